// Shared helpers for the core tests: thin columns of 3-D cells standing in for 1-D problems.
#pragma once

#include "ember/simd.h"
#include "ember/simulation.h"

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

} // namespace ember::testing
