// Shared helpers for the core tests: thin columns of 3-D cells standing in for 1-D problems.
#pragma once

#include "ember/heat_operator.h"
#include "ember/simd.h"
#include "ember/simulation.h"

#include <array>
#include <cmath>
#include <vector>

namespace ember::testing
{

/// Restores the processor's best SIMD level when a test ends, pass or fail (tests that set
/// levels must not leave a slower one behind for the next test).
struct SimdLevelGuard
{
  ~SimdLevelGuard() { set_simd_level(best_simd_level()); }
};

/// Rock with constant properties; κ = k/(ρc).
inline Rock simple_rock(const char* name, double k, double rho, double c)
{
  Rock r;
  r.name = name;
  r.density = rho;
  r.conductivity.k_ref = k;
  r.heat_capacity.c_ref = c;
  return r;
}

/// Coordinates 0, h, 2h, ..., n·h.
inline std::vector<double> uniform_line(double length, int n)
{
  std::vector<double> z(n + 1);
  for (int i = 0; i <= n; ++i)
    z[i] = length * i / n;
  return z;
}

/// Vertical column one cell wide: depth `depth` below z = 0, n cells, hexahedra or tetrahedra.
inline Mesh column(double depth, int n, double width, bool tets)
{
  if (tets)
    return make_box_tet({ 0, 0, -depth }, { width, width, 0 }, { 1, 1, n });
  return make_box_hex({ 0, 0, -depth }, { width, width, 0 }, { 1, 1, n });
}

/// Put the cells whose centroid lies at z_lo < z < z_hi into `region` (a sill-like layer).
inline void mark_layer(Mesh& mesh, double z_lo, double z_hi, int region = 1)
{
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    double zc = 0;
    for (auto n : mesh.nodes(c))
      zc += mesh.points[n][2] / mesh.nodes(c).size();
    if (zc > z_lo && zc < z_hi)
      mesh.cell_region[c] = region;
  }
}

/// Value of a nodal field at depth d, averaged over the nodes at that depth (exact level).
inline double at_depth(const Mesh& mesh, const std::vector<double>& f, double d)
{
  double s = 0;
  int n = 0;
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
    if (std::abs(-mesh.points[i][2] - d) < 1e-9)
    {
      s += f[i];
      ++n;
    }
  return n ? s / n : NAN;
}

/// Log-spaced output times between t0 and t1 [s], n of them.
inline std::vector<double> log_times(double t0, double t1, int n)
{
  std::vector<double> t(n);
  for (int i = 0; i < n; ++i)
    t[i] = t0 * std::pow(t1 / t0, double(i) / (n - 1));
  return t;
}

/// Moves the nodes strictly inside the box [0, size] by up to `amplitude` cells, the same
/// shifts every run: on tetrahedra some edge weights turn negative (obtuse cells).
inline void distort_interior(Mesh& mesh, const std::array<double, 3>& size, double amplitude)
{
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
  {
    auto& p = mesh.points[i];
    bool interior = true;
    for (int d = 0; d < 3; ++d)
      interior = interior && p[d] > 0 && p[d] < size[d];
    if (interior)
      for (int d = 0; d < 3; ++d)
        p[d] += amplitude * std::sin(2.3 * static_cast<double>(i) + 1.1 * d);
  }
}

/// Calls column(j, A e_j) for every node j: the operator's columns, one rate() per node at
/// the temperatures e_j (1 at node j, 0 elsewhere).
template <class F>
void for_each_operator_column(const HeatOperator& op, std::size_t n, tbb::task_arena& arena, F column)
{
  std::vector<double> unit(n, 0.0), rate;
  PowerTally tally;
  for (std::size_t j = 0; j < n; ++j)
  {
    unit[j] = 1.0;
    op.rate(unit, rate, tally, arena);
    unit[j] = 0.0;
    column(j, rate);
  }
}

} // namespace ember::testing
