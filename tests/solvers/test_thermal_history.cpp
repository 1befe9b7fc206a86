// Thermal-history products recorded inside the solve (thermal_history.h, body_summary.h)
// against closed forms; each check names its source and tolerance (verification.md §0).
#include "verification_cases.h"

#include <boost/math/special_functions/erf.hpp>
#include <boost/math/tools/roots.hpp>
#include <gtest/gtest.h>

#include <cstring>
#include <fstream>
#include <limits>
#include <sstream>

using namespace ember;
using namespace ember::testing;

namespace
{
const std::vector<double>& field(const Snapshot& snap, const std::string& name)
{
  for (const PointField& f : snap.point_fields)
    if (f.name == name)
      return f.values;
  throw std::runtime_error("snapshot has no point array " + name);
}

// Root of f on [lo, hi] by Boost.Math's TOMS 748.
template <class F>
double root(F f, double lo, double hi)
{
  boost::math::tools::eps_tolerance<double> tol(50);
  std::uintmax_t iterations = 200;
  const auto [a, b] = boost::math::tools::toms748_solve(f, lo, hi, tol, iterations);
  return 0.5 * (a + b);
}

std::string message_of(const std::function<void()>& f)
{
  try
  {
    f();
  }
  catch (const std::invalid_argument& e)
  {
    return e.what();
  }
  return "(no exception)";
}
} // namespace

// Peak temperature and its time beside an instantaneous sheet, Carslaw & Jaeger (1959) ch. 2,
// Jaeger (1964) Rev. Geophys. 2: κ t_peak = x b / ln((x + b)/(x − b)), θ_peak = θ(x, t_peak)
// (verification.md §2). Tolerances (verification.md §0): peak 1 % of ΔT, its time 10 % (the
// maximum is flat). The body summary's contact temperature is read on the host side, at the
// node one spacing h outside the contact: it is the sheet's peak at d = h (same closed form,
// 1 % of ΔT), taken at contact_distance = h. Time above a
// threshold at x = 2b against the two analytic crossings of θ(2b, t) = θ_thr (root finding on
// the closed form): 2 % of the interval, set by the 1 % temperature tolerance over the
// crossing slopes. Rock without latent heat is never molten: SolidificationTime NaN.
TEST(ThermalHistory, PeakTemperatureBesideSheet)
{
  const Sheet p;
  const double extent = 16 * p.b, tau = p.b * p.b / p.kappa();
  const int per_b = 20;
  const double theta_thr = 0.2, T_thr = p.Th + theta_thr * (p.T0 - p.Th);
  ThermalHistorySettings hs;
  hs.thresholds = { T_thr };
  BodySummarySettings summary;
  summary.bodies = { 1 };
  summary.aureole_temperature = p.Th + 0.3 * (p.T0 - p.Th);
  hs.summary = summary;
  const ColumnRun run =
    run_sheet(p, extent, 16 * per_b, false, { 5 * tau, 10 * tau }, 0, p.b / per_b, IntegratorKind::ForwardEuler, &hs);
  const Snapshot& snap = run.result.snapshots.back();
  const auto& peak = field(snap, "PeakTemperature");
  const auto& peak_time = field(snap, "PeakTemperatureTime");
  for (double d_over_b : { 0.25, 0.5, 1.0, 2.0, 3.0 })
  {
    const double x = p.b * (1 + d_over_b);
    const double theta = (sheet_value(run, extent, peak, x) - p.Th) / (p.T0 - p.Th);
    EXPECT_NEAR(theta, p.peak_theta(x), 0.01) << "d/b = " << d_over_b;
    EXPECT_NEAR(sheet_value(run, extent, peak_time, x) / p.peak_time(x), 1.0, 0.10)
      << "d/b = " << d_over_b;
  }
  // time above θ_thr at x = 2b: θ(2b, t) rises through θ_thr before t_peak, falls after it
  const double x = 2 * p.b, tp = p.peak_time(x);
  auto excess = [&](double t) { return p.theta(x, t) - theta_thr; };
  const double t_in = root(excess, 1e-3 * tp, tp), t_out = root(excess, tp, 10 * tau);
  const double above = sheet_value(run, extent, field(snap, ThermalHistory::time_above_name(T_thr)), x);
  EXPECT_NEAR(above / (t_out - t_in), 1.0, 0.02);
  for (double s : field(snap, "SolidificationTime"))
    EXPECT_TRUE(std::isnan(s));

  // Body summary (body_summary.h) of the sheet (region 1).
  ASSERT_EQ(run.history->summaries().size(), 2u);
  const BodySummary& table = run.history->summaries().back();
  ASSERT_EQ(table.regions.size(), 2u);
  const RegionSummary& sill = table.regions[1];
  EXPECT_EQ(sill.region, 1);
  const double h = p.b / per_b;
  EXPECT_NEAR((sill.contact_temperature - p.Th) / (p.T0 - p.Th), p.peak_theta(p.b + h), 0.01);
  EXPECT_NEAR(sill.contact_distance, h, 1e-9 * h);
  EXPECT_EQ(table.model.contact_temperature, sill.contact_temperature);
  EXPECT_EQ(table.model.contact_distance, sill.contact_distance);
  EXPECT_TRUE(std::isnan(table.regions[0].contact_temperature)); // host: not a body
  EXPECT_TRUE(std::isnan(table.regions[0].contact_distance));
  // Aureole (peak θ > 0.3) against the distance where θ_peak(x) = 0.3 (θ_peak falls
  // monotonically with x). Node-based, so within the spacing h plus the distance a 1 % peak
  // error moves the limit (|dθ_peak/dx| ≈ 0.18/b there → 0.06 b ≈ 1.1 h): 2.5 h.
  const double x_aureole =
    root([&](double xx) { return p.peak_theta(xx) - 0.3; }, p.b * 1.0001, 10 * p.b);
  EXPECT_NEAR(sill.aureole_thickness_temperature, x_aureole - p.b, 2.5 * h);
  EXPECT_EQ(table.model.aureole_thickness_temperature, sill.aureole_thickness_temperature);
  EXPECT_TRUE(std::isnan(sill.aureole_thickness_reflectance)); // no organic rock
  // Closed, insulated column: heat in place is conserved (verification.md §11.1, 1e-8), and
  // the regions add up to the model.
  const BodySummary& first = run.history->summaries().front();
  EXPECT_NEAR(table.model.heat_in_place / first.model.heat_in_place, 1.0, 1e-8);
  EXPECT_NEAR((table.regions[0].heat_in_place + sill.heat_in_place) / table.model.heat_in_place,
    1.0, 1e-12);
  EXPECT_NEAR(sill.volume, p.b * h * h, 1e-9 * p.b * h * h);
}

