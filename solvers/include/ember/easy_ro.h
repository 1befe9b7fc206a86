/**
 * @file easy_ro.h
 * @brief EASY%Ro vitrinite reflectance kinetics (Sweeney & Burnham 1990, AAPG Bull. 74(10),
 *        1559–1570): 20 parallel first-order reactions on a prescribed temperature history.
 *
 * Reaction i has A = 1e13 s⁻¹ and E_i = 34 + 2i kcal/mol (i = 0..19) with the published
 * stoichiometric weights w_i (Σ w_i = 0.85). Its progress is carried as the integral
 *   I_i(t) = ∫_0^t A exp(−E_i / (R T(t′))) dt′        (T in K),
 * so F = Σ w_i (1 − exp(−I_i)) and %Ro = exp(−1.6 + 3.7 F), ranging from exp(−1.6) = 0.2019
 * (unreacted) to exp(−1.6 + 3.7·0.85) = 4.688 (all reactions complete).
 *
 * The integrals add along a history, so a state is the 20 numbers I_i (160 bytes). Within a
 * step the temperature is taken linear in time, and the step's increment is evaluated exactly
 * for that linear ramp (see easy_ro_advance()). Temperatures in °C, times in s.
 */
#pragma once

#include <array>
#include <stdexcept>

namespace ember
{

/// Number of parallel reactions in EASY%Ro.
inline constexpr int kEasyRoReactions = 20;

/// Reaction progress integrals I_i [-] of the 20 EASY%Ro reactions; all zero = unreacted.
using EasyRoState = std::array<double, kEasyRoReactions>;

/// Published constants of the model (Sweeney & Burnham 1990).
struct EasyRoKinetics
{
  static constexpr double frequency_factor = 1e13;  ///< A [1/s]
  static constexpr double gas_constant = 8.314462618 / 4184.0; ///< R [kcal/(mol·K)]
  /// Activation energy of reaction i [kcal/mol]: 34, 36, ..., 72.
  static constexpr double activation_energy(int i) { return 34.0 + 2.0 * i; }
  /// Stoichiometric weights w_i [-], summing to 0.85.
  static constexpr std::array<double, kEasyRoReactions> weights{ 0.03, 0.03, 0.04, 0.04, 0.05,
    0.05, 0.06, 0.04, 0.04, 0.07, 0.06, 0.06, 0.06, 0.05, 0.05, 0.04, 0.03, 0.02, 0.02, 0.01 };
};

/// Reflectance of the unreacted state, exp(−1.6) = 0.2019 %Ro.
double easy_ro_minimum();
/// Reflectance with every reaction complete, exp(−1.6 + 3.7·0.85) = 4.688 %Ro.
double easy_ro_maximum();

/// Converted fraction F = Σ w_i (1 − exp(−I_i)), in [0, 0.85].
double easy_ro_fraction(const EasyRoState& state);
/// Vitrinite reflectance %Ro = exp(−1.6 + 3.7 F).
double easy_ro_reflectance(const EasyRoState& state);

/**
 * Mean Arrhenius factor (1/Δt) ∫ exp(−a/T(t)) dt over a step on which the absolute
 * temperature T runs linearly from T0 to T1 [K]; a = E/R [K]. Exact for the linear ramp (to
 * round-off): Gauss–Legendre where the exponent a/T changes by ≤ 1 over the step, the closed
 * form with the exponential integral otherwise (see easy_ro.cpp for why).
 */
double mean_arrhenius_factor(double a, double T0, double T1);

/**
 * Advance the state over a step of length dt [s] on which the temperature runs linearly in
 * time from T0 to T1 [°C]. dt = 0 leaves the state unchanged.
 */
void easy_ro_advance(EasyRoState& state, double T0, double T1, double dt);

/**
 * State after heating at a constant rate from T_start to T_end [°C] over `duration` [s]
 * (a burial history), starting unreacted; T_end < T_start is a cooling ramp, equal values an
 * isothermal hold. Throws std::invalid_argument for a negative or non-finite duration.
 */
EasyRoState easy_ro_burial_state(double T_start, double T_end, double duration);

/**
 * A state whose reflectance is `reflectance` [%Ro]: the state reached by heating at the
 * constant rate `heating_rate` [K/s] from T_start [°C] to the temperature at which %Ro equals
 * the target (found by bisection; the reflectance rises monotonically along the ramp). The
 * split of the progress among the 20 reactions depends on the path, so the path is part of
 * the answer; a burial-like rate is the natural choice for rock before an intrusion.
 * Throws std::invalid_argument naming the value if it lies outside [0.2019, 4.688) %Ro or
 * the rate is not positive.
 */
EasyRoState easy_ro_state_for_reflectance(double reflectance, double heating_rate,
  double T_start);

} // namespace ember
