// Reading scenario files: values reach the core in SI, the rocks and regions re-emit in their own
// schemas, and every class of bad input names file, line, column, key and what is allowed.
// (Input-handling tests: no published source is involved.)
#include "ember/inputs/scenario.h"
#include "sample_rocks.h"

#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <numbers>

using namespace ember;
using namespace ember::inputs;

namespace
{
const std::string kScenario = R"(format: 1
title: test basin
domain:
  x: [-1000, 1000]
  y: [-500, 500]
  depth: 2000
mesh: {cell_size: 100, cells_across: 8}
rocks:
)" + ember::testing::kSampleRockList + R"(layers:
  - {name: Upper shale, rock: shale, top: 0}
  - {name: Deep dolerite, rock: dolerite, top: 1500}
bodies:
  - name: Sill A
    type: sill
    rock: dolerite
    temperature: 1150
    time: 100
    centre: [0, 0]
    depth: 800
    radius: 400
    thickness: 20
  - name: Dike B
    type: dike
    rock: dolerite
    temperature: 1100
    centre: [-500, 0]
    depth: 1000
    strike: 0
    dip: 90
    width: 10
    length: 600
    height: 800
initial: {kind: geotherm, surface_temperature: 10, gradient: 30}
boundaries:
  top: {kind: fixed_temperature, temperature: 10}
  bottom: {kind: heat_flow, heat_flow: 60}
run:
  end: 10000
  outputs: {first: 1, count: 5}
  integrator: forward-euler
  threads: 2
  arrays: [Temperature, MeltFraction]
)";

std::string replaced(std::string text, const std::string& from, const std::string& to)
{
  const auto at = text.find(from);
  if (at == std::string::npos)
    throw std::logic_error("test text lacks '" + from + "'");
  return text.replace(at, from.size(), to);
}

/// 1-based line of the first line containing `needle`.
int line_of(const std::string& text, const std::string& needle)
{
  const auto at = text.find(needle);
  return 1 + static_cast<int>(std::count(text.begin(), text.begin() + at, '\n'));
}

Scenario parse(const std::string& text) { return parse_scenario(load_yaml_text(text, "s.yaml"), "s.yaml"); }

std::string error_of(const std::string& text)
{
  try
  {
    parse(text);
  }
  catch (const InputError& e)
  {
    return e.what();
  }
  return "no error";
}

/// The error starts with "s.yaml:LINE:" where LINE holds `needle` in `text`, and contains `parts`.
void expect_error(const std::string& text, const std::string& needle,
  std::initializer_list<std::string> parts)
{
  const std::string e = error_of(text);
  EXPECT_EQ(e.rfind("s.yaml:" + std::to_string(line_of(text, needle)) + ":", 0), 0u) << e;
  for (const auto& p : parts)
    EXPECT_NE(e.find(p), std::string::npos) << "missing '" << p << "' in: " << e;
}
} // namespace

TEST(Scenario, ReadsEverythingInCoreUnits)
{
  const Scenario s = parse(kScenario);
  EXPECT_EQ(s.title, "test basin");
  EXPECT_DOUBLE_EQ(s.domain.bottom, -2000.0);
  ASSERT_EQ(s.layers.size(), 2u);
  EXPECT_DOUBLE_EQ(s.layers[1].z_top, -1500.0);
  EXPECT_EQ(s.layer_at(-1499.0), 0u);
  EXPECT_EQ(s.layer_at(-1501.0), 1u);
  ASSERT_EQ(s.bodies.size(), 2u);
  const Body& sill = s.bodies[0];
  EXPECT_EQ(sill.region, 2);
  EXPECT_DOUBLE_EQ(sill.time, 100 * kSecondsPerYear);
  EXPECT_EQ(sill.replaces, 0); // emplaced later: holds the shale of its layer before then
  EXPECT_DOUBLE_EQ(std::get<Sill>(sill.shape).z, -800.0);
  EXPECT_EQ(s.bodies[1].replaces, 1); // present from the start: its own rock
  EXPECT_DOUBLE_EQ(std::get<Dike>(s.bodies[1].shape).dip, std::numbers::pi / 2);
  EXPECT_DOUBLE_EQ(s.initial.gradient, 0.03); // K/km → K/m
  ASSERT_EQ(s.boundaries.size(), 3u);
  EXPECT_DOUBLE_EQ(s.boundaries[1].heat_flux, 0.06); // mW/m² → W/m²
  EXPECT_EQ(s.boundaries[2].kind, BoundaryCondition::Kind::Insulated); // sides default
  ASSERT_EQ(s.output_times.size(), 5u);
  EXPECT_DOUBLE_EQ(s.output_times[0], kSecondsPerYear);
  EXPECT_NEAR(s.output_times[1], 10 * kSecondsPerYear, 1e-6); // log-spaced 1, 10, ..., 1e4
  EXPECT_EQ(s.output_times.back(), s.end_time);
  EXPECT_EQ(s.integrator, IntegratorKind::ForwardEuler);
  EXPECT_EQ(s.settings().threads, 2);
  EXPECT_EQ(s.arrays, (std::vector<std::string>{ "Temperature", "MeltFraction" }));
  ASSERT_EQ(s.emplacements().size(), 2u);
  EXPECT_EQ(s.emplacements()[0].region, 2);
}