// Contact temperature of a sill intruded at its melting point, Turcotte & Schubert (2002),
// "Solidification of a dike or sill" (§4.19 from memory; verification.md §3(ii)): L = 400 kJ/kg,
// c = 1 kJ/kg/K, ΔT = Tm − T_host = 1000 K, same rock in sill and host; the contact stays at
// T_c = T_host + ΔT/(1 + erf λ2) = T_host + 0.621473 ΔT until the fronts meet at
// t_s = b²/(4κλ2²). The body summary reads it at the host node one spacing out, d = h = b/50.
// That node's peak is bracketed by exact values: at most T_c (maximum principle in the host,
// whose contact never exceeds T_c), at least its closed-form value at the output time or at t_s,
// whichever is earlier (the closed form holds until t_s). At d = b/50 the bracket is 8.5 K wide
// (0.85 % of ΔT), the first-order offset ΔT·(2/√π)(λ2 d/b)/(1 + erf λ2). Each bound carries the
// 1 % of ΔT tolerance of verification.md §3(ii). The body's solidification time (its centre node
// freezes when the fronts meet) against t_s: 3 % (verification.md §3(ii)).
// The boundary node, which the summary used to read, holds half magma (with its latent heat),
// half host: at emplacement it takes the mixture's temperature, (T_liquidus + L/c + T_host)/2
// = 701.25 °C by energy (equal control-volume shares), 8 % of ΔT above T_c.
TEST(BodySummary, ContactOfSillIntrudedAtItsMeltingPoint)
{
  const MeltingSill p;
  const int per_b = 50;
  const double h = p.b / per_b, extent = 5 * p.b, t_s = p.solidification_time();
  const double dT = p.Tm - p.T_host, T_c = p.contact();
  ASSERT_NEAR((T_c - p.T_host) / dT, 0.621473, 1e-6); // the catalogue's value
  ThermalHistorySettings hs;
  BodySummarySettings summary;
  summary.bodies = { 1 };
  hs.summary = summary;
  const std::vector<double> times = { 0.5 * t_s, 1.5 * t_s };
  const ColumnRun run = run_layer(p.magma(), p.b, p.T_host, p.Tm + p.half_interval, extent,
    int(extent / h + 0.5), false, times, 0, h, IntegratorKind::ForwardEuler, &hs);
  const auto& rows = run.history->summaries();
  ASSERT_EQ(rows.size(), times.size());
  for (std::size_t k = 0; k < times.size(); ++k)
  {
    const RegionSummary& sill = rows[k].regions.at(1);
    const double lower = p.host(h, std::min(times[k], t_s));
    EXPECT_NEAR(sill.contact_distance, h, 1e-9 * h);
    EXPECT_GE(sill.contact_temperature, lower - 0.01 * dT) << "t/t_s = " << times[k] / t_s;
    EXPECT_LE(sill.contact_temperature, T_c + 0.01 * dT) << "t/t_s = " << times[k] / t_s;
  }
  EXPECT_TRUE(std::isinf(rows[0].regions.at(1).solidification_time)); // still molten
  EXPECT_NEAR(rows[1].regions.at(1).solidification_time / t_s, 1.0, 0.03);
  const double mixture = (p.Tm + p.half_interval + p.L / p.c + p.T_host) / 2;
  EXPECT_NEAR(sheet_value(run, extent, field(run.result.snapshots.back(), "PeakTemperature"), p.b),
    mixture, 1e-6);
}

