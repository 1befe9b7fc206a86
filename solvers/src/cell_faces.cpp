#include "cell_faces.h"

#include "huge_pages.h"

#include <algorithm>
#include <limits>
#include <string>
#include <tuple>
#include <utility>

namespace ember
{

// Checked against vtkCellValidator in ParaView 5.11.
const std::vector<LocalFace>& local_faces(CellType type)
{
  static const std::vector<LocalFace> tet = { { 3, { 0, 1, 3 } }, { 3, { 1, 2, 3 } },
    { 3, { 2, 0, 3 } }, { 3, { 0, 2, 1 } } };
  static const std::vector<LocalFace> hex = { { 4, { 0, 4, 7, 3 } }, { 4, { 1, 2, 6, 5 } },
    { 4, { 0, 1, 5, 4 } }, { 4, { 3, 7, 6, 2 } }, { 4, { 0, 3, 2, 1 } }, { 4, { 4, 5, 6, 7 } } };
  static const std::vector<LocalFace> wedge = { { 3, { 0, 1, 2 } }, { 3, { 3, 5, 4 } },
    { 4, { 0, 3, 4, 1 } }, { 4, { 1, 4, 5, 2 } }, { 4, { 2, 5, 3, 0 } } };
  static const std::vector<LocalFace> pyramid = { { 4, { 0, 3, 2, 1 } }, { 3, { 0, 1, 4 } },
    { 3, { 1, 2, 4 } }, { 3, { 2, 3, 4 } }, { 3, { 3, 0, 4 } } };
  switch (type)
  {
  case CellType::Tetrahedron: return tet;
  case CellType::Hexahedron: return hex;
  case CellType::Wedge: return wedge;
  case CellType::Pyramid: return pyramid;
  }
  throw MeshError("invalid cell type");
}

std::vector<FaceEntry> sorted_cell_faces(const Mesh& mesh)
{
  constexpr std::uint64_t kNone = std::numeric_limits<std::uint32_t>::max();
  if (mesh.n_points() >= kNone || mesh.n_cells() >= kNone)
    throw MeshError("mesh too large: " + std::to_string(mesh.n_points()) + " points and " +
      std::to_string(mesh.n_cells()) + " cells (at most 2^32 - 2 of each)");
  std::size_t n_faces = 0; // sized once: ~0.5 GB on 10⁶-node tetrahedra, not grown by doubling
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    n_faces += local_faces(mesh.cell_types[c]).size();
  std::vector<FaceEntry> faces;
  reserve_on_huge_pages(faces, n_faces);
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    const auto nodes = mesh.nodes(c);
    const auto& local = local_faces(mesh.cell_types[c]);
    for (std::size_t f = 0; f < local.size(); ++f)
    {
      std::array<std::uint64_t, 4> id{ kNone, kNone, kNone, kNone };
      for (int a = 0; a < local[f].n; ++a)
        id[a] = static_cast<std::uint64_t>(nodes[local[f].v[a]]);
      for (int a = 1; a < local[f].n; ++a) // insertion sort of 3 or 4 ids
        for (int b = a; b > 0 && id[b - 1] > id[b]; --b)
          std::swap(id[b - 1], id[b]);
      faces.push_back({ id[0] << 32 | id[1], id[2] << 32 | id[3], static_cast<std::uint32_t>(c),
        static_cast<std::uint32_t>(f) });
    }
  }
  // By node set alone: the callers look only at runs of equal sets, whose order within a run
  // does not change what they find.
  std::sort(faces.begin(), faces.end(), [](const FaceEntry& a, const FaceEntry& b) {
    return a.high != b.high ? a.high < b.high : a.low < b.low;
  });
  return faces;
}

std::vector<CellFace> faces_of_one_cell(const std::vector<FaceEntry>& sorted)
{
  std::vector<CellFace> owned;
  for (std::size_t i = 0; i < sorted.size();)
  {
    std::size_t j = i + 1;
    while (j < sorted.size() && sorted[j].same_face(sorted[i]))
      ++j;
    if (j - i == 1)
      owned.push_back({ sorted[i].cell, sorted[i].local });
    i = j;
  }
  std::sort(owned.begin(), owned.end(), [](const CellFace& a, const CellFace& b) {
    return std::tie(a.cell, a.local) < std::tie(b.cell, b.local);
  });
  return owned;
}

} // namespace ember
