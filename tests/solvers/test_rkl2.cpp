// RKL2 super-time-stepping: stage count, temporal order, stability with latent heat and with
// the radiation boundary. Scheme: Meyer, Balsara & Aslam (2014), J. Comput. Phys. 257, 594–626
// (formulas and numerical checks in shared/reference/rkl2.md).
#include "verification_cases.h"

#include "ember/integrators.h"
#include "ember/rkl2.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <numbers>

using namespace ember;
using namespace ember::testing;

// Meyer et al. (2014) stability bound τ ≤ Δt_FE (s² + s − 2)/4 and its inverse
// s(τ) = ⌈(√(9 + 16τ/Δt_FE) − 1)/2⌉ (rkl2.md "Stability bound"): exact integer round trip.
TEST(Rkl2, StageCountInvertsTheStabilityBound)
{
  const double dt_fe = 3.7;
  for (int s = 2; s <= 200; ++s)
  {
    const double tau = Rkl2::max_super_step(s, dt_fe);
    EXPECT_EQ(Rkl2::stages_for(tau, dt_fe), s);
    EXPECT_EQ(Rkl2::stages_for(tau * (1 + 1e-9), dt_fe), s + 1);
  }
  EXPECT_EQ(Rkl2::stages_for(1e-3 * dt_fe, dt_fe), 2);
  EXPECT_DOUBLE_EQ(Rkl2::max_super_step(2, dt_fe), dt_fe);
  EXPECT_THROW(Rkl2(1.0, 1), std::invalid_argument);
  EXPECT_THROW(Rkl2(0.0), std::invalid_argument);
  EXPECT_EQ(integrator_kind("RKL2"), IntegratorKind::RKL2);
  EXPECT_EQ(integrator_kind("forward-euler"), IntegratorKind::ForwardEuler);
  EXPECT_EQ(integrator_kind(integrator_name(IntegratorKind::RKL2)), IntegratorKind::RKL2);
  EXPECT_THROW(integrator_kind("crank-nicolson"), std::invalid_argument);
  EXPECT_NE(dynamic_cast<Rkl2*>(make_integrator().get()), nullptr); // RKL2 is the default
}

namespace
{
// A column with a held top (depth 0) and an insulated base (depth L). With a lumped mass and a
// field uniform across the column, Q1 reduces exactly to 1-D lumped P1 (rkl2.md
// "Verification"), whose eigenvectors are sin(k_m d), k_m = (m + ½)π/L, with eigenvalues
// λ_m = (4κ/h²) sin²(k_m h/2): the exact semi-discrete solution is known in closed form, so the
// error measured below is purely temporal.
struct EigenColumn
{
  double L = 1.0, k = 2.5, rho = 2500, c = 1000; // κ = 1e-6 m²/s
  int cells = 40;
  double kappa() const { return k / (rho * c); }
  double wavenumber(int m) const { return (m + 0.5) * std::numbers::pi / L; }
  double eigenvalue(int m) const
  {
    const double h = L / cells, s = std::sin(wavenumber(m) * h / 2);
    return 4 * kappa() / (h * h) * s * s;
  }
  double exact(double d, double t) const
  {
    return std::sin(wavenumber(0) * d) * std::exp(-eigenvalue(0) * t) +
           0.5 * std::sin(wavenumber(2) * d) * std::exp(-eigenvalue(2) * t);
  }
};

// Max nodal |T − exact| at t_end after super-steps of τ with exactly s stages. The stage count
// is pinned by scaling the stability bound the integrator sees (its `safety` argument) with τ.
double temporal_error(const EigenColumn& p, int s, double tau_fraction, double t_end_in_tau_max)
{
  const Mesh mesh = column(p.L, p.cells, p.L / p.cells, false);
  ThermalModel model(
    mesh, { simple_rock("rock", p.k, p.rho, p.c) }, std::vector<int>(mesh.n_cells(), 0));
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::FixedTemperature;
  top.side = Side::Top;
  HeatOperator op(model, { top });
  tbb::task_arena arena(1);
  std::vector<double> T(mesh.n_points()), E(mesh.n_points());
  for (std::size_t i = 0; i < T.size(); ++i)
  {
    T[i] = p.exact(-mesh.points[i][2], 0.0);
    E[i] = model.energy(i, T[i]);
  }
  const double dt_fe = op.stable_time_step(T, arena); // constant k: independent of T
  const double tau_max = Rkl2::max_super_step(s, dt_fe);
  const double tau = tau_fraction * tau_max;
  const double t_end = t_end_in_tau_max * tau_max;
  // τ/(safety·Δt_FE) just above the (s−1)-stage bound, well inside the s-stage one.
  const double safety = tau / (0.99 * tau_max);
  Rkl2 rkl2(std::numeric_limits<double>::infinity()); // the step is set here, not controlled
  const int n_steps = static_cast<int>(std::lround(t_end / tau));
  for (int step = 0; step < n_steps; ++step)
  {
    rkl2.advance(model, op, tau, safety, E, T, arena);
    EXPECT_EQ(rkl2.last_stages(), s);
  }
  double worst = 0;
  for (std::size_t i = 0; i < T.size(); ++i)
    worst = std::max(worst, std::abs(T[i] - p.exact(-mesh.points[i][2], t_end)));
  return worst;
}
} // namespace

