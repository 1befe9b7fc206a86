#include "ember/simd.h"

#include <atomic>
#include <stdexcept>

namespace ember
{
namespace
{
std::atomic<int> chosen{ -1 }; // -1: not chosen yet, use the best
} // namespace

SimdLevel best_simd_level()
{
#if defined(__x86_64__) && defined(__GNUC__)
  if (__builtin_cpu_supports("avx2"))
    return SimdLevel::AVX2;
  return SimdLevel::SSE2;
#else
  return SimdLevel::Scalar;
#endif
}

SimdLevel simd_level()
{
  const int level = chosen.load(std::memory_order_relaxed);
  return level < 0 ? best_simd_level() : static_cast<SimdLevel>(level);
}

void set_simd_level(SimdLevel level)
{
  if (level > best_simd_level())
    throw std::invalid_argument("SIMD level " + simd_level_name(level) +
      " is not supported by this processor (best: " + simd_level_name(best_simd_level()) + ")");
  chosen.store(static_cast<int>(level), std::memory_order_relaxed);
}

std::vector<SimdLevel> supported_simd_levels()
{
  std::vector<SimdLevel> levels;
  for (int l = 0; l <= static_cast<int>(best_simd_level()); ++l)
    levels.push_back(static_cast<SimdLevel>(l));
  return levels;
}

std::string simd_level_name(SimdLevel level)
{
  switch (level)
  {
    case SimdLevel::Scalar:
      return "scalar";
    case SimdLevel::SSE2:
      return "sse2";
    case SimdLevel::AVX2:
      return "avx2";
  }
  return "unknown";
}

} // namespace ember
