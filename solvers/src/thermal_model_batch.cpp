// ThermalModel::temperatures_after_change: T(E) after a step for a block of nodes, several
// single-rock nodes at a time. The update pass was the largest part of an explicit step
// (bench/README.md, "fifth pass"), and per node it is the same straight-line Newton step on
// the same rock for nearly all nodes — work that vectorises across nodes.
#include "ember/simd.h"
#include "ember/thermal_model.h"
#include "vector_lanes.h"

namespace ember
{
namespace
{
using namespace lanes;

/**
 * Lanes of V = consecutive single-rock nodes of one rock: the Newton step of
 * ThermalModel::settled_newton_step written once more for a vector of nodes, operation for
 * operation (EnthalpyFit::evaluate, then newton_settled), so every lane gets the bits the
 * scalar step gives. Lanes whose step is not settled, and blocks that are not W single-rock
 * nodes of one rock, are handed to the scalar temperature_after_change from their original
 * inputs.
 */
template <class V>
[[gnu::always_inline]] inline void settle_block(const ThermalModel& model, std::size_t first,
  std::size_t count, const double* E, const double* E_old, double* T, float* inverse_capacity)
{
  constexpr std::size_t W = kWidth<V>;
  const auto scalar = [&](std::size_t k) {
    T[k] = model.temperature_after_change(first + k, E[k], E_old[k], T[k], inverse_capacity[k]);
  };
  const std::vector<EnthalpyFit>& fits = model.enthalpy_fits();
  std::size_t k = 0;
  for (; k + W <= count; k += W)
  {
    const std::size_t node = first + k;
    int rock;
    const double* masses;
    if (!model.one_rock_run(node, W, rock, masses))
    {
      for (std::size_t l = 0; l < W; ++l)
        scalar(k + l);
      continue;
    }
    V m;
    load(m, masses);
    const EnthalpyFit& fit = fits[rock];
    V e, e_old, t_old, ic;
    load(e, E + k);
    load(e_old, E_old + k);
    load(t_old, T + k);
    load(ic, inverse_capacity + k);
    const V guess = t_old + (e - e_old) * ic;

    // EnthalpyFit::evaluate(guess, h, c)
    V t_lo, t_hi, zero, one;
    splat(t_lo, fit.t_lo);
    splat(t_hi, fit.t_hi);
    splat(zero, 0.0);
    splat(one, 1.0);
    const V t = guess < t_lo ? t_lo : (guess > t_hi ? t_hi : guess);
    const V c_sensible = fit.a0 + t * (2.0 * fit.a1 + t * (3.0 * fit.a2 + t * 4.0 * fit.a3));
    const V f = (guess - fit.solidus) * fit.inverse_interval;
    const auto melting = (f > 0.0) & (f < 1.0);
    V latent_step, melting_capacity;
    splat(melting_capacity, fit.latent * fit.inverse_interval);
    latent_step = melting ? f : (f >= 1.0 ? one : zero);
    const V h = t * (fit.a0 + t * (fit.a1 + t * (fit.a2 + t * fit.a3))) +
      (guess - t) * c_sensible + fit.latent * latent_step;
    const V c = c_sensible + (melting ? melting_capacity : zero);

    // The step, and ThermalModel::newton_settled at the guess
    const V r = m * h - e, C = m * c;
    const V inverse_C = 1.0 / C;
    const V T_new = guess - r * inverse_C;
    const V floor = m * fit.capacity_floor;
    const V abs_r = r < 0.0 ? -r : r;
    const V abs_guess = guess < 0.0 ? -guess : guess;
    V kink;
    if (fit.latent == 0.0)
      splat(kink, 1e300);
    else
    {
      const V a = guess - fit.solidus, b = guess - fit.liquidus;
      const V abs_a = a < 0.0 ? -a : a, abs_b = b < 0.0 ? -b : b;
      kink = abs_b < abs_a ? abs_b : abs_a; // std::min(|a|, |b|)
    }
    const auto settled = (floor > 0.0) & (kink * floor > abs_r) &
      (m * fit.curvature_bound * r * r <= 2e-9 * (1.0 + abs_guess) * C * floor * floor);
    bool all = true;
    for (std::size_t l = 0; l < W; ++l)
      all = all && settled[l] != 0;
    if (all)
    {
      store(T + k, T_new);
      store(inverse_capacity + k, inverse_C);
      continue;
    }
    for (std::size_t l = 0; l < W; ++l)
      if (settled[l] != 0)
      {
        T[k + l] = T_new[l];
        inverse_capacity[k + l] = static_cast<float>(inverse_C[l]);
      }
      else
        scalar(k + l); // from the original T and inverse capacity: the scalar path's bits
  }
  for (; k < count; ++k)
    scalar(k);
}

#if defined(__x86_64__) && defined(__GNUC__)
__attribute__((target("avx2"))) void settle_avx2(const ThermalModel& model, std::size_t first,
  std::size_t count, const double* E, const double* E_old, double* T, float* inverse_capacity)
{
  settle_block<Lanes4>(model, first, count, E, E_old, T, inverse_capacity);
}
#endif
} // namespace

void ThermalModel::temperatures_after_change(std::size_t first, std::size_t count,
  const double* E, const double* E_old, double* T, float* inverse_capacity) const
{
  switch (simd_level())
  {
#if defined(__x86_64__) && defined(__GNUC__)
    case SimdLevel::AVX2:
      return settle_avx2(*this, first, count, E, E_old, T, inverse_capacity);
    case SimdLevel::SSE2:
      return settle_block<Lanes2>(*this, first, count, E, E_old, T, inverse_capacity);
#endif
    default:
      for (std::size_t k = 0; k < count; ++k)
        T[k] = temperature_after_change(first + k, E[k], E_old[k], T[k], inverse_capacity[k]);
  }
}

} // namespace ember
