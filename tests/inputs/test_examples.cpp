// The shipped example scenarios parse, build at a coarse resolution in well under a second, and
// hold the regions and volumes they describe. (Geometry checks: formulas computed here.)
#include "ember/inputs/model_builder.h"
#include "volume_check.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <set>

using namespace ember;
using namespace ember::inputs;

namespace
{
/// Coarse: half the resolution written in the file (4 cells across each body).
constexpr double kCoarse = 0.5;

Scenario example(const std::string& name)
{
  Scenario s = load_scenario(std::string(EMBERLITH_EXAMPLE_DATA) + "/" + name + "/scenario.yaml");
  s.mesh.resolution = kCoarse;
  return s;
}

double box_volume(const Domain& d)
{
  return (d.x[1] - d.x[0]) * (d.y[1] - d.y[0]) * (d.top - d.bottom);
}

/// The emitted rock library and region map re-read cleanly and set up the core for the built
/// mesh as the scenario says (the runner's path through the property-assignment filter).
void expect_reemits(const Scenario& s, const BuiltModel& m)
{
  const RockLibrary lib = parse_rock_library(load_yaml_text(rock_library_yaml(s), "rocks"), { "rocks", "" });
  const RegionMap map = parse_region_map(load_yaml_text(region_map_yaml(s), "regions"), lib, { "regions", "" });
  EXPECT_EQ(lib.rocks.size(), s.library.rocks.size());
  EXPECT_EQ(map.regions.size(), s.regions.regions.size());
  const ModelSetup setup = make_model_setup(lib, map, m.mesh.cell_region);
  ASSERT_EQ(setup.emplacements.size(), s.bodies.size());
  for (std::size_t b = 0; b < s.bodies.size(); ++b)
  {
    EXPECT_EQ(setup.emplacements[b].region, s.bodies[b].region);
    EXPECT_DOUBLE_EQ(setup.emplacements[b].time, s.bodies[b].time);
  }
  for (std::size_t c = 0; c < m.mesh.n_cells(); ++c)
  {
    const RegionEntry& r = *s.regions.find(m.mesh.cell_region[c]);
    ASSERT_EQ(setup.cell_rock[c], r.intrusion ? r.intrusion->replaces : r.rock) << "cell " << c;
  }
}
} // namespace

TEST(Examples, SillBasin)
{
  const Scenario s = example("sill-basin");
  ASSERT_EQ(s.layers.size(), 4u);
  ASSERT_EQ(s.bodies.size(), 3u);
  std::set<double> times;
  for (const Body& b : s.bodies)
    times.insert(b.time);
  EXPECT_EQ(times.size(), 3u); // three sills, three emplacement times
  for (std::size_t i = 0; i < s.library.rocks.size(); ++i)
    EXPECT_FALSE(s.library.sources[i].empty()) << s.library.rocks[i].name;
  const BuiltModel m = build_model(s);
  expect_reemits(s, m);
  const ModelSummary summary = describe(s, m);
  ASSERT_EQ(summary.regions.size(), 7u);
  double total = 0.0;
  for (const RegionCells& r : summary.regions)
  {
    EXPECT_GT(r.cells, 0u) << r.name;
    total += r.volume;
  }
  EXPECT_NEAR(total, box_volume(s.domain), 1e-9 * total); // no air: the cells fill the box
  for (std::size_t b = 0; b < s.bodies.size(); ++b)
    ember::testing::expect_volume(s, m, ember::testing::sheet_shadow(s.bodies[b].shape), s.bodies[b].name.c_str(), b);
  EXPECT_GT(summary.stable_time_step, 0.0);
  EXPECT_LT(summary.cells, 200000u);
}

TEST(Examples, LavaFlow)
{
  const Scenario s = example("lava-flow");
  ASSERT_EQ(s.layers.size(), 1u);
  ASSERT_EQ(s.bodies.size(), 1u);
  EXPECT_EQ(s.boundaries[0].kind, BoundaryCondition::Kind::RadiationConvection);
  const BuiltModel m = build_model(s);
  expect_reemits(s, m);
  const ModelSummary summary = describe(s, m);
  ASSERT_EQ(summary.regions.size(), 2u);
  // The ground fills the box below the surface; the flow stands above it.
  EXPECT_NEAR(summary.regions[0].volume, box_volume(s.domain), 1e-9 * box_volume(s.domain));
  ember::testing::expect_volume(s, m, ember::testing::sheet_shadow(s.bodies[0].shape), "Taldrun flow");
  EXPECT_GT(summary.stable_time_step, 0.0);
}

TEST(Examples, DocumentedScenarioParsesAndBuilds)
{
  // The fully commented example of docs/scenario-format.md, with the examples' rock library.
  const std::string doc = read_text_file(std::string(EMBERLITH_SOURCE_DIR) + "/docs/scenario-format.md");
  const auto start = doc.rfind("```yaml\n", doc.find("title: Example basin"));
  ASSERT_NE(start, std::string::npos);
  std::string text = doc.substr(start + 8, doc.find("```", start + 8) - start - 8);
  const std::string rocks = "rocks: ../rocks.yaml";
  text.replace(text.find(rocks), rocks.size(), "rocks: " + std::string(EMBERLITH_EXAMPLE_DATA) + "/rocks.yaml");
  Scenario s = parse_scenario(load_yaml_text(text, "doc example"), "doc example");
  EXPECT_EQ(s.bodies.size(), 4u);
  EXPECT_EQ(s.initial.kind, InitialState::Kind::SteadyState);
  s.mesh.resolution = 0.25;
  const BuiltModel m = build_model(s);
  EXPECT_EQ(describe(s, m, false).regions.size(), 6u);
}

// The examples run through the core as the runner will drive it (forward Euler, first output
// only, coarsest resolution): emplacement, radiation and the steady initial state work on the
// built meshes, and energy balances (the ledger's identity holds to round-off; 1e-9 relative
// is far above accumulated round-off for a few steps, far below any modelling error).
TEST(Examples, CoarseModelsRunTheirFirstOutput)
{
  for (const char* name : { "lava-flow", "sill-basin" })
  {
    Scenario s = example(name);
    s.mesh.resolution = 0.25;
    const BuiltModel m = build_model(s);
    const RockLibrary lib = parse_rock_library(load_yaml_text(rock_library_yaml(s), "rocks"), { "rocks", "" });
    const RegionMap map = parse_region_map(load_yaml_text(region_map_yaml(s), "regions"), lib, { "regions", "" });
    const ModelSetup setup = make_model_setup(lib, map, m.mesh.cell_region);
    ThermalModel model(m.mesh, setup.rocks, setup.cell_rock);
    SimulationSettings settings = s.settings();
    settings.output_times.resize(1);
    ForwardEuler euler;
    const SimulationResult result =
      simulate(model, s.boundaries, s.initial, setup.emplacements, settings, euler);
    ASSERT_EQ(result.snapshots.size(), 1u) << name;
    EXPECT_LT(std::abs(result.ledger.relative_imbalance()), 1e-9) << name;
    const auto& T = result.snapshots[0].temperature;
    const double hottest = *std::max_element(T.begin(), T.end());
    EXPECT_GT(hottest, 900.0) << name;   // the bodies are still hot
    EXPECT_LE(hottest, 1150.0) << name;  // and nothing exceeds their emplacement temperature
    std::printf("%s: %zu steps to %.3g years, hottest node %.1f °C\n", name, result.steps,
      settings.output_times[0] / kSecondsPerYear, hottest);
  }
}
