/**
 * @file rkl2.h
 * @brief Second-order Runge–Kutta–Legendre super-time-stepping (RKL2) of the enthalpy balance.
 *
 * Meyer, Balsara & Aslam (2014), J. Comput. Phys. 257, 594–626, doi:10.1016/j.jcp.2013.08.021
 * (formulas and their numerical checks: shared/reference/rkl2.md). One super-step of size τ
 * takes s stages, each one operator application, and is stable for
 *   τ ≤ Δt_FE (s² + s − 2)/4,
 * so reaching a time t costs ~√(t/Δt_FE) applications instead of forward Euler's t/Δt_FE.
 * The state is the nodal heat content E; every stage recovers T(E) and evaluates the rate,
 * so latent heat, T-dependent properties and the radiation boundary enter exactly as in
 * forward Euler. Boundary and source heat are booked with the same stage weights as E, so the
 * energy ledger closes to round-off.
 */
#pragma once

#include "ember/simulation.h"

#include <vector>

namespace ember
{

/// RKL2 super-time-stepping of the nodal heat content (the default integrator).
class Rkl2 final : public Integrator
{
public:
  /**
   * Cap on the stages per super-step (cost and round-off growth of very long super-steps).
   */
  static constexpr int kDefaultMaxStages = 128;
  /**
   * Default accuracy tolerance [K], see `tolerance`. Chosen on the sill reference problem
   * (bench/README.md) and the latent-heat and lava-flow tests: RKL2 is then at least as
   * accurate as forward Euler at its stable step, with far fewer operator applications.
   */
  static constexpr double kDefaultTolerance = 2.0;

  /**
   * @param tolerance  accuracy control [K]: the super-step is sized so that τ·|ΔR_i|/C_i, the
   *   change of a node's heating rate over one super-step times its length (over its heat
   *   capacity), stays near `tolerance`. Stability alone would make one huge super-step per
   *   output interval, and RKL2 is not L-stable (stiff modes are damped only by |R| ≈ 1/2 per
   *   super-step, rkl2.md): after a sudden start (an emplaced sill, a lava surface meeting air)
   *   that costs hundreds of kelvin. The control starts at the forward-Euler step, grows at
   *   most 2× per super-step, and starts again at the forward-Euler step whenever E was
   *   changed between super-steps (an emplacement).
   *   Infinity switches the control off (stability alone sets the step).
   * @param max_stages  cap on the stages per super-step (≥ 2).
   */
  explicit Rkl2(double tolerance = kDefaultTolerance, int max_stages = kDefaultMaxStages);

  /**
   * One super-step: the interval dt_max [s] (to the next output or event) is split into the
   * fewest equal super-steps no longer than the accuracy-controlled step and the stable step
   * with max_stages, safety·Δt_FE·(s²+s−2)/4; the first of them is taken with the smallest
   * stable s.
   */
  Step advance(const ThermalModel& model,
               const HeatOperator& op,
               double dt_max,
               double safety,
               std::vector<double>& E,
               std::vector<double>& T,
               tbb::task_arena& arena) override;

  /// Forget the step history (the next super-step starts again at the forward-Euler step).
  void reset();

  /// Smallest s with τ ≤ dt_fe (s² + s − 2)/4 (at least 2): ⌈(√(9 + 16 τ/dt_fe) − 1)/2⌉.
  static int stages_for(double tau, double dt_fe);
  /// Largest stable super-step with s ≥ 2 stages: dt_fe (s² + s − 2)/4 [s].
  static double max_super_step(int s, double dt_fe);

  double tolerance() const { return tolerance_; }
  int max_stages() const { return max_stages_; }
  /// Stages of the last super-step taken (0 before the first).
  int last_stages() const { return last_stages_; }

private:
  double tolerance_;
  int max_stages_;
  int last_stages_ = 0;
  double last_tau_ = 0.0; ///< previous super-step [s]; 0 = no history
  // Y_0 and M(Y_0) are kept for the whole super-step (every stage uses them); the stages
  // themselves are carried as increments D_j = Y_j − Y_0, which keeps round-off relative to
  // the change rather than to the large absolute heat content (the ledger closes tighter).
  // rate0_prev_ is M(Y_0) of the previous super-step, for the accuracy control.
  std::vector<double> y0_, rate0_, rate0_prev_, rate_, d_prev_, d_prev2_;
  std::vector<float> inverse_capacity_; ///< 1/(dE/dT) from each node's last T(E) solve: its next first guess
};

} // namespace ember
