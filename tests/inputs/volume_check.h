// Rasterised body volume against the shape's formula, within a bound derived from the cell
// size; shared by the model-builder and example tests.
#pragma once

#include "ember/inputs/model_builder.h"

#include <gtest/gtest.h>

#include <cstdio>
#include <numbers>

namespace ember::testing
{
using namespace ember::inputs;

/// Largest cell along axis a among cells overlapping [lo, hi].
inline double max_cell_in(const std::vector<double>& line, double lo, double hi)
{
  double h = 0.0;
  for (std::size_t i = 1; i < line.size(); ++i)
    if (line[i] > lo && line[i - 1] < hi)
      h = std::max(h, line[i] - line[i - 1]);
  return h;
}

/// Rasterised and analytic volume of bodies[body], and the first-order bound on their difference.
///
/// Tolerance, from the cell size: a cell is misclassified only if the body's surface cuts it,
/// and then by less than the part of it beyond the surface, so the error lies within a band of
/// half a cell's extent along the surface normal on each side: |ΔV| <= ∫_S ½ Σ_a h_a |n_a| dA =
/// Σ_a h_a A_a, with A_a = ½ ∫_S |n_a| dA the body's shadow (projected area) along axis a and h_a
/// the largest cell size along a over the body. First order in h: curvature terms are smaller
/// by a further factor h / radius. Faces lying on node planes are exact: their shadow is left
/// out by the caller. The bound is a worst case; the printed error shows the typical one.
/// Returns the relative error.
inline double expect_volume(const Scenario& s, const BuiltModel& m, std::array<double, 3> shadow,
  const char* what, std::size_t body = 0)
{
  const ModelSummary summary = describe(s, m, false);
  const RegionCells& r = summary.regions[static_cast<std::size_t>(s.bodies[body].region)];
  const auto box = bounding_box(s.bodies[body].shape);
  double bound = 0.0;
  for (int a = 0; a < 3; ++a)
    bound += max_cell_in(m.lines[a], box[0][a], box[1][a]) * shadow[a];
  EXPECT_NEAR(r.volume, r.analytic_volume, bound) << what;
  std::printf("%s: rasterised %.5g m³, formula %.5g m³ (%+.2f %%, bound ±%.1f %%)\n", what, r.volume,
    r.analytic_volume, 100 * (r.volume / r.analytic_volume - 1), 100 * bound / r.analytic_volume);
  return r.volume / r.analytic_volume - 1;
}

/// Shadows of a sill (along x, y: its diameter times thickness plus rim rise; along z: its
/// plan area) or a lava flow (its plan extents times thickness; its plan area).
inline std::array<double, 3> sheet_shadow(const Shape& shape)
{
  const auto box = bounding_box(shape);
  const double dz = box[1][2] - box[0][2];
  const double area = std::holds_alternative<LavaFlow>(shape) ? std::get<LavaFlow>(shape).plan_area()
                                                              : std::numbers::pi * std::get<Sill>(shape).radius * std::get<Sill>(shape).radius;
  return { (box[1][1] - box[0][1]) * dz, (box[1][0] - box[0][0]) * dz, area };
}

} // namespace ember::testing
