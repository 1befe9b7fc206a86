/**
 * @file mesh.h
 * @brief Unstructured mesh of linear 3-D cells with a region id per cell (VTK-free).
 *
 * Node ordering inside a cell follows the VTK conventions (VTK_TETRA 10, VTK_HEXAHEDRON 12,
 * VTK_WEDGE 13, VTK_PYRAMID 14); VTK_VOXEL (11) is accepted and reordered to a hexahedron.
 * Coordinates are in metres, z positive up.
 */
#pragma once

#include <array>
#include <cstdint>
#include <span>
#include <stdexcept>
#include <string>
#include <vector>

namespace ember
{

enum class CellType : std::uint8_t
{
  Tetrahedron,
  Hexahedron,
  Wedge,
  Pyramid
};

/// Number of nodes of a linear cell of this type.
int n_cell_nodes(CellType type);

/// Human-readable name ("tetrahedron", ...).
const char* cell_type_name(CellType type);

/// Local node pairs joined by an edge of a cell of this type, in VTK's edge order (vtkTetra,
/// vtkHexahedron, vtkWedge, vtkPyramid): 6, 12, 9 and 8 edges.
std::span<const std::array<int, 2>> cell_edges(CellType type);

/// Thrown for input that cannot form a valid mesh; the message names the offending cell ids.
class MeshError : public std::runtime_error
{
public:
  using std::runtime_error::runtime_error;
};

using Point = std::array<double, 3>;

struct Mesh
{
  std::vector<Point> points;               ///< node coordinates [m]
  std::vector<CellType> cell_types;        ///< one per cell
  std::vector<std::int64_t> cell_offsets{0}; ///< CSR offsets into cell_nodes, n_cells()+1 entries
  std::vector<std::int64_t> cell_nodes;    ///< node ids per cell, VTK ordering
  std::vector<int> cell_region;            ///< region id per cell

  std::size_t n_points() const { return points.size(); }
  std::size_t n_cells() const { return cell_types.size(); }
  std::span<const std::int64_t> nodes(std::size_t cell) const
  {
    return { cell_nodes.data() + cell_offsets[cell],
      static_cast<std::size_t>(cell_offsets[cell + 1] - cell_offsets[cell]) };
  }

  /// Append a cell; node ids must already exist (checked by validate()).
  void add_cell(CellType type, std::span<const std::int64_t> node_ids, int region);
  /// Room for `cells` cells with `entries` node ids in all, so that adding them does not
  /// reallocate (large meshes: on transparent huge pages where the system allows).
  void reserve_cells(std::size_t cells, std::size_t entries);
};

/**
 * Build a mesh from VTK-style arrays (cell type codes, CSR offsets, connectivity).
 * Throws MeshError listing the ids of cells that are not linear 3-D cells (e.g. triangles,
 * quadratic cells) or whose node count does not match the type, or that reference a
 * non-existent point.
 */
Mesh mesh_from_vtk_arrays(std::vector<Point> points, std::span<const std::uint8_t> vtk_types,
  std::span<const std::int64_t> offsets, std::span<const std::int64_t> connectivity,
  std::span<const int> regions);

/// A face of a cell: the cell and the face's index in its cell type's VTK face order.
struct CellFace
{
  std::uint32_t cell;
  std::uint32_t local;
};

/// What validate_mesh() found. Problems that make the mesh unusable are thrown, not reported.
struct MeshReport
{
  std::vector<std::int64_t> unreferenced_points; ///< allowed; they get no equation
  std::size_t n_pieces = 0;                      ///< face-connected components (1 = connected)
  std::vector<std::int64_t> piece_of_cell;       ///< component index per cell
  /// Faces owned by one cell only (the outer surface), in (cell, local face) order: the same
  /// faces find_boundary_faces() gives, found in the same sort (so the operator need not sort
  /// every face again).
  std::vector<CellFace> boundary_faces;
};

/**
 * Check the mesh. Throws MeshError naming cell ids for inverted or degenerate cells
 * (non-positive Jacobian determinant at any quadrature point or corner) and for node ids out
 * of range. Reports unreferenced points and disconnected pieces.
 */
MeshReport validate_mesh(const Mesh& mesh);

/// Structured box of hexahedra (nx*ny*nz cells) spanning [x0,x1]x[y0,y1]x[z0,z1]; region 0.
Mesh make_box_hex(std::array<double, 3> lo, std::array<double, 3> hi, std::array<int, 3> n);

/// Same box, each hexahedron split into 6 tetrahedra (conforming Kuhn split).
Mesh make_box_tet(std::array<double, 3> lo, std::array<double, 3> hi, std::array<int, 3> n);

/**
 * Box of hexahedra on given (graded) node coordinate lines along each axis.
 * Lines must be strictly increasing.
 */
Mesh make_graded_box_hex(const std::vector<double>& xs, const std::vector<double>& ys,
  const std::vector<double>& zs);

} // namespace ember