// Solidification time in the one-phase Stefan problem (lava-lake crust), Turcotte & Schubert
// (2002) §4.18 (section from memory): T = T0 + (Tm − T0) erf(η)/erf(λ), η = y/(2√(κt)). The
// solidus Ts = Tm − 5 K (the interval standing in for isothermal melting) passes depth y at
// η* = erf⁻¹(erf(λ)(Ts − T0)/(Tm − T0)), t(y) = y²/(4κη*²). With a lumped (nodal) enthalpy a
// node's melt fraction reaches zero only once its whole control volume has frozen, i.e. when
// the front passes y + h/2 (h the node spacing), so that is the depth compared.
// Tolerance 4 %: the 2 % front-position tolerance of verification.md §3(i), doubled as t ∝ y².
TEST(ThermalHistory, SolidificationTimeInLavaLakeCrust)
{
  const LavaLake p;
  const double lambda = stefan_lambda(p.L, p.c, p.Tm);
  const double eta =
    boost::math::erf_inv(std::erf(lambda) * (p.Tm - p.half_interval) / p.Tm);
  const double h = p.depth / p.cells;
  ThermalHistorySettings hs;
  const ColumnRun run = run_lava_lake(p, { kSecondsPerYear }, &hs);
  const Snapshot& snap = run.result.snapshots.back();
  const auto& solid = field(snap, "SolidificationTime");
  for (double y : { 1.0, 2.0, 4.0, 6.0 })
  {
    const double exact = std::pow(y + h / 2, 2) / (4 * p.kappa * eta * eta);
    EXPECT_NEAR(at_depth(run.mesh, solid, y) / exact, 1.0, 0.04) << "y = " << y << " m";
  }
  // Still molten at depth (front ≈ 8.1 m at 1 yr): +∞. The surface nodes are held at 0 °C
  // from the start, so they were never molten: NaN.
  EXPECT_TRUE(std::isinf(at_depth(run.mesh, solid, 12.0)));
  EXPECT_TRUE(std::isnan(at_depth(run.mesh, solid, 0.0)));
}

// Heat in place, volumetric method of Muffler & Cataldi (1978), Geothermics 7, generalised with
// the enthalpy; worked examples of verification.md §9, computed here by hand:
//  (a) reservoir V = 10 km × 1 km × 1 km = 1e10 m³ at 220 °C, T_ref = 15 °C, bulk
//      ρc = 0.9·2650·850 + 0.1·860·4500 = 2.41425e6 J/(m³K) carried as one rock
//      (ρ = 2414.25 kg/m³, c = 1000): H = ρc V ΔT = 2.41425e6 · 1e10 · 205 = 4.9492125e18 J;
//      recoverable with R = 0.25: 1.237303e18 J.
//  (b) sill 10 km × 10 km × 100 m, ρ = 2800, c = 1200, L = 400 kJ/kg, fully molten at
//      1150 °C, T_ref = 15 °C: H = ρV (c ΔT + L) = 2800 · 1e10 · (1200·1135 + 4e5) = 4.9336e19 J.
// Tolerance: arithmetic, 1e-12 relative (verification.md §9).
TEST(BodySummary, HeatInPlaceWorkedExamples)
{
  BodySummarySettings s;
  s.reference_temperature = 15;
  s.recovery_factor = 0.25;
  {
    Mesh mesh = make_box_hex({ 0, 0, -1000 }, { 10000, 1000, 0 }, { 4, 2, 2 });
    ThermalModel model(mesh, { simple_rock("reservoir", 2.5, 2414.25, 1000) },
      std::vector<int>(mesh.n_cells(), 0));
    const BodySummary b =
      summarize_bodies(model, 0, std::vector<double>(mesh.n_points(), 220.0), {}, s);
    const double H = (0.9 * 2650 * 850 + 0.1 * 860 * 4500) * 1e10 * (220 - 15);
    EXPECT_NEAR(b.model.heat_in_place / H, 1.0, 1e-12);
    EXPECT_NEAR(b.model.heat_in_place / 4.949212e18, 1.0, 1e-6); // the catalogue's rounding
    EXPECT_NEAR(b.model.recoverable_heat / (0.25 * H), 1.0, 1e-12);
    EXPECT_NEAR(b.model.volume / 1e10, 1.0, 1e-12);
    EXPECT_EQ(b.model.melt_volume_fraction, 0.0);
    EXPECT_TRUE(std::isnan(b.model.solidification_time)); // no history given
  }
  {
    Mesh mesh = make_box_hex({ 0, 0, -100 }, { 10000, 10000, 0 }, { 2, 2, 2 });
    Rock sill = simple_rock("dolerite", 2.0, 2800, 1200);
    sill.latent_heat = 4e5;
    sill.solidus = 1000;
    sill.liquidus = 1100;
    ThermalModel model(mesh, { sill }, std::vector<int>(mesh.n_cells(), 0));
    const BodySummary b =
      summarize_bodies(model, 0, std::vector<double>(mesh.n_points(), 1150.0), {}, s);
    const double H = 2800 * 1e10 * (1200 * (1150 - 15) + 4e5);
    EXPECT_NEAR(b.model.heat_in_place / H, 1.0, 1e-12);
    EXPECT_NEAR(b.model.heat_in_place / 4.9336e19, 1.0, 1e-6);
    EXPECT_NEAR(b.regions.at(0).melt_volume_fraction, 1.0, 1e-15);
  }
}

