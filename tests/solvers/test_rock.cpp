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
  Rock host;
  host.name = "host";
  host.heat_capacity.law = HeatCapacity::Law::WaplesWaples;
  host.heat_capacity.c_ref = 900;
  ThermalModel model(mesh, { host, basalt_with_latent() }, { 0, 1 });
  for (std::size_t node = 0; node < mesh.n_points(); ++node)
    for (double T : { 979.9999, 980.0, 980.0001, 1080.0, 1179.9999, 1180.0, 1180.0001, 20.0,
           1500.0 })
    {
      const double E = model.energy(node, T);
      for (double guess : { T, 0.0, 2000.0, 980.0, 1180.0 })
        EXPECT_NEAR(model.temperature(node, E, guess), T, 1e-8) << "node " << node;
    }
}
