#include "ember/mesh.h"

#include "ember/geometry.h"

#include "cell_faces.h"
#include "huge_pages.h"

#include <algorithm>
#include <cmath>
#include <map>
#include <numeric>
#include <sstream>

namespace ember
{
namespace
{

// Error messages list at most this many ids so a broken 10^6-cell file stays readable.
constexpr std::size_t max_listed_ids = 20;

/// "cell 3" / "cells 3, 7, 9 and 12 more (15 in total)".
std::string list_cells(const std::vector<std::int64_t>& ids)
{
  std::ostringstream s;
  s << (ids.size() == 1 ? "cell " : "cells ");
  const std::size_t shown = std::min(ids.size(), max_listed_ids);
  for (std::size_t i = 0; i < shown; ++i)
    s << (i ? ", " : "") << ids[i];
  if (ids.size() > shown)
    s << " and " << ids.size() - shown << " more (" << ids.size() << " in total)";
  return s.str();
}

/// Pick the singular or plural phrase for an id list.
const char* verb(const std::vector<std::int64_t>& ids, const char* one, const char* many)
{
  return ids.size() == 1 ? one : many;
}

/// Name of a VTK cell type code, for error messages about cells we do not accept.
std::string vtk_type_name(int code)
{
  static const std::map<int, const char*> names = { { 0, "empty cell" }, { 1, "vertex" },
    { 2, "poly-vertex" }, { 3, "line" }, { 4, "poly-line" }, { 5, "triangle" },
    { 6, "triangle strip" }, { 7, "polygon" }, { 8, "pixel" }, { 9, "quad" }, { 10, "tetra" },
    { 11, "voxel" }, { 12, "hexahedron" }, { 13, "wedge" }, { 14, "pyramid" },
    { 15, "pentagonal prism" }, { 16, "hexagonal prism" }, { 21, "quadratic edge" },
    { 22, "quadratic triangle" }, { 23, "quadratic quad" }, { 24, "quadratic tetra" },
    { 25, "quadratic hexahedron" }, { 26, "quadratic wedge" }, { 27, "quadratic pyramid" },
    { 28, "biquadratic quad" }, { 29, "triquadratic hexahedron" }, { 42, "polyhedron" } };
  const auto it = names.find(code);
  return it != names.end() ? it->second : "unknown";
}

constexpr std::uint8_t vtk_tetra = 10, vtk_voxel = 11, vtk_hexahedron = 12, vtk_wedge = 13,
                       vtk_pyramid = 14;

// A VTK voxel numbers its nodes lexicographically (x fastest); a hexahedron goes round each
// face. hex node i = voxel node voxel_to_hex[i].
constexpr std::array<int, 8> voxel_to_hex = { 0, 1, 3, 2, 4, 5, 7, 6 };


/// Union-find with path halving; small enough to keep local.
struct DisjointSets
{
  std::vector<std::int64_t> parent;
  explicit DisjointSets(std::size_t n) : parent(n) { std::iota(parent.begin(), parent.end(), 0); }
  std::int64_t find(std::int64_t a)
  {
    while (parent[a] != a)
      a = parent[a] = parent[parent[a]];
    return a;
  }
  void unite(std::int64_t a, std::int64_t b) { parent[find(a)] = find(b); }
};

/// Throws if the CSR arrays, node counts, regions or node ids are inconsistent.
void check_structure(const Mesh& mesh)
{
  const std::size_t n = mesh.n_cells();
  if (mesh.cell_offsets.size() != n + 1 || mesh.cell_offsets.front() != 0 ||
    mesh.cell_offsets.back() != static_cast<std::int64_t>(mesh.cell_nodes.size()))
    throw MeshError("mesh cell_offsets must have n_cells()+1 entries from 0 to cell_nodes.size()");
  if (mesh.cell_region.size() != n)
    throw MeshError("mesh has " + std::to_string(n) + " cells but " +
      std::to_string(mesh.cell_region.size()) + " region ids");

  std::vector<std::int64_t> wrong_count, out_of_range;
  const auto n_points = static_cast<std::int64_t>(mesh.n_points());
  for (std::size_t c = 0; c < n; ++c)
  {
    const auto c_id = static_cast<std::int64_t>(c);
    if (mesh.cell_offsets[c + 1] - mesh.cell_offsets[c] != n_cell_nodes(mesh.cell_types[c]))
    {
      wrong_count.push_back(c_id);
      continue;
    }
    for (const auto id : mesh.nodes(c))
      if (id < 0 || id >= n_points)
      {
        out_of_range.push_back(c_id);
        break;
      }
  }
  std::string msg;
  if (!wrong_count.empty())
    msg += list_cells(wrong_count) + verb(wrong_count, " has", " have") +
      " a node count that does not match the cell type. ";
  if (!out_of_range.empty())
    msg += list_cells(out_of_range) + verb(out_of_range, " references", " reference") +
      " point ids outside [0, " +
      std::to_string(n_points) + "). ";
  if (!msg.empty())
    throw MeshError("invalid mesh: " + msg);
}

} // namespace

int n_cell_nodes(CellType type)
{
  switch (type)
  {
  case CellType::Tetrahedron: return 4;
  case CellType::Hexahedron: return 8;
  case CellType::Wedge: return 6;
  case CellType::Pyramid: return 5;
  }
  throw MeshError("invalid cell type " + std::to_string(static_cast<int>(type)));
}

const char* cell_type_name(CellType type)
{
  switch (type)
  {
  case CellType::Tetrahedron: return "tetrahedron";
  case CellType::Hexahedron: return "hexahedron";
  case CellType::Wedge: return "wedge";
  case CellType::Pyramid: return "pyramid";
  }
  return "invalid cell type";
}

std::span<const std::array<int, 2>> cell_edges(CellType type)
{
  static constexpr std::array<std::array<int, 2>, 6> tet = { { { 0, 1 }, { 1, 2 }, { 2, 0 },
    { 0, 3 }, { 1, 3 }, { 2, 3 } } };
  static constexpr std::array<std::array<int, 2>, 12> hex = { { { 0, 1 }, { 1, 2 }, { 3, 2 },
    { 0, 3 }, { 4, 5 }, { 5, 6 }, { 7, 6 }, { 4, 7 }, { 0, 4 }, { 1, 5 }, { 3, 7 }, { 2, 6 } } };
  static constexpr std::array<std::array<int, 2>, 9> wedge = { { { 0, 1 }, { 1, 2 }, { 2, 0 },
    { 3, 4 }, { 4, 5 }, { 5, 3 }, { 0, 3 }, { 1, 4 }, { 2, 5 } } };
  static constexpr std::array<std::array<int, 2>, 8> pyramid = { { { 0, 1 }, { 1, 2 },
    { 2, 3 }, { 3, 0 }, { 0, 4 }, { 1, 4 }, { 2, 4 }, { 3, 4 } } };
  switch (type)
  {
  case CellType::Tetrahedron: return tet;
  case CellType::Hexahedron: return hex;
  case CellType::Wedge: return wedge;
  case CellType::Pyramid: return pyramid;
  }
  throw MeshError("invalid cell type " + std::to_string(static_cast<int>(type)));
}

void Mesh::reserve_cells(std::size_t cells, std::size_t entries)
{
  reserve_on_huge_pages(cell_types, cells);
  reserve_on_huge_pages(cell_nodes, entries);
  reserve_on_huge_pages(cell_offsets, cells + 1);
  reserve_on_huge_pages(cell_region, cells);
}

void Mesh::add_cell(CellType type, std::span<const std::int64_t> node_ids, int region)
{
  // A wrong count would shift every later cell's nodes in the CSR arrays, so refuse it here.
  if (static_cast<int>(node_ids.size()) != n_cell_nodes(type))
    throw MeshError("cell " + std::to_string(n_cells()) + ": a " + cell_type_name(type) +
      " needs " + std::to_string(n_cell_nodes(type)) + " nodes, got " +
      std::to_string(node_ids.size()));
  cell_types.push_back(type);
  cell_nodes.insert(cell_nodes.end(), node_ids.begin(), node_ids.end());
  cell_offsets.push_back(static_cast<std::int64_t>(cell_nodes.size()));
  cell_region.push_back(region);
}

Mesh mesh_from_vtk_arrays(std::vector<Point> points, std::span<const std::uint8_t> vtk_types,
  std::span<const std::int64_t> offsets, std::span<const std::int64_t> connectivity,
  std::span<const int> regions)
{
  const std::size_t n = vtk_types.size();
  // VTK >= 9 vtkCellArray offsets: n+1 entries starting at 0 (not the n end offsets of .vtu).
  if (offsets.size() != n + 1 || offsets.front() != 0 ||
    offsets.back() != static_cast<std::int64_t>(connectivity.size()))
    throw MeshError("VTK offsets must have n_cells+1 = " + std::to_string(n + 1) +
      " entries running from 0 to the connectivity size " + std::to_string(connectivity.size()) +
      " (got " + std::to_string(offsets.size()) + " entries)");
  for (std::size_t c = 0; c < n; ++c)
    if (offsets[c + 1] < offsets[c])
      throw MeshError("VTK offsets decrease at cell " + std::to_string(c));
  // An empty region array means "one region"; anything else must match the cell count.
  if (!regions.empty() && regions.size() != n)
    throw MeshError("got " + std::to_string(regions.size()) + " region ids for " +
      std::to_string(n) + " cells");

  std::map<int, std::vector<std::int64_t>> unsupported; // VTK type code -> cells
  std::vector<std::int64_t> wrong_count, out_of_range;
  const auto n_points = static_cast<std::int64_t>(points.size());

  Mesh mesh;
  mesh.points = std::move(points);
  mesh.reserve_cells(n, connectivity.size());
  for (std::size_t c = 0; c < n; ++c)
  {
    const auto c_id = static_cast<std::int64_t>(c);
    const std::span<const std::int64_t> ids = connectivity.subspan(
      static_cast<std::size_t>(offsets[c]), static_cast<std::size_t>(offsets[c + 1] - offsets[c]));
    CellType type{};
    switch (vtk_types[c])
    {
    case vtk_tetra: type = CellType::Tetrahedron; break;
    case vtk_voxel: // fall through: a voxel is an axis-aligned hexahedron in another order
    case vtk_hexahedron: type = CellType::Hexahedron; break;
    case vtk_wedge: type = CellType::Wedge; break;
    case vtk_pyramid: type = CellType::Pyramid; break;
    default: unsupported[vtk_types[c]].push_back(c_id); continue;
    }
    if (static_cast<int>(ids.size()) != n_cell_nodes(type))
    {
      wrong_count.push_back(c_id);
      continue;
    }
    if (std::any_of(ids.begin(), ids.end(), [&](auto id) { return id < 0 || id >= n_points; }))
      out_of_range.push_back(c_id);

    std::array<std::int64_t, 8> local{};
    std::copy(ids.begin(), ids.end(), local.begin());
    if (vtk_types[c] == vtk_voxel)
      for (int i = 0; i < 8; ++i)
        local[i] = ids[voxel_to_hex[i]];
    mesh.add_cell(type, std::span(local.data(), ids.size()), regions.empty() ? 0 : regions[c]);
  }

  // Report every problem at once: fixing a mesh file one error per run is tedious.
  std::ostringstream msg;
  for (const auto& [code, cells] : unsupported)
    msg << list_cells(cells) << verb(cells, " is not a linear 3-D cell", " are not linear 3-D cells") << " (VTK type " << code
        << " = " << vtk_type_name(code) << "). ";
  if (!unsupported.empty())
    msg << "Accepted VTK types: 10 tetra, 11 voxel, 12 hexahedron, 13 wedge, 14 pyramid. ";
  if (!wrong_count.empty())
    msg << list_cells(wrong_count) << verb(wrong_count, " has", " have")
        << " a node count that does not match the VTK cell type. ";
  if (!out_of_range.empty())
    msg << list_cells(out_of_range) << verb(out_of_range, " references", " reference")
        << " point ids outside [0, " << n_points << "). ";
  if (!msg.str().empty())
    throw MeshError("cannot build mesh: " + msg.str());
  return mesh;
}

MeshReport validate_mesh(const Mesh& mesh)
{
  check_structure(mesh);
  const auto bad = cells_with_bad_jacobian(mesh);
  if (!bad.empty())
    throw MeshError(list_cells(bad) + verb(bad, " has", " have") +
      " a non-positive Jacobian determinant (inverted, degenerate or not in VTK node order)");

  MeshReport report;
  std::vector<char> referenced(mesh.n_points(), 0);
  for (const auto id : mesh.cell_nodes)
    referenced[id] = 1;
  for (std::size_t p = 0; p < referenced.size(); ++p)
    if (!referenced[p])
      report.unreferenced_points.push_back(static_cast<std::int64_t>(p));

  // Cells are face-neighbours when they share a face with the same node set: unite the cells
  // of each run of equal node sets in the sorted faces.
  const std::vector<FaceEntry> faces = sorted_cell_faces(mesh);
  DisjointSets sets(mesh.n_cells());
  for (std::size_t i = 1; i < faces.size(); ++i)
    if (faces[i].same_face(faces[i - 1]))
      sets.unite(faces[i].cell, faces[i - 1].cell);
  report.boundary_faces = faces_of_one_cell(faces);

  // Number pieces in order of their first cell so the numbering is deterministic.
  std::map<std::int64_t, std::int64_t> piece_of_root;
  report.piece_of_cell.resize(mesh.n_cells());
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    const auto root = sets.find(static_cast<std::int64_t>(c));
    const auto it = piece_of_root.try_emplace(root, piece_of_root.size()).first;
    report.piece_of_cell[c] = it->second;
  }
  report.n_pieces = piece_of_root.size();
  return report;
}

