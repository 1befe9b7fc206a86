// Private to scenario*.cpp: pieces of the scenario reader shared between its files.
#pragma once

#include "ember/inputs/scenario.h"

namespace ember::inputs::detail
{

/// A two-number list [a, b].
std::array<double, 2> number_pair(const YAML::Node& node, const YamlContext& ctx);
/// Required key holding a number > 0.
double positive(const YAML::Node& map, const char* key, const YamlContext& ctx);
/// Optional key holding an angle in degrees within [lo, hi]; returned in radians.
double angle_or(const YAML::Node& map, const char* key, double fallback_deg, double lo, double hi,
  const YamlContext& ctx);

/// Read bodies[i]; `scenario` already holds the domain, library and layers.
Body parse_body(const YAML::Node& node, const YamlContext& ctx, const Scenario& scenario);

} // namespace ember::inputs::detail