// Bad input names the value or region.
TEST(ThermalHistory, BadInput)
{
  Mesh mesh = make_box_hex({ 0, 0, -2 }, { 2, 2, 0 }, { 2, 2, 2 });
  ThermalModel model(mesh, { simple_rock("host", 2.5, 2500, 1000) }, std::vector<int>(8, 0));
  for (double bad : { -200.0, 3500.0, double(NAN) })
  {
    ThermalHistorySettings s;
    s.thresholds = { 300, bad };
    const std::string m = message_of([&] { ThermalHistory h(model, s); });
    EXPECT_NE(m.find("threshold 1"), std::string::npos) << m;
    EXPECT_NE(m.find("temperature range"), std::string::npos) << m;
  }
  {
    ThermalHistorySettings s;
    s.thresholds = { 300, 500, 300 };
    const std::string m = message_of([&] { ThermalHistory h(model, s); });
    EXPECT_NE(m.find("threshold 2 (300 °C) repeats threshold 0"), std::string::npos) << m;
  }
  {
    // set up for one model, started on another
    Mesh other = make_box_hex({ 0, 0, -2 }, { 2, 2, 0 }, { 1, 1, 1 });
    ThermalModel small(other, { simple_rock("host", 2.5, 2500, 1000) }, { 0 });
    ThermalHistory h(model, {});
    tbb::task_arena arena(1);
    const std::string m = message_of([&] {
      h.start(0, std::vector<double>(small.n_nodes(), 10.0), small, arena);
    });
    EXPECT_NE(m.find("27 nodes"), std::string::npos) << m;
  }
  {
    ThermalHistorySettings s;
    s.organic = { { 7, {} } };
    const std::string m = message_of([&] { ThermalHistory h(model, s); });
    EXPECT_NE(m.find("organic-bearing region 7"), std::string::npos) << m;
  }
  {
    ThermalHistorySettings s;
    s.organic = { { 0, { InitialMaturity::Kind::Reflectance, 9.0 } } };
    const std::string m = message_of([&] { ThermalHistory h(model, s); });
    EXPECT_NE(m.find("region 0"), std::string::npos) << m;
    EXPECT_NE(m.find("9 %Ro"), std::string::npos) << m;
  }
  for (double R : { -0.1, 1.5 })
  {
    ThermalHistorySettings s;
    s.summary = BodySummarySettings{};
    s.summary->recovery_factor = R;
    const std::string m = message_of([&] { ThermalHistory h(model, s); });
    EXPECT_NE(m.find("recovery factor"), std::string::npos) << m;
    std::ostringstream value;
    value << R;
    EXPECT_NE(m.find(value.str()), std::string::npos) << m;
  }
  {
    BodySummarySettings s;
    s.bodies = { 3 };
    const std::string m = message_of([&] { validate(s, mesh); });
    EXPECT_NE(m.find("body region 3"), std::string::npos) << m;
  }
}