Mesh make_box_hex(std::array<double, 3> lo, std::array<double, 3> hi, std::array<int, 3> n)
{
  std::array<std::vector<double>, 3> lines;
  for (int d = 0; d < 3; ++d)
  {
    if (n[d] < 1 || !(hi[d] > lo[d]))
      throw MeshError("box needs n >= 1 cells and hi > lo along every axis (axis " +
        std::to_string(d) + ")");
    for (int i = 0; i <= n[d]; ++i)
      lines[d].push_back(i == n[d] ? hi[d] : lo[d] + (hi[d] - lo[d]) * i / n[d]);
  }
  return make_graded_box_hex(lines[0], lines[1], lines[2]);
}

Mesh make_graded_box_hex(
  const std::vector<double>& xs, const std::vector<double>& ys, const std::vector<double>& zs)
{
  const std::array<const std::vector<double>*, 3> lines = { &xs, &ys, &zs };
  for (int d = 0; d < 3; ++d)
  {
    const auto& l = *lines[d];
    bool ok = l.size() >= 2 && std::all_of(l.begin(), l.end(), [](double v) { return std::isfinite(v); });
    for (std::size_t i = 1; ok && i < l.size(); ++i)
      ok = l[i] > l[i - 1];
    if (!ok)
      throw MeshError("graded box: coordinate line " + std::string(1, "xyz"[d]) +
        " needs at least 2 finite, strictly increasing values");
  }

  const auto nx = static_cast<std::int64_t>(xs.size()), ny = static_cast<std::int64_t>(ys.size());
  auto id = [&](std::int64_t i, std::int64_t j, std::int64_t k) { return i + nx * (j + ny * k); };

  Mesh mesh;
  const std::size_t cells = (xs.size() - 1) * (ys.size() - 1) * (zs.size() - 1);
  reserve_on_huge_pages(mesh.points, xs.size() * ys.size() * zs.size());
  mesh.reserve_cells(cells, 8 * cells);
  for (const double z : zs)
    for (const double y : ys)
      for (const double x : xs)
        mesh.points.push_back({ x, y, z });
  for (std::int64_t k = 0; k + 1 < static_cast<std::int64_t>(zs.size()); ++k)
    for (std::int64_t j = 0; j + 1 < ny; ++j)
      for (std::int64_t i = 0; i + 1 < nx; ++i)
      {
        // VTK hexahedron: bottom face counter-clockwise seen from above, then the top face.
        const std::array<std::int64_t, 8> hex = { id(i, j, k), id(i + 1, j, k),
          id(i + 1, j + 1, k), id(i, j + 1, k), id(i, j, k + 1), id(i + 1, j, k + 1),
          id(i + 1, j + 1, k + 1), id(i, j + 1, k + 1) };
        mesh.add_cell(CellType::Hexahedron, hex, 0);
      }
  return mesh;
}

