// Every rejected input names the problem and where it is.
#include "ember/simulation.h"

#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <string>

using namespace ember;

namespace
{
Rock good()
{
  Rock r;
  r.name = "sandstone";
  return r;
}

void expect_message(const std::function<void()>& f, const std::string& part1,
  const std::string& part2 = "")
{
  try
  {
    f();
    FAIL() << "no exception; expected one mentioning '" << part1 << "'";
  }
  catch (const std::exception& e)
  {
    const std::string what = e.what();
    EXPECT_NE(what.find(part1), std::string::npos) << what;
    EXPECT_NE(what.find(part2), std::string::npos) << what;
  }
}
} // namespace

TEST(BadInput, NegativeOrNanProperties)
{
  Rock r = good();
  r.density = -1;
  expect_message([&] { validate(r); }, "sandstone", "density");
  r = good();
  r.conductivity.k_ref = NAN;
  expect_message([&] { validate(r); }, "sandstone", "conductivity");
  r = good();
  r.heat_capacity.c_ref = 0;
  expect_message([&] { validate(r); }, "sandstone", "heat_capacity");
  r = good();
  r.heat_production = -1e-6;
  expect_message([&] { validate(r); }, "sandstone", "heat_production");
}

TEST(BadInput, SolidusAboveLiquidus)
{
  Rock r = good();
  r.latent_heat = 4e5;
  r.solidus = 1200;
  r.liquidus = 1100;
  expect_message([&] { validate(r); }, "sandstone", "solidus");
}

TEST(BadInput, EmissivityOutsideUnitInterval)
{
  Rock r = good();
  r.emissivity = 1.2;
  expect_message([&] { validate(r); }, "sandstone", "emissivity");
  BoundaryCondition bc;
  bc.kind = BoundaryCondition::Kind::Radiation;
  bc.emissivity = 1.5;
  expect_message([&] { validate(bc, 3); }, "boundary condition 3", "emissivity");
}

TEST(BadInput, RegionWithoutRockType)
{
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 2, 1, 1 }, { 2, 1, 1 });
  mesh.cell_region[1] = 7;
  expect_message([&] { ThermalModel(mesh, { good() }, { 0, -1 }); }, "cell 1", "region 7");
}

TEST(BadInput, TooManyRockTypes)
{
  // The model keeps each node share's rock in one byte.
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 2, 1, 1 }, { 2, 1, 1 });
  expect_message([&] { ThermalModel(mesh, std::vector<Rock>(257, good()), { 0, 256 }); },
    "257 rock types", "at most 256");
  EXPECT_NO_THROW(ThermalModel(mesh, std::vector<Rock>(256, good()), { 0, 255 }));
}

TEST(BadInput, InvertedCellIsNamed)
{
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 3, 1, 1 }, { 3, 1, 1 });
  std::swap(mesh.cell_nodes[mesh.cell_offsets[2] + 0], mesh.cell_nodes[mesh.cell_offsets[2] + 4]);
  expect_message([&] { ThermalModel(mesh, { good() }, { 0, 0, 0 }); }, "2");
}

TEST(BadInput, OutputTimesMustIncreaseAndEndAfterStart)
{
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 1, 1, 1 }, { 1, 1, 1 });
  ThermalModel model(mesh, { good() }, { 0 });
  ForwardEuler fe;
  SimulationSettings s;
  s.output_times = { 2 * kSecondsPerYear, 1 * kSecondsPerYear };
  expect_message([&] { simulate(model, {}, {}, {}, s, fe); }, "out of order", "entry 1");
  s.output_times = { -kSecondsPerYear };
  expect_message([&] { simulate(model, {}, {}, {}, s, fe); }, "after the start");
}

TEST(BadInput, EmplacementOfMissingRegion)
{
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 1, 1, 1 }, { 1, 1, 1 });
  ThermalModel model(mesh, { good() }, { 0 });
  ForwardEuler fe;
  SimulationSettings s;
  s.output_times = { kSecondsPerYear };
  expect_message([&] { simulate(model, {}, {}, { { 5, 0, 0.0, 1000.0 } }, s, fe); }, "region 5");
}

// A temperature outside the physical range stops the run, naming node, step and time.
TEST(BadInput, GuardStopsNonPhysicalState)
{
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 1, 1, 1 }, { 1, 1, 1 });
  Rock hot = good();
  hot.heat_production = 1e3; // absurd: heats past the guard within a few years
  ThermalModel model(mesh, { hot }, { 0 });
  ForwardEuler fe;
  SimulationSettings s;
  s.output_times = { 1e3 * kSecondsPerYear };
  expect_message([&] { simulate(model, {}, {}, {}, s, fe); }, "node 0", "step");
}
