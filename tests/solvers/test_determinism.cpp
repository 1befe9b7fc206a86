// Results are bitwise identical for any thread count (DEVELOPERS.md, determinism rule).
#include "test_support.h"

#include "ember/integrators.h"

#include <gtest/gtest.h>

#include <cstring>

using namespace ember;
using namespace ember::testing;

namespace
{
SimulationResult run(int threads, IntegratorKind kind)
{
  Mesh mesh = make_box_hex({ 0, 0, -12 }, { 24, 24, 0 }, { 24, 24, 12 });
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    const auto& p = mesh.points[mesh.nodes(c)[0]];
    if (p[2] < -5 && p[2] >= -7 && p[0] > 4 && p[0] < 18)
      mesh.cell_region[c] = 1;
  }
  Rock host = simple_rock("host", 2.5, 2500, 900);
  host.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  host.heat_capacity.law = HeatCapacity::Law::WaplesWaples;
  Rock sill = simple_rock("sill", 2.2, 2900, 1100);
  sill.latent_heat = 4e5;
  sill.solidus = 980;
  sill.liquidus = 1150;
  ThermalModel model(mesh, { host, sill }, std::vector<int>(mesh.n_cells(), 0));
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::RadiationConvection;
  top.transfer_coefficient = 10;
  SimulationSettings s;
  s.output_times = { 0.02 * kSecondsPerYear, 0.1 * kSecondsPerYear };
  s.threads = threads;
  const auto integrator = make_integrator(kind);
  return simulate(model, { top }, { InitialState::Kind::Geotherm, 10, 0.03, 0 },
    { { 1, 1, 0.01 * kSecondsPerYear, 1150 } }, s, *integrator);
}
} // namespace

TEST(Determinism, BitwiseIdenticalForOneTwoAndThreeThreads)
{
  for (IntegratorKind kind : { IntegratorKind::ForwardEuler, IntegratorKind::RKL2 })
  {
    const SimulationResult one = run(1, kind);
    ASSERT_GT(one.steps, 5u);
    for (int threads : { 2, 3 })
    {
      const SimulationResult other = run(threads, kind);
      ASSERT_EQ(one.snapshots.size(), other.snapshots.size());
      for (std::size_t k = 0; k < one.snapshots.size(); ++k)
      {
        const auto& a = one.snapshots[k].temperature;
        const auto& b = other.snapshots[k].temperature;
        ASSERT_EQ(a.size(), b.size());
        EXPECT_EQ(0, std::memcmp(a.data(), b.data(), a.size() * sizeof(double)))
          << integrator_name(kind) << ", " << threads << " threads, snapshot " << k;
      }
      EXPECT_EQ(one.ledger.boundary, other.ledger.boundary);
      EXPECT_EQ(one.ledger.emplaced, other.ledger.emplaced);
    }
  }
}
