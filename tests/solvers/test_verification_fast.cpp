// Verification against published closed-form solutions (shared/reference/verification.md).
// Tolerances follow its §0 guidance; each check names its source.
#include "verification_cases.h"

#include <gtest/gtest.h>
#include <oneapi/tbb/task_arena.h>

#include <algorithm>

using namespace ember;
using namespace ember::testing;

// Carslaw & Jaeger (1959) ch. 2 / Turcotte & Schubert (2002) §4.15 (section from memory):
// erf profile and cumulative surface heat loss of a half-space, on hexahedra and tetrahedra.
// Tolerance: T within 0.5 % of ΔT (hexes; 2 % tets), Q(t) within 0.5 % (verification.md §0, §1).
TEST(Verification, HalfSpaceFixedSurfaceTemperature)
{
  const HalfSpace p;
  const double t = kSecondsPerYear;
  for (bool tets : { false, true })
  {
    const int cells = tets ? 80 : 160;
    const ColumnRun run = run_half_space(p, 40.0, cells, tets, { t });
    const Snapshot& snap = run.result.snapshots.back();
    const double tol = (tets ? 0.02 : 0.005) * (p.T_initial - p.T_surface);
    for (double z : { 1.0, 3.0, 10.0, 20.0 })
      EXPECT_NEAR(at_depth(run.mesh, snap.temperature, z), p.temperature(z, t), tol)
        << (tets ? "tets" : "hexes") << " z = " << z;
    // The held surface nodes' half-cell of heat, ρc ΔT dz/2, leaves at t = 0 before the ledger
    // starts; the closed form counts it, so add it back.
    const double lost = -snap.boundary_heat / run.area +
      p.rho * p.c * (p.T_initial - p.T_surface) * 0.5 * 40.0 / cells;
    EXPECT_NEAR(lost / p.heat_lost(t), 1.0, 0.005) << (tets ? "tets" : "hexes");
  }
}

// Instantaneous sheet (sill), Carslaw & Jaeger (1959) ch. 2, Jaeger (1964) Rev. Geophys. 2:
// centre, contact and 2b temperatures vs time, peak temperature at x = 2b.
// Tolerance: 1 % of (T0 − Th) for τ ≥ 0.05; peak 1 % (verification.md §0, §2).
TEST(Verification, InstantaneousSheet)
{
  const Sheet p;
  const double extent = 10 * p.b;
  const double tau = p.b * p.b / p.kappa();
  const ColumnRun run =
    run_sheet(p, extent, 200, false, log_times(0.05 * tau, 4 * tau, 120), 0, p.b / 20);
  double worst = 0, peak = 0;
  for (const Snapshot& snap : run.result.snapshots)
  {
    for (double x : { 0.0, p.b, 2 * p.b })
    {
      const double theta = (sheet_value(run, extent, snap.temperature, x) - p.Th) / (p.T0 - p.Th);
      worst = std::max(worst, std::abs(theta - p.theta(x, snap.time)));
    }
    peak = std::max(peak, sheet_value(run, extent, snap.temperature, 2 * p.b));
  }
  EXPECT_LT(worst, 0.01);
  EXPECT_NEAR((peak - p.Th) / (p.T0 - p.Th), p.peak_theta(2 * p.b), 0.01);
  // ∫θ dx = 2b in a closed insulated domain (verification.md §2, §11): stored heat unchanged.
  EXPECT_LT(std::abs(run.result.ledger.stored_change), 1e-10 * run.result.ledger.initial);
}

// One-phase Stefan problem: crust growth on a lava lake, Turcotte & Schubert (2002) §4.18
// (section from memory). λ from the transcendental equation (Boost.Math TOMS 748). A
// solidus–liquidus interval of 1 % of ΔT stands in for isothermal melting.
// Tolerance: front position 2 % (verification.md §0, §3(i)).
TEST(Verification, StefanLavaLakeCrust)
{
  const LavaLake p;
  const double lambda = stefan_lambda(p.L, p.c, p.Tm);
  EXPECT_NEAR(lambda, 0.862411, 1e-6); // the catalogue's value, verification.md §3(i)
  const double t = kSecondsPerYear, depth = p.depth, dT = p.Tm, kappa = p.kappa;
  const int cells = p.cells;
  const ColumnRun run = run_lava_lake(p, { t });
  const Mesh& mesh = run.mesh;
  const auto& T = run.result.snapshots.back().temperature;
  double front = NAN;
  for (int i = 0; i < cells; ++i)
  {
    const double z0 = depth * i / cells, z1 = depth * (i + 1) / cells;
    const double T0 = at_depth(mesh, T, z0), T1 = at_depth(mesh, T, z1);
    if (T0 < dT && T1 >= dT)
      front = z0 + (dT - T0) / (T1 - T0) * (z1 - z0);
  }
  const double exact = 2 * lambda * std::sqrt(kappa * t);
  EXPECT_NEAR(front / exact, 1.0, 0.02) << "front " << front << " m, exact " << exact << " m";
}