// Second order in time (Meyer et al. 2014, §3; rkl2.md "Second order": halving τ at fixed s
// cuts the error 4×, observed orders 1.999–2.009 for s = 3..32). Tolerance: observed order
// between τ_max/8 and τ_max/16 within [1.9, 2.1] (the asymptotic range, rkl2.md).
TEST(Rkl2, SecondOrderInTimeOnExactSemiDiscreteModes)
{
  const EigenColumn p;
  for (int s : { 3, 8, 16 })
  {
    // t_end ≈ 1/λ_0: the slow mode has decayed by ~e, the fast one much more.
    const double dt_fe_guess = 0.5 / p.eigenvalue(p.cells);
    const double span = std::ceil(1.0 / p.eigenvalue(0) / Rkl2::max_super_step(s, dt_fe_guess));
    const double e4 = temporal_error(p, s, 1.0 / 4, span);
    const double e8 = temporal_error(p, s, 1.0 / 8, span);
    const double e16 = temporal_error(p, s, 1.0 / 16, span);
    const double order = std::log2(e8 / e16);
    std::printf("s = %2d: errors %.3e %.3e %.3e, orders %.3f %.3f\n",
                s,
                e4,
                e8,
                e16,
                std::log2(e4 / e8),
                order);
    EXPECT_GT(order, 1.9) << "s = " << s;
    EXPECT_LT(order, 2.1) << "s = " << s;
    EXPECT_GT(e16, 1e-11) << "error must be above round-off for the order to mean anything";
  }
}

namespace
{
// A sill with latent heat in host rock with T-dependent k and c (as test_operator's model).
SimulationResult latent_sill(IntegratorKind kind,
                             std::vector<double> times,
                             double safety = 0.9,
                             double emplacement_time = 0.0)
{
  static Mesh mesh = []
  {
    Mesh m = make_box_hex({ 0, 0, 0 }, { 4, 2, 12 }, { 4, 2, 24 });
    mark_layer(m, 5, 7);
    return m;
  }();
  Rock shale = simple_rock("shale", 1.8, 2500, 900);
  shale.heat_capacity.law = HeatCapacity::Law::WaplesWaples;
  shale.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  shale.conductivity.crystalline = false;
  Rock dolerite = simple_rock("dolerite", 2.2, 2900, 1100);
  dolerite.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  dolerite.latent_heat = 4e5;
  dolerite.solidus = 980;
  dolerite.liquidus = 1150;
  ThermalModel model(mesh, { shale, dolerite }, std::vector<int>(mesh.n_cells(), 0));
  SimulationSettings s;
  s.output_times = std::move(times);
  s.safety = safety;
  const auto integrator = make_integrator(kind);
  return simulate(model,
                  {},
                  { InitialState::Kind::Uniform, 50.0 },
                  { { 1, 1, emplacement_time, 1150.0 } },
                  s,
                  *integrator);
}

double max_difference(const SimulationResult& a, const SimulationResult& b)
{
  double worst = 0;
  for (std::size_t k = 0; k < a.snapshots.size(); ++k)
    for (std::size_t i = 0; i < a.snapshots[k].temperature.size(); ++i)
      worst =
        std::max(worst, std::abs(a.snapshots[k].temperature[i] - b.snapshots[k].temperature[i]));
  return worst;
}
} // namespace

