// Conservation and monotonicity properties of the discrete heat operator.
#include "test_support.h"

#include "ember/integrators.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <numeric>

using namespace ember;
using namespace ember::testing;

namespace
{
// Heterogeneous model: Waples c(T), Vosteen–Schellschmidt k(T), a latent-heat body.
ThermalModel heterogeneous(const Mesh& mesh)
{
  Rock shale = simple_rock("shale", 1.8, 2500, 900);
  shale.heat_capacity.law = HeatCapacity::Law::WaplesWaples;
  shale.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  shale.conductivity.crystalline = false;
  Rock dolerite = simple_rock("dolerite", 2.2, 2900, 1100);
  dolerite.latent_heat = 4e5;
  dolerite.solidus = 980;
  dolerite.liquidus = 1150;
  std::vector<int> rock(mesh.n_cells(), 0);
  return ThermalModel(mesh, { shale, dolerite }, rock);
}

void mark_middle(Mesh& mesh)
{
  mark_layer(mesh, 3, 5);
}
} // namespace

// verification.md §11.1: an insulated closed domain keeps its heat content; with the enthalpy
// formulation this holds to round-off (tolerance 1e-8 relative there; we ask 1e-11), for
// either integrator.
TEST(Operator, InsulatedHeterogeneousModelConservesEnergy)
{
  for (IntegratorKind kind : { IntegratorKind::ForwardEuler, IntegratorKind::RKL2 })
    for (bool tets : { false, true })
    {
      Mesh mesh = tets ? make_box_tet({ 0, 0, 0 }, { 4, 3, 8 }, { 4, 3, 8 })
                       : make_box_hex({ 0, 0, 0 }, { 4, 3, 8 }, { 4, 3, 8 });
      mark_middle(mesh);
      ThermalModel model = heterogeneous(mesh);
      const auto integrator = make_integrator(kind);
      SimulationSettings s;
      s.output_times = log_times(0.05 * kSecondsPerYear, 5 * kSecondsPerYear, 5);
      const auto result = simulate(model, {}, { InitialState::Kind::Uniform, 50.0 },
        { { 1, 1, 0.0, 1200.0 } }, s, *integrator);
      EXPECT_LT(std::abs(result.ledger.stored_change), 1e-11 * result.ledger.initial)
        << (tets ? "tets " : "hexes ") << integrator_name(kind);
      // melt fractions stay in [0, 1] and some melt crystallised
      for (double f : result.snapshots.back().melt_fraction)
        EXPECT_TRUE(f >= 0 && f <= 1);
    }
}

// verification.md §11.2: with heat production A, uniform T and insulated faces,
// T = T0 + A t/(ρc), and the ledger books the source heat exactly (either integrator: the
// solution is linear in t, so both are exact up to round-off).
TEST(Operator, UniformSourceHeatsUniformly)
{
  for (IntegratorKind kind : { IntegratorKind::ForwardEuler, IntegratorKind::RKL2 })
  {
    Mesh mesh = make_box_tet({ 0, 0, 0 }, { 3, 2, 2 }, { 3, 2, 2 });
    Rock r = simple_rock("granite", 3.0, 2700, 800);
    r.heat_production = 3e-6;
    ThermalModel model(mesh, { r }, std::vector<int>(mesh.n_cells(), 0));
    const auto integrator = make_integrator(kind);
    SimulationSettings s;
    s.output_times = { 10 * kSecondsPerYear };
    const auto result =
      simulate(model, {}, { InitialState::Kind::Uniform, 20.0 }, {}, s, *integrator);
    const double expected = 20.0 + 3e-6 * 10 * kSecondsPerYear / (2700 * 800);
    for (double T : result.snapshots.back().temperature)
      EXPECT_NEAR(T, expected, 1e-9 * expected) << integrator_name(kind);
    EXPECT_LT(std::abs(result.ledger.relative_imbalance()), 1e-12) << integrator_name(kind);
  }
}

