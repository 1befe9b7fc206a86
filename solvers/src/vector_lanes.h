// Vector lanes for the node loops (simd.h): GCC vector extensions, whose element-wise
// arithmetic, lane-mask comparisons and ?: on masks lower to SSE2 in the plain x86-64 build
// and to AVX2 inside functions built with target("avx2"). Internal to the core.
#pragma once

#include <cstddef>
#include <cstring>

namespace ember
{
namespace lanes
{
typedef double Lanes2 __attribute__((vector_size(16)));
typedef double Lanes4 __attribute__((vector_size(32)));
// The same lanes in single precision, for the kept inverse capacities.
typedef float Floats2 __attribute__((vector_size(8)));
typedef float Floats4 __attribute__((vector_size(16)));
template <class V>
struct FloatsOf;
template <>
struct FloatsOf<Lanes2>
{
  using type = Floats2;
};
template <>
struct FloatsOf<Lanes4>
{
  using type = Floats4;
};

template <class V>
constexpr std::size_t kWidth = sizeof(V) / sizeof(double);

template <class V>
[[gnu::always_inline]] inline void load(V& v, const double* p)
{
  std::memcpy(&v, p, sizeof v);
}
template <class V>
[[gnu::always_inline]] inline void store(double* p, const V& v)
{
  std::memcpy(p, &v, sizeof v);
}
template <class V>
[[gnu::always_inline]] inline void load(V& v, const float* p)
{
  typename FloatsOf<V>::type f;
  std::memcpy(&f, p, sizeof f);
  v = __builtin_convertvector(f, V);
}
template <class V>
[[gnu::always_inline]] inline void store(float* p, const V& v)
{
  const auto f = __builtin_convertvector(v, typename FloatsOf<V>::type);
  std::memcpy(p, &f, sizeof f);
}
template <class V>
[[gnu::always_inline]] inline void splat(V& v, double x)
{
  for (std::size_t l = 0; l < kWidth<V>; ++l)
    v[l] = x;
}

} // namespace lanes
} // namespace ember