// Lumped radiative cooling of a slab exposed on one face: elementary integration of the
// Stefan–Boltzmann law (CODATA 2018 σ), verification.md §4. Conductivity set very high so the
// radiative Biot number is ~1e-3 (lumped error ≈ 0.3 Bi). Tolerance: 0.5 K at the end of a
// 1500 → 1400 K interval (0.5 % of it), for T_sky = 0 and 280 K.
TEST(Verification, LumpedRadiativeSlab)
{
  const double rho = 2800, c = 1000, d = 1.0, T1 = 1500, T2 = 1400;
  for (double Ts : { 0.0, 280.0 })
  {
    const double C = rho * c * d / kStefanBoltzmann;
    double t;
    if (Ts == 0)
      t = C / 3 * (1 / (T2 * T2 * T2) - 1 / (T1 * T1 * T1));
    else
    {
      auto G = [Ts](double T) {
        return (std::log((T - Ts) / (T + Ts)) - 2 * std::atan(T / Ts)) / (4 * Ts * Ts * Ts);
      };
      t = C * (G(T1) - G(T2));
    }
    Mesh mesh = make_box_hex({ 0, 0, -d }, { 0.25, 0.25, 0 }, { 1, 1, 4 });
    ThermalModel model(mesh, { simple_rock("slab", 3e5, rho, c) }, std::vector<int>(4, 0));
    BoundaryCondition top;
    top.kind = BoundaryCondition::Kind::Radiation;
    top.side = Side::Top;
    top.emissivity = 1.0;
    top.sky_temperature = Ts - kKelvinOffset;
    SimulationSettings s;
    s.output_times = { t };
    ForwardEuler fe;
    const auto result = simulate(
      model, { top }, { InitialState::Kind::Uniform, T1 - kKelvinOffset }, {}, s, fe);
    double mean = 0;
    for (double T : result.snapshots.back().temperature)
      mean += (T + kKelvinOffset) / mesh.n_points();
    EXPECT_NEAR(mean, T2, 0.5) << "T_sky = " << Ts << " K";
  }
}

// Half-space cooling of oceanic lithosphere against the young-age GDH1 fit of Stein & Stein
// (1992), Nature 359: q = 510 t^(−1/2) mW/m² (t in Myr, t ≤ 55 Myr), with their parameters
// (verification.md §5, recalled there from memory). Tolerance 1 % (the fit rounds ~0.2 %).
TEST(Verification, SeafloorHeatFlowSteinAndStein)
{
  const double k = 3.138, cp = 1171, rho = 3330, Tm = 1450;
  const double dz = 500, depth = 2e5;
  const int cells = static_cast<int>(depth / dz);
  const double Myr = 1e6 * kSecondsPerYear;
  std::vector<double> times;
  for (double age : { 5.0, 10.0, 20.0, 40.0 })
  {
    times.push_back(age * Myr);
    times.push_back(1.02 * age * Myr);
  }
  Mesh mesh = column(depth, cells, dz, false);
  ThermalModel model(mesh, { simple_rock("mantle", k, rho, cp) }, std::vector<int>(cells, 0));
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::FixedTemperature;
  top.side = Side::Top;
  SimulationSettings s;
  s.output_times = times;
  ForwardEuler fe;
  const auto result = simulate(model, { top }, { InitialState::Kind::Uniform, Tm }, {}, s, fe);
  for (std::size_t i = 0; i + 1 < result.snapshots.size(); i += 2)
  {
    const auto& a = result.snapshots[i];
    const auto& b = result.snapshots[i + 1];
    const double q = -(b.boundary_heat - a.boundary_heat) / (b.time - a.time) / (dz * dz);
    const double age = std::sqrt(a.time * b.time) / Myr;
    EXPECT_NEAR(q * 1e3 / (510.0 / std::sqrt(age)), 1.0, 0.01) << "age " << age << " Myr";
  }
}