namespace
{
struct SillRun
{
  SimulationResult result;
  std::shared_ptr<ThermalHistory> history;
  Mesh mesh;
};

// Host with a geotherm, organic-bearing with burial maturity; a sill with latent heat
// emplaced at 0.01 yr; radiating and convecting top.
SillRun run_sill(int threads)
{
  SillRun run;
  run.mesh = make_box_hex({ 0, 0, -12 }, { 16, 16, 0 }, { 16, 16, 12 });
  for (std::size_t c = 0; c < run.mesh.n_cells(); ++c)
  {
    const auto& q = run.mesh.points[run.mesh.nodes(c)[0]];
    if (q[2] < -5 && q[2] >= -7 && q[0] > 3 && q[0] < 12)
      run.mesh.cell_region[c] = 1;
  }
  Rock host = simple_rock("shale", 1.8, 2500, 900);
  host.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  Rock sill = simple_rock("dolerite", 2.2, 2900, 1100);
  sill.latent_heat = 4e5;
  sill.solidus = 980;
  sill.liquidus = 1150;
  ThermalModel model(run.mesh, { host, sill }, std::vector<int>(run.mesh.n_cells(), 0));
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::RadiationConvection;
  top.transfer_coefficient = 10;
  ThermalHistorySettings hs;
  hs.thresholds = { 200, 500 };
  InitialMaturity burial;
  burial.kind = InitialMaturity::Kind::Burial;
  burial.age = 20e6 * kSecondsPerYear;
  hs.organic = { { 0, burial } };
  BodySummarySettings summary;
  summary.bodies = { 1 };
  summary.aureole_reflectance = 0.6;
  hs.summary = summary;
  run.history = std::make_shared<ThermalHistory>(model, hs);
  SimulationSettings s;
  s.output_times = { 0.02 * kSecondsPerYear, 0.1 * kSecondsPerYear };
  s.threads = threads;
  ForwardEuler fe;
  run.result = simulate(model, { top }, { InitialState::Kind::Geotherm, 10, 0.03, 0 },
    { { 1, 1, 0.01 * kSecondsPerYear, 1150 } }, s, fe, {}, run.history.get());
  return run;
}

bool same_bits(double a, double b)
{
  return std::memcmp(&a, &b, sizeof a) == 0;
}
} // namespace

// Results are bitwise identical for 1 and 2 threads (DEVELOPERS.md, determinism rule): every
// recorded array and every summary entry. Also: the emplacement's jump is recorded (interior
// sill nodes peak at the emplacement temperature at the emplacement time), the organic index
// covers exactly the host's nodes, burial maturity of 20 Myr at the geotherm is above the
// unreacted value and below what the contact reaches, and heat in place follows the ledger.
TEST(ThermalHistory, DeterministicAcrossThreadCounts)
{
  const SillRun one = run_sill(1), two = run_sill(2);
  ASSERT_EQ(one.result.snapshots.size(), two.result.snapshots.size());
  for (std::size_t k = 0; k < one.result.snapshots.size(); ++k)
  {
    const auto& a = one.result.snapshots[k].point_fields;
    const auto& b = two.result.snapshots[k].point_fields;
    ASSERT_EQ(a.size(), 6u); // peak, its time, solidification, 2 thresholds, EasyRo
    ASSERT_EQ(a.size(), b.size());
    for (std::size_t f = 0; f < a.size(); ++f)
    {
      ASSERT_EQ(a[f].name, b[f].name);
      EXPECT_EQ(0, std::memcmp(a[f].values.data(), b[f].values.data(),
                     a[f].values.size() * sizeof(double)))
        << a[f].name << ", snapshot " << k;
    }
    const BodySummary &sa = one.history->summaries()[k], &sb = two.history->summaries()[k];
    for (std::size_t r = 0; r <= sa.regions.size(); ++r)
    {
      const RegionSummary& x = r < sa.regions.size() ? sa.regions[r] : sa.model;
      const RegionSummary& y = r < sb.regions.size() ? sb.regions[r] : sb.model;
      for (auto member : { &RegionSummary::volume, &RegionSummary::melt_volume_fraction,
             &RegionSummary::heat_in_place, &RegionSummary::solidification_time,
             &RegionSummary::contact_temperature, &RegionSummary::contact_distance,
             &RegionSummary::aureole_thickness_temperature,
             &RegionSummary::aureole_thickness_reflectance })
        EXPECT_TRUE(same_bits(x.*member, y.*member)) << "row " << r << ", snapshot " << k;
    }
  }

  const Snapshot& last = one.result.snapshots.back();
  const auto& peak = field(last, "PeakTemperature");
  const auto& peak_time = field(last, "PeakTemperatureTime");
  const auto& ro = field(last, "EasyRo");
  double ro_far = NAN, ro_contact = NAN;
  for (std::size_t i = 0; i < one.mesh.n_points(); ++i)
  {
    const auto& q = one.mesh.points[i];
    const bool sill_interior = q[2] < -5.5 && q[2] > -6.5 && q[0] > 4.5 && q[0] < 11.5;
    if (sill_interior)
    {
      EXPECT_NEAR(peak[i], 1150.0, 1e-9) << "node " << i; // T recovered from E by Newton
      EXPECT_EQ(peak_time[i], 0.01 * kSecondsPerYear) << "node " << i;
      EXPECT_EQ(one.history->organic_index(i), -1) << "node " << i; // not host rock
    }
    else
      EXPECT_GE(one.history->organic_index(i), 0) << "node " << i;
    if (q[0] == 8 && q[1] == 8 && q[2] == -11)
      ro_far = ro[i];
    if (q[0] == 8 && q[1] == 8 && q[2] == -4)
      ro_contact = ro[i];
  }
  EXPECT_GT(ro_far, easy_ro_minimum());
  EXPECT_GT(ro_contact, ro_far + 0.1);
  // Host-side contact (body_summary.h), one node spacing (1 m = b, the sill's half-thickness)
  // outside the sill: a plausibility bracket only, as the rocks differ (shale with k(T) over
  // dolerite) and the melting interval is wide. Below: the peak at d = b beside the same sheet
  // without latent heat, θ_peak = 0.242 (Carslaw & Jaeger 1959 ch. 2, verification.md §2; latent
  // heat only adds heat; the shale's lower effusivity makes this rough). Above: the contact
  // value of a sill intruded at its melting point, Th + ΔT/(1 + erf λ2) with the dolerite's L
  // and c (Turcotte & Schubert 2002, solidification of a dike or sill, §4.19 from memory;
  // verification.md §3(ii)): host nodes stay below the contact (maximum principle), and a node
  // b out peaks far below it (about half the excess without latent heat, verification.md §2),
  // which leaves room for the shale's lower effusivity raising the contact itself. Th = 10 °C
  // (the geotherm at the sill, within 0.3 K).
  const RegionSummary& sill = one.history->summaries().back().regions.at(1);
  Sheet sheet;
  sheet.b = 1;
  const double Th = 10, dT = 1150 - Th;
  EXPECT_GT(sill.contact_temperature, Th + dT * sheet.peak_theta(2 * sheet.b));
  EXPECT_LT(sill.contact_temperature, Th + dT / (1 + std::erf(sill_lambda(4e5, 1100, dT))));
  EXPECT_EQ(sill.contact_distance, 1.0);
  EXPECT_GT(sill.aureole_thickness_reflectance, 0.0);
  // Heat in place is E evaluated with the output T field, so between two outputs after the
  // emplacement it changes by the boundary heat (verification.md §11.5): 1e-8 relative.
  const auto& rows = one.history->summaries();
  const auto& snaps = one.result.snapshots;
  const double boundary = snaps[1].boundary_heat - snaps[0].boundary_heat;
  EXPECT_NEAR((rows[1].model.heat_in_place - rows[0].model.heat_in_place) / boundary, 1.0, 1e-8);
}

