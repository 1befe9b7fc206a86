#include "ember/inputs/body_shapes.h"

#include <algorithm>
#include <cmath>
#include <numbers>

namespace ember::inputs
{
namespace
{

double dot(const Point& a, const Point& b) { return a[0] * b[0] + a[1] * b[1] + a[2] * b[2]; }

Point offset(const Point& p, const std::array<double, 2>& centre, double z)
{
  return { p[0] - centre[0], p[1] - centre[1], p[2] - z };
}

/// Even–odd rule; points exactly on an edge may fall either way (measure zero for volumes).
bool in_polygon(const std::vector<std::array<double, 2>>& poly, double x, double y)
{
  bool inside = false;
  for (std::size_t i = 0, j = poly.size() - 1; i < poly.size(); j = i++)
  {
    const auto& a = poly[i];
    const auto& b = poly[j];
    if ((a[1] > y) != (b[1] > y) && x < (b[0] - a[0]) * (y - a[1]) / (b[1] - a[1]) + a[0])
      inside = !inside;
  }
  return inside;
}

struct Contains
{
  const Point& p;
  bool operator()(const Sill& s) const
  {
    const double rho = std::hypot(p[0] - s.centre[0], p[1] - s.centre[1]);
    return rho <= s.radius && std::abs(p[2] - s.mid_z(rho)) <= 0.5 * s.thickness;
  }
  bool operator()(const Dike& d) const
  {
    const Point r = offset(p, d.centre, d.z);
    return std::abs(dot(r, d.normal())) <= 0.5 * d.width &&
      std::abs(dot(r, d.strike_vector())) <= 0.5 * d.length &&
      std::abs(dot(r, d.dip_vector())) <= 0.5 * d.height;
  }
  bool operator()(const Pluton& b) const
  {
    const Point r = offset(p, b.centre, b.z);
    const double u = r[0] * std::sin(b.strike) + r[1] * std::cos(b.strike); // along strike
    const double v = r[0] * std::cos(b.strike) - r[1] * std::sin(b.strike); // across
    const auto& s = b.semi_axes;
    return (u / s[0]) * (u / s[0]) + (v / s[1]) * (v / s[1]) + (r[2] / s[2]) * (r[2] / s[2]) <= 1.0;
  }
  bool operator()(const LavaFlow& f) const
  {
    return p[2] >= f.base_z && p[2] <= f.base_z + f.thickness && in_polygon(f.outline, p[0], p[1]);
  }
};

struct Box
{
  std::array<Point, 2> operator()(const Sill& s) const
  {
    const double t = 0.5 * s.thickness;
    return { Point{ s.centre[0] - s.radius, s.centre[1] - s.radius, s.z - t },
      Point{ s.centre[0] + s.radius, s.centre[1] + s.radius, s.z + s.rim_rise() + t } };
  }
  std::array<Point, 2> operator()(const Dike& d) const
  {
    // Half-extent of the slab along each axis: Σ over its three edge vectors of |component|.
    const Point e[3] = { d.normal(), d.strike_vector(), d.dip_vector() };
    const double half[3] = { 0.5 * d.width, 0.5 * d.length, 0.5 * d.height };
    Point lo{ d.centre[0], d.centre[1], d.z }, hi = lo;
    for (int a = 0; a < 3; ++a)
    {
      double h = 0.0;
      for (int k = 0; k < 3; ++k)
        h += half[k] * std::abs(e[k][a]);
      lo[a] -= h;
      hi[a] += h;
    }
    return { lo, hi };
  }
  std::array<Point, 2> operator()(const Pluton& b) const
  {
    // Bounding box of a rotated ellipse in plan: half-widths sqrt((a sinφ)² + (b cosφ)²), ...
    const double a = b.semi_axes[0], c = b.semi_axes[1];
    const double hx = std::hypot(a * std::sin(b.strike), c * std::cos(b.strike));
    const double hy = std::hypot(a * std::cos(b.strike), c * std::sin(b.strike));
    return { Point{ b.centre[0] - hx, b.centre[1] - hy, b.z - b.semi_axes[2] },
      Point{ b.centre[0] + hx, b.centre[1] + hy, b.z + b.semi_axes[2] } };
  }
  std::array<Point, 2> operator()(const LavaFlow& f) const
  {
    Point lo{ f.outline[0][0], f.outline[0][1], f.base_z };
    Point hi{ lo[0], lo[1], f.base_z + f.thickness };
    for (const auto& v : f.outline)
      for (int a = 0; a < 2; ++a)
        lo[a] = std::min(lo[a], v[a]), hi[a] = std::max(hi[a], v[a]);
    return { lo, hi };
  }
};

struct Volume
{
  // A saucer of constant vertical thickness has the flat sill's volume (Cavalieri's principle).
  double operator()(const Sill& s) const { return std::numbers::pi * s.radius * s.radius * s.thickness; }
  double operator()(const Dike& d) const { return d.width * d.length * d.height; }
  double operator()(const Pluton& b) const
  {
    return 4.0 / 3.0 * std::numbers::pi * b.semi_axes[0] * b.semi_axes[1] * b.semi_axes[2];
  }
  double operator()(const LavaFlow& f) const { return f.plan_area() * f.thickness; }
};

} // namespace

double Sill::mid_z(double rho) const
{
  return z + std::max(0.0, std::min(rho, radius) - inner_radius) * std::tan(inclination);
}

double Sill::rim_rise() const { return mid_z(radius) - z; }

Point Dike::strike_vector() const { return { std::sin(strike), std::cos(strike), 0.0 }; }

Point Dike::dip_vector() const
{
  // Horizontal dip direction is the strike azimuth + 90° (right-hand rule).
  return { std::cos(dip) * std::cos(strike), -std::cos(dip) * std::sin(strike), -std::sin(dip) };
}

Point Dike::normal() const
{
  return { std::sin(dip) * std::cos(strike), -std::sin(dip) * std::sin(strike), std::cos(dip) };
}

double LavaFlow::plan_area() const
{
  double twice = 0.0;
  for (std::size_t i = 0, j = outline.size() - 1; i < outline.size(); j = i++)
    twice += outline[j][0] * outline[i][1] - outline[i][0] * outline[j][1];
  return 0.5 * std::abs(twice);
}

const char* shape_name(const Shape& shape)
{
  static const char* names[] = { "sill", "dike", "pluton", "lava_flow" };
  return names[shape.index()];
}

bool contains(const Shape& shape, const Point& p) { return std::visit(Contains{ p }, shape); }

std::array<Point, 2> bounding_box(const Shape& shape) { return std::visit(Box{}, shape); }

double analytic_volume(const Shape& shape) { return std::visit(Volume{}, shape); }

} // namespace ember::inputs