// An emplacement can bring the model its first heat source: after refresh() the rate at a
// uniform temperature is each node's source and sums to A × the body's volume (the operator
// skips reading sources while no node has one, so it must notice).
TEST(Operator, RefreshPicksUpTheFirstHeatSource)
{
  Mesh mesh = make_box_tet({ 0, 0, 0 }, { 3, 2, 2 }, { 3, 2, 2 });
  const Rock host = simple_rock("shale", 2.0, 2500, 900);
  Rock granite = simple_rock("granite", 3.0, 2700, 800);
  granite.heat_production = 3e-6;
  ThermalModel model(mesh, { host, granite }, std::vector<int>(mesh.n_cells(), 0));
  HeatOperator op(model, {});
  ASSERT_FALSE(op.has_sources());
  tbb::task_arena arena(2);
  const std::vector<double> T(mesh.n_points(), 20.0);
  std::vector<double> rate;
  PowerTally tally;
  op.rate(T, rate, tally, arena);
  for (double r : rate)
    ASSERT_EQ(r, 0.0);
  std::vector<std::int64_t> all(mesh.n_cells());
  std::iota(all.begin(), all.end(), 0);
  model.set_cell_rock(all, 1);
  op.refresh();
  ASSERT_TRUE(op.has_sources());
  op.rate(T, rate, tally, arena);
  double total = 0.0;
  for (std::size_t i = 0; i < rate.size(); ++i)
  {
    EXPECT_NEAR(rate[i], model.node_source(i), 1e-15) << "node " << i;
    total += rate[i];
  }
  EXPECT_NEAR(total, 3e-6 * 3 * 2 * 2, 1e-15);
  EXPECT_NEAR(tally.source, 3e-6 * 3 * 2 * 2, 1e-15);
}

// verification.md §11 (DMP): lumped Q1 on cubes has non-positive off-diagonals, so an explicit
// step within the bound keeps every T inside the initial range: the §2 sheet with its
// discontinuous start, and a latent-heat version.
TEST(Operator, DiscreteMaximumPrincipleOnCubes)
{
  for (double latent : { 0.0, 4e5 })
  {
    Mesh mesh = make_box_hex({ 0, 0, 0 }, { 4, 4, 8 }, { 4, 4, 16 });
    mark_middle(mesh);
    ThermalModel model = heterogeneous(mesh);
    std::vector<Rock> rocks = model.rocks();
    rocks[1].latent_heat = latent;
    ThermalModel m2(mesh, rocks, model.cell_rock());
    ForwardEuler fe;
    SimulationSettings s;
    s.output_times = log_times(0.01 * kSecondsPerYear, 2 * kSecondsPerYear, 30);
    const auto result =
      simulate(m2, {}, { InitialState::Kind::Uniform, 50.0 }, { { 1, 1, 0.0, 1150.0 } }, s, fe);
    for (const Snapshot& snap : result.snapshots)
      for (double T : snap.temperature)
      {
        EXPECT_GE(T, 50.0 - 1e-10);
        EXPECT_LE(T, 1150.0 + 1e-10);
      }
  }
}

// Open boundaries: stored-heat change equals the booked boundary heat (§11.3) to round-off,
// for either integrator (RKL2 books each stage's boundary heat with that stage's weight).
TEST(Operator, LedgerBalancesWithRadiationConvectionAndFixedBase)
{
  for (IntegratorKind kind : { IntegratorKind::ForwardEuler, IntegratorKind::RKL2 })
  {
    Mesh mesh = make_box_hex({ 0, 0, -6 }, { 3, 3, 0 }, { 3, 3, 6 });
    ThermalModel model(mesh, { simple_rock("basalt", 2.0, 2800, 1000) },
      std::vector<int>(mesh.n_cells(), 0));
    BoundaryCondition top;
    top.kind = BoundaryCondition::Kind::RadiationConvection;
    top.side = Side::Top;
    top.transfer_coefficient = 20;
    top.fluid_temperature = 15;
    top.sky_temperature = -20;
    BoundaryCondition base;
    base.kind = BoundaryCondition::Kind::FixedTemperature;
    base.side = Side::Bottom;
    base.temperature = 300;
    const auto integrator = make_integrator(kind);
    SimulationSettings s;
    s.output_times = { 0.1 * kSecondsPerYear, 1 * kSecondsPerYear };
    const auto result =
      simulate(model, { top, base }, { InitialState::Kind::Uniform, 1100.0 }, {}, s, *integrator);
    EXPECT_LT(result.ledger.boundary, 0.0); // it cooled
    EXPECT_LT(std::abs(result.ledger.relative_imbalance()), 1e-12) << integrator_name(kind);
  }
}