// EASY%Ro (Sweeney & Burnham 1990, AAPG Bull. 74) in the host of the 100 m sill of
// verification.md §8(d): instantaneous sheet of Carslaw & Jaeger (1959) ch. 2, b = 50 m,
// T0 = 1150, Th = 50 °C, κ = 1e-6 m²/s, host unreacted, 2000 yr. Expected values from
// tests/reference/easy_ro_sheet_expected.txt (solve_ivp along the closed-form T(t)).
// Tolerance 0.05 %Ro absolute: verification.md §8 allows 0.05–0.1 %Ro when T is within 1 % of
// ΔT (∂%Ro/∂T ≈ 0.01–0.03 per K); at 10 nodes per b the peak is far better than that.
TEST(ThermalHistory, EasyRoBesideCoolingSill)
{
  const std::string path = std::string(EMBER_REFERENCE_DIR) + "/easy_ro_sheet_expected.txt";
  std::ifstream in(path);
  ASSERT_TRUE(in) << path;
  std::vector<std::pair<double, double>> expected; // (distance [m], %Ro)
  for (std::string line; std::getline(in, line);)
  {
    if (line.empty() || line[0] == '#')
      continue;
    std::istringstream row(line);
    double d, ro;
    row >> d >> ro;
    expected.emplace_back(d, ro);
  }
  ASSERT_EQ(expected.size(), 6u);

  Sheet p;
  p.b = 50;
  ASSERT_DOUBLE_EQ(p.kappa(), 1e-6);
  const double extent = 16 * p.b;
  const int per_b = 10;
  ThermalHistorySettings hs;
  hs.organic = { { 0, {} } }; // the host, unreacted at the start
  const ColumnRun run = run_sheet(
    p, extent, 16 * per_b, false, { 2000 * kSecondsPerYear }, 0, p.b / per_b, IntegratorKind::ForwardEuler, &hs);
  const Snapshot& snap = run.result.snapshots.back();
  const std::vector<double>* ro = nullptr;
  for (const PointField& f : snap.point_fields)
    if (f.name == "EasyRo")
      ro = &f.values;
  ASSERT_TRUE(ro);
  for (const auto& [d, value] : expected)
    EXPECT_NEAR(sheet_value(run, extent, *ro, p.b + d), value, 0.05) << "d = " << d << " m";
  // Not organic: the sill's interior nodes carry NaN.
  EXPECT_TRUE(std::isnan(sheet_value(run, extent, *ro, 0.5 * p.b)));
}