Mesh make_box_tet(std::array<double, 3> lo, std::array<double, 3> hi, std::array<int, 3> n)
{
  const Mesh hexes = make_box_hex(lo, hi, n);

  // Kuhn split: one tetrahedron per monotone lattice path from hex corner (0,0,0) to (1,1,1),
  // i.e. per permutation of the axes. Every cube uses the same diagonal direction, so each
  // shared face is cut along the same diagonal from both sides (conforming).
  // Corner (a,b,c) of the unit cube -> local VTK hex node.
  auto corner = [](std::array<int, 3> c) {
    static constexpr int node[2][2][2] = { { { 0, 4 }, { 3, 7 } }, { { 1, 5 }, { 2, 6 } } };
    return node[c[0]][c[1]][c[2]];
  };
  std::vector<std::array<int, 4>> tets;
  std::array<int, 3> axes = { 0, 1, 2 };
  do
  {
    std::array<int, 3> c = { 0, 0, 0 };
    std::array<int, 4> tet{};
    tet[0] = corner(c);
    for (int s = 0; s < 3; ++s)
    {
      c[axes[s]] = 1;
      tet[s + 1] = corner(c);
    }
    // The path tet's orientation is the sign of the axis permutation; odd ones are flipped
    // by swapping two nodes so all tets are positively oriented (VTK convention).
    const int inversions = (axes[0] > axes[1]) + (axes[0] > axes[2]) + (axes[1] > axes[2]);
    if (inversions % 2)
      std::swap(tet[1], tet[2]);
    tets.push_back(tet);
  } while (std::next_permutation(axes.begin(), axes.end()));

  Mesh mesh;
  mesh.points = hexes.points;
  mesh.reserve_cells(hexes.n_cells() * tets.size(), hexes.n_cells() * tets.size() * 4);
  for (std::size_t c = 0; c < hexes.n_cells(); ++c)
  {
    const auto hex = hexes.nodes(c);
    for (const auto& t : tets)
    {
      const std::array<std::int64_t, 4> ids = { hex[t[0]], hex[t[1]], hex[t[2]], hex[t[3]] };
      mesh.add_cell(CellType::Tetrahedron, ids, 0);
    }
  }
  return mesh;
}

} // namespace ember