// Two copies of one rock are one material: assigning them to alternate cells must not change
// the rate. Uniform cells take the single-rock path (k per node, vector sweep); alternating
// cells make every node a contact node (k per (node, rock) pair, scalar sweep). Both are
// G = ½W (k(T_i) + k(T_j)); only the grouping of the weights' sums differs (round-off).
TEST(Operator, RateDoesNotDependOnSplittingARockIntoIdenticalCopies)
{
  for (bool tets : { false, true })
  {
    const Mesh mesh = tets ? make_box_tet({ 0, 0, 0 }, { 4, 3, 5 }, { 4, 3, 5 })
                           : make_box_hex({ 0, 0, 0 }, { 4, 3, 5 }, { 4, 3, 5 });
    Rock shale = simple_rock("shale", 1.8, 2500, 900);
    shale.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
    shale.conductivity.crystalline = false;
    std::vector<int> alternate(mesh.n_cells());
    for (std::size_t c = 0; c < alternate.size(); ++c)
      alternate[c] = static_cast<int>(c % 2);
    const ThermalModel one(mesh, { shale, shale }, std::vector<int>(mesh.n_cells(), 0));
    const ThermalModel two(mesh, { shale, shale }, alternate);
    std::vector<BoundaryCondition> bcs(1);
    bcs[0].kind = BoundaryCondition::Kind::Radiation;
    bcs[0].side = Side::Top;
    const HeatOperator op_one(one, bcs), op_two(two, bcs);
    std::vector<double> T(mesh.n_points());
    for (std::size_t i = 0; i < T.size(); ++i) // a rough field: every edge carries heat
      T[i] = 20.0 + 600.0 * std::abs(std::sin(1.7 * static_cast<double>(i)));
    tbb::task_arena arena(2);
    std::vector<double> r_one, r_two;
    PowerTally p_one, p_two;
    const double dt_one = op_one.rate_and_stable_step(T, r_one, p_one, arena);
    const double dt_two = op_two.rate_and_stable_step(T, r_two, p_two, arena);
    double scale = 0.0;
    for (double r : r_one)
      scale = std::max(scale, std::abs(r));
    ASSERT_GT(scale, 0.0);
    for (std::size_t i = 0; i < T.size(); ++i)
      EXPECT_NEAR(r_two[i], r_one[i], 1e-12 * scale) << (tets ? "tets" : "hexes") << " node " << i;
    EXPECT_NEAR(dt_two, dt_one, 1e-12 * dt_one);
    EXPECT_NEAR(p_two.boundary, p_one.boundary, 1e-12 * scale);
  }
}

// The stable step is 2/λ with λ Gershgorin's bound on the operator over the node capacities:
// max_i (|A_ii| + Σ_{j≠i} |A_ij|) / C_i (Gershgorin 1931; any textbook on matrix eigenvalues).
// Here A is read off the operator itself, one column per unit temperature field (constant k,
// so the rate is linear in T), and the bound is summed in the test. The distorted
// tetrahedra have obtuse angles, hence negative edge weights, where Σ|A_ij| ≠ |ΣA_ij|: the
// branch of the sweep that sums |G| is checked as well as the one that does not.
TEST(Operator, StableStepIsGershgorinBoundOfTheAssembledOperator)
{
  for (bool distorted : { false, true })
  {
    Mesh mesh = make_box_tet({ 0, 0, 0 }, { 4, 3, 3 }, { 4, 3, 3 });
    if (distorted) // up to 0.3 cell
      distort_interior(mesh, { 4, 3, 3 }, 0.3);
    const double c = 900.0;
    const ThermalModel model(mesh, { simple_rock("granite", 2.7, 2650, c) },
      std::vector<int>(mesh.n_cells(), 0));
    const HeatOperator op(model, {}); // insulated: no boundary stiffness, no held nodes
    tbb::task_arena arena(1);
    const std::size_t n = mesh.n_points();
    std::vector<double> row_abs_sum(n, 0.0);
    int negative_weights = 0;
    for_each_operator_column(op, n, arena, [&](std::size_t j, const std::vector<double>& column) {
      for (std::size_t i = 0; i < n; ++i)
      {
        row_abs_sum[i] += std::abs(column[i]);
        if (i != j && column[i] < -1e-12)
          ++negative_weights; // A_ij = G_ij < 0
      }
    });
    if (distorted)
      ASSERT_GT(negative_weights, 0) << "the distortion should make some weights negative";
    else
      ASSERT_EQ(negative_weights, 0);
    double lambda = 0.0;
    for (std::size_t i = 0; i < n; ++i)
    {
      double mass = 0.0;
      for (const NodeShare& s : model.shares(i))
        mass += s.mass;
      lambda = std::max(lambda, row_abs_sum[i] / (mass * c));
    }
    // The operator keeps 1/C rounded up to single precision (2^-23 relative at most): its
    // step may be that much shorter than the bound, never longer.
    const std::vector<double> T(n, 300.0);
    const double step = op.stable_time_step(T, arena);
    EXPECT_LE(step, 2.0 / lambda * (1 + 1e-15)) << (distorted ? "distorted" : "regular");
    EXPECT_GE(step, 2.0 / lambda * (1 - 0x1p-23)) << (distorted ? "distorted" : "regular");
  }
}