// Driven directly with a piecewise-linear history (as an integrator's step ends would): the
// recorded products are exact for linear segments, so three calls at the breakpoints and 3000
// calls along the same history (as forward-Euler steps or RKL2 super-steps would give) agree
// to round-off (1e-12 relative), and both match the closed forms: peak 400 °C at 100 yr; time
// above 300 °C and the solidus (350 °C) crossing on the cooling leg from the segment
// geometry; EASY%Ro against the python reference value of this history
// (tests/reference/easy_ro_expected.txt, 1e-9 relative as in test_easy_ro).
TEST(ThermalHistory, ExactForLinearSegmentsWhateverTheStep)
{
  Mesh mesh = make_box_hex({ 0, 0, -1 }, { 1, 1, 0 }, { 1, 1, 1 });
  Rock rock = simple_rock("low-melting", 2.0, 2500, 1000);
  rock.latent_heat = 1e5;
  rock.solidus = 350;
  rock.liquidus = 390;
  ThermalModel model(mesh, { rock }, { 0 });
  const double yr = kSecondsPerYear;
  const std::vector<std::pair<double, double>> history{ { 0, 50 }, { 100 * yr, 400 },
    { 2100 * yr, 100 } };
  double expected_ro = NAN;
  {
    std::ifstream in(std::string(EMBER_REFERENCE_DIR) + "/easy_ro_expected.txt");
    for (std::string line; std::getline(in, line);)
      if (line.rfind("case contact_ramp_50_to_400C_in_100yr_then_cool_to_100C_in_2kyr ", 0) == 0)
        std::istringstream(line.substr(line.find(' ', 5))) >> expected_ro;
  }
  ASSERT_FALSE(std::isnan(expected_ro));
  tbb::task_arena arena(1);
  auto drive = [&](int per_segment) {
    ThermalHistorySettings s;
    s.thresholds = { 300 };
    s.organic = { { 0, {} } };
    auto h = std::make_shared<ThermalHistory>(model, s);
    h->start(0, std::vector<double>(mesh.n_points(), history[0].second), model, arena);
    for (std::size_t k = 0; k + 1 < history.size(); ++k)
      for (int j = 1; j <= per_segment; ++j)
      {
        const double f = double(j) / per_segment;
        const auto [t0, T0] = history[k];
        const auto [t1, T1] = history[k + 1];
        h->update(t0 + f * (t1 - t0), std::vector<double>(mesh.n_points(), T0 + f * (T1 - T0)),
          model, arena);
      }
    return h;
  };
  const auto coarse = drive(1), fine = drive(1500);
  const double above = (400.0 - 300) / 350 * 100 * yr + (400.0 - 300) / 300 * 2000 * yr;
  const double solid = 100 * yr + (400.0 - 350) / 300 * 2000 * yr;
  for (const auto& h : { coarse, fine })
  {
    EXPECT_EQ(h->peak_temperature()[0], 400.0);
    EXPECT_EQ(h->peak_time()[0], 100 * yr);
    EXPECT_NEAR(h->time_above(0)[0] / above, 1.0, 1e-12);
    EXPECT_NEAR(h->solidification_time()[0] / solid, 1.0, 1e-12);
    EXPECT_NEAR(h->reflectance()[0] / expected_ro, 1.0, 1e-9);
  }
  EXPECT_NEAR(fine->reflectance()[0] / coarse->reflectance()[0], 1.0, 1e-12);
}

