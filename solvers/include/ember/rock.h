/**
 * @file rock.h
 * @brief Thermal properties of one rock type and its specific enthalpy h(T).
 *
 * Temperatures are in °C throughout the core (the empirical laws below are written in °C;
 * radiation converts to kelvin where it needs to). Everything else is SI.
 *
 * Specific enthalpy, relative to 0 °C:  h(T) = ∫_0^T c(T') dT' + L f(T),
 * where f is the melt fraction. h is strictly increasing, so T(h) is well defined.
 */
#pragma once

#include <algorithm>
#include <stdexcept>
#include <string>

namespace ember
{

/// Thrown for invalid property values; the message names the rock type and the property.
class PropertyError : public std::runtime_error
{
public:
  using std::runtime_error::runtime_error;
};

/// Thermal conductivity law k(T) [W/(m·K)], T in °C.
struct Conductivity
{
  enum class Law
  {
    Constant,             ///< k = k_ref
    VosteenSchellschmidt, ///< k = k0 / (0.99 + T (a − b/k0)), k0 from k_ref = k(25 °C)
    ZothHaenel            ///< k = A + B / (350 + T)
  };
  Law law = Law::Constant;
  double k_ref = 2.5;       ///< constant value, or the 25 °C value for Vosteen & Schellschmidt
  bool crystalline = true;  ///< Vosteen & Schellschmidt coefficient set (else sedimentary)
  double a = 0.0, b = 0.0;  ///< Zoth & Haenel A [W/(m·K)] and B [W/m]
  double k_min = 0.5;       ///< floor applied at high temperature where the fits run out [W/(m·K)]
};

/// Specific heat capacity law c(T) [J/(kg·K)], T in °C.
struct HeatCapacity
{
  enum class Law
  {
    Constant,     ///< c = c_ref
    WaplesWaples  ///< c = c_ref · cN(T)/cN(20 °C), cN the normalised polynomial; held at 1000 °C above
  };
  Law law = Law::Constant;
  double c_ref = 1000.0; ///< constant value, or the 20 °C value
};

struct Rock
{
  std::string name;
  double density = 2700.0;          ///< [kg/m³]
  Conductivity conductivity;
  HeatCapacity heat_capacity;
  double latent_heat = 0.0;         ///< of crystallisation [J/kg]; 0 = no phase change
  double solidus = 1000.0;          ///< [°C]
  double liquidus = 1200.0;         ///< [°C]
  double heat_production = 0.0;     ///< radiogenic [W/m³]
  double emissivity = 0.95;         ///< surface emissivity [-]
};

/// Throws PropertyError naming the rock and the property for NaN/negative/out-of-range values.
void validate(const Rock& rock);

/**
 * The three conductivity laws in one form, k(T) = max(k_floor, p + q / (r + s·max(T, −100))),
 * with the law's constants worked out once (Vosteen & Schellschmidt's k0 needs a square root).
 * A non-positive denominator gives k_floor. The heat operator evaluates k at every node (and
 * on rock-contact edges) in every rate call: one division, no branch on the law.
 */
struct ConductivityFit
{
  double p = 0.0, q = 0.0, r = 1.0, s = 0.0;
  double k_floor = 0.0;
  double operator()(double T) const
  {
    if (q == 0.0) // constant k: no division
      return p > k_floor ? p : k_floor;
    const double d = r + s * (T > -100.0 ? T : -100.0);
    const double k = p + q / d;
    return d > 0.0 ? (k > k_floor ? k : k_floor) : k_floor;
  }
};
ConductivityFit conductivity_fit(const Conductivity& law);

/**
 * Specific enthalpy h(T) and apparent heat capacity dh/dT of one rock with its constants
 * worked out once; the enthalpy functions below and the solver's T(E) both use it.
 *   sensible: T (a0 + T (a1 + T (a2 + T a3))) on [t_lo, t_hi], continued linearly outside
 *             (a constant c is a0 = c on an unbounded range; Waples & Waples is the quartic)
 *   latent:   L · clamp((T − solidus) / (liquidus − solidus), 0, 1)
 */
struct EnthalpyFit
{
  double a0 = 0.0, a1 = 0.0, a2 = 0.0, a3 = 0.0;
  double t_lo = -1e300, t_hi = 1e300;
  double latent = 0.0, solidus = 0.0, inverse_interval = 0.0;
  double liquidus = 0.0;
  /// Bounds for T(E)'s Newton error and the stable step: dh/dT ≥ capacity_floor > 0 (the
  /// lowest sensible c(T)) everywhere, and |d²h/dT²| ≤ curvature_bound away from solidus and
  /// liquidus (where dh/dT jumps).
  double capacity_floor = 0.0, curvature_bound = 0.0;

  /// Distance from T to the nearest jump of dh/dT (solidus or liquidus) [K].
  double kink_distance(double T) const
  {
    if (latent == 0.0)
      return 1e300;
    const double a = T - solidus, b = T - liquidus;
    return std::min(a < 0.0 ? -a : a, b < 0.0 ? -b : b);
  }

  double sensible_capacity(double T) const
  {
    const double t = T < t_lo ? t_lo : (T > t_hi ? t_hi : T);
    return a0 + t * (2.0 * a1 + t * (3.0 * a2 + t * 4.0 * a3));
  }
  double melt_fraction(double T) const
  {
    const double f = (T - solidus) * inverse_interval;
    return f < 0.0 ? 0.0 : (f > 1.0 ? 1.0 : f);
  }
  double enthalpy(double T) const
  {
    const double t = T < t_lo ? t_lo : (T > t_hi ? t_hi : T);
    const double h = t * (a0 + t * (a1 + t * (a2 + t * a3)));
    return h + (T - t) * sensible_capacity(t) + latent * melt_fraction(T);
  }
  /// dh/dT; inside the melting interval the latent term L/(liquidus − solidus) is added.
  double capacity(double T) const
  {
    const double f = (T - solidus) * inverse_interval;
    return sensible_capacity(T) + (f > 0.0 && f < 1.0 ? latent * inverse_interval : 0.0);
  }
  /// enthalpy(T) and capacity(T) together, sharing the work (T(E)'s Newton iteration). Also
  /// written for vectors of nodes in thermal_model_batch.cpp: change both together.
  void evaluate(double T, double& h, double& c) const
  {
    const double t = T < t_lo ? t_lo : (T > t_hi ? t_hi : T);
    const double c_sensible = a0 + t * (2.0 * a1 + t * (3.0 * a2 + t * 4.0 * a3));
    const double f = (T - solidus) * inverse_interval;
    const bool melting = f > 0.0 && f < 1.0;
    h = t * (a0 + t * (a1 + t * (a2 + t * a3))) + (T - t) * c_sensible +
      latent * (melting ? f : (f >= 1.0 ? 1.0 : 0.0));
    c = c_sensible + (melting ? latent * inverse_interval : 0.0);
  }
};
EnthalpyFit enthalpy_fit(const Rock& rock);

double conductivity(const Rock& rock, double T);      ///< [W/(m·K)]
double heat_capacity(const Rock& rock, double T);     ///< sensible c(T) [J/(kg·K)]
double melt_fraction(const Rock& rock, double T);     ///< linear between solidus and liquidus
double sensible_enthalpy(const Rock& rock, double T); ///< ∫_0^T c dT' [J/kg]
double specific_enthalpy(const Rock& rock, double T); ///< sensible + L f(T) [J/kg]
/// dh/dT including the latent term where the melt fraction varies [J/(kg·K)].
double apparent_heat_capacity(const Rock& rock, double T);

} // namespace ember
