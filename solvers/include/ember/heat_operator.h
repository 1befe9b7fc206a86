/**
 * @file heat_operator.h
 * @brief Nodal enthalpy balance dE_i/dt = conduction + sources + boundary fluxes.
 *
 *   dE_i/dt = Σ_j G_ij (T_j − T_i)  +  Σ_c V_ci A_c  +  Σ_f ∫_f N_i q_f dA
 *
 * Conduction runs over the mesh edges. Element stiffness rows sum to zero, so a cell's
 * −k Σ_b K^c_ab T_b equals Σ_{b≠a} k (−K^c_ab)(T_b − T_a): node i exchanges heat with each
 * node j it shares a cell with through the conductance G_ij = Σ_r ½(k_r(T_i) + k_r(T_j)) W^r_ij,
 * where W^r_ij = Σ (−K^c_ij) over the cells of rock r holding that edge [m]. With constant
 * k this is exactly the finite-element operator; with k(T), k is the mean of its values at
 * the edge's two ends, per rock, so material contrasts stay sharp, and each node's k is
 * evaluated once per rate rather than once per edge. G_ij = G_ji
 * bit for bit, so every exchange conserves heat. Boundary fluxes q_f (into
 * the body, W/m²) per surface group: radiation −εσ(T⁴ − T_sky⁴) (T in K), convection
 * −h(T − T_fluid), both, a prescribed heat flow, or insulated. Fixed-temperature nodes are
 * held; the heat they pass is booked as boundary heat. Parallel loops gather per node in a
 * fixed order, so results do not depend on the thread count. rate() and stable_time_step()
 * fill per-operator scratch arrays (node conductivities): one call at a time per operator.
 */
#pragma once

#include "ember/thermal_model.h"

#include <oneapi/tbb/task_arena.h>

#include <cstdint>
#include <vector>

namespace ember
{

/// CODATA 2018 Stefan–Boltzmann constant [W m⁻² K⁻⁴].
inline constexpr double kStefanBoltzmann = 5.670374419e-8;
inline constexpr double kKelvinOffset = 273.15;

struct BoundaryCondition
{
  enum class Kind
  {
    Insulated,
    FixedTemperature,
    HeatFlux,              ///< prescribed heat flow into the body [W/m²]
    Radiation,
    Convection,
    RadiationConvection
  };
  Kind kind = Kind::Insulated;
  Side side = Side::Top;
  std::vector<int> regions;        ///< restrict to faces of these regions (empty = all)
  double temperature = 0.0;        ///< FixedTemperature [°C]
  double heat_flux = 0.0;          ///< HeatFlux into the body [W/m²] (basal heat flow > 0)
  double emissivity = -1.0;        ///< radiation; < 0 = use each face's rock emissivity
  double sky_temperature = 0.0;    ///< radiation sink [°C]
  double transfer_coefficient = 0; ///< convection h [W/(m²·K)]
  double fluid_temperature = 0.0;  ///< convection sink [°C]
};

/// Throws std::invalid_argument naming the condition (by index) and the bad parameter.
void validate(const BoundaryCondition& bc, std::size_t index);

/// Powers summed over the model in one rate evaluation [W].
struct PowerTally
{
  double boundary = 0.0; ///< heat entering through boundaries (incl. fixed-T nodes)
  double source = 0.0;   ///< radiogenic heat
};

class HeatOperator
{
public:
  HeatOperator(const ThermalModel& model, std::vector<BoundaryCondition> conditions);

  /// dE/dt [W] per node for nodal temperatures T [°C]. Held nodes get 0.
  void rate(const std::vector<double>& T, std::vector<double>& dEdt, PowerTally& tally,
    tbb::task_arena& arena) const;

  /// rate() and stable_time_step() for the same T in one pass over the edges; returns the
  /// stable step [s].
  double rate_and_stable_step(const std::vector<double>& T, std::vector<double>& dEdt,
    PowerTally& tally, tbb::task_arena& arena) const;