// Aureole geometry on a 3-D mesh: a synthetic peak-temperature field decreasing with distance
// from an L-shaped body, so the host nodes above the limit form one connected shell; the
// reported thickness must equal the largest distance from those nodes to the nearest boundary
// node, computed here by brute force (exact arithmetic on node coordinates: 1e-12 m).
// Contact temperature on the host side: the nearest host nodes lie one spacing (1 m) from the
// body's boundary nodes, joined to them by a cube edge, which the Kuhn split keeps as a tet
// edge; diagonal tet edges reach only farther (colder) nodes. So 900 − 100·1 = 800 °C at
// 1 m, not the boundary nodes' 1000 °C.
TEST(BodySummary, AureoleThicknessOnTetrahedra)
{
  Mesh mesh = make_box_tet({ 0, 0, 0 }, { 12, 10, 8 }, { 12, 10, 8 });
  auto in_body = [](const Point& q) {
    return (q[0] > 3 && q[0] < 7 && q[1] > 3 && q[1] < 5 && q[2] > 3 && q[2] < 5) ||
      (q[0] > 5 && q[0] < 7 && q[1] > 3 && q[1] < 8 && q[2] > 3 && q[2] < 5);
  };
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    Point centre{};
    for (auto n : mesh.nodes(c))
      for (int d = 0; d < 3; ++d)
        centre[d] += mesh.points[n][d] / mesh.nodes(c).size();
    if (in_body(centre))
      mesh.cell_region[c] = 1;
  }
  ThermalModel model(mesh, { simple_rock("host", 2.5, 2500, 1000) },
    std::vector<int>(mesh.n_cells(), 0));
  // boundary nodes: in a body cell and in a host cell
  std::vector<char> body_node(mesh.n_points(), 0), host_node(mesh.n_points(), 0);
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    for (auto n : mesh.nodes(c))
      (mesh.cell_region[c] == 1 ? body_node : host_node)[n] = 1;
  std::vector<Point> boundary;
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
    if (body_node[i] && host_node[i])
      boundary.push_back(mesh.points[i]);
  auto nearest = [&](const Point& q) {
    double d = INFINITY;
    for (const Point& b : boundary)
      d = std::min(d, std::hypot(q[0] - b[0], q[1] - b[1], q[2] - b[2]));
    return d;
  };
  std::vector<double> peak(mesh.n_points());
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
    peak[i] = body_node[i] ? 1000.0 : 900.0 - 100.0 * nearest(mesh.points[i]);
  for (double limit : { 750.0, 600.0, 450.0 }) // distances below 1.5, 3, 4.5 m
  {
    double expected = 0;
    for (std::size_t i = 0; i < mesh.n_points(); ++i)
      if (!body_node[i] && peak[i] > limit)
        expected = std::max(expected, nearest(mesh.points[i]));
    BodySummarySettings s;
    s.bodies = { 1 };
    s.aureole_temperature = limit;
    const BodySummary b =
      summarize_bodies(model, 0, std::vector<double>(mesh.n_points(), 10.0), { peak, {}, {} }, s);
    EXPECT_NEAR(b.regions.at(1).aureole_thickness_temperature, expected, 1e-12)
      << "limit " << limit;
    EXPECT_GT(expected, 0.9);
    EXPECT_EQ(b.regions.at(1).contact_temperature, 800.0);
    EXPECT_EQ(b.regions.at(1).contact_distance, 1.0);
    EXPECT_EQ(b.model.contact_temperature, 800.0);
    EXPECT_EQ(b.model.contact_distance, 1.0);
  }
}

// Bookkeeping of the solidification column (a definition, no external source): the contact
// nodes' control volumes hold the body's magma, so their solidification times count for the
// body and the whole model, not for the host region around it; a host node away from any body
// that melted (host partial melting) still counts for the host.
TEST(BodySummary, ContactNodesSolidifyWithTheBodyNotTheHost)
{
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 6, 1, 6 }, { 6, 1, 6 });
  mark_layer(mesh, 2, 4); // the two cell layers between z = 2 and 4 are region 1
  const ThermalModel model(mesh, { simple_rock("host", 2.5, 2600, 900) },
    std::vector<int>(mesh.n_cells(), 0));
  const double kNaN = std::numeric_limits<double>::quiet_NaN();
  std::vector<double> solidified(mesh.n_points(), kNaN); // host: never molten
  std::size_t far_host = 0;
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
  {
    const double z = mesh.points[i][2];
    if (z > 2.5 && z < 3.5)
      solidified[i] = 10.0; // body interior
    else if (std::abs(z - 2.0) < 1e-9 || std::abs(z - 4.0) < 1e-9)
      solidified[i] = 20.0; // contact nodes, shared by body and host cells
    else if (std::abs(z - 6.0) < 1e-9 && mesh.points[i][0] == 0.0 && mesh.points[i][1] == 0.0)
      far_host = i;
  }
  BodySummarySettings s;
  s.bodies = { 1 };
  const auto summarize = [&] {
    return summarize_bodies(model, 0, std::vector<double>(mesh.n_points(), 20.0),
      { {}, solidified, {} }, s);
  };
  BodySummary b = summarize();
  EXPECT_EQ(b.regions.at(1).solidification_time, 20.0);
  EXPECT_TRUE(std::isnan(b.regions.at(0).solidification_time));
  EXPECT_EQ(b.model.solidification_time, 20.0);
  solidified[far_host] = 5.0; // a host node away from the body melted and froze again
  b = summarize();
  EXPECT_EQ(b.regions.at(0).solidification_time, 5.0);
  EXPECT_EQ(b.regions.at(1).solidification_time, 20.0);
}
