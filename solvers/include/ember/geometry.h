/**
 * @file geometry.h
 * @brief Element operators, lumped nodal volumes and boundary faces of linear 3-D cells.
 *
 * For each cell the geometric stiffness K_ab = ∫ ∇N_a·∇N_b dV (conductivity 1, units m) and
 * the lumped volume shares V_a = ∫ N_a dV (m³). Tetrahedra are exact (P1); hexahedra (Q1)
 * take volumes by Gauss quadrature and the stiffness by the vertex rule; wedges and pyramids
 * use Gauss quadrature exact for their basis on affine cells. The conductive heat rate into
 * node a of a cell is −k Σ_b K_ab T_b; the heat operator folds K into per-edge weights and
 * does not keep these matrices (ThermalModel keeps the volumes).
 */
#pragma once

#include "ember/mesh.h"

#include <array>
#include <cstdint>
#include <vector>

namespace ember
{

struct ElementMatrices
{
  /// Start of cell c's n×n row-major stiffness block in `stiffness`; n_cells()+1 entries.
  std::vector<std::int64_t> stiffness_offsets;
  std::vector<double> stiffness;    ///< ∫ ∇N_a·∇N_b dV [m]
  std::vector<double> nodal_volume; ///< ∫ N_a dV [m³], aligned with Mesh::cell_nodes
  std::vector<double> cell_volume;  ///< [m³]
};

/// Compute element matrices. Throws MeshError naming cells with a non-positive Jacobian.
ElementMatrices compute_element_matrices(const Mesh& mesh);
/**
 * The parts of compute_element_matrices (the same numbers) for a mesh that validate_mesh has
 * checked: ElementMatrices::nodal_volume alone (what the thermal model needs), and the
 * stiffness blocks alone (nodal_volume and cell_volume left empty: what the heat operator
 * needs). Each guards only the Jacobians it evaluates — MeshError naming the cells where one
 * is not positive — not every corner, as validate_mesh and compute_element_matrices do.
 */
std::vector<double> compute_nodal_volumes(const Mesh& mesh);
ElementMatrices compute_element_stiffness(const Mesh& mesh);

/// Ids of cells whose Jacobian determinant is non-positive at any quadrature point or corner.
std::vector<std::int64_t> cells_with_bad_jacobian(const Mesh& mesh);

/// A face owned by exactly one cell.
struct BoundaryFace
{
  std::int64_t cell = -1;                ///< owning cell
  int n_nodes = 0;                       ///< 3 or 4
  std::array<std::int64_t, 4> nodes{};   ///< node ids, ordered so the normal points outward
  double area = 0;                       ///< [m²]
  std::array<double, 3> normal{};        ///< outward unit normal (area-weighted mean for quads)
  std::array<double, 4> node_area{};     ///< ∫ N_a dA per face node [m²], sums to area
};

/// All boundary faces, sorted by (cell, local face index) so the order is deterministic.
std::vector<BoundaryFace> find_boundary_faces(const Mesh& mesh);
/// The same faces' geometry from a list validate_mesh() has found (MeshReport::boundary_faces).
std::vector<BoundaryFace> boundary_face_geometry(const Mesh& mesh,
  const std::vector<CellFace>& faces);

enum class Side : std::uint8_t
{
  Top,    ///< outward normal z-component >  cos 45°
  Bottom, ///< outward normal z-component < -cos 45°
  Sides   ///< everything else
};

/// Side a face belongs to, by its outward normal.
Side classify_face(const BoundaryFace& face);

/**
 * Indices into `faces` of the faces on `side`; if `regions` is non-empty, only faces whose
 * owning cell's region is listed.
 */
std::vector<std::size_t> select_faces(const Mesh& mesh, const std::vector<BoundaryFace>& faces,
  Side side, const std::vector<int>& regions = {});

} // namespace ember
