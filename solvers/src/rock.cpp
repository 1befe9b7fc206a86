#include "ember/rock.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>
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

constexpr double kWaples[4] = { 0.716, 0.00172, -2.13e-6, 8.95e-10 }; // cN = Σ kWaples[n] Tⁿ

double waples_normalised(double T)
{
  return ((kWaples[3] * T + kWaples[2]) * T + kWaples[1]) * T + kWaples[0];
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

ConductivityFit conductivity_fit(const Conductivity& law)
{
  switch (law.law)
  {
    case Conductivity::Law::Constant:
      return { law.k_ref, 0.0, 1.0, 0.0, 0.0 }; // no floor: a constant k is taken as given
    case Conductivity::Law::VosteenSchellschmidt:
    {
      const auto [k0, beta] = vosteen_schellschmidt(law); // k = k0 / (0.99 + β T)
      return { 0.0, k0, 0.99, beta, law.k_min };
    }
    case Conductivity::Law::ZothHaenel: // k = A + B / (350 + T)
      return { law.a, law.b, 350.0, 1.0, law.k_min };
  }
  return { law.k_ref, 0.0, 1.0, 0.0, 0.0 };
}

double conductivity(const Rock& rock, double T)
{
  return conductivity_fit(rock.conductivity)(T);
}

namespace
{
// Extremes of the sensible capacity c(t) = a0 + 2a1 t + 3a2 t² + 4a3 t³ and of its slope
// c'(t) = 2a1 + 6a2 t + 12a3 t² over [t_lo, t_hi] (c is held constant outside, c' is 0 there):
// each is reached at an end or where its own derivative vanishes.
void set_newton_bounds(EnthalpyFit& fit)
{
  const bool cubic = fit.a1 != 0.0 || fit.a2 != 0.0 || fit.a3 != 0.0;
  if (!cubic)
  {
    fit.capacity_floor = fit.a0;
    fit.curvature_bound = 0.0;
    return;
  }
  if (!(std::isfinite(fit.t_lo) && std::isfinite(fit.t_hi) && fit.t_lo < 1e299 && fit.t_hi < 1e299))
  {
    fit.capacity_floor = 0.0; // unbounded polynomial: no bound, Newton iterates to the end
    return;
  }
  const auto slope = [&](double t) { return 2.0 * fit.a1 + t * (6.0 * fit.a2 + t * 12.0 * fit.a3); };
  std::vector<double> c_points{ fit.t_lo, fit.t_hi }, slope_points{ fit.t_lo, fit.t_hi };
  if (fit.a3 != 0.0)
    slope_points.push_back(-fit.a2 / (4.0 * fit.a3)); // vertex of c'
  // Roots of c' (candidates for c's extremes).
  const double qa = 12.0 * fit.a3, qb = 6.0 * fit.a2, qc = 2.0 * fit.a1;
  if (qa == 0.0 && qb != 0.0)
    c_points.push_back(-qc / qb);
  else if (qa != 0.0 && qb * qb - 4.0 * qa * qc >= 0.0)
  {
    const double root = std::sqrt(qb * qb - 4.0 * qa * qc);
    c_points.push_back((-qb + root) / (2.0 * qa));
    c_points.push_back((-qb - root) / (2.0 * qa));
  }
  double c_min = std::numeric_limits<double>::infinity(), slope_max = 0.0;
  for (double t : c_points)
    if (t >= fit.t_lo && t <= fit.t_hi)
      c_min = std::min(c_min, fit.sensible_capacity(t));
  for (double t : slope_points)
    if (t >= fit.t_lo && t <= fit.t_hi)
      slope_max = std::max(slope_max, std::abs(slope(t)));
  fit.capacity_floor = c_min > 0.0 ? c_min : 0.0;
  fit.curvature_bound = slope_max;
}
} // namespace

EnthalpyFit enthalpy_fit(const Rock& rock)
{
  EnthalpyFit fit;
  const HeatCapacity& law = rock.heat_capacity;
  if (law.law == HeatCapacity::Law::Constant)
    fit.a0 = law.c_ref;
  else
  {
    // h = scale ∫_0^T cN dT' with cN = c0 + c1 T + c2 T² + c3 T³ (Waples & Waples above).
    const double scale = law.c_ref / waples_normalised(20.0);
    fit.a0 = scale * kWaples[0];
    fit.a1 = scale * kWaples[1] / 2.0;
    fit.a2 = scale * kWaples[2] / 3.0;
    fit.a3 = scale * kWaples[3] / 4.0;
    fit.t_lo = kWaplesTmin;
    fit.t_hi = kWaplesTmax;
  }
  if (rock.latent_heat > 0.0)
  {
    fit.latent = rock.latent_heat;
    fit.solidus = rock.solidus;
    fit.liquidus = rock.liquidus;
    fit.inverse_interval = 1.0 / (rock.liquidus - rock.solidus);
  }
  set_newton_bounds(fit);
  return fit;
}

double heat_capacity(const Rock& rock, double T)
{
  return enthalpy_fit(rock).sensible_capacity(T);
}

double sensible_enthalpy(const Rock& rock, double T)
{
  EnthalpyFit fit = enthalpy_fit(rock);
  fit.latent = 0.0;
  return fit.enthalpy(T);
}

double melt_fraction(const Rock& rock, double T)
{
  return enthalpy_fit(rock).melt_fraction(T);
}

double specific_enthalpy(const Rock& rock, double T)
{
  return enthalpy_fit(rock).enthalpy(T);
}

double apparent_heat_capacity(const Rock& rock, double T)
{
  return enthalpy_fit(rock).capacity(T);
}

} // namespace ember
