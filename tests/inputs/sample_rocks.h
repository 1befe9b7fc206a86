// Two rock types in the rock-library schema, shared by the input tests (test values, no source).
#pragma once

#include <string>

namespace ember::testing
{

/// The `rocks:` list items, indented for a top-level `rocks:` key.
inline const std::string kSampleRockList = R"(  - name: shale
    density: 2450
    conductivity: {law: vosteen-schellschmidt, at_25C: 1.8, class: sedimentary}
    heat_capacity: {law: waples-waples, at_20C: 850}
    heat_production: 1.5
    source: test value
  - name: dolerite
    density: 2900
    conductivity: {law: zoth-haenel, A: 1.18, B: 474}
    heat_capacity: 1000
    latent_heat: 400000
    solidus: 980
    liquidus: 1150
)";

} // namespace ember::testing
