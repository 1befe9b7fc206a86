// The conduction sweep of HeatOperator, and the (T, k) pairs it gathers, at the chosen vector
// level (heat_operator_sweep.cpp). Internal to the core.
#pragma once

#include "ember/heat_operator.h"

namespace ember
{

struct HeatSweep
{
  /// Writes the (T, k) pairs of nodes [begin, end) the sweep gathers: T, and k of the node's
  /// rock at T for single-rock nodes (0 at contact nodes); and those contact nodes' pairs per
  /// rock.
  static void pairs(const HeatOperator& op, const double* T, std::size_t begin, std::size_t end);
  /// Nodes of chunks [chunk_begin, chunk_end) (4 nodes each; the last may be short): with
  /// rate, dEdt of each node (sources included); with bound, the largest Gershgorin rate of
  /// the range's nodes, and Σ_b |A_ib| of its flux-boundary nodes in op.flux_stiffness_.
  static double run(const HeatOperator& op, bool bound, bool rate, double* dEdt,
    std::size_t chunk_begin, std::size_t chunk_end);
};

} // namespace ember
