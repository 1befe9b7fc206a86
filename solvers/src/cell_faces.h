// The faces of each cell type, and every cell face of a mesh sorted by its node set: how
// validate_mesh finds face-neighbours and find_boundary_faces the faces only one cell owns.
// Internal to the core.
#pragma once

#include "ember/mesh.h"

#include <array>
#include <cstdint>
#include <vector>

namespace ember
{

/// A face of a cell: its n (3 or 4) nodes as local indices, ordered so that the right-hand
/// normal points out of the cell (VTK order, vtkCell::GetFace).
struct LocalFace
{
  int n;
  std::array<int, 4> v;
};
const std::vector<LocalFace>& local_faces(CellType type);

/**
 * A cell's face named by its sorted node ids, 32 bits each, packed in two words (a
 * triangle's fourth id is 2^32 − 1, which no node has), with the cell and local face it came
 * from. 24 bytes: on 10⁶-node tetrahedra (23·10⁶ faces) sorting them moves half the bytes
 * of 64-bit ids and compares two words per key.
 */
struct FaceEntry
{
  std::uint64_t high, low;
  std::uint32_t cell, local;
  bool same_face(const FaceEntry& other) const { return high == other.high && low == other.low; }
};

/// Every face of every cell, sorted by node set, so the faces that cells share lie side by
/// side. The node ids must be valid; throws MeshError if the mesh has
/// 2^32 − 1 or more points or cells.
std::vector<FaceEntry> sorted_cell_faces(const Mesh& mesh);

/// The faces of sorted_cell_faces() that only one cell has, in (cell, local face) order.
std::vector<CellFace> faces_of_one_cell(const std::vector<FaceEntry>& sorted);

} // namespace ember
