// Verification problems shared by the fast and the reference suites. Each names its source;
// analytical values are computed here from the closed forms (std::erf, Boost.Math), not typed in.
#pragma once

#include "test_support.h"

#include "ember/integrators.h"
#include "ember/thermal_history.h"

#include <boost/math/tools/roots.hpp>

#include <cmath>
#include <memory>
#include <numbers>

namespace ember::testing
{

// ---- Carslaw & Jaeger (1959) ch. 2; verification.md §1: half-space, fixed surface T -------
struct HalfSpace
{
  double k = 2.5, rho = 2500, c = 1000; // κ = 1e-6 m²/s
  double T_initial = 1000, T_surface = 0;
  double kappa() const { return k / (rho * c); }
  double temperature(double z, double t) const
  {
    return T_surface + (T_initial - T_surface) * std::erf(z / (2 * std::sqrt(kappa() * t)));
  }
  /// cumulative heat lost per unit area Q(t) = 2kΔT√(t/(πκ)) [J/m²]
  double heat_lost(double t) const
  {
    return 2 * k * (T_initial - T_surface) * std::sqrt(t / (std::numbers::pi * kappa()));
  }
};

struct ColumnRun
{
  Mesh mesh;
  SimulationResult result;
  double area;
  std::shared_ptr<ThermalHistory> history; ///< set when the run recorded a thermal history
};

/// A column of `cells` cells over `depth`, uniform at T_initial, its top held at T_surface from
/// t = 0 (forward Euler). With `history`, a ThermalHistory is recorded (ColumnRun::history).
inline ColumnRun run_cooling_column(const Rock& rock, double T_initial, double T_surface,
  double depth, int cells, bool tets, const std::vector<double>& times, int threads = 0,
  const ThermalHistorySettings* history = nullptr)
{
  const double w = depth / cells;
  ColumnRun run{ column(depth, cells, w, tets), {}, w * w, {} };
  ThermalModel model(run.mesh, { rock }, std::vector<int>(run.mesh.n_cells(), 0));
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::FixedTemperature;
  top.side = Side::Top;
  top.temperature = T_surface;
  SimulationSettings s;
  s.output_times = times;
  s.threads = threads;
  ForwardEuler fe;
  if (history)
    run.history = std::make_shared<ThermalHistory>(model, *history);
  run.result = simulate(model, { top }, { InitialState::Kind::Uniform, T_initial }, {}, s, fe,
    {}, run.history.get());
  return run;
}

inline ColumnRun run_half_space(const HalfSpace& p, double depth, int cells, bool tets,
  const std::vector<double>& times, int threads = 0)
{
  return run_cooling_column(simple_rock("rock", p.k, p.rho, p.c), p.T_initial, p.T_surface,
    depth, cells, tets, times, threads);
}

// ---- Carslaw & Jaeger (1959) ch. 2; Jaeger (1964); verification.md §2: instantaneous sheet --
struct Sheet
{
  double b = 5.0; // half-thickness [m]
  double k = 2.5, rho = 2500, c = 1000;
  double T0 = 1150, Th = 50;
  double kappa() const { return k / (rho * c); }
  double theta(double x, double t) const
  {
    const double s = 2 * std::sqrt(kappa() * t);
    return 0.5 * (std::erf((b - x) / s) + std::erf((b + x) / s));
  }
  /// time of the peak at x > b: κ t_peak = x b / ln((x + b)/(x − b)) (verification.md §2)
  double peak_time(double x) const { return x * b / std::log((x + b) / (x - b)) / kappa(); }
  /// peak θ at x > b
  double peak_theta(double x) const { return theta(x, peak_time(x)); }
};

/// Half the sheet: symmetry plane at z = 0 (insulated base), the sheet fills −b < z < 0 measured
/// from the model top... we use depth d = distance from the symmetry plane, mesh top far away.
/// With `history`, a ThermalHistory is recorded during the run (ColumnRun::history).
inline ColumnRun run_sheet(const Sheet& p, double extent, int cells, bool tets,
  const std::vector<double>& times, int threads = 0, double width = 1.0,
  IntegratorKind kind = IntegratorKind::ForwardEuler, const ThermalHistorySettings* history = nullptr)
{
  // Column from z = −extent (symmetry plane, insulated) up to z = 0 (far field, insulated):
  // distance from the sheet centre is x = z + extent.
  ColumnRun run{ tets ? make_box_tet({ 0, 0, -extent }, { width, width, 0 }, { 1, 1, cells })
                      : make_box_hex({ 0, 0, -extent }, { width, width, 0 }, { 1, 1, cells }),
    {}, width * width, {} };
  mark_layer(run.mesh, -2 * extent, p.b - extent);
  const Rock rock = simple_rock("rock", p.k, p.rho, p.c);
  ThermalModel model(run.mesh, { rock }, std::vector<int>(run.mesh.n_cells(), 0));
  SimulationSettings s;
  s.output_times = times;
  s.threads = threads;
  const auto integrator = make_integrator(kind);
  if (history)
    run.history = std::make_shared<ThermalHistory>(model, *history);
  run.result = simulate(model, {}, { InitialState::Kind::Uniform, p.Th }, { { 1, 0, 0.0, p.T0 } },
    s, *integrator, {}, run.history.get());
  return run;
}

/// Nodal value at distance x from the symmetry plane of run_sheet.
inline double sheet_value(const ColumnRun& run, double extent, const std::vector<double>& f,
  double x)
{
  return at_depth(run.mesh, f, extent - x);
}

// ---- Turcotte & Schubert (2002) §4.18 (from memory); verification.md §3(i): lava-lake crust --
/// λ1 from L√π/(c ΔT) = exp(−λ²)/(λ erf λ), by Boost.Math's TOMS 748 bracketing solver.
inline double stefan_lambda(double L, double c, double dT)
{
  const double lhs = L * std::sqrt(std::numbers::pi) / (c * dT);
  auto f = [lhs](double l) { return std::exp(-l * l) / (l * std::erf(l)) - lhs; };
  boost::math::tools::eps_tolerance<double> tol(50);
  std::uintmax_t iterations = 100;
  const auto [lo, hi] = boost::math::tools::toms748_solve(f, 1e-3, 5.0, tol, iterations);
  return 0.5 * (lo + hi);
}

/// Lava lake of T&S §4.18: melt at the liquidus under a surface held at 0 °C; a solidus–
/// liquidus interval of ±5 K around Tm stands in for isothermal melting (1 % of ΔT,
/// verification.md §3(i)). Column of `cells` hexahedra over `depth`.
struct LavaLake
{
  double L = 4e5, c = 1000, k = 2.0, kappa = 7e-7, Tm = 1000, half_interval = 5;
  double depth = 16;
  int cells = 160;
  Rock magma() const
  {
    Rock r = simple_rock("basalt", k, k / (kappa * c), c);
    r.latent_heat = L;
    r.solidus = Tm - half_interval;
    r.liquidus = Tm + half_interval;
    return r;
  }
};

inline ColumnRun run_lava_lake(const LavaLake& p, const std::vector<double>& times,
  const ThermalHistorySettings* history = nullptr)
{
  return run_cooling_column(
    p.magma(), p.Tm + p.half_interval, 0.0, p.depth, p.cells, false, times, 0, history);
}

} // namespace ember::testing
