// Large arrays on transparent huge pages. Building the model and operator of a 10⁶-node
// tetrahedral mesh allocates and first touches about 2 GB of temporaries, and with 4 KB pages
// half of that set-up's time went to page faults and the kernel clearing pages
// (bench/README.md, item 33). Internal to the core.
#pragma once

#include <cstddef>
#include <cstdint>
#include <vector>

#if defined(__linux__)
#include <sys/mman.h>
#endif

namespace ember
{

/// Ask the kernel to back the 2 MB-aligned part of [p, p + bytes) with transparent huge pages
/// (Linux's madvise(MADV_HUGEPAGE), which matters where THP is in its "madvise" mode). Call it
/// before the memory is first touched. A hint: ignored where unsupported or refused.
inline void advise_huge_pages(const void* p, std::size_t bytes)
{
#if defined(__linux__) && defined(MADV_HUGEPAGE)
  constexpr std::uintptr_t kHuge = std::uintptr_t{ 1 } << 21;
  if (bytes < 4 * kHuge) // small arrays: not worth a system call
    return;
  const auto first = reinterpret_cast<std::uintptr_t>(p);
  const std::uintptr_t begin = (first + kHuge - 1) & ~(kHuge - 1);
  const std::uintptr_t end = (first + bytes) & ~(kHuge - 1);
  if (end > begin)
    madvise(reinterpret_cast<void*>(begin), end - begin, MADV_HUGEPAGE);
#else
  (void)p;
  (void)bytes;
#endif
}

/// v.reserve(n), with huge pages advised for the new storage beyond v's elements (which the
/// reallocation has not touched yet).
template <class T, class A>
void reserve_on_huge_pages(std::vector<T, A>& v, std::size_t n)
{
  if (n <= v.capacity())
    return;
  v.reserve(n);
  advise_huge_pages(v.data() + v.size(), (n - v.size()) * sizeof(T));
}

} // namespace ember