TEST(Scenario, SteadyInitialStateSetsTheBasalHeatFlow)
{
  std::string text = replaced(kScenario, "{kind: geotherm, surface_temperature: 10, gradient: 30}",
    "{kind: steady, basal_heat_flow: 70}");
  text = replaced(text, "  bottom: {kind: heat_flow, heat_flow: 60}\n", "");
  const Scenario s = parse(text);
  EXPECT_EQ(s.initial.kind, InitialState::Kind::SteadyState);
  EXPECT_EQ(s.boundaries[1].kind, BoundaryCondition::Kind::HeatFlux);
  EXPECT_DOUBLE_EQ(s.boundaries[1].heat_flux, 0.07);
  // Given twice is ambiguous; a radiating top cannot be solved for steady state.
  expect_error(replaced(kScenario, "{kind: geotherm, surface_temperature: 10, gradient: 30}",
                 "{kind: steady, basal_heat_flow: 70}"),
    "bottom: {kind", { "boundaries.bottom:", "remove one" });
  expect_error(replaced(text, "{kind: fixed_temperature, temperature: 10}",
                 "{kind: radiation, sky_temperature: -20}"),
    "top: {kind: rad", { "boundaries.top", "fixed_temperature or convection" });
}

TEST(Scenario, RocksAndRegionsReEmitInTheirOwnSchemas)
{
  const Scenario s = parse(kScenario);
  const RockLibrary lib =
    parse_rock_library(load_yaml_text(rock_library_yaml(s), "emitted rocks"), { "emitted rocks", "" });
  ASSERT_EQ(lib.rocks.size(), s.library.rocks.size());
  for (std::size_t i = 0; i < lib.rocks.size(); ++i)
  {
    const Rock &a = lib.rocks[i], &b = s.library.rocks[i];
    EXPECT_EQ(a.name, b.name);
    EXPECT_EQ(a.density, b.density);
    EXPECT_EQ(a.conductivity.law, b.conductivity.law);
    EXPECT_EQ(a.conductivity.k_ref, b.conductivity.k_ref);
    EXPECT_EQ(a.conductivity.crystalline, b.conductivity.crystalline);
    EXPECT_EQ(a.conductivity.a, b.conductivity.a);
    EXPECT_EQ(a.conductivity.b, b.conductivity.b);
    EXPECT_EQ(a.conductivity.k_min, b.conductivity.k_min);
    EXPECT_EQ(a.heat_capacity.law, b.heat_capacity.law);
    EXPECT_EQ(a.heat_capacity.c_ref, b.heat_capacity.c_ref);
    EXPECT_EQ(a.latent_heat, b.latent_heat);
    EXPECT_EQ(a.solidus, b.solidus);
    EXPECT_EQ(a.liquidus, b.liquidus);
    EXPECT_DOUBLE_EQ(a.heat_production, b.heat_production); // through µW/m³ and back: 4 ulp
    EXPECT_EQ(a.emissivity, b.emissivity);
    EXPECT_EQ(lib.sources[i], s.library.sources[i]);
  }
  const RegionMap map = parse_region_map(
    load_yaml_text(region_map_yaml(s), "emitted regions"), lib, { "emitted regions", "" });
  ASSERT_EQ(map.regions.size(), s.regions.regions.size());
  for (std::size_t i = 0; i < map.regions.size(); ++i)
  {
    const RegionEntry &a = map.regions[i], &b = s.regions.regions[i];
    EXPECT_EQ(a.id, b.id);
    EXPECT_EQ(a.name, b.name);
    EXPECT_EQ(a.rock, b.rock);
    ASSERT_EQ(a.intrusion.has_value(), b.intrusion.has_value());
    if (a.intrusion)
    {
      EXPECT_EQ(a.intrusion->temperature, b.intrusion->temperature);
      EXPECT_DOUBLE_EQ(a.intrusion->time, b.intrusion->time); // through years and back: 4 ulp
      EXPECT_EQ(a.intrusion->replaces, b.intrusion->replaces);
    }
  }
}

