#include "ember/easy_ro.h"

#include <algorithm>
#include <cmath>
#include <sstream>

namespace ember
{
namespace
{
constexpr double kKelvin = 273.15;
using K = EasyRoKinetics;

// a_i = E_i / R [K] of reaction i.
double activation_temperature(int i)
{
  return K::activation_energy(i) / K::gas_constant;
}

// 6-point Gauss–Legendre nodes and weights on [0, 1]. Where the Arrhenius exponent a/T moves
// by Δx ≤ 1 over the step, the integrand exp(−a/T(s)) is within round-off of an exponential
// exp(c s) with |c| ≤ 1 (a/T is nearly linear in s since ΔT/T ≤ Δx/x ≤ 1/5), and the 6-point
// rule's error term (n!)⁴/((2n+1)((2n)!)³)·max|f⁽¹²⁾| is ~2e-16 of the value: exact for our
// purpose without the cancellation the closed form suffers when T1 ≈ T0.
constexpr std::array<double, 6> kGaussNode{ 0.0337652428984239860938492, 0.1693953067668677431693002,
  0.3806904069584015456847491, 0.6193095930415984543152509, 0.8306046932331322568306998,
  0.9662347571015760139061508 };
constexpr std::array<double, 6> kGaussWeight{ 0.0856622461895851725201480, 0.1803807865240693037849167,
  0.2339569672863455236949352, 0.2339569672863455236949352, 0.1803807865240693037849167,
  0.0856622461895851725201480 };

// p(x) = 1 − x eˣ E1(x) for x > 0, from the even continued fraction of E1 (Abramowitz & Stegun
// 5.1.22): eˣE1(x) = 1/(x + 1 − q), q = 1/(x + 3 − 4/(x + 5 − 9/(x + 7 − …))). Then
// p = (1 − q)/(x + 1 − q) exactly, which avoids the cancellation of 1 − x eˣE1(x) ≈ 1/x at the
// large x (30–210) of these kinetics. q by the modified Lentz method.
double one_minus_x_ex_e1(double x)
{
  constexpr double tiny = 1e-300;
  double b = x + 3.0;
  double c = 1.0 / tiny;
  double d = 1.0 / b;
  double q = d;
  for (int n = 2; n < 10000; ++n)
  {
    const double an = -double(n) * n;
    b += 2.0;
    d = an * d + b;
    d = 1.0 / (std::abs(d) < tiny ? tiny : d);
    c = b + an / c;
    if (std::abs(c) < tiny)
      c = tiny;
    const double delta = c * d;
    q *= delta;
    if (std::abs(delta - 1.0) < 1e-16)
      break;
  }
  return (1.0 - q) / (x + 1.0 - q);
}

// Mean of exp(−a_i/T) over a linear ramp T0 → T1 [K] for all 20 reactions at once. Gauss–
// Legendre for the reactions whose exponent moves by ≤ 1 over the step (by recurrence across
// reactions: a_i = a_0 + i Δa, so exp(−a_i u) = exp(−a_0 u)·exp(−Δa u)^i, 12 exp calls in all),
// the closed form for the others.
void mean_factors(double T0, double T1, std::array<double, kEasyRoReactions>& out)
{
  const double a0 = activation_temperature(0);
  // Δa from the exact 2 kcal/mol spacing, not as a difference of two rounded a_i, whose
  // error the recurrence would multiply by up to 19.
  const double da = (K::activation_energy(1) - K::activation_energy(0)) / K::gas_constant;
  if (T0 == T1)
  {
    double e = std::exp(-a0 / T0);
    const double r = std::exp(-da / T0);
    for (int i = 0; i < kEasyRoReactions; ++i, e *= r)
      out[i] = e;
    return;
  }
  const double T_lo = std::min(T0, T1), T_hi = std::max(T0, T1);
  const double spread = 1.0 / T_lo - 1.0 / T_hi; // Δx_i = a_i · spread
  int n_gauss = 0;
  while (n_gauss < kEasyRoReactions && activation_temperature(n_gauss) * spread <= 1.0)
    ++n_gauss;
  if (n_gauss > 0)
  {
    std::array<double, 6> e, r;
    for (int k = 0; k < 6; ++k)
    {
      const double u = 1.0 / (T0 + kGaussNode[k] * (T1 - T0));
      e[k] = std::exp(-a0 * u);
      r[k] = std::exp(-da * u);
    }
    for (int i = 0; i < n_gauss; ++i)
    {
      double s = 0.0;
      for (int k = 0; k < 6; ++k)
      {
        s += kGaussWeight[k] * e[k];
        e[k] *= r[k];
      }
      out[i] = s;
    }
  }
  for (int i = n_gauss; i < kEasyRoReactions; ++i)
    out[i] = mean_arrhenius_factor(activation_temperature(i), T0, T1);
}

double fraction_for(double reflectance)
{
  return (std::log(reflectance) + 1.6) / 3.7;
}
} // namespace

double easy_ro_minimum()
{
  return std::exp(-1.6);
}

double easy_ro_maximum()
{
  double total = 0.0;
  for (double w : K::weights)
    total += w;
  return std::exp(-1.6 + 3.7 * total);
}

double easy_ro_fraction(const EasyRoState& state)
{
  double F = 0.0;
  for (int i = 0; i < kEasyRoReactions; ++i)
    F += K::weights[i] * -std::expm1(-state[i]); // 1 − e^(−I), accurate for small I
  return F;
}

double easy_ro_reflectance(const EasyRoState& state)
{
  return std::exp(-1.6 + 3.7 * easy_ro_fraction(state));
}

double mean_arrhenius_factor(double a, double T0, double T1)
{
  if (T0 == T1)
    return std::exp(-a / T0);
  const double T_lo = std::min(T0, T1), T_hi = std::max(T0, T1);
  const double x_lo = a / T_lo, x_hi = a / T_hi;
  if (x_lo - x_hi <= 1.0)
  {
    double s = 0.0;
    for (int k = 0; k < 6; ++k)
      s += kGaussWeight[k] * std::exp(-a / (T0 + kGaussNode[k] * (T1 - T0)));
    return s;
  }
  // ∫ exp(−a/T) dT = G(T) = T e^(−x) p(x), x = a/T (dG/dT = e^(−x) by direct differentiation).
  // With exp(−x_hi) factored out the two terms differ by at least a factor e^(Δx) > e, so the
  // subtraction loses at most a couple of bits.
  const double bracket = T_hi * one_minus_x_ex_e1(x_hi) -
    T_lo * one_minus_x_ex_e1(x_lo) * std::exp(-(x_lo - x_hi));
  return std::exp(-x_hi) * bracket / (T_hi - T_lo);
}

void easy_ro_advance(EasyRoState& state, double T0, double T1, double dt)
{
  if (dt == 0.0)
    return;
  std::array<double, kEasyRoReactions> mean;
  mean_factors(T0 + kKelvin, T1 + kKelvin, mean);
  const double scale = K::frequency_factor * dt;
  for (int i = 0; i < kEasyRoReactions; ++i)
    state[i] += scale * mean[i];
}

EasyRoState easy_ro_burial_state(double T_start, double T_end, double duration)
{
  if (!(duration >= 0.0) || !std::isfinite(duration))
  {
    std::ostringstream msg;
    msg << "EASY%Ro burial history: duration " << duration << " s must be finite and >= 0";
    throw std::invalid_argument(msg.str());
  }
  EasyRoState state{};
  easy_ro_advance(state, T_start, T_end, duration);
  return state;
}

EasyRoState easy_ro_state_for_reflectance(double reflectance, double heating_rate,
  double T_start)
{
  const double lo_ro = easy_ro_minimum(), hi_ro = easy_ro_maximum();
  if (!(reflectance >= lo_ro * (1.0 - 1e-12) && reflectance < hi_ro))
  {
    std::ostringstream msg;
    msg << "initial vitrinite reflectance " << reflectance
        << " %Ro is outside the EASY%Ro range [" << lo_ro << ", " << hi_ro << ")";
    throw std::invalid_argument(msg.str());
  }
  if (!(heating_rate > 0.0) || !std::isfinite(heating_rate))
  {
    std::ostringstream msg;
    msg << "EASY%Ro equivalent heating rate " << heating_rate << " K/s must be positive";
    throw std::invalid_argument(msg.str());
  }
  if (reflectance <= lo_ro)
    return {};
  const double target = fraction_for(reflectance);
  auto ramp = [&](double T_end) {
    return easy_ro_burial_state(T_start, T_end, (T_end - T_start) / heating_rate);
  };
  // F rises monotonically with the end temperature of the ramp: bracket, then bisect.
  double lo = T_start, hi = T_start + 50.0;
  while (easy_ro_fraction(ramp(hi)) < target)
  {
    lo = hi;
    hi += 2.0 * (hi - T_start);
    if (hi > T_start + 1e5)
    {
      std::ostringstream msg;
      msg << "initial vitrinite reflectance " << reflectance
          << " %Ro cannot be reached by heating at " << heating_rate << " K/s";
      throw std::invalid_argument(msg.str());
    }
  }
  for (int it = 0; it < 200 && hi - lo > 1e-11 * (1.0 + std::abs(hi)); ++it)
  {
    const double mid = 0.5 * (lo + hi);
    (easy_ro_fraction(ramp(mid)) < target ? lo : hi) = mid;
  }
  return ramp(0.5 * (lo + hi));
}

} // namespace ember
