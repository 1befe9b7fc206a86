/**
 * @file simd.h
 * @brief Which vector instructions the node loops may use, chosen once at run time.
 *
 * The core is built for plain x86-64 (the plugin must load on any such machine); the hot
 * node loops also carry an AVX2 build of themselves, used where the processor runs it. (An
 * AVX-512 build of the T(E) loop, 8 nodes at a time, ran at 0.6 × the speed of the AVX2 one
 * on the machines here — bench/README.md, item 19 — and was dropped.) Every level computes
 * each node with the same operations in the same order, without fused multiply-adds (the
 * core is compiled with -ffp-contract=off), so all levels give the same bits: results do not
 * depend on the machine's vector width, and the scalar level stays the reference the tests
 * compare the others with. One exception, for infinite temperatures only: the conduction
 * sweep's padding slots (weight 0 times T_i − T_i) turn an infinite T_i into NaN where the
 * scalar code gives ±inf; either way the run's guards stop on it.
 */
#pragma once

#include <string>
#include <vector>

namespace ember
{

enum class SimdLevel
{
  Scalar, ///< one node at a time (the reference)
  SSE2,   ///< 2 nodes at a time: every x86-64 processor
  AVX2    ///< 4 nodes at a time
};

/// The widest level this processor supports (Scalar on non-x86-64 builds).
SimdLevel best_simd_level();
/// The level the node loops use: best_simd_level() unless set_simd_level() chose another.
SimdLevel simd_level();
/// Use `level` from now on (tests and the benchmark compare levels); throws
/// std::invalid_argument if this processor cannot run it. Not for use while a solve runs.
void set_simd_level(SimdLevel level);
/// All levels this processor runs, Scalar first.
std::vector<SimdLevel> supported_simd_levels();
/// "scalar", "sse2" or "avx2".
std::string simd_level_name(SimdLevel level);

} // namespace ember
