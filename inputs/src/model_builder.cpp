// Scenario → graded box of hexahedra, bodies rasterised by sub-cell volume fraction.
#include "ember/inputs/model_builder.h"

#include <algorithm>
#include <cmath>

namespace ember::inputs
{
namespace
{

using Zones = std::array<std::vector<AxisZone>, 3>;

/// Cells across a body at which an inclined sheet may step by one thickness per cell.
constexpr double kStaircase = 8.0;

/// Beyond this a run would need tens of GB (see describe()'s memory estimate): refuse early.
constexpr double kMaxCells = 50e6;

/// Cell size each body asks for along each axis: its extent / N (capped at the far field), and
/// finer where its thinnest dimension needs it.
std::array<double, 3> body_sizes(const Shape& shape, const std::array<Point, 2>& box, int n, double far)
{
  std::array<double, 3> size{};
  for (int a = 0; a < 3; ++a)
    size[a] = std::min(far, (box[1][a] - box[0][a]) / n);
  if (const auto* s = std::get_if<Sill>(&shape))
  {
    size[2] = std::min(size[2], s->thickness / n);
    // Across an inclined rim, a column may shift the sheet by at most its own thickness (at
    // the default 8 cells across; proportionally more when fewer are asked), so the
    // rasterised rim stays connected.
    if (s->inclination > 0.0)
      for (int a = 0; a < 2; ++a)
        size[a] = std::min(size[a], kStaircase / n * s->thickness / std::tan(s->inclination));
  }
  else if (const auto* d = std::get_if<Dike>(&shape))
  {
    // N cells across the width along the axis most normal to the slab. Along each of the m
    // other axes a cell may shift the slab by at most w / m (h_b |n_b| <= w / m): a cell then
    // spans at most w/N + w of the normal, so cells in the slab's core are mostly inside and
    // an oblique dike rasterises as a connected staircase at any N, without the cost of N
    // cells across along every axis.
    const Point normal = d->normal();
    int a_max = 0, m = 0;
    for (int a = 0; a < 3; ++a)
      if (std::abs(normal[a]) > std::abs(normal[a_max]))
        a_max = a;
    for (int a = 0; a < 3; ++a)
      m += a != a_max && std::abs(normal[a]) > 1e-12 ? 1 : 0;
    for (int a = 0; a < 3; ++a)
      if (a == a_max)
        size[a] = std::min(size[a], d->width / (n * std::abs(normal[a])));
      else if (std::abs(normal[a]) > 1e-12)
        size[a] = std::min(size[a], d->width / (m * std::abs(normal[a])));
  }
  else if (const auto* f = std::get_if<LavaFlow>(&shape))
    size[2] = std::min(size[2], f->thickness / n);
  return size;
}

/// Axis-aligned flat faces of a body, per axis [m]: where node planes make its volume exact.
std::array<std::vector<double>, 3> flat_faces(const Shape& shape)
{
  std::array<std::vector<double>, 3> faces;
  if (const auto* s = std::get_if<Sill>(&shape))
    faces[2] = { s->z - 0.5 * s->thickness, s->z + 0.5 * s->thickness };
  else if (const auto* f = std::get_if<LavaFlow>(&shape))
    faces[2] = { f->base_z, f->base_z + f->thickness };
  else if (const auto* d = std::get_if<Dike>(&shape))
  {
    const Point normal = d->normal();
    const double centre[3] = { d->centre[0], d->centre[1], d->z };
    for (int a = 0; a < 3; ++a)
      if (std::abs(normal[a]) > 1.0 - 1e-12)
        faces[a] = { centre[a] - 0.5 * d->width, centre[a] + 0.5 * d->width };
  }
  return faces;
}

/// Cell index of the structured box (x fastest), as make_graded_box_hex orders its cells.
struct Grid
{
  const std::array<std::vector<double>, 3>& lines;
  std::size_t n(int a) const { return lines[a].size() - 1; }
  std::size_t index(std::size_t i, std::size_t j, std::size_t k) const { return i + n(0) * (j + n(1) * k); }
  /// Cells along axis a that overlap [lo, hi].
  std::pair<std::size_t, std::size_t> range(int a, double lo, double hi) const
  {
    const auto& l = lines[a];
    const auto first = std::upper_bound(l.begin(), l.end(), lo) - l.begin();
    const auto last = std::lower_bound(l.begin(), l.end(), hi) - l.begin();
    return { static_cast<std::size_t>(std::max<std::ptrdiff_t>(first - 1, 0)),
      static_cast<std::size_t>(std::min<std::ptrdiff_t>(last, static_cast<std::ptrdiff_t>(n(a)))) };
  }
};

/// Fraction of cell (i, j, k) inside the body, from 4×4×4 sub-cell centre samples.
double volume_fraction(const Shape& shape, const Grid& g, std::size_t i, std::size_t j, std::size_t k)
{
  constexpr int s = 4;
  const std::size_t idx[3] = { i, j, k };
  double lo[3], h[3];
  for (int a = 0; a < 3; ++a)
    lo[a] = g.lines[a][idx[a]], h[a] = (g.lines[a][idx[a] + 1] - lo[a]) / s;
  int inside = 0;
  for (int c = 0; c < s; ++c)
    for (int b = 0; b < s; ++b)
      for (int a = 0; a < s; ++a)
        inside += contains(shape, { lo[0] + (a + 0.5) * h[0], lo[1] + (b + 0.5) * h[1], lo[2] + (c + 0.5) * h[2] });
  return inside / double(s * s * s);
}

/// Drop cells with region < 0 (air) and the nodes only they used; renumber the rest in order.
Mesh without_air(const Mesh& box)
{
  Mesh mesh;
  std::vector<std::int64_t> new_id(box.n_points(), -1);
  for (std::size_t c = 0; c < box.n_cells(); ++c)
    if (box.cell_region[c] >= 0)
      for (const auto n : box.nodes(c))
        new_id[n] = 0;
  for (std::size_t p = 0; p < box.n_points(); ++p)
    if (new_id[p] == 0)
    {
      new_id[p] = static_cast<std::int64_t>(mesh.points.size());
      mesh.points.push_back(box.points[p]);
    }
  for (std::size_t c = 0; c < box.n_cells(); ++c)
    if (box.cell_region[c] >= 0)
    {
      std::array<std::int64_t, 8> hex{};
      const auto nodes = box.nodes(c);
      for (std::size_t a = 0; a < nodes.size(); ++a)
        hex[a] = new_id[nodes[a]];
      mesh.add_cell(box.cell_types[c], hex, box.cell_region[c]);
    }
  return mesh;
}

} // namespace

BuiltModel build_model(const Scenario& scenario)
{
  const Domain& d = scenario.domain;
  const double far = scenario.mesh.effective_cell_size();
  const int n = scenario.mesh.effective_cells_across();
  Zones zones;
  std::array<std::vector<double>, 3> faces;
  double z_max = d.top;
  for (const Body& body : scenario.bodies)
  {
    const auto box = bounding_box(body.shape);
    const auto size = body_sizes(body.shape, box, n, far);
    const auto flat = flat_faces(body.shape);
    for (int a = 0; a < 3; ++a)
    {
      zones[a].push_back({ box[0][a], box[1][a], size[a] });
      faces[a].insert(faces[a].end(), flat[a].begin(), flat[a].end());
    }
    z_max = std::max(z_max, box[1][2]);
  }

  BuiltModel model;
  const double lo[3] = { d.x[0], d.y[0], d.bottom }, hi[3] = { d.x[1], d.y[1], z_max };
  for (int a = 0; a < 3; ++a)
    model.lines[a] = graded_line(lo[a], hi[a], far, scenario.mesh.max_growth, zones[a], faces[a]);
  const Grid grid{ model.lines };
  const double n_cells = double(grid.n(0)) * double(grid.n(1)) * double(grid.n(2));
  if (n_cells > kMaxCells)
    throw InputError(scenario.file + ": the model would have " + std::to_string(std::llround(n_cells)) +
      " cells, more than " + std::to_string(std::llround(kMaxCells)) +
      " (allowed: lower mesh.resolution or mesh.cells_across, or raise mesh.cell_size)");

  // Layers by cell centre; above the ground, air (-1) until a body claims the cell.
  std::vector<int> region(grid.n(0) * grid.n(1) * grid.n(2));
  for (std::size_t k = 0; k < grid.n(2); ++k)
  {
    const double zc = 0.5 * (model.lines[2][k] + model.lines[2][k + 1]);
    const int r = zc > d.top ? -1 : scenario.layers[scenario.layer_at(zc)].region;
    std::fill_n(region.begin() + static_cast<std::ptrdiff_t>(grid.index(0, 0, k)), grid.n(0) * grid.n(1), r);
  }
  for (const Body& body : scenario.bodies)
  {
    const auto box = bounding_box(body.shape);
    const auto [i0, i1] = grid.range(0, box[0][0], box[1][0]);
    const auto [j0, j1] = grid.range(1, box[0][1], box[1][1]);
    const auto [k0, k1] = grid.range(2, box[0][2], box[1][2]);
    std::size_t claimed = 0;
    for (std::size_t k = k0; k < k1; ++k)
      for (std::size_t j = j0; j < j1; ++j)
        for (std::size_t i = i0; i < i1; ++i)
          if (volume_fraction(body.shape, grid, i, j, k) >= 0.5)
            region[grid.index(i, j, k)] = body.region, ++claimed;
    if (claimed == 0)
      throw InputError(body.location + ": the " + shape_name(body.shape) + " '" + body.name +
        "' fills no cell at this resolution (allowed: bodies at least half filling some cell; "
        "raise mesh.cells_across or mesh.resolution)");
  }

  Mesh box = make_graded_box_hex(model.lines[0], model.lines[1], model.lines[2]);
  box.cell_region = std::move(region);
  const bool has_air = std::any_of(box.cell_region.begin(), box.cell_region.end(), [](int r) { return r < 0; });
  model.mesh = has_air ? without_air(box) : std::move(box);
  for (const RegionEntry& r : scenario.regions.regions)
    model.region_names.push_back(r.name);

  // A later body may hide an earlier one completely.
  std::vector<std::size_t> count(model.region_names.size(), 0);
  for (const int r : model.mesh.cell_region)
    ++count[static_cast<std::size_t>(r)];
  for (const Body& body : scenario.bodies)
    if (count[static_cast<std::size_t>(body.region)] == 0)
      throw InputError(body.location + ": body '" + body.name + "' has no cell left: later bodies "
        "cover it (allowed: later bodies override earlier ones only in part)");
  return model;
}

} // namespace ember::inputs
