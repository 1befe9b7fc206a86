#include "ember/rkl2.h"

#include <oneapi/tbb/blocked_range.h>
#include <oneapi/tbb/parallel_for.h>
#include <oneapi/tbb/parallel_reduce.h>

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <string>

namespace ember
{
namespace
{
constexpr std::size_t kGrain = 2048;

// Meyer, Balsara & Aslam (2014): b_0 = b_1 = b_2 = 1/3, b_j = (j² + j − 2)/(2j(j + 1)).
double b(int j)
{
  return j <= 2 ? 1.0 / 3.0 : double(j * j + j - 2) / (2.0 * j * (j + 1));
}
} // namespace

Rkl2::Rkl2(double tolerance, int max_stages)
  : tolerance_(tolerance)
  , max_stages_(max_stages)
{
  if (max_stages < 2)
    throw std::invalid_argument("RKL2: at most " + std::to_string(max_stages) +
                                " stages per super-step; need at least 2");
  if (!(tolerance > 0.0))
    throw std::invalid_argument("RKL2: accuracy tolerance " + std::to_string(tolerance) +
                                " K must be positive");
}

void Rkl2::reset()
{
  last_tau_ = 0.0;
  last_stages_ = 0;
  rate0_prev_.clear();
}

int Rkl2::stages_for(double tau, double dt_fe)
{
  const double ratio = tau / dt_fe;
  int s = std::max(2, static_cast<int>(std::ceil((std::sqrt(9.0 + 16.0 * ratio) - 1.0) / 2.0)));
  // Guard the ceil against round-off either way.
  while (max_super_step(s, dt_fe) < tau)
    ++s;
  while (s > 2 && max_super_step(s - 1, dt_fe) >= tau)
    --s;
  return s;
}

double Rkl2::max_super_step(int s, double dt_fe)
{
  return dt_fe * (double(s) * s + s - 2.0) / 4.0;
}

Integrator::Step Rkl2::advance(const ThermalModel& model,
                               const HeatOperator& op,
                               double dt_max,
                               double safety,
                               std::vector<double>& E,
                               std::vector<double>& T,
                               tbb::task_arena& arena)
{
  const std::size_t n = E.size();
  PowerTally p0;
  const double dt_fe = safety * op.rate_and_stable_step(T, rate0_, p0, arena);
  // Accuracy control (common practice for explicit step control, no source): the heating
  // rate changed by ΔR_i over the last super-step τ_prev; τ_prev·|ΔR_i|/C_i [K] measures the
  // second-order term the step had to follow, and scales as τ². Aim it at the tolerance.
  // E changed since the last super-step ended (an emplacement, or another run): that is a new
  // sudden start, so the history says nothing about it; start again at one forward-Euler step.
  if (last_tau_ > 0.0 && (y0_.size() != n || d_prev_.size() != n ||
                          arena.execute(
                            [&]
                            {
                              return tbb::parallel_reduce(
                                tbb::blocked_range<std::size_t>(0, n, kGrain),
                                false,
                                [&](const tbb::blocked_range<std::size_t>& r, bool changed)
                                {
                                  for (std::size_t i = r.begin(); i != r.end() && !changed; ++i)
                                    changed = E[i] != y0_[i] + d_prev_[i];
                                  return changed;
                                },
                                [](bool a, bool b) { return a || b; });
                            })))
    reset();
  double tau_accurate = std::isinf(tolerance_) ? tolerance_ : dt_fe; // no history: one FE step
  if (std::isfinite(tolerance_) && last_tau_ > 0.0 && rate0_prev_.size() == n)
  {
    const double change =
      last_tau_ *
      arena.execute(
        [&]
        {
          return tbb::parallel_reduce(
            tbb::blocked_range<std::size_t>(0, n, kGrain),
            0.0,
            [&](const tbb::blocked_range<std::size_t>& r, double worst)
            {
              for (std::size_t i = r.begin(); i != r.end(); ++i)
                if (rate0_[i] != rate0_prev_[i]) // held and unreferenced nodes have rate 0
                  worst =
                    std::max(worst, std::abs(rate0_[i] - rate0_prev_[i]) / model.capacity(i, T[i]));
              return worst;
            },
            [](double a, double b) { return std::max(a, b); }); // max: exact in any order
        });
    const double factor = change > 0.0 ? 0.9 * std::sqrt(tolerance_ / change) : 2.0;
    tau_accurate = std::max(dt_fe, last_tau_ * std::clamp(factor, 0.1, 2.0));
  }
  // Fewest equal super-steps over the interval within both limits; take the first.
  const double tau_limit = std::min(tau_accurate, max_super_step(max_stages_, dt_fe));
  const double n_super = std::max(1.0, std::ceil(dt_max / tau_limit * (1.0 - 1e-12)));
  const double tau = dt_max / n_super;
  const int s = std::min(stages_for(tau, dt_fe), max_stages_);
  last_stages_ = s;
  last_tau_ = tau;

  y0_ = E;
  inverse_capacity_.resize(n, 0.0f); // a stale one only makes a worse first guess
  d_prev_.assign(n, 0.0);  // D_{j-1}
  d_prev2_.assign(n, 0.0); // D_{j-2}, overwritten in place by D_j
  // The tallies follow the same recursion as D (they are Σ_i of its rate terms), so the heat
  // booked is exactly the heat the stages put into E, whatever the stage weights.
  double boundary_prev2 = 0.0, source_prev2 = 0.0;
  const double w1 = 4.0 / (double(s) * s + s - 2.0);
  const double mu1 = b(1) * w1;
  double boundary_prev = mu1 * tau * p0.boundary, source_prev = mu1 * tau * p0.source;
  arena.execute(
    [&]
    {
      tbb::parallel_for(tbb::blocked_range<std::size_t>(0, n, kGrain),
                        [&](const tbb::blocked_range<std::size_t>& r)
                        {
                          // E = Y_0 here, so the old E is y0_.
                          update_heat_and_temperature(model, r.begin(), r.end(), E.data(), T.data(),
                            inverse_capacity_.data(), [&](std::size_t i, double) {
                              d_prev_[i] = mu1 * tau * rate0_[i];
                              return y0_[i] + d_prev_[i];
                            });
                        });
    });
  hold_fixed(op, T);
  for (int j = 2; j <= s; ++j)
  {
    PowerTally p;
    op.rate(T, rate_, p, arena);
    const double mu = (2.0 * j - 1.0) / j * b(j) / b(j - 1);
    const double nu = -(j - 1.0) / j * b(j) / b(j - 2);
    const double mu_t = mu * w1;
    const double gamma_t = -(1.0 - b(j - 1)) * mu_t;
    arena.execute(
      [&]
      {
        tbb::parallel_for(tbb::blocked_range<std::size_t>(0, n, kGrain),
                          [&](const tbb::blocked_range<std::size_t>& r)
                          {
                            update_heat_and_temperature(model, r.begin(), r.end(), E.data(), T.data(),
                              inverse_capacity_.data(), [&](std::size_t i, double) {
                                // D_j = μ D_{j−1} + ν D_{j−2} + τ (μ̃ M(Y_{j−1}) + γ̃ M(Y_0)); the (1 −
                                // μ − ν) Y_0 term of the paper vanishes in increments.
                                const double d = mu * d_prev_[i] + nu * d_prev2_[i] +
                                                 tau * (mu_t * rate_[i] + gamma_t * rate0_[i]);
                                d_prev2_[i] = d;
                                return y0_[i] + d;
                              });
                          });
      });
    hold_fixed(op, T);
    std::swap(d_prev_, d_prev2_);
    const double boundary =
      mu * boundary_prev + nu * boundary_prev2 + tau * (mu_t * p.boundary + gamma_t * p0.boundary);
    const double source =
      mu * source_prev + nu * source_prev2 + tau * (mu_t * p.source + gamma_t * p0.source);
    boundary_prev2 = boundary_prev;
    source_prev2 = source_prev;
    boundary_prev = boundary;
    source_prev = source;
  }
  std::swap(rate0_prev_, rate0_); // M(Y_0) of this super-step, for the next one's control
  return { tau, { boundary_prev, source_prev }, static_cast<std::size_t>(s) };
}

} // namespace ember
