#include "ember/rock.h"

#include <algorithm>
#include <cmath>
#include <sstream>

namespace ember
{
namespace
{

[[noreturn]] void fail(const Rock& rock, const char* property, double value, const char* rule)
{
  std::ostringstream msg;
  msg << "rock type '" << rock.name << "': " << property << " = " << value << " is invalid ("
      << rule << ")";
  throw PropertyError(msg.str());
}

void require_positive(const Rock& rock, const char* property, double value)
{
  if (!std::isfinite(value) || value <= 0.0)
    fail(rock, property, value, "must be a finite number > 0");
}

void require_non_negative(const Rock& rock, const char* property, double value)
{
  if (!std::isfinite(value) || value < 0.0)
    fail(rock, property, value, "must be a finite number >= 0");
}

// Vosteen & Schellschmidt (2003), Phys. Chem. Earth 28, 499-509: k0 (value at 0 °C) from the
// 25 °C value, and the temperature coefficients a, b. Coefficients from memory (see
// shared/reference/verification.md §10); the tests check the published worked values.
struct VsCoefficients
{
  double k0, beta;
};

VsCoefficients vosteen_schellschmidt(const Conductivity& law)
{
  const double k25 = law.k_ref;
  double k0, a, b;
  if (law.crystalline)
  {
    k0 = 0.53 * k25 + 0.5 * std::sqrt(1.13 * k25 * k25 - 0.42 * k25);
    a = 0.0030;
    b = 0.0042;
  }
  else
  {
    k0 = 0.54 * k25 + 0.5 * std::sqrt(1.16 * k25 * k25 - 0.39 * k25);
    a = 0.0034;
    b = 0.0039;
  }
  return { k0, a - b / k0 };
}

// Waples & Waples (2004), Nat. Resour. Res. 13(2), 97-122: normalised heat capacity
// polynomial (T in °C; coefficients from memory, see verification.md §10). Held constant above
// 1000 °C, the top of its fitted range, so that magma does not run off the fit.
constexpr double kWaplesTmax = 1000.0;
constexpr double kWaplesTmin = -100.0; // held below too, so h stays monotone

double waples_normalised(double T)
{
  return ((8.95e-10 * T - 2.13e-6) * T + 0.00172) * T + 0.716;
}

double waples_normalised_integral(double T) // ∫_0^T cN dT'
{
  return (((8.95e-10 / 4.0 * T - 2.13e-6 / 3.0) * T + 0.00172 / 2.0) * T + 0.716) * T;
}

double melt_slope(const Rock& rock, double T)
{
  if (rock.latent_heat <= 0.0 || T <= rock.solidus || T >= rock.liquidus)
    return 0.0;
  return 1.0 / (rock.liquidus - rock.solidus);
}

} // namespace

void validate(const Rock& rock)
{
  if (rock.name.empty())
    throw PropertyError("a rock type has an empty name");
  require_positive(rock, "density", rock.density);
  if (rock.conductivity.law != Conductivity::Law::ZothHaenel) // Zoth & Haenel use A, B only
    require_positive(rock, "conductivity", rock.conductivity.k_ref);
  require_positive(rock, "heat_capacity", rock.heat_capacity.c_ref);
  require_non_negative(rock, "latent_heat", rock.latent_heat);
  require_non_negative(rock, "heat_production", rock.heat_production);
  if (!std::isfinite(rock.emissivity) || rock.emissivity < 0.0 || rock.emissivity > 1.0)
    fail(rock, "emissivity", rock.emissivity, "must lie in [0, 1]");
  if (rock.latent_heat > 0.0)
  {
    if (!std::isfinite(rock.solidus))
      fail(rock, "solidus", rock.solidus, "must be finite");
    if (!std::isfinite(rock.liquidus) || rock.liquidus <= rock.solidus)
    {
      std::ostringstream msg;
      msg << "rock type '" << rock.name << "': solidus (" << rock.solidus
          << " °C) must be below liquidus (" << rock.liquidus << " °C)";
      throw PropertyError(msg.str());
    }
  }
  if (rock.conductivity.law == Conductivity::Law::ZothHaenel)
  {
    // k must stay positive over the range the model can reach (-100 .. 3000 °C).
    for (double T : { -100.0, 3000.0 })
      if (!(rock.conductivity.a + rock.conductivity.b / (350.0 + T) > 0.0))
        fail(rock, "conductivity (Zoth & Haenel A, B)", rock.conductivity.a,
          "k = A + B/(350 + T) must stay positive from -100 to 3000 °C");
  }
  require_positive(rock, "conductivity floor k_min", rock.conductivity.k_min);
}

double conductivity(const Rock& rock, double T)
{
  const Conductivity& law = rock.conductivity;
  switch (law.law)
  {
    case Conductivity::Law::Constant:
      return law.k_ref;
    case Conductivity::Law::VosteenSchellschmidt:
    {
      const auto [k0, beta] = vosteen_schellschmidt(law);
      const double denominator = 0.99 + std::max(T, -100.0) * beta;
      return denominator > 0.0 ? std::max(k0 / denominator, law.k_min) : law.k_min;
    }
    case Conductivity::Law::ZothHaenel:
      return std::max(law.a + law.b / (350.0 + std::max(T, -100.0)), law.k_min);
  }
  return law.k_ref;
}

double heat_capacity(const Rock& rock, double T)
{
  const HeatCapacity& law = rock.heat_capacity;
  if (law.law == HeatCapacity::Law::Constant)
    return law.c_ref;
  const double Tc = std::clamp(T, kWaplesTmin, kWaplesTmax);
  return law.c_ref * waples_normalised(Tc) / waples_normalised(20.0);
}

double sensible_enthalpy(const Rock& rock, double T)
{
  const HeatCapacity& law = rock.heat_capacity;
  if (law.law == HeatCapacity::Law::Constant)
    return law.c_ref * T;
  const double scale = law.c_ref / waples_normalised(20.0);
  if (T < kWaplesTmin)
    return scale * (waples_normalised_integral(kWaplesTmin) +
                     waples_normalised(kWaplesTmin) * (T - kWaplesTmin));
  if (T <= kWaplesTmax)
    return scale * waples_normalised_integral(T);
  return scale * (waples_normalised_integral(kWaplesTmax) +
                   waples_normalised(kWaplesTmax) * (T - kWaplesTmax));
}

double melt_fraction(const Rock& rock, double T)
{
  if (rock.latent_heat <= 0.0)
    return 0.0;
  if (T <= rock.solidus)
    return 0.0;
  if (T >= rock.liquidus)
    return 1.0;
  return (T - rock.solidus) / (rock.liquidus - rock.solidus);
}

double specific_enthalpy(const Rock& rock, double T)
{
  return sensible_enthalpy(rock, T) + rock.latent_heat * melt_fraction(rock, T);
}

double apparent_heat_capacity(const Rock& rock, double T)
{
  return heat_capacity(rock, T) + rock.latent_heat * melt_slope(rock, T);
}

double min_heat_capacity(const Rock& rock, double T_lo, double T_hi)
{
  if (rock.heat_capacity.law == HeatCapacity::Law::Constant)
    return rock.heat_capacity.c_ref;
  // cN is increasing on [-100, 1000] °C (its derivative has no real root there), so the
  // minimum sits at the low end.
  (void)T_hi;
  return heat_capacity(rock, T_lo);
}

} // namespace ember
