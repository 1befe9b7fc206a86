/**
 * @file body_shapes.h
 * @brief Geometry of the magmatic bodies a scenario can hold: sills (flat or saucer-shaped),
 *        dikes (planar slabs), plutons (ellipsoids) and lava flows (sheets on a polygon outline).
 *
 * Coordinates are metres, x east, y north, z up (the model's frame). A scenario gives vertical
 * positions as depths below the domain top; the parser converts them to z, so these shapes
 * only know z. Angles are stored in radians.
 */
#pragma once

#include "ember/mesh.h"

#include <array>
#include <variant>
#include <vector>

namespace ember::inputs
{

/// Lens of constant vertical thickness around a mid-surface; flat, or a saucer whose rim rises.
struct Sill
{
  std::array<double, 2> centre{}; ///< plan position of the centre [m]
  double z = 0.0;                 ///< elevation of the mid-surface at the centre [m]
  double radius = 0.0;            ///< outer radius in plan [m]
  double thickness = 0.0;         ///< vertical thickness [m]
  double inner_radius = 0.0;      ///< saucer: radius of the flat floor [m] (= radius: flat sill)
  double inclination = 0.0;       ///< saucer: dip of the rim [rad], rising outward
  /// Elevation of the mid-surface at plan distance rho from the centre [m].
  double mid_z(double rho) const;
  /// Height the rim rises above the floor [m].
  double rim_rise() const;
};

/// Planar slab: width normal to its plane, length along strike, height along dip.
struct Dike
{
  std::array<double, 2> centre{};
  double z = 0.0;        ///< elevation of the slab centre [m]
  double strike = 0.0;   ///< azimuth of the strike line, clockwise from north [rad]
  double dip = 0.0;      ///< from horizontal, to the right of the strike direction [rad]
  double width = 0.0;    ///< [m]
  double length = 0.0;   ///< along strike [m]
  double height = 0.0;   ///< along dip [m]
  Point strike_vector() const; ///< unit, horizontal
  Point dip_vector() const;    ///< unit, pointing down-dip
  Point normal() const;        ///< unit normal of the slab plane
};

/// Ellipsoid with its first semi-axis along `strike` (horizontal), its third vertical.
struct Pluton
{
  std::array<double, 2> centre{};
  double z = 0.0;                     ///< elevation of the centre [m]
  std::array<double, 3> semi_axes{};  ///< a (along strike), b (across), c (vertical) [m]
  double strike = 0.0;                ///< azimuth of the a-axis, clockwise from north [rad]
};

/// Sheet of constant thickness over a simple polygon outline (plan), between two elevations.
struct LavaFlow
{
  std::vector<std::array<double, 2>> outline; ///< polygon vertices (x, y) [m], not closed
  double thickness = 0.0; ///< [m]
  double base_z = 0.0;    ///< elevation of the flow's base [m]
  bool on_surface = true; ///< sits on the ground (above the domain top) rather than inside it
  double plan_area() const; ///< shoelace formula [m²]
};

using Shape = std::variant<Sill, Dike, Pluton, LavaFlow>;

/// "sill", "dike", "pluton" or "lava_flow".
const char* shape_name(const Shape& shape);
/// Whether point p [m] lies inside the body.
bool contains(const Shape& shape, const Point& p);
/// Axis-aligned bounding box {lo, hi} [m].
std::array<Point, 2> bounding_box(const Shape& shape);
/// The body's volume from its formula (π r² t, 4/3 π abc, slab w·l·h, area × t) [m³].
double analytic_volume(const Shape& shape);

} // namespace ember::inputs