TEST(Scenario, RockLibraryPathIsRelativeToTheScenarioFile)
{
  const auto dir = std::filesystem::temp_directory_path() / "ember_test_scenario";
  std::filesystem::create_directories(dir / "lib");
  std::ofstream(dir / "lib" / "rocks.yaml") << "format: 1\nrocks:\n" << ember::testing::kSampleRockList;
  std::string text = kScenario.substr(0, kScenario.find("rocks:\n")) + "rocks: lib/rocks.yaml\n" +
    kScenario.substr(kScenario.find("layers:"));
  std::ofstream(dir / "scenario.yaml") << text;
  const Scenario s = load_scenario((dir / "scenario.yaml").string());
  EXPECT_EQ(s.library.rocks.size(), 2u);
  EXPECT_EQ(s.library_file, (dir / "lib" / "rocks.yaml").string());
  std::ofstream(dir / "scenario.yaml") << replaced(text, "lib/rocks.yaml", "lib/rock.yaml");
  try
  {
    load_scenario((dir / "scenario.yaml").string());
    FAIL() << "no error";
  }
  catch (const InputError& e)
  {
    EXPECT_NE(std::string(e.what()).find("scenario.yaml:8:8: rocks: cannot read the rock library"),
      std::string::npos) << e.what();
  }
  std::filesystem::remove_all(dir);
}

// One test per class of error, each checking position, key and what is allowed.

TEST(ScenarioErrors, UnknownKeyTypo)
{
  expect_error(replaced(kScenario, "    radius: 400", "    raduis: 400"), "raduis",
    { "bodies[0].raduis: unknown key", "radius", "thickness", "saucer" });
  expect_error(replaced(kScenario, "title:", "titel:"), "titel", { "titel: unknown key (allowed here: format, title" });
}

TEST(ScenarioErrors, MissingKey)
{
  expect_error(replaced(kScenario, "    thickness: 20\n", ""), "  - name: Sill A",
    { "bodies[0]: missing required key 'thickness'" });
  expect_error(replaced(kScenario, "  depth: 2000\n", ""), "  x: [-1000", { "domain: missing required key 'depth'" });
}

TEST(ScenarioErrors, WrongType)
{
  expect_error(replaced(kScenario, "radius: 400", "radius: wide"), "radius: wide",
    { "bodies[0].radius: expected a finite number, found 'wide'" });
  expect_error(replaced(kScenario, "x: [-1000, 1000]", "x: 1000"), "x: 1000",
    { "domain.x: expected a list of two numbers" });
  expect_error(replaced(kScenario, "threads: 2", "threads: two"), "threads: two",
    { "run.threads: expected an integer" });
}

TEST(ScenarioErrors, UnknownRockName)
{
  expect_error(replaced(kScenario, "    rock: dolerite\n    temperature: 1150", "    rock: gabbro\n    temperature: 1150"),
    "rock: gabbro", { "bodies[0].rock: rock type 'gabbro' is not in the rock library (it has: 'shale', 'dolerite')" });
  expect_error(replaced(kScenario, "rock: shale, top: 0", "rock: slate, top: 0"), "rock: slate",
    { "layers[0].rock: rock type 'slate'" });
}

