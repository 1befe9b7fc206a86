#include "ember/node_cells.h"

#include "huge_pages.h"

#include <limits>
#include <string>

namespace ember
{

NodeCells::NodeCells(const Mesh& mesh)
{
  if (mesh.cell_nodes.size() >= std::numeric_limits<std::uint32_t>::max())
    throw MeshError("mesh too large: " + std::to_string(mesh.cell_nodes.size()) +
      " cell-node entries (at most 2^32 - 2)");
  const std::size_t n = mesh.n_points();
  offsets_.assign(n + 1, 0);
  for (std::int64_t node : mesh.cell_nodes)
    ++offsets_[node + 1];
  for (std::size_t i = 0; i < n; ++i)
    offsets_[i + 1] += offsets_[i];
  reserve_on_huge_pages(slots_, mesh.cell_nodes.size());
  slots_.resize(mesh.cell_nodes.size());
  std::vector<std::uint32_t> fill(offsets_.begin(), offsets_.end() - 1);
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    const auto nodes = mesh.nodes(c);
    for (std::size_t a = 0; a < nodes.size(); ++a)
      slots_[fill[nodes[a]]++] = { static_cast<std::uint32_t>(c), static_cast<std::uint32_t>(a) };
  }
}

} // namespace ember