// Stability with latent heat (Meyer et al. 2014 bound applied to the linearised operator over
// the sensible capacity, which latent heat only raises): super-steps through the
// crystallisation interval stay bounded and are at least as accurate as forward Euler at its
// stable step. Reference: forward Euler at 1/10 of the stable step (its error is then ~10×
// smaller than the default run's). Tolerances: 1 % of ΔT against that reference
// (verification.md §0), bounds within 1 % of ΔT of the initial range (RKL2 is not monotone,
// rkl2.md caveat), ledger 1e-12 relative.
TEST(Rkl2, StableThroughLatentHeatWithTemperatureDependentProperties)
{
  const auto times = log_times(0.05 * kSecondsPerYear, 5 * kSecondsPerYear, 4);
  const SimulationResult fine = latent_sill(IntegratorKind::ForwardEuler, times, 0.09);
  const SimulationResult fe = latent_sill(IntegratorKind::ForwardEuler, times);
  const SimulationResult rkl2 = latent_sill(IntegratorKind::RKL2, times);
  const double dT = 1150.0 - 50.0;
  const double e_fe = max_difference(fe, fine), e_rkl2 = max_difference(rkl2, fine);
  std::printf("latent sill: FE %zu applications (error %.3g K), RKL2 %zu in %zu super-steps "
              "(error %.3g K)\n",
              fe.operator_applications,
              e_fe,
              rkl2.operator_applications,
              rkl2.steps,
              e_rkl2);
  EXPECT_LT(e_rkl2, 0.01 * dT);
  EXPECT_LE(e_rkl2, e_fe);
  for (const Snapshot& snap : rkl2.snapshots)
    for (std::size_t i = 0; i < snap.temperature.size(); ++i)
    {
      EXPECT_GE(snap.temperature[i], 50.0 - 0.01 * dT);
      EXPECT_LE(snap.temperature[i], 1150.0 + 0.01 * dT);
      EXPECT_GE(snap.melt_fraction[i], 0.0);
      EXPECT_LE(snap.melt_fraction[i], 1.0);
    }
  EXPECT_LT(rkl2.operator_applications, fe.operator_applications);
  EXPECT_LT(std::abs(rkl2.ledger.relative_imbalance()), 1e-12);
}

// An emplacement during the run is a new sudden start: the accuracy control must begin again
// at the forward-Euler step rather than carry on with the long super-steps it had reached.
// Same model, reference and tolerances as above; the sill enters at 2 yr into host rock that
// has been evolving with long super-steps.
TEST(Rkl2, EmplacementDuringTheRunRestartsTheStepControl)
{
  const double t_in = 2 * kSecondsPerYear;
  std::vector<double> times = { t_in };
  for (double t : log_times(t_in + 0.02 * kSecondsPerYear, t_in + 3 * kSecondsPerYear, 4))
    times.push_back(t);
  const SimulationResult fine = latent_sill(IntegratorKind::ForwardEuler, times, 0.09, t_in);
  const SimulationResult fe = latent_sill(IntegratorKind::ForwardEuler, times, 0.9, t_in);
  const SimulationResult rkl2 = latent_sill(IntegratorKind::RKL2, times, 0.9, t_in);
  const double e_fe = max_difference(fe, fine), e_rkl2 = max_difference(rkl2, fine);
  std::printf(
    "sill emplaced at 2 yr: FE %zu applications (error %.3g K), RKL2 %zu (error %.3g K)\n",
    fe.operator_applications,
    e_fe,
    rkl2.operator_applications,
    e_rkl2);
  EXPECT_LT(e_rkl2, 0.01 * (1150.0 - 50.0));
  EXPECT_LE(e_rkl2, e_fe);
  EXPECT_LT(std::abs(rkl2.ledger.relative_imbalance()), 1e-12);
}