TEST(ScenarioErrors, BodyOutsideTheDomain)
{
  expect_error(replaced(kScenario, "    radius: 400", "    radius: 900"), "  - name: Sill A",
    { "bodies[0]: the sill reaches outside the domain: its y extent [-900, 900] m is not within "
      "the domain's [-500, 500] m" });
  expect_error(replaced(kScenario, "    height: 800", "    height: 2400"), "  - name: Dike B",
    { "bodies[1]: the dike reaches outside the domain: its depth extent [-200, 2200] m" });
}

TEST(ScenarioErrors, NegativeThickness)
{
  expect_error(replaced(kScenario, "thickness: 20", "thickness: -20"), "thickness: -20",
    { "bodies[0].thickness: must be > 0, found -20" });
  expect_error(replaced(kScenario, "width: 10", "width: 0"), "width: 0", { "bodies[1].width: must be > 0" });
}

TEST(ScenarioErrors, NonIncreasingOutputList)
{
  expect_error(replaced(kScenario, "{first: 1, count: 5}", "[1, 10, 10, 100]"), "outputs: [",
    { "run.outputs[2]: output times must increase strictly", "allowed here: 10" });
  expect_error(replaced(kScenario, "{first: 1, count: 5}", "[1, 20000]"), "outputs: [",
    { "run.outputs[1]:", "not pass run.end" });
}

TEST(ScenarioErrors, BadBoundaryKind)
{
  expect_error(replaced(kScenario, "kind: heat_flow, heat_flow: 60", "kind: flux, heat_flow: 60"),
    "kind: flux", { "boundaries.bottom.kind: 'flux' is not a boundary kind (allowed: insulated, "
                    "fixed_temperature, heat_flow, radiation, convection, radiation_convection)" });
  expect_error(replaced(kScenario, "{kind: heat_flow, heat_flow: 60}", "{kind: convection, transfer_coefficient: 5}"),
    "kind: convection", { "boundaries.bottom: missing required key 'fluid_temperature'" });
  expect_error(replaced(kScenario, "  bottom: {kind: heat_flow, heat_flow: 60}",
                 "  bottom: {kind: radiation, sky_temperature: 0, emissivity: 2}"),
    "emissivity: 2", { "boundaries.bottom:", "emissivity" });
}

TEST(ScenarioErrors, UnknownBodyType)
{
  expect_error(replaced(kScenario, "type: sill", "type: laccolith"), "type: laccolith",
    { "bodies[0].type: 'laccolith' is not a body type (allowed: sill, dike, pluton, lava_flow)" });
}

TEST(ScenarioErrors, UnsupportedFormat)
{
  expect_error(replaced(kScenario, "format: 1", "format: 2"), "format: 2",
    { "format: format 2 is not supported (this version reads format 1)" });
}

TEST(ScenarioErrors, OtherChecks)
{
  expect_error(replaced(kScenario, "top: 1500", "top: 2500"), "top: 2500", { "layers[1].top: layer tops must increase" });
  expect_error(replaced(kScenario, "name: Dike B", "name: Sill A"), "name: Sill A\n    type: dike",
    { "bodies[1].name: the name 'Sill A' is already used" });
  expect_error(replaced(kScenario, "integrator: forward-euler", "integrator: rk4"), "rk4",
    { "run.integrator: 'rk4' is not an integrator (allowed: rkl2, forward-euler)" });
  expect_error(replaced(kScenario, "kind: geotherm", "kind: linear"), "kind: linear",
    { "initial.kind: 'linear' is not an initial state (allowed: uniform, geotherm, steady)" });
  expect_error(replaced(kScenario, "dip: 90", "dip: 120"), "dip: 120", { "bodies[1].dip: angle in degrees must lie in [0, 90]" });
  expect_error(replaced(kScenario, "    thickness: 20\n", "    thickness: 20\n    saucer: {inner_radius: 100}\n"),
    "saucer:", { "bodies[0].saucer: give exactly one of 'inclination' (degrees) or 'rim_rise' (m)" });
  expect_error(replaced(kScenario, "  - name: Dike B\n",
                 "  - {name: Flow, type: lava_flow, rock: dolerite, temperature: 1150, time: 5,\n"
                 "     thickness: 4, outline: [[0, 0], [100, 0], [0, 100]]}\n  - name: Dike B\n"),
    "time: 5", { "bodies[1].time: a lava flow standing on the ground must be emplaced at time 0" });
}