// Steady geotherm with uniform heat production, Turcotte & Schubert (2002) §4.6 (section from
// memory; formula sure), verification.md §7(a): T = T0 + q0 z/k − A z²/(2k); A = 1 µW/m³,
// q0 = 65 mW/m², k = 2.5, T0 = 10 °C, basal heat flow q0 − A·35 km = 30 mW/m².
// Linear elements are nodally exact here; tolerance 1e-6 relative (verification.md §7).
TEST(Verification, SteadyGeothermWithHeatProduction)
{
  const double A = 1e-6, q0 = 0.065, k = 2.5, T0 = 10, depth = 35e3, dz = 500;
  const int cells = static_cast<int>(depth / dz);
  Mesh mesh = column(depth, cells, dz, false);
  Rock crust = simple_rock("crust", k, 2700, 1000);
  crust.heat_production = A;
  ThermalModel model(mesh, { crust }, std::vector<int>(cells, 0));
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::FixedTemperature;
  top.side = Side::Top;
  top.temperature = T0;
  BoundaryCondition base;
  base.kind = BoundaryCondition::Kind::HeatFlux;
  base.side = Side::Bottom;
  base.heat_flux = q0 - A * depth;
  HeatOperator op(model, { top, base });
  const auto T = op.steady_state(initial_temperatures(mesh, {}));
  for (double z : { 1e3, 5e3, 10e3, 20e3, 30e3, 35e3 })
  {
    const double exact = T0 + q0 * z / k - A * z * z / (2 * k);
    EXPECT_NEAR(at_depth(mesh, T, z), exact, 1e-6 * exact) << "z = " << z;
  }
  // Without an anchoring boundary no steady state exists: a clear error, not garbage.
  HeatOperator floating(model, { base });
  EXPECT_THROW(floating.steady_state(initial_temperatures(mesh, {})), std::invalid_argument);
}

// Steady geotherm with temperature-dependent conductivity, no heat production: the Kirchhoff
// transform ∫k(T)dT = q0 z gives, for the Vosteen & Schellschmidt form k = k0/(0.99 + βT),
// T(z) = [(0.99 + βT0) exp(β q0 z/k0) − 0.99]/β (verification.md §7(d), derived there and checked
// against ODE integration; tabulated for a = 0.0030, b = 0.0042, k0 = 3.0, q0 = 60 mW/m²,
// T0 = 10 °C). Tolerance 0.1 % (verification.md §7). Then the transient operator must hold this
// state: the heat operator's own steady state has no residual rate.
TEST(Verification, SteadyGeothermWithTemperatureDependentConductivity)
{
  const double q0 = 0.060, T0 = 10, depth = 20e3, dz = 250;
  const int cells = static_cast<int>(depth / dz);
  Mesh mesh = column(depth, cells, dz, false);
  Rock crust = simple_rock("crust", 3.0, 2700, 1000);
  crust.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  crust.conductivity.crystalline = true; // a = 0.0030, b = 0.0042
  // The law is parameterised by k(25 °C); find the one whose k0 = k(0 °C)·0.99 is 3.0.
  double lo = 1.0, hi = 5.0;
  for (int i = 0; i < 100; ++i)
  {
    crust.conductivity.k_ref = 0.5 * (lo + hi);
    (conductivity_fit(crust.conductivity).q < 3.0 ? lo : hi) = crust.conductivity.k_ref;
  }
  ASSERT_NEAR(conductivity_fit(crust.conductivity).q, 3.0, 1e-12);
  ThermalModel model(mesh, { crust }, std::vector<int>(cells, 0));
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::FixedTemperature;
  top.temperature = T0;
  BoundaryCondition base;
  base.kind = BoundaryCondition::Kind::HeatFlux;
  base.side = Side::Bottom;
  base.heat_flux = q0;
  HeatOperator op(model, { top, base });
  const auto T = op.steady_state(initial_temperatures(mesh, {}));
  const std::pair<double, double> table[] = { { 1e3, 30.4454 }, { 5e3, 119.0950 },
    { 10e3, 247.1191 }, { 20e3, 573.6624 } };
  for (const auto& [z, exact] : table)
    EXPECT_NEAR(at_depth(mesh, T, z), exact, 1e-3 * exact) << "z = " << z;

  tbb::task_arena arena(1);
  std::vector<double> rate;
  PowerTally tally;
  op.rate(T, rate, tally, arena);
  const double column_area = dz * dz;
  for (std::size_t i = 0; i < rate.size(); ++i) // heat imbalance per node vs the heat flowing
    EXPECT_NEAR(rate[i] / (q0 * column_area), 0.0, 1e-9) << "node " << i;
}
