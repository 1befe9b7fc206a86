// Rock property laws and the enthalpy inversion.
#include "ember/rock.h"
#include "ember/thermal_model.h"

#include <gtest/gtest.h>

#include <cmath>

using namespace ember;

namespace
{
Rock basalt_with_latent()
{
  Rock r;
  r.name = "basalt";
  r.density = 2800;
  r.heat_capacity.c_ref = 1100;
  r.latent_heat = 4e5;
  r.solidus = 980;
  r.liquidus = 1180;
  return r;
}

Rock waples_host()
{
  Rock r;
  r.name = "host";
  r.heat_capacity.law = HeatCapacity::Law::WaplesWaples;
  r.heat_capacity.c_ref = 900;
  return r;
}
} // namespace

// Vosteen & Schellschmidt (2003), worked values re-derived in shared/reference/verification.md
// §10 (coefficients from memory there): crystalline k25 = 3.0 → 2.6717/2.3397/2.0810/1.7042 at
// 100/200/300/500 °C; sedimentary k25 = 2.5 → 2.2052/1.8992/1.6678 at 100/200/300 °C.
TEST(Rock, VosteenSchellschmidtWorkedValues)
{
  Rock r;
  r.name = "granite";
  r.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  r.conductivity.k_ref = 3.0;
  EXPECT_NEAR(conductivity(r, 100), 2.6717, 1e-4);
  EXPECT_NEAR(conductivity(r, 200), 2.3397, 1e-4);
  EXPECT_NEAR(conductivity(r, 300), 2.0810, 1e-4);
  EXPECT_NEAR(conductivity(r, 500), 1.7042, 1e-4);
  r.conductivity.crystalline = false;
  r.conductivity.k_ref = 2.5;
  EXPECT_NEAR(conductivity(r, 100), 2.2052, 1e-4);
  EXPECT_NEAR(conductivity(r, 200), 1.8992, 1e-4);
  EXPECT_NEAR(conductivity(r, 300), 1.6678, 1e-4);
}

// Zoth & Haenel (1988) as reproduced by Clauser & Huenges (1995); table in verification.md §10
// (coefficients from memory there): basic rocks A = 1.18, B = 474 → 2.46 / 2.04 / 1.81.
TEST(Rock, ZothHaenelBasicRocks)
{
  Rock r;
  r.name = "dolerite";
  r.conductivity.law = Conductivity::Law::ZothHaenel;
  r.conductivity.a = 1.18;
  r.conductivity.b = 474;
  EXPECT_NEAR(conductivity(r, 20), 2.46, 5e-3);
  EXPECT_NEAR(conductivity(r, 200), 2.04, 5e-3);
  EXPECT_NEAR(conductivity(r, 400), 1.81, 5e-3);
}

// Waples & Waples (2004) normalised heat capacity; ratios cN(T)/cN(20) = 1.158 (100 °C),
// 1.310 (200), 1.420 (300), 1.541 (500), 1.602 (1000) from verification.md §10.
TEST(Rock, WaplesHeatCapacityRatiosAndEnthalpyIntegral)
{
  Rock r;
  r.name = "shale";
  r.heat_capacity.law = HeatCapacity::Law::WaplesWaples;
  r.heat_capacity.c_ref = 1000;
  EXPECT_NEAR(heat_capacity(r, 100) / 1000, 1.158, 1e-3);
  EXPECT_NEAR(heat_capacity(r, 200) / 1000, 1.310, 1e-3);
  EXPECT_NEAR(heat_capacity(r, 300) / 1000, 1.420, 1e-3);
  EXPECT_NEAR(heat_capacity(r, 500) / 1000, 1.541, 1e-3);
  EXPECT_NEAR(heat_capacity(r, 1000) / 1000, 1.602, 1e-3);
  // dh/dT = c: central difference of the enthalpy against the law, across the 1000 °C hold.
  for (double T : { 50.0, 400.0, 999.0, 1001.0, 1300.0 })
    EXPECT_NEAR((sensible_enthalpy(r, T + 1e-3) - sensible_enthalpy(r, T - 1e-3)) / 2e-3,
      heat_capacity(r, T), 1e-3);
}

