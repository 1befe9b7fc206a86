// HeatOperator's conduction sweep: Σ_j G_ij (T_j − T_i) per node, and the Gershgorin bound.
// It is most of an explicit step's instructions (bench/README.md, item 21). With the edges in
// SELL-4 order (HeatOperator::SlicedEdges) four consecutive nodes take their s-th edges as
// one vector: the weights in one load, the far ends' (T, k) pairs in four. Chunks with a
// rock-contact node, or with a negative weight when the bound is asked for, go node by node
// through the scalar code. Every level sums each node's edges in the same order with the
// same operations (no FMA: simd.h), so all levels give the scalar level's bits. The pass
// before it, which writes the (T, k) pairs the sweep gathers, is vectorised the same way.
#include "heat_sweep.h"

#include "ember/simd.h"
#include "vector_lanes.h"

#include <algorithm>
#include <cmath>
#include <cstring>


namespace ember
{
namespace
{
using namespace lanes;

// What the sweep reads and writes, as plain pointers.
struct SweepView
{
  const std::uint32_t* chunk_start;
  const std::uint16_t* count;
  const std::uint32_t* far_offset; ///< far end's pair: T at tk[offset], k at tk[offset + 1]
  const double* half_weight;
  const std::uint8_t* rock;
  const std::uint8_t* kind;
  const double* tk; ///< pair p's T at tk[2p], its k at tk[2p + 1]; node i's pair is p = i
  const ConductivityFit* fits;
  const double* source; ///< null when no node has one: the sweep adds 0 instead
  const float* inverse_capacity;
  double* flux_stiffness;
  std::size_t n;
  std::uint8_t flux_face, signed_weights, contact; ///< HeatOperator::NodeKind bits
};
constexpr std::size_t kChunk = 4;

/// Node i alone, in the order every level sums it in. Returns λ_i (0 without Bound).
template <bool Bound, bool Rate>
double scalar_node(const SweepView& v, std::size_t i, double* dEdt, std::size_t& next_flux)
{
  const double Ti = v.tk[2 * i], ki = v.tk[2 * i + 1];
  const std::size_t first_slot = v.chunk_start[i / kChunk] + i % kChunk;
  double s = 0.0, g_sum = 0.0, g_abs = 0.0;
  // Σ_j G_ij (T_j − T_i), and for the bound Σ G (and Σ|G| when Signed), with
  // G = ½W (k_r(T_i) + k_r(T_j)): the far end's k_r from its pair; the near end's from the
  // node's own pair, or at a contact node evaluated once per rock (its edges come by rock).
  const bool contact = v.kind[i] & v.contact;
  const auto exchange_all = [&]<bool Signed>() {
    double k_near = ki;
    int near_rock = -1;
    for (std::size_t e = 0; e < v.count[i]; ++e)
    {
      const std::size_t k = first_slot + kChunk * e;
      if (contact && v.rock[k] != near_rock)
      {
        near_rock = v.rock[k];
        k_near = v.fits[near_rock](Ti);
      }
      const double* far = v.tk + v.far_offset[k];
      const double G = v.half_weight[k] * (k_near + far[1]);
      s += G * (far[0] - Ti);
      if constexpr (Bound)
        g_sum += G;
      if constexpr (Signed)
        g_abs += std::abs(G);
    }
  };
  // With no negative weight at the node (bricks, non-obtuse tetrahedra), Σ|G| = ΣG: the
  // loop without |G| serves nearly every node.
  const bool signed_weights = Bound && (v.kind[i] & v.signed_weights);
  if (signed_weights)
    exchange_all.template operator()<Bound>();
  else
    exchange_all.template operator()<false>();
  if constexpr (Rate)
    dEdt[i] = s + (v.source ? v.source[i] : 0.0);
  if constexpr (!Bound)
    return 0.0;
  // |A_ii| + Σ_j |A_ij|
  const double stiffness = signed_weights ? std::abs(g_sum) + g_abs : 2.0 * g_sum;
  if (v.kind[i] & v.flux_face)
    v.flux_stiffness[next_flux++] = stiffness;
  return stiffness * v.inverse_capacity[i];
}

/// The nodes of chunks [chunk_begin, chunk_end) one at a time; returns the largest λ_i.
template <bool Bound, bool Rate>
double scalar_chunks(const SweepView& v, double* dEdt, std::size_t chunk_begin,
  std::size_t chunk_end, std::size_t& next_flux)
{
  double worst = 0.0;
  for (std::size_t i = chunk_begin * kChunk; i < std::min(chunk_end * kChunk, v.n); ++i)
    worst = std::max(worst, scalar_node<Bound, Rate>(v, i, dEdt, next_flux));
  return worst;
}

#if defined(__x86_64__) && defined(__GNUC__)
// T and k of the pairs at offsets at[0..W) of tk: one 16-byte load per (T, k) pair, then a
// transpose (unpcklpd / unpckhpd, with AVX2 after vinsertf128).
[[gnu::always_inline]] inline Lanes2 pair(const double* tk, std::uint32_t offset)
{
  Lanes2 p;
  std::memcpy(&p, tk + offset, sizeof p);
  return p;
}
[[gnu::always_inline]] inline void gather_tk(
  const double* tk, const std::uint32_t* at, Lanes2& T, Lanes2& k)
{
  const Lanes2 p0 = pair(tk, at[0]), p1 = pair(tk, at[1]);
  T = __builtin_shufflevector(p0, p1, 0, 2);
  k = __builtin_shufflevector(p0, p1, 1, 3);
}
[[gnu::always_inline]] inline void gather_tk(
  const double* tk, const std::uint32_t* at, Lanes4& T, Lanes4& k)
{
  const Lanes4 a = __builtin_shufflevector(pair(tk, at[0]), pair(tk, at[2]), 0, 1, 2, 3);
  const Lanes4 b = __builtin_shufflevector(pair(tk, at[1]), pair(tk, at[3]), 0, 1, 2, 3);
  T = __builtin_shufflevector(a, b, 0, 4, 2, 6); // {T0, T1, T2, T3}
  k = __builtin_shufflevector(a, b, 1, 5, 3, 7);
}

// T and k of W consecutive nodes, whose pairs lie side by side from tk: two loads, a transpose.
[[gnu::always_inline]] inline void own_tk(const double* tk, Lanes2& T, Lanes2& k)
{
  Lanes2 a, b;
  load(a, tk);
  load(b, tk + 2);
  T = __builtin_shufflevector(a, b, 0, 2);
  k = __builtin_shufflevector(a, b, 1, 3);
}
[[gnu::always_inline]] inline void own_tk(const double* tk, Lanes4& T, Lanes4& k)
{
  Lanes4 a, b;
  load(a, tk);
  load(b, tk + 4);
  T = __builtin_shufflevector(a, b, 0, 2, 4, 6);
  k = __builtin_shufflevector(a, b, 1, 3, 5, 7);
}

/// The 4 nodes of chunk c, W at a time: scalar_node's sums lane by lane. The chunk's padding
/// slots (weight 0, the node itself) add +0 to sums that start at +0, which leaves them as
/// they are. `flux` says whether any of the 4 is a flux-boundary node.
template <class V, bool Bound, bool Rate>
[[gnu::always_inline]] inline void vector_chunk(const SweepView& v, std::size_t c,
  bool flux, double* dEdt, V& worst, std::size_t& next_flux)
{
  constexpr std::size_t W = kWidth<V>;
  const std::size_t first_slot = v.chunk_start[c];
  const std::size_t slots = (v.chunk_start[c + 1] - first_slot) / kChunk;
  for (std::size_t part = 0; part < kChunk; part += W)
  {
    const std::size_t i = c * kChunk + part;
    V Ti, ki, s, g;
    own_tk(v.tk + 2 * i, Ti, ki);
    splat(s, 0.0);
    splat(g, 0.0);
    for (std::size_t e = 0; e < slots; ++e)
    {
      const std::size_t k = first_slot + kChunk * e + part;
      V w, Tj, kj;
      load(w, v.half_weight + k);
      gather_tk(v.tk, v.far_offset + k, Tj, kj);
      const V G = w * (ki + kj);
      s = s + G * (Tj - Ti);
      if constexpr (Bound)
        g = g + G;
    }
    if constexpr (Rate)
    {
      V source;
      if (v.source)
        load(source, v.source + i);
      else
        splat(source, 0.0);
      store(dEdt + i, s + source);
    }
    if constexpr (Bound)
    {
      const V stiffness = 2.0 * g;
      V inverse_capacity;
      load(inverse_capacity, v.inverse_capacity + i);
      const V lambda = stiffness * inverse_capacity;
      worst = worst < lambda ? lambda : worst; // std::max(worst, λ) lane by lane
      for (std::size_t l = 0; flux && l < W; ++l)
        if (v.kind[i + l] & v.flux_face)
          v.flux_stiffness[next_flux++] = stiffness[l];
    }
  }
}

template <class V, bool Bound, bool Rate>
[[gnu::always_inline]] inline double vector_range(const SweepView& v, double* dEdt,
  std::size_t chunk_begin, std::size_t chunk_end, std::size_t next_flux)
{
  // A chunk goes through the vector code when it is full and none of its nodes is a contact
  // node (nor, for the bound, has a negative weight).
  const std::uint8_t scalar_bits = Bound ? v.contact | v.signed_weights : v.contact;
  const std::uint32_t scalar_mask = 0x01010101u * scalar_bits;
  const std::uint32_t flux_mask = 0x01010101u * v.flux_face;
  const std::size_t full_chunks = v.n / kChunk;
  V worst_lanes;
  splat(worst_lanes, 0.0);
  double worst = 0.0;
  for (std::size_t c = chunk_begin; c != chunk_end; ++c)
  {
    std::uint32_t kinds = scalar_mask;
    if (c < full_chunks)
      std::memcpy(&kinds, v.kind + c * kChunk, sizeof kinds);
    if (!(kinds & scalar_mask))
      vector_chunk<V, Bound, Rate>(v, c, (kinds & flux_mask) != 0, dEdt, worst_lanes, next_flux);
    else
      worst = std::max(worst, scalar_chunks<Bound, Rate>(v, dEdt, c, c + 1, next_flux));
  }
  for (std::size_t l = 0; l < kWidth<V>; ++l)
    worst = std::max(worst, worst_lanes[l]);
  return worst;
}

template <bool Bound, bool Rate>
__attribute__((target("avx2"))) double avx2_range(const SweepView& v, double* dEdt,
  std::size_t chunk_begin, std::size_t chunk_end, std::size_t next_flux)
{
  return vector_range<Lanes4, Bound, Rate>(v, dEdt, chunk_begin, chunk_end, next_flux);
}
#endif

template <bool Bound, bool Rate>
double level_range(const SweepView& v, double* dEdt, std::size_t chunk_begin,
  std::size_t chunk_end, std::size_t next_flux)
{
  switch (simd_level())
  {
#if defined(__x86_64__) && defined(__GNUC__)
    case SimdLevel::AVX2:
      return avx2_range<Bound, Rate>(v, dEdt, chunk_begin, chunk_end, next_flux);
    case SimdLevel::SSE2:
      return vector_range<Lanes2, Bound, Rate>(v, dEdt, chunk_begin, chunk_end, next_flux);
#endif
    default:
      return scalar_chunks<Bound, Rate>(v, dEdt, chunk_begin, chunk_end, next_flux);
  }
}

// ---- The (T, k) pairs the sweep gathers, written at the start of each rate call ----------

struct PairView
{
  const double* T;
  const std::uint8_t* node_rock; ///< HeatOperator::kMixedRock at rock contacts
  const ConductivityFit* fits;
  double* tk;
  std::uint8_t mixed_rock;
};

void scalar_pairs(const PairView& v, std::size_t begin, std::size_t end)
{
  for (std::size_t i = begin; i != end; ++i)
  {
    v.tk[2 * i] = v.T[i];
    v.tk[2 * i + 1] = v.node_rock[i] != v.mixed_rock ? v.fits[v.node_rock[i]](v.T[i]) : 0.0;
  }
}

#if defined(__x86_64__) && defined(__GNUC__)
/// ConductivityFit::operator() for W temperatures, operation for operation.
template <class V>
[[gnu::always_inline]] inline void conductivity(const ConductivityFit& fit, const V& T, V& k)
{
  V k_floor;
  splat(k_floor, fit.k_floor);
  if (fit.q == 0.0) // constant k: no division
  {
    splat(k, fit.p > fit.k_floor ? fit.p : fit.k_floor);
    return;
  }
  V lowest;
  splat(lowest, -100.0);
  const V d = fit.r + fit.s * (T > lowest ? T : lowest);
  const V k_law = fit.p + fit.q / d;
  k = d > 0.0 ? (k_law > k_floor ? k_law : k_floor) : k_floor;
}

/// W consecutive nodes of one rock at a time (a rock byte compare per block), the pairs
/// interleaved in registers and stored whole; other blocks node by node.
template <class V>
[[gnu::always_inline]] inline void vector_pairs(const PairView& v, std::size_t begin,
  std::size_t end)
{
  constexpr std::size_t W = kWidth<V>;
  std::size_t i = begin;
  for (; i + W <= end; i += W)
  {
    const std::uint8_t rock = v.node_rock[i];
    bool one_rock = rock != v.mixed_rock;
    for (std::size_t l = 1; l < W; ++l)
      one_rock = one_rock && v.node_rock[i + l] == rock;
    if (!one_rock)
    {
      scalar_pairs(v, i, i + W);
      continue;
    }
    V T;
    load(T, v.T + i);
    V k;
    conductivity(v.fits[rock], T, k);
    if constexpr (W == 4)
    {
      store(v.tk + 2 * i, V(__builtin_shufflevector(T, k, 0, 4, 1, 5)));
      store(v.tk + 2 * i + 4, V(__builtin_shufflevector(T, k, 2, 6, 3, 7)));
    }
    else
    {
      store(v.tk + 2 * i, V(__builtin_shufflevector(T, k, 0, 2)));
      store(v.tk + 2 * i + 2, V(__builtin_shufflevector(T, k, 1, 3)));
    }
  }
  scalar_pairs(v, i, end);
}

__attribute__((target("avx2"))) void avx2_pairs(const PairView& v, std::size_t begin,
  std::size_t end)
{
  vector_pairs<Lanes4>(v, begin, end);
}
#endif
} // namespace

double HeatSweep::run(const HeatOperator& op, bool bound, bool rate, double* dEdt,
  std::size_t chunk_begin, std::size_t chunk_end)
{
  static_assert(sizeof(HeatOperator::NodeTK) == 2 * sizeof(double));
  const HeatOperator::SlicedEdges& edges = op.edges_;
  const SweepView v{ edges.start.data(), edges.count.data(),
    edges.far_offset.data(), edges.half_weight.data(), edges.rock.data(), op.node_kind_.data(),
    reinterpret_cast<const double*>(op.node_tk_.data()), op.fits_.data(),
    op.any_source_ ? op.model_->node_sources().data() : nullptr, op.inverse_capacity_.data(),
    op.flux_stiffness_.data(),
    op.model_->n_nodes(), HeatOperator::kFluxFace, HeatOperator::kSignedWeights,
    HeatOperator::kContact };
  // Flux-boundary nodes of this range, in the same ascending order: one search per range.
  const std::size_t next_flux = bound ? op.flux_index(chunk_begin * kChunk) : 0;
  if (bound && rate)
    return level_range<true, true>(v, dEdt, chunk_begin, chunk_end, next_flux);
  if (bound)
    return level_range<true, false>(v, dEdt, chunk_begin, chunk_end, next_flux);
  if (rate)
    return level_range<false, true>(v, dEdt, chunk_begin, chunk_end, next_flux);
  return 0.0;
}

void HeatSweep::pairs(const HeatOperator& op, const double* T, std::size_t begin, std::size_t end)
{
  const PairView v{ T, op.node_rock_.data(), op.fits_.data(),
    reinterpret_cast<double*>(op.node_tk_.data()), HeatOperator::kMixedRock };
  switch (simd_level())
  {
#if defined(__x86_64__) && defined(__GNUC__)
    case SimdLevel::AVX2:
      avx2_pairs(v, begin, end);
      break;
    case SimdLevel::SSE2:
      vector_pairs<Lanes2>(v, begin, end);
      break;
#endif
    default:
      scalar_pairs(v, begin, end);
  }
  // The contact nodes' pairs per rock, stored in node order after the nodes' own.
  const std::vector<std::uint32_t>& node = op.contact_pair_node_;
  const std::size_t first = static_cast<std::size_t>(
    std::lower_bound(node.begin(), node.end(), begin) - node.begin());
  HeatOperator::NodeTK* pair = op.node_tk_.data() + op.node_rock_.size();
  for (std::size_t m = first; m < node.size() && node[m] < end; ++m)
  {
    const double Tm = T[node[m]];
    pair[m] = { Tm, op.fits_[op.contact_pair_rock_[m]](Tm) };
  }
}

} // namespace ember
