#include "ember/heat_operator.h"

#include "heat_sweep.h"

#include <oneapi/tbb/blocked_range.h>
#include <oneapi/tbb/parallel_for.h>
#include <oneapi/tbb/parallel_reduce.h>

#include <Eigen/Sparse>
#include <Eigen/IterativeLinearSolvers>
#include <Eigen/SparseCholesky>

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <sstream>
#include <stdexcept>

namespace ember
{
namespace
{
// Fixed chunking: with simple_partitioner the reduction tree is the same for any thread count.
constexpr std::size_t kGrain = 2048;

double kelvin(double T) { return T + kKelvinOffset; }

// The nearest float at or above x (x positive).
float round_up_to_float(double x)
{
  if (!(x <= std::numeric_limits<float>::max()))
    return std::numeric_limits<float>::infinity();
  const float f = static_cast<float>(x);
  return static_cast<double>(f) >= x ? f : std::nextafter(f, std::numeric_limits<float>::infinity());
}

bool has_radiation(BoundaryCondition::Kind k)
{
  return k == BoundaryCondition::Kind::Radiation ||
    k == BoundaryCondition::Kind::RadiationConvection;
}
bool has_convection(BoundaryCondition::Kind k)
{
  return k == BoundaryCondition::Kind::Convection ||
    k == BoundaryCondition::Kind::RadiationConvection;
}

// Heat flux into the body through a face element at temperature T [W/m²].
double face_flux(const BoundaryCondition& bc, double emissivity, double T)
{
  double q = 0.0;
  if (has_radiation(bc.kind))
  {
    const double Tk = kelvin(T), Ts = kelvin(bc.sky_temperature);
    q -= emissivity * kStefanBoltzmann * (Tk * Tk * Tk * Tk - Ts * Ts * Ts * Ts);
  }
  if (has_convection(bc.kind))
    q -= bc.transfer_coefficient * (T - bc.fluid_temperature);
  if (bc.kind == BoundaryCondition::Kind::HeatFlux)
    q += bc.heat_flux;
  return q;
}

// d(−q)/dT, the linearised boundary stiffness per unit area [W/(m²·K)].
double face_stiffness(const BoundaryCondition& bc, double emissivity, double T)
{
  double s = 0.0;
  if (has_radiation(bc.kind))
  {
    const double Tk = std::max(kelvin(T), kelvin(bc.sky_temperature));
    s += 4.0 * emissivity * kStefanBoltzmann * Tk * Tk * Tk;
  }
  if (has_convection(bc.kind))
    s += bc.transfer_coefficient;
  return s;
}

void require(bool ok, std::size_t index, const char* what, double value, const char* rule)
{
  if (!ok)
  {
    std::ostringstream msg;
    msg << "boundary condition " << index << ": " << what << " = " << value << " is invalid ("
        << rule << ")";
    throw std::invalid_argument(msg.str());
  }
}
} // namespace

void validate(const BoundaryCondition& bc, std::size_t index)
{
  const bool rad = has_radiation(bc.kind), conv = has_convection(bc.kind);
  if (rad)
  {
    require(bc.emissivity < 0.0 || bc.emissivity <= 1.0, index, "emissivity", bc.emissivity,
      "must lie in [0, 1], or be negative to use the rock's");
    require(std::isfinite(bc.sky_temperature) && bc.sky_temperature >= -kKelvinOffset, index,
      "sky temperature [°C]", bc.sky_temperature, "must be finite and above absolute zero");
  }
  if (conv)
  {
    require(std::isfinite(bc.transfer_coefficient) && bc.transfer_coefficient >= 0.0, index,
      "heat-transfer coefficient [W/(m²·K)]", bc.transfer_coefficient, "must be >= 0");
    require(std::isfinite(bc.fluid_temperature), index, "fluid temperature [°C]",
      bc.fluid_temperature, "must be finite");
  }
  if (bc.kind == BoundaryCondition::Kind::FixedTemperature)
    require(std::isfinite(bc.temperature) && bc.temperature >= -kKelvinOffset, index,
      "temperature [°C]", bc.temperature, "must be finite and above absolute zero");
  if (bc.kind == BoundaryCondition::Kind::HeatFlux)
    require(std::isfinite(bc.heat_flux), index, "heat flux [W/m²]", bc.heat_flux,
      "must be finite");
}

HeatOperator::HeatOperator(const ThermalModel& model, std::vector<BoundaryCondition> conditions)
  : model_(&model)
{
  if (model.n_nodes() > std::numeric_limits<std::int32_t>::max()) // edges: 2 × pair index
    throw std::invalid_argument("mesh too large for the heat operator: " +
      std::to_string(model.n_nodes()) + " nodes (at most 2^31 - 1)");
  for (std::size_t i = 0; i < conditions.size(); ++i)
    validate(conditions[i], i);
  const Mesh& mesh = model.mesh();
  const std::vector<BoundaryFace> faces = boundary_face_geometry(mesh, model.boundary_faces());
  std::map<std::int64_t, double> fixed;
  for (const BoundaryCondition& bc : conditions)
  {
    if (bc.kind == BoundaryCondition::Kind::Insulated)
      continue;
    Group group{ bc, {} };
    std::map<std::int64_t, std::pair<double, double>> area; // node → (area, ε·area)
    for (std::size_t f : select_faces(mesh, faces, bc.side, bc.regions))
    {
      const BoundaryFace& face = faces[f];
      const double eps = bc.emissivity >= 0.0
        ? bc.emissivity
        : model.rocks()[model.cell_rock()[face.cell]].emissivity;
      for (int a = 0; a < face.n_nodes; ++a)
      {
        auto& [A, epsA] = area[face.nodes[a]];
        A += face.node_area[a];
        epsA += eps * face.node_area[a];
      }
    }
    if (bc.kind == BoundaryCondition::Kind::FixedTemperature)
    {
      for (const auto& [node, value] : area)
        fixed.emplace(node, bc.temperature); // first listed condition wins at shared edges
      continue;
    }
    for (const auto& [node, value] : area)
      group.nodes.push_back({ node, value.first, value.second / value.first });
    groups_.push_back(std::move(group));
  }
  fixed_.assign(fixed.begin(), fixed.end());
  node_kind_.assign(model.n_nodes(), kInterior);
  for (const Group& g : groups_)
    for (const NodeArea& na : g.nodes)
      node_kind_[na.node] = kFluxFace;
  for (const auto& [node, T] : fixed_)
    node_kind_[node] = kHeld;
  for (std::size_t i = 0; i < model.n_nodes(); ++i)
    if (node_kind_[i] & kFluxFace)
      flux_nodes_.push_back(static_cast<std::uint32_t>(i));
  flux_stiffness_.resize(flux_nodes_.size());
  refresh();
}

void HeatOperator::build_edges()
{
  const ThermalModel& model = *model_;
  const Mesh& mesh = model.mesh();
  // Computed again rather than kept: the edge weights are all the operator needs of it, and
  // the full element matrices would be the largest array of the run (~500 B per node on hexes).
  // The model has checked the mesh and computed the volumes: the stiffness alone.
  const ElementMatrices em = compute_element_stiffness(mesh);
  const std::size_t n = model.n_nodes();
  if (model.rocks().size() > kMixedRock)
    throw std::invalid_argument("heat operator: at most " + std::to_string(kMixedRock) +
      " rock types (" + std::to_string(model.rocks().size()) + " given)");
  fits_.clear();
  for (const Rock& rock : model.rocks())
    fits_.push_back(conductivity_fit(rock.conductivity));
  node_rock_.assign(n, kMixedRock);
  for (std::size_t i = 0; i < n; ++i)
    if (model.shares(i).size() == 1)
      node_rock_[i] = static_cast<std::uint8_t>(model.shares(i)[0].rock);
  // One (T, k) pair per (contact node, rock), after the nodes' own pairs.
  contact_pair_node_.clear();
  contact_pair_rock_.clear();
  std::vector<std::uint32_t> first_contact_pair(n, 0);
  for (std::size_t i = 0; i < n; ++i)
    if (node_rock_[i] == kMixedRock)
    {
      first_contact_pair[i] = static_cast<std::uint32_t>(n + contact_pair_node_.size());
      for (const NodeShare& share : model.shares(i))
      {
        contact_pair_node_.push_back(static_cast<std::uint32_t>(i));
        contact_pair_rock_.push_back(static_cast<std::uint8_t>(share.rock));
      }
    }
  // Edges address a pair by the offset of its T among the pairs' doubles (2 × its index).
  if (2 * (n + contact_pair_node_.size()) > std::numeric_limits<std::uint32_t>::max())
    throw std::invalid_argument("mesh too large for the heat operator: more than 2^31 - 1 "
                                "(node, rock) temperature pairs");
  node_tk_.assign(n + contact_pair_node_.size(), {});
  // The pair an edge of rock r gathers for its far end j.
  const auto far_pair = [&](std::int64_t j, int rock) {
    if (node_rock_[j] != kMixedRock)
      return static_cast<std::uint32_t>(j);
    std::uint32_t p = first_contact_pair[j];
    while (contact_pair_rock_[p - n] != rock)
      ++p;
    return p;
  };
  // Each node's row is built in CSR order first, then dealt into the chunk's slots.
  std::vector<std::uint32_t> row_start(n + 1, 0), row_node;
  std::vector<double> row_weight;
  std::vector<std::uint8_t> row_rock;
  struct Entry
  {
    std::int64_t node;
    int rock;
    double weight;
  };
  std::vector<Entry> row;
  const NodeCells cells(mesh);
  for (std::size_t i = 0; i < n; ++i)
  {
    // Cells in ascending order, then a stable sort by (rock, neighbour): the weights of one
    // (j, rock) pair are summed in ascending cell order from either end, so W_ij = W_ji
    // exactly.
    row.clear();
    for (const CellSlot& slot : cells.of(i))
    {
      const auto nodes = mesh.nodes(slot.cell);
      const std::size_t m = nodes.size();
      const double* K =
        em.stiffness.data() + em.stiffness_offsets[slot.cell] + slot.local * m;
      for (std::size_t b = 0; b < m; ++b)
        if (b != slot.local && K[b] != 0.0)
          row.push_back({ nodes[b], model.cell_rock()[slot.cell], -0.5 * K[b] });
    }
    std::stable_sort(row.begin(), row.end(), [](const Entry& x, const Entry& y) {
      return x.rock != y.rock ? x.rock < y.rock : x.node < y.node;
    });
    const std::size_t first = row_node.size();
    for (std::size_t k = 0; k < row.size(); ++k)
    {
      if (k > 0 && row[k].node == row[k - 1].node && row[k].rock == row[k - 1].rock)
      {
        row_weight.back() += row[k].weight;
        continue;
      }
      row_node.push_back(far_pair(row[k].node, row[k].rock));
      row_rock.push_back(static_cast<std::uint8_t>(row[k].rock));
      row_weight.push_back(row[k].weight);
    }
    if (row_node.size() - first > std::numeric_limits<std::uint16_t>::max())
      throw std::invalid_argument("heat operator: node " + std::to_string(i) + " couples to " +
        std::to_string(row_node.size() - first) + " neighbours (at most 65535; is the mesh "
        "degenerate?)");
    row_start[i + 1] = static_cast<std::uint32_t>(row_node.size());
    node_kind_[i] &= static_cast<std::uint8_t>(~(kSignedWeights | kContact));
    for (std::size_t k = first; k < row_node.size(); ++k)
      if (row_weight[k] < 0.0)
        node_kind_[i] |= kSignedWeights;
    if (node_rock_[i] == kMixedRock && row_node.size() > first)
      node_kind_[i] |= kContact;
  }
  edge_entries_ = row_node.size();

  // SELL-4: chunk c holds 4 × (its longest row) slots; padding points a node at itself.
  constexpr std::size_t C = SlicedEdges::kChunk;
  const std::size_t chunks = (n + C - 1) / C;
  SlicedEdges& e = edges_;
  e.start.assign(chunks + 1, 0);
  e.count.resize(n);
  std::size_t slots = 0;
  for (std::size_t c = 0; c < chunks; ++c)
  {
    std::size_t longest = 0;
    for (std::size_t i = c * C; i < std::min(n, (c + 1) * C); ++i)
    {
      e.count[i] = static_cast<std::uint16_t>(row_start[i + 1] - row_start[i]);
      longest = std::max<std::size_t>(longest, e.count[i]);
    }
    slots += C * longest;
    if (slots > std::numeric_limits<std::uint32_t>::max())
      throw std::invalid_argument("mesh too large for the heat operator: more than 2^32 - 1 "
                                  "node-to-node coupling slots");
    e.start[c + 1] = static_cast<std::uint32_t>(slots);
  }
  e.far_offset.assign(slots, 0);
  e.half_weight.assign(slots, 0.0);
  e.rock.assign(slots, 0);
  for (std::size_t c = 0; c < chunks; ++c)
    for (std::size_t l = 0; l < C; ++l)
    {
      const std::size_t i = c * C + l;
      for (std::size_t k = e.start[c] + l; k < e.start[c + 1]; k += C)
        e.far_offset[k] = static_cast<std::uint32_t>(2 * std::min(i, n - 1));
      if (i >= n)
        continue;
      for (std::size_t s = 0; s < e.count[i]; ++s)
      {
        const std::size_t k = e.slot(i, s), from = row_start[i] + s;
        e.far_offset[k] = 2 * row_node[from];
        e.half_weight[k] = row_weight[from];
        e.rock[k] = row_rock[from];
      }
    }
}

void HeatOperator::refresh()
{
  const ThermalModel& model = *model_;
  inverse_capacity_.assign(model.n_nodes(), 0.0f);
  source_total_ = 0.0; // sequential: one fixed summation order
  any_source_ = false;
  const std::vector<EnthalpyFit>& fits = model.enthalpy_fits();
  for (std::size_t i = 0; i < model.n_nodes(); ++i)
  {
    double min_capacity = 0.0; // lowest sensible heat capacity of the node [J/K]
    for (const NodeShare& s : model.shares(i))
      min_capacity += s.mass * fits[s.rock].capacity_floor;
    if (!(node_kind_[i] & kHeld) && min_capacity > 0.0)
      inverse_capacity_[i] = round_up_to_float(1.0 / min_capacity);
    if (!(node_kind_[i] & kHeld))
      source_total_ += model.node_source(i);
    any_source_ = any_source_ || model.node_source(i) != 0.0; // held nodes too: the sweep adds it
  }
  build_edges();
}

std::size_t HeatOperator::flux_index(std::size_t node) const
{
  return static_cast<std::size_t>(
    std::lower_bound(flux_nodes_.begin(), flux_nodes_.end(), static_cast<std::uint32_t>(node)) -
    flux_nodes_.begin());
}

std::size_t HeatOperator::contact_nodes() const
{
  return static_cast<std::size_t>(std::count_if(node_kind_.begin(), node_kind_.end(),
    [](std::uint8_t kind) { return (kind & kContact) != 0; }));
}

std::size_t HeatOperator::contact_edge_entries() const
{
  std::size_t count = 0;
  for (std::size_t i = 0; i < edges_.count.size(); ++i)
    if (node_kind_[i] & kContact)
      count += edges_.count[i];
  return count;
}

double HeatOperator::bytes_per_node() const
{
  const double n = static_cast<double>(model_->n_nodes());
  const double slots = static_cast<double>(edge_slots());
  const double contact_pairs = static_cast<double>(contact_pair_node_.size());
  return (slots * (4 + 8 + 1) + static_cast<double>(edges_.start.size()) * 4 +
           contact_pairs * (16 + 4 + 1) + static_cast<double>(flux_nodes_.size()) * (4 + 8)) / n +
    2 /* count */ + 4 /* inverse capacity */ + 1 /* kind */ + 1 /* rock */ + 16 /* T, k */;
}

template <bool Bound, bool Rate>
double HeatOperator::sweep_all(const std::vector<double>& T, std::vector<double>& dEdt,
  tbb::task_arena& arena) const
{
  const std::size_t n = model_->n_nodes();
  if constexpr (Rate)
    dEdt.resize(n);
  const std::size_t chunks = edges_.start.size() - 1;
  // A max is exact under any partition, so the bound does not depend on the thread count.
  return arena.execute([&] {
    tbb::parallel_for(tbb::blocked_range<std::size_t>(0, n, kGrain),
      [&](const tbb::blocked_range<std::size_t>& r) {
        HeatSweep::pairs(*this, T.data(), r.begin(), r.end());
      });
    return tbb::parallel_reduce(
      tbb::blocked_range<std::size_t>(0, chunks, kGrain / SlicedEdges::kChunk), 0.0,
      [&](const tbb::blocked_range<std::size_t>& r, double w) {
        return std::max(w, HeatSweep::run(*this, Bound, Rate, dEdt.data(), r.begin(), r.end()));
      },
      [](double a, double b) { return std::max(a, b); });
  });
}

double HeatOperator::conduct(const std::vector<double>& T, std::vector<double>& dEdt,
  PowerTally& tally, tbb::task_arena& arena, bool bound) const
{
  const double worst =
    bound ? sweep_all<true, true>(T, dEdt, arena) : sweep_all<false, true>(T, dEdt, arena);
  // Boundary groups one after another (a node may sit in several); nodes unique per group.
  tally = {};
  for (const Group& g : groups_)
    for (const NodeArea& na : g.nodes)
      if (!(node_kind_[na.node] & kHeld))
      {
        const double q = na.area * face_flux(g.bc, na.emissivity, T[na.node]);
        dEdt[na.node] += q;
        tally.boundary += q;
      }
  // Heat through held nodes leaves (or enters) the body; book it, then hold the node.
  for (const auto& [node, value] : fixed_)
  {
    tally.boundary -= dEdt[node] - model_->node_source(node);
    dEdt[node] = 0.0;
  }
  tally.source = source_total_;
  return bound ? stable_step_from(worst, T) : 0.0;
}

double HeatOperator::stable_step_from(double worst, const std::vector<double>& T) const
{
  for (const Group& g : groups_)
  {
    std::size_t k = 0; // both lists ascend: walk them together (held nodes are skipped)
    for (const NodeArea& na : g.nodes)
    {
      while (k < flux_nodes_.size() && flux_nodes_[k] < na.node)
        ++k;
      if (!(node_kind_[na.node] & kHeld))
        flux_stiffness_[k] += na.area * face_stiffness(g.bc, na.emissivity, T[na.node]);
    }
  }
  for (std::size_t k = 0; k < flux_nodes_.size(); ++k) // after all groups: complete
    worst = std::max(worst, flux_stiffness_[k] * inverse_capacity_[flux_nodes_[k]]);
  return worst > 0.0 ? 2.0 / worst : std::numeric_limits<double>::infinity();
}

void HeatOperator::rate(const std::vector<double>& T, std::vector<double>& dEdt,
  PowerTally& tally, tbb::task_arena& arena) const
{
  conduct(T, dEdt, tally, arena, false);
}

double HeatOperator::rate_and_stable_step(const std::vector<double>& T,
  std::vector<double>& dEdt, PowerTally& tally, tbb::task_arena& arena) const
{
  return conduct(T, dEdt, tally, arena, true);
}

double HeatOperator::stable_time_step(const std::vector<double>& T, tbb::task_arena& arena) const
{
  std::vector<double> unused;
  return stable_step_from(sweep_all<true, false>(T, unused, arena), T);
}

std::vector<double> HeatOperator::steady_state(std::vector<double> T) const
{
  const ThermalModel& model = *model_;
  const std::size_t n = model.n_nodes();
  bool anchored = !fixed_.empty();
  for (const Group& g : groups_)
  {
    if (has_radiation(g.bc.kind))
      throw std::invalid_argument("steady initial state: radiation boundaries are not supported "
                                  "(use a fixed temperature or convection at the top)");
    anchored = anchored || has_convection(g.bc.kind);
  }
  if (!anchored)
    throw std::invalid_argument("steady initial state needs a fixed-temperature or convection "
                                "boundary (e.g. the top surface); with only heat flow and "
                                "insulated faces no steady state exists");
  for (const auto& [node, value] : fixed_)
    T[node] = value;
  // Unknowns: free nodes with a control volume.
  std::vector<std::int64_t> unknown(n, -1);
  std::int64_t m = 0;
  for (std::size_t i = 0; i < n; ++i)
    if (!(node_kind_[i] & kHeld) && model.node_volume(i) > 0.0)
      unknown[i] = m++;
  for (int iteration = 0; iteration < 100; ++iteration)
  {
    std::vector<Eigen::Triplet<double>> entries;
    Eigen::VectorXd rhs = Eigen::VectorXd::Zero(m);
    for (std::size_t i = 0; i < n; ++i)
    {
      const std::int64_t row = unknown[i];
      if (row < 0)
        continue;
      rhs[row] += model.node_source(i);
      double diagonal = 0.0;
      for (std::size_t e = 0; e < edges_.count[i]; ++e)
      {
        const std::size_t k = edges_.slot(i, e);
        const std::size_t j = pair_node(edges_.far_offset[k] / 2);
        const double G = conductance(k, T[i], T[j]);
        diagonal += G;
        if (unknown[j] >= 0)
          entries.emplace_back(row, unknown[j], -G);
        else
          rhs[row] += G * T[j];
      }
      entries.emplace_back(row, row, diagonal);
    }
    for (const Group& g : groups_)
      for (const NodeArea& na : g.nodes)
      {
        const std::int64_t row = unknown[na.node];
        if (row < 0)
          continue;
        if (g.bc.kind == BoundaryCondition::Kind::HeatFlux)
          rhs[row] += na.area * g.bc.heat_flux;
        if (has_convection(g.bc.kind))
        {
          entries.emplace_back(row, row, na.area * g.bc.transfer_coefficient);
          rhs[row] += na.area * g.bc.transfer_coefficient * g.bc.fluid_temperature;
        }
      }
    Eigen::SparseMatrix<double> A(m, m);
    A.setFromTriplets(entries.begin(), entries.end());
    // Preconditioned conjugate gradients, warm-started from the last iterate: a sparse direct
    // factorisation of a 3-D mesh fills in badly (SimplicialLDLT took ~6 minutes at 55k nodes,
    // CG with incomplete Cholesky well under a second per Picard iteration).
    Eigen::ConjugateGradient<Eigen::SparseMatrix<double>, Eigen::Lower | Eigen::Upper,
      Eigen::IncompleteCholesky<double>> solver;
    solver.setTolerance(1e-14);
    solver.setMaxIterations(static_cast<Eigen::Index>(10 * m + 1000));
    solver.compute(A);
    Eigen::VectorXd guess(m);
    for (std::size_t i = 0; i < n; ++i)
      if (unknown[i] >= 0)
        guess[unknown[i]] = T[i];
    const Eigen::VectorXd x = solver.info() == Eigen::Success ? solver.solveWithGuess(rhs, guess) : guess;
    if (solver.info() != Eigen::Success)
      throw std::runtime_error("steady initial state: the conduction system could not be solved "
                               "(is every piece of the mesh connected to a held boundary?)");
    double change = 0.0;
    for (std::size_t i = 0; i < n; ++i)
      if (unknown[i] >= 0)
      {
        change = std::max(change, std::abs(x[unknown[i]] - T[i]));
        T[i] = x[unknown[i]];
      }
    if (change < 1e-9)
      return T;
  }
  throw std::runtime_error("steady initial state: Picard iteration on k(T) did not converge "
                           "in 100 iterations");
}

} // namespace ember