TEST(Rock, EnthalpyIsMonotoneAndCarriesLatentHeat)
{
  const Rock r = basalt_with_latent();
  double previous = specific_enthalpy(r, -50);
  for (double T = -49; T < 1500; T += 0.5)
  {
    const double h = specific_enthalpy(r, T);
    EXPECT_GT(h, previous) << "at " << T;
    previous = h;
  }
  EXPECT_NEAR(specific_enthalpy(r, 1200) - specific_enthalpy(r, 900), 1100 * 300 + 4e5, 1e-6);
  EXPECT_DOUBLE_EQ(melt_fraction(r, 1080), 0.5);
}

// T(E) at and around the kinks of E(T) (solidus, liquidus) and with a mixed-material node.
TEST(Rock, TemperatureInversionAtKinks)
{
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 2, 1, 1 }, { 2, 1, 1 });
  ThermalModel model(mesh, { waples_host(), basalt_with_latent() }, { 0, 1 });
  for (std::size_t node = 0; node < mesh.n_points(); ++node)
    for (double T : { 979.9999, 980.0, 980.0001, 1080.0, 1179.9999, 1180.0, 1180.0001, 20.0,
           1500.0 })
    {
      const double E = model.energy(node, T);
      for (double guess : { T, 0.0, 2000.0, 980.0, 1180.0 })
        EXPECT_NEAR(model.temperature(node, E, guess), T, 1e-8) << "node " << node;
    }
}

// The bounds behind T(E)'s early stop (EnthalpyFit::capacity_floor, curvature_bound), against
// the definitions sampled densely: min c(T) and max |dc/dT| by central differences (no
// published source needed: both are properties of the fit itself).
TEST(Rock, EnthalpyFitNewtonBoundsMatchSampledExtremes)
{
  for (const Rock& rock : { waples_host(), basalt_with_latent() })
  {
    const EnthalpyFit fit = enthalpy_fit(rock);
    double c_min = 1e300, slope_max = 0.0;
    for (double T = -300.0; T <= 2000.0; T += 0.25)
    {
      c_min = std::min(c_min, fit.sensible_capacity(T));
      const double d = 1e-3;
      slope_max = std::max(slope_max,
        std::abs(fit.sensible_capacity(T + d) - fit.sensible_capacity(T - d)) / (2 * d));
    }
    EXPECT_GT(fit.capacity_floor, 0.0) << rock.name;
    EXPECT_LE(fit.capacity_floor, c_min + 1e-9) << rock.name;
    EXPECT_NEAR(fit.capacity_floor, c_min, 1e-6 * c_min) << rock.name;
    EXPECT_GE(fit.curvature_bound, slope_max * (1 - 1e-6)) << rock.name;
    EXPECT_NEAR(fit.curvature_bound, slope_max, 1e-3 * slope_max + 1e-12) << rock.name;
  }
}

// T(E) after a change, from the previous solve's 1/(dE/dT): whatever path it takes (one Newton
// step accepted by the Taylor bound, or iterations near a solidus or liquidus), the result is
// within the documented tolerance 1e-9 (1 + |T|) of the temperature that produced E. Steps
// from 0.001 K to 300 K, up and down, across both kinks and on single- and mixed-rock nodes.
TEST(Rock, TemperatureAfterChangeMeetsItsTolerance)
{
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 2, 1, 1 }, { 2, 1, 1 });
  ThermalModel model(mesh, { waples_host(), basalt_with_latent() }, { 0, 1 });
  int checked = 0;
  for (std::size_t node = 0; node < mesh.n_points(); ++node)
    for (double T_old : { 20.0, 400.0, 979.0, 980.0, 1000.0, 1179.5, 1180.0, 1300.0 })
      for (double change : { 1e-3, 0.1, 3.0, 40.0, 300.0 })
        for (double sign : { -1.0, 1.0 })
        {
          const double T_new = T_old + sign * change;
          float inverse_capacity = static_cast<float>(1.0 / model.capacity(node, T_old));
          const double T = model.temperature_after_change(
            node, model.energy(node, T_new), model.energy(node, T_old), T_old, inverse_capacity);
          EXPECT_NEAR(T, T_new, 1e-9 * (1 + std::abs(T_new)) + 1e-11)
            << "node " << node << " from " << T_old << " to " << T_new;
          EXPECT_GT(inverse_capacity, 0.0);
          ++checked;
        }
  EXPECT_EQ(checked, 12 * 8 * 5 * 2);
}
