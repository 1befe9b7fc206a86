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

/// Half a sheet of half-thickness b in one rock (region 1, emplaced at t = 0 at T_emplaced
/// into host at T_host): symmetry plane at the column's base (insulated), the far field at
/// the top (insulated); the distance from the sheet centre is x = z + extent.
/// With `history`, a ThermalHistory is recorded during the run (ColumnRun::history).
inline ColumnRun run_layer(const Rock& rock, double b, double T_host, double T_emplaced,
  double extent, int cells, bool tets, const std::vector<double>& times, int threads = 0,
  double width = 1.0, IntegratorKind kind = IntegratorKind::ForwardEuler,
  const ThermalHistorySettings* history = nullptr)
{
  ColumnRun run{ tets ? make_box_tet({ 0, 0, -extent }, { width, width, 0 }, { 1, 1, cells })
                      : make_box_hex({ 0, 0, -extent }, { width, width, 0 }, { 1, 1, cells }),
    {}, width * width, {} };
  mark_layer(run.mesh, -2 * extent, b - extent);
  ThermalModel model(run.mesh, { rock }, std::vector<int>(run.mesh.n_cells(), 0));
  SimulationSettings s;
  s.output_times = times;
  s.threads = threads;
  const auto integrator = make_integrator(kind);
  if (history)
    run.history = std::make_shared<ThermalHistory>(model, *history);
  run.result = simulate(model, {}, { InitialState::Kind::Uniform, T_host },
    { { 1, 0, 0.0, T_emplaced } }, s, *integrator, {}, run.history.get());
  return run;
}

/// The sheet of Carslaw & Jaeger in a column (run_layer with the sheet's rock).
inline ColumnRun run_sheet(const Sheet& p, double extent, int cells, bool tets,
  const std::vector<double>& times, int threads = 0, double width = 1.0,
  IntegratorKind kind = IntegratorKind::ForwardEuler, const ThermalHistorySettings* history = nullptr)
{
  return run_layer(simple_rock("rock", p.k, p.rho, p.c), p.b, p.Th, p.T0, extent, cells, tets,
    times, threads, width, kind, history);
}

/// Nodal value at distance x from the symmetry plane of run_sheet.
inline double sheet_value(const ColumnRun& run, double extent, const std::vector<double>& f,
  double x)
{
  return at_depth(run.mesh, f, extent - x);
}

// ---- Turcotte & Schubert (2002) §4.18 (from memory); verification.md §3(i): lava-lake crust --
/// Root of f on [1e-3, 5] by Boost.Math's TOMS 748 bracketing solver.
template <class F>
double lambda_root(F f)
{
  boost::math::tools::eps_tolerance<double> tol(50);
  std::uintmax_t iterations = 100;
  const auto [lo, hi] = boost::math::tools::toms748_solve(f, 1e-3, 5.0, tol, iterations);
  return 0.5 * (lo + hi);
}

/// λ1 from L√π/(c ΔT) = exp(−λ²)/(λ erf λ).
inline double stefan_lambda(double L, double c, double dT)
{
  const double lhs = L * std::sqrt(std::numbers::pi) / (c * dT);
  return lambda_root([lhs](double l) { return std::exp(-l * l) / (l * std::erf(l)) - lhs; });
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

// ---- Turcotte & Schubert (2002), "Solidification of a dike or sill" (§4.19 from memory);
// verification.md §3(ii): a sill intruded at its melting point, same properties in magma and
// host. Solid grows inward from each wall as x_m = 2λ2√(κt); the contact stays at
// T_c = T_host + (Tm − T_host)/(1 + erf λ2) until the fronts meet at t_s = b²/(4κλ2²).
/// λ2 from L√π/(c ΔT) = exp(−λ²)/(λ (1 + erf λ)).
inline double sill_lambda(double L, double c, double dT)
{
  const double lhs = L * std::sqrt(std::numbers::pi) / (c * dT);
  return lambda_root(
    [lhs](double l) { return std::exp(-l * l) / (l * (1 + std::erf(l))) - lhs; });
}

/// T&S's numbers of verification.md §3(ii), first row: L = 400 kJ/kg, c = 1 kJ/kg/K,
/// Tm − T_host = 1000 K (λ2 = 0.606664, T_c at 0.621473 of the way). A solidus–liquidus
/// interval of ±2.5 K around Tm (0.5 % of ΔT) stands in for isothermal melting (verification.md
/// §3(i): ≤ 1 %); the magma is emplaced at the liquidus.
struct MeltingSill
{
  double b = 1.0; // half-thickness [m]
  double k = 2.5, rho = 2500, c = 1000, L = 4e5; // κ = 1e-6 m²/s
  double T_host = 0, Tm = 1000, half_interval = 2.5;
  double kappa() const { return k / (rho * c); }
  double lambda() const { return sill_lambda(L, c, Tm - T_host); }
  double contact() const { return T_host + (Tm - T_host) / (1 + std::erf(lambda())); }
  /// host temperature at distance d outside the contact, exact for t ≤ solidification_time()
  double host(double d, double t) const
  {
    return T_host +
      (Tm - T_host) * (1 - std::erf(d / (2 * std::sqrt(kappa() * t)))) / (1 + std::erf(lambda()));
  }
  double solidification_time() const { return b * b / (4 * kappa() * lambda() * lambda()); }
  Rock magma() const
  {
    Rock r = simple_rock("magma", k, rho, c);
    r.latent_heat = L;
    r.solidus = Tm - half_interval;
    r.liquidus = Tm + half_interval;
    return r;
  }
};

} // namespace ember::testing