  /**
   * Forward-Euler stable step [s] for the current T: 2 / λ with λ a Gershgorin bound of the
   * linearised operator (conduction |Σ_j G_ij| + Σ_j |G_ij|, plus 4εσT³A and hA on boundary
   * nodes) over
   * the smallest sensible capacity of each node. Latent heat only raises capacity, so the
   * bound stays safe across a phase change.
   */
  double stable_time_step(const std::vector<double>& T, tbb::task_arena& arena) const;

  /**
   * Steady conductive state of this operator: solves Σ_j G_ij(T) (T_i − T_j) = sources +
   * boundary heat (conjugate gradients), with fixed-temperature nodes held and convection
   * included; Picard iterations on k(T) from T_guess until max|ΔT| < 1e-9 K. Needs at least one
   * fixed-temperature or convection boundary; radiation boundaries are rejected (non-linear).
   */
  std::vector<double> steady_state(std::vector<double> T_guess) const;

  /// Nodes held at a fixed temperature, and that temperature, in ascending node order.
  const std::vector<std::pair<std::int64_t, double>>& fixed_nodes() const { return fixed_; }
  /// Rebuild node-dependent data after the model's rock assignment changed.
  void refresh();

  /// Directed edge entries (node pairs sharing a cell, per rock) over all nodes.
  std::size_t edge_entries() const { return edge_entries_; }
  /// Slots the edge storage holds: the entries plus padding to each chunk's longest row.
  std::size_t edge_slots() const { return edges_.far_offset.size(); }
  /// Rock-contact nodes (cells of several rocks meet there) and their edge entries.
  std::size_t contact_nodes() const;
  std::size_t contact_edge_entries() const;
  /// (T, k) pairs kept for the contact nodes: one per (contact node, rock).
  std::size_t contact_pairs() const { return contact_pair_node_.size(); }
  /// Whether any node has a radiogenic source (if not, the sweep reads none).
  bool has_sources() const { return any_source_; }
  /// Bytes this operator keeps per node (edges, capacities, flags; boundary groups apart).
  double bytes_per_node() const;

private:
  struct NodeArea
  {
    std::int64_t node;
    double area;       ///< ∫ N_i dA over the group's faces [m²]
    double emissivity; ///< area-weighted, for radiation groups
  };
  struct Group
  {
    BoundaryCondition bc;
    std::vector<NodeArea> nodes; ///< unique nodes, ascending
  };

  friend struct HeatSweep;        // the conduction sweep (heat_operator_sweep.cpp)
  friend struct HeatOperatorProbe; // tests: per-node sweep results (test_simd.cpp)
  /// The conduction sweep over all nodes at T (fills node_tk_ first): with Rate writes dEdt
  /// (sources included); with Bound returns the largest Gershgorin rate
  /// λ_i = Σ_b |A_ib| / C_i over the interior nodes and leaves Σ_b |A_ib| of flux-boundary
  /// nodes in flux_stiffness_ for the group pass.
  template <bool Bound, bool Rate>
  double sweep_all(const std::vector<double>& T, std::vector<double>& dEdt,
    tbb::task_arena& arena) const;
  double conduct(const std::vector<double>& T, std::vector<double>& dEdt, PowerTally& tally,
    tbb::task_arena& arena, bool bound) const;
  /// 2/λ from the interior nodes' largest λ and the flux-boundary nodes (adds their faces).
  double stable_step_from(double interior_worst, const std::vector<double>& T) const;
  void build_edges();

  enum NodeKind : std::uint8_t // bit flags
  {
    kInterior = 0,
    kHeld = 1,          ///< fixed temperature
    kFluxFace = 2,      ///< on a radiation / convection / heat-flow boundary group
    kSignedWeights = 4, ///< has a negative edge weight (obtuse cells): Σ|G| ≠ ΣG
    kContact = 8        ///< cells of several rocks meet at the node: k per edge rock
  };

