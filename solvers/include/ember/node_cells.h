/**
 * @file node_cells.h
 * @brief Node → cells index: which cells hold each node, and where.
 *
 * Built on demand (a counting sort over the connectivity) by the set-up steps that need it
 * (node shares, the heat operator's edges, body summaries) and dropped after use: at 8 B per
 * cell-node it would otherwise be one of the larger arrays a run keeps.
 */
#pragma once

#include "ember/mesh.h"

#include <cstdint>
#include <span>
#include <vector>

namespace ember
{

/// Where a node appears in a cell: the cell and the node's local index in it.
struct CellSlot
{
  std::uint32_t cell;
  std::uint32_t local;
};

class NodeCells
{
public:
  /// Throws MeshError if the mesh has 2^32 or more cell-node entries.
  explicit NodeCells(const Mesh& mesh);

  /// The cells holding `node`, in ascending cell id: the fixed order behind determinism.
  std::span<const CellSlot> of(std::size_t node) const
  {
    return { slots_.data() + offsets_[node], offsets_[node + 1] - offsets_[node] };
  }

private:
  std::vector<std::uint32_t> offsets_;
  std::vector<CellSlot> slots_;
};

} // namespace ember