// Stability with the non-linear radiation boundary, 1: the lumped radiative slab of
// test_verification_fast (verification.md §4, elementary integration of the Stefan–Boltzmann
// law). Conductivity 3e5 W/(m·K) makes the conduction very stiff, so RKL2 runs its largest
// super-steps against a T⁴ boundary. Tolerance as there: 0.5 K.
TEST(Rkl2, StableWithRadiationOnStiffLumpedSlab)
{
  const double rho = 2800, c = 1000, d = 1.0, T1 = 1500, T2 = 1400;
  const double t = rho * c * d / kStefanBoltzmann / 3 * (1 / (T2 * T2 * T2) - 1 / (T1 * T1 * T1));
  Mesh mesh = make_box_hex({ 0, 0, -d }, { 0.25, 0.25, 0 }, { 1, 1, 4 });
  ThermalModel model(mesh, { simple_rock("slab", 3e5, rho, c) }, std::vector<int>(4, 0));
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::Radiation;
  top.emissivity = 1.0;
  top.sky_temperature = -kKelvinOffset;
  SimulationSettings s;
  s.output_times = { t };
  Rkl2 rkl2;
  const auto result =
    simulate(model, { top }, { InitialState::Kind::Uniform, T1 - kKelvinOffset }, {}, s, rkl2);
  double mean = 0;
  for (double T : result.snapshots.back().temperature)
    mean += (T + kKelvinOffset) / mesh.n_points();
  EXPECT_NEAR(mean, T2, 0.5);
  std::printf("stiff radiating slab: %zu applications in %zu super-steps, last s = %d\n",
              result.operator_applications,
              result.steps,
              rkl2.last_stages());
  EXPECT_GT(rkl2.last_stages(), 16); // the stiff case does run long super-steps
  EXPECT_LT(std::abs(result.ledger.relative_imbalance()), 1e-12);
}

// Stability with the non-linear radiation boundary, 2: a lava flow radiating and convecting
// at its top while it crystallises, T-dependent k. Reference: forward Euler at 1/10 of the
// stable step on the same mesh. Tolerance 1 % of ΔT (verification.md §0) and no worse than
// forward Euler at its stable step; ledger 1e-12 relative.
TEST(Rkl2, StableWithRadiationAndLatentHeatOnLavaFlow)
{
  Mesh mesh = make_box_hex({ 0, 0, -4 }, { 1, 1, 0 }, { 2, 2, 32 });
  Rock lava = simple_rock("basalt lava", 1.5, 2700, 1100);
  lava.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  lava.latent_heat = 4e5;
  lava.solidus = 980;
  lava.liquidus = 1150;
  ThermalModel model(mesh, { lava }, std::vector<int>(mesh.n_cells(), 0));
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::RadiationConvection;
  top.transfer_coefficient = 10;
  top.fluid_temperature = 15;
  top.sky_temperature = -30;
  SimulationSettings s;
  s.output_times = log_times(1e-3 * kSecondsPerYear, 0.5 * kSecondsPerYear, 4);
  auto run = [&](IntegratorKind kind, double safety)
  {
    ThermalModel m = model;
    SimulationSettings settings = s;
    settings.safety = safety;
    const auto integrator = make_integrator(kind);
    return simulate(m, { top }, { InitialState::Kind::Uniform, 1150.0 }, {}, settings, *integrator);
  };
  const SimulationResult fine = run(IntegratorKind::ForwardEuler, 0.09);
  const SimulationResult fe = run(IntegratorKind::ForwardEuler, 0.9);
  const SimulationResult rkl2 = run(IntegratorKind::RKL2, 0.9);
  const double e_fe = max_difference(fe, fine), e_rkl2 = max_difference(rkl2, fine);
  std::printf("lava flow: FE %zu applications (error %.3g K), RKL2 %zu (error %.3g K)\n",
              fe.operator_applications,
              e_fe,
              rkl2.operator_applications,
              e_rkl2);
  EXPECT_LT(e_rkl2, 0.01 * (1150.0 - 15.0));
  EXPECT_LE(e_rkl2, e_fe);
  EXPECT_LT(rkl2.operator_applications, fe.operator_applications);
  EXPECT_LT(rkl2.ledger.boundary, 0.0);
  EXPECT_LT(std::abs(rkl2.ledger.relative_imbalance()), 1e-12);
}