  const ThermalModel* model_;
  std::vector<Group> groups_;
  std::vector<std::pair<std::int64_t, double>> fixed_;
  std::vector<std::uint8_t> node_kind_;
  /// 1 / (smallest sensible heat capacity [J/K]) of free nodes, 0 for held ones: the
  /// sweep's bound multiplies, no branch. Single precision rounded up (a bound needs no more,
  /// and stays a bound), 4 B less for the sweep to stream.
  std::vector<float> inverse_capacity_;
  double source_total_ = 0.0;        ///< Σ radiogenic heat of the free nodes [W]
  /// Whether any node has a radiogenic source; if none, the sweep does not read them (8 B per
  /// node less: models without heat production are common).
  bool any_source_ = false;
  /**
   * The edges in SELL-4 order (sliced ELLPACK with chunks of 4 nodes; Kreutzer et al. 2014,
   * SIAM J. Sci. Comput. 36(5)): node i's s-th edge sits in slot
   * start[i / 4] + 4 s + i % 4, so the sweep takes 4 consecutive nodes' s-th edges with one
   * vector load. A chunk holds as many slots per node as its longest row; the padding
   * points a node at itself with weight 0 and adds exactly nothing. An edge names its far
   * end by the (T, k) pair to gather (node_tk_): the node's own pair, or, where the far end
   * is a contact node, that node's pair for the edge's rock. Each node's edges are sorted by
   * (rock, far node): the fixed summation order behind thread-count and vector-width
   * independence (a contact node evaluates its own k once per rock).
   */
  struct SlicedEdges
  {
    static constexpr std::size_t kChunk = 4;
    std::vector<std::uint32_t> start;     ///< first slot of each chunk, and the total
    std::vector<std::uint16_t> count;     ///< edges of each node
    /// Where the far end's (T, k) pair starts among the pairs' doubles (2 × its index), so
    /// the sweep's loads address it with a scaled index and no shift.
    std::vector<std::uint32_t> far_offset;
    std::vector<double> half_weight;      ///< ½ W^r_ij [m]
    std::vector<std::uint8_t> rock;       ///< r
    std::size_t slot(std::size_t node, std::size_t s) const
    {
      return start[node / kChunk] + kChunk * s + node % kChunk;
    }
  };
  SlicedEdges edges_;
  std::size_t edge_entries_ = 0;
  std::vector<ConductivityFit> fits_;    ///< per rock
  static constexpr std::uint8_t kMixedRock = 255;
  std::vector<std::uint8_t> node_rock_;  ///< the rock of single-rock nodes, else kMixedRock
  struct NodeTK
  {
    double T, k;
  };
  /// (T_i, k_rock(T_i)) side by side (one cache line per neighbour in the sweep's gather),
  /// filled at the start of each rate call: first one pair per node (k of its rock at
  /// single-rock nodes, 0 at contact nodes), then one per (contact node, rock).
  mutable std::vector<NodeTK> node_tk_;
  std::vector<std::uint32_t> contact_pair_node_; ///< node of pair n + m
  std::vector<std::uint8_t> contact_pair_rock_;  ///< rock of pair n + m
  /// The node whose temperature pair p carries.
  std::size_t pair_node(std::size_t p) const
  {
    const std::size_t n = node_rock_.size();
    return p < n ? p : contact_pair_node_[p - n];
  }
  std::vector<std::uint32_t> flux_nodes_;      ///< nodes on flux-boundary groups, ascending
  mutable std::vector<double> flux_stiffness_; ///< their Σ_b |A_ib| [W/K], same order
  std::size_t flux_index(std::size_t node) const;
  /// G of edge slot k between nodes at Ti and Tj [W/K]: ½W × (k_rock(Ti) + k_rock(Tj)).
  double conductance(std::size_t k, double Ti, double Tj) const
  {
    const ConductivityFit& fit = fits_[edges_.rock[k]];
    return edges_.half_weight[k] * (fit(Ti) + fit(Tj));
  }
};

} // namespace ember
