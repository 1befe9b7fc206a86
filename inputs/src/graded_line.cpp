// Graded node lines: fine inside zones, geometric growth away from them, capped far away.
#include "ember/inputs/model_builder.h"

#include <algorithm>
#include <cmath>

namespace ember::inputs
{
namespace
{

/// Target cell size at x. Each zone (padded by one of its cells on both sides, so body faces
/// sit in uniform spacing) asks for its size; away from it the size grows linearly at `slope`,
/// capped at far_size. s is then Lipschitz with constant `slope`.
double target_size(double x, double far_size, double slope, const std::vector<AxisZone>& zones)
{
  double s = far_size;
  for (const AxisZone& z : zones)
  {
    const double lo = z.lo - z.size, hi = z.hi + z.size;
    const double d = x < lo ? lo - x : x > hi ? x - hi : 0.0;
    s = std::min(s, z.size + slope * d);
  }
  return s;
}

/// ∫ dx / s sampled on a fine uniform grid, with its inverse, both by linear interpolation.
struct CellCount
{
  std::vector<double> xs, cum;
  double at(double x) const
  {
    const auto i = std::clamp<std::size_t>(
      static_cast<std::size_t>(std::upper_bound(xs.begin(), xs.end(), x) - xs.begin()), 1, xs.size() - 1);
    return cum[i - 1] + (cum[i] - cum[i - 1]) * (x - xs[i - 1]) / (xs[i] - xs[i - 1]);
  }
  double inverse(double f) const
  {
    const auto i = std::clamp<std::size_t>(
      static_cast<std::size_t>(std::upper_bound(cum.begin(), cum.end(), f) - cum.begin()), 1, cum.size() - 1);
    return xs[i - 1] + (xs[i] - xs[i - 1]) * (f - cum[i - 1]) / (cum[i] - cum[i - 1]);
  }
  /// Cells in (p, q), and the share C <= 1 of the integral each holds.
  std::size_t cells(double p, double q) const
  {
    return static_cast<std::size_t>(std::max(1.0, std::ceil(at(q) - at(p) - 1e-6)));
  }
  double share(double p, double q) const { return (at(q) - at(p)) / double(cells(p, q)); }
};

} // namespace

std::vector<double> graded_line(double lo, double hi, double far_size, double max_growth,
  const std::vector<AxisZone>& zones, const std::vector<double>& fixed_nodes)
{
  // Within a cell pair ln s changes by at most slope · ∫ dx/s <= 2 · slope · C, and each cell's
  // size lies between C·min s and C·max s over it; so neighbouring cells differ by at most
  // exp(2 · slope) <= max_growth. 5 % margin for the sampled integral.
  const double slope = 0.95 * 0.5 * std::log(max_growth);
  double smallest = far_size;
  for (const AxisZone& z : zones)
    smallest = std::min(smallest, z.size);
  // 16 samples per smallest cell: the integral is exact where s is uniform (1/s constant).
  const std::size_t m = std::clamp<std::size_t>(
    static_cast<std::size_t>(std::ceil(16.0 * (hi - lo) / smallest)), 16, 4000000);
  CellCount count;
  count.xs.resize(m + 1);
  count.cum.assign(m + 1, 0.0);
  double previous = 0.0;
  for (std::size_t i = 0; i <= m; ++i)
  {
    count.xs[i] = i == m ? hi : lo + (hi - lo) * double(i) / double(m);
    const double inv = 1.0 / target_size(count.xs[i], far_size, slope, zones);
    if (i > 0)
      count.cum[i] = count.cum[i - 1] + 0.5 * (count.xs[i] - count.xs[i - 1]) * (previous + inv);
    previous = inv;
  }

  // Fixed nodes split the line into segments, each rounding its own cell count. Where s is
  // uniform around the node, the cells beside it differ by the ratio of the two segments'
  // shares C; keep only nodes whose segments both have C >= 1/max_growth.
  const double tol = 1e-9 * (hi - lo);
  std::vector<double> breaks{ lo };
  for (const double b : fixed_nodes)
    if (b > lo + tol && b < hi - tol)
      breaks.push_back(b);
  breaks.push_back(hi);
  std::sort(breaks.begin(), breaks.end());
  breaks.erase(std::unique(breaks.begin(), breaks.end(), [&](double a, double b) { return b - a <= tol; }),
    breaks.end());
  breaks.back() = hi;
  for (bool dropped = true; dropped;)
  {
    dropped = false;
    for (std::size_t i = 1; i + 1 < breaks.size(); ++i)
      if (count.share(breaks[i - 1], breaks[i]) * max_growth < 1.0 ||
        count.share(breaks[i], breaks[i + 1]) * max_growth < 1.0)
      {
        breaks.erase(breaks.begin() + static_cast<std::ptrdiff_t>(i));
        dropped = true;
        break;
      }
  }

  std::vector<double> line{ lo };
  for (std::size_t s = 0; s + 1 < breaks.size(); ++s)
  {
    const double p = breaks[s], q = breaks[s + 1];
    const std::size_t n = count.cells(p, q);
    const double fp = count.at(p), fq = count.at(q);
    for (std::size_t k = 1; k < n; ++k)
      line.push_back(count.inverse(fp + (fq - fp) * double(k) / double(n)));
    line.push_back(q);
  }
  return line;
}

} // namespace ember::inputs
