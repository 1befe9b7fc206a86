#include "ember/heat_operator.h"

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
  for (std::size_t i = 0; i < conditions.size(); ++i)
    validate(conditions[i], i);
  const Mesh& mesh = model.mesh();
  const std::vector<BoundaryFace> faces = find_boundary_faces(mesh);
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
  is_fixed_.assign(model.n_nodes(), 0);
  for (const auto& [node, T] : fixed_)
    is_fixed_[node] = 1;
  cell_flux_.resize(mesh.cell_nodes.size());
  if (mesh.cell_nodes.size() > std::numeric_limits<std::uint32_t>::max())
    throw std::invalid_argument("mesh too large for the heat operator: " +
      std::to_string(mesh.cell_nodes.size()) + " cell-node entries (at most 2^32 - 1)");
  gather_start_.assign(model.n_nodes() + 1, 0);
  gather_.reserve(mesh.cell_nodes.size());
  for (std::size_t i = 0; i < model.n_nodes(); ++i)
  {
    for (const CellSlot& slot : model.cells_of(i))
      gather_.push_back(static_cast<std::uint32_t>(mesh.cell_offsets[slot.cell] + slot.local));
    gather_start_[i + 1] = static_cast<std::int64_t>(gather_.size());
  }
  const ElementMatrices& em = model.elements();
  row_abs_sum_.resize(mesh.cell_nodes.size());
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    const std::size_t m = mesh.nodes(c).size();
    for (std::size_t a = 0; a < m; ++a)
    {
      const double* row = em.stiffness.data() + em.stiffness_offsets[c] + a * m;
      double row_sum = 0.0;
      for (std::size_t b = 0; b < m; ++b)
        row_sum += std::abs(row[b]);
      row_abs_sum_[mesh.cell_offsets[c] + a] = row_sum;
    }
  }
  refresh();
}

void HeatOperator::refresh()
{
  const ThermalModel& model = *model_;
  min_capacity_.assign(model.n_nodes(), 0.0);
  for (std::size_t i = 0; i < model.n_nodes(); ++i)
    for (const NodeShare& s : model.shares(i))
      min_capacity_[i] += s.mass * min_heat_capacity(model.rocks()[s.rock], -100.0, 3000.0);
}

void HeatOperator::rate(const std::vector<double>& T, std::vector<double>& dEdt,
  PowerTally& tally, tbb::task_arena& arena) const
{
  const ThermalModel& model = *model_;
  const Mesh& mesh = model.mesh();
  const ElementMatrices& em = model.elements();
  const std::size_t n = model.n_nodes();
  dEdt.resize(n);
  arena.execute([&] {
    // 1. Per cell: conductive heat into each of its nodes, −k_c K^c T^c.
    tbb::parallel_for(tbb::blocked_range<std::size_t>(0, mesh.n_cells(), kGrain / 8),
      [&](const tbb::blocked_range<std::size_t>& r) {
        double Tc[8];
        for (std::size_t c = r.begin(); c != r.end(); ++c)
        {
          const auto nodes = mesh.nodes(c);
          const std::size_t m = nodes.size();
          double mean = 0.0;
          for (std::size_t a = 0; a < m; ++a)
            mean += (Tc[a] = T[nodes[a]]);
          const double k = conductivity(model.rocks()[model.cell_rock()[c]], mean / m);
          const double* K = em.stiffness.data() + em.stiffness_offsets[c];
          double* out = cell_flux_.data() + mesh.cell_offsets[c];
          for (std::size_t a = 0; a < m; ++a)
          {
            double s = 0.0;
            for (std::size_t b = 0; b < m; ++b)
              s += K[a * m + b] * Tc[b];
            out[a] = -k * s;
          }
        }
      });
    // 2. Per node: gather in ascending cell order, add radiogenic heat.
    tbb::parallel_for(tbb::blocked_range<std::size_t>(0, n, kGrain),
      [&](const tbb::blocked_range<std::size_t>& r) {
        for (std::size_t i = r.begin(); i != r.end(); ++i)
        {
          double s = model.node_source(i);
          for (std::int64_t k = gather_start_[i]; k < gather_start_[i + 1]; ++k)
            s += cell_flux_[gather_[k]];
          dEdt[i] = s;
        }
      });
  });
  // 3. Boundary groups one after another (a node may sit in several); nodes unique per group.
  tally = {};
  for (const Group& g : groups_)
    for (const NodeArea& na : g.nodes)
      if (!is_fixed_[na.node])
      {
        const double q = na.area * face_flux(g.bc, na.emissivity, T[na.node]);
        dEdt[na.node] += q;
        tally.boundary += q;
      }
  // Heat through held nodes leaves (or enters) the body; book it, then hold the node.
  for (const auto& [node, value] : fixed_)
  {
    tally.boundary -= dEdt[node] - model.node_source(node);
    dEdt[node] = 0.0;
  }
  tally.source = arena.execute([&] {
    return tbb::parallel_deterministic_reduce(
      tbb::blocked_range<std::size_t>(0, n, kGrain), 0.0,
      [&](const tbb::blocked_range<std::size_t>& r, double s) {
        for (std::size_t i = r.begin(); i != r.end(); ++i)
          if (!is_fixed_[i])
            s += model.node_source(i);
        return s;
      },
      std::plus<>());
  });
}

double HeatOperator::stable_time_step(const std::vector<double>& T, tbb::task_arena& arena) const
{
  const ThermalModel& model = *model_;
  const Mesh& mesh = model.mesh();
  const std::size_t n = model.n_nodes();
  std::vector<double>& stiffness = node_stiffness_; // Σ |A_ib| per node row [W/K]
  stiffness.resize(n);
  arena.execute([&] {
    tbb::parallel_for(tbb::blocked_range<std::size_t>(0, mesh.n_cells(), kGrain / 8),
      [&](const tbb::blocked_range<std::size_t>& r) {
        for (std::size_t c = r.begin(); c != r.end(); ++c)
        {
          const auto nodes = mesh.nodes(c);
          double mean = 0.0;
          for (std::int64_t node : nodes)
            mean += T[node];
          // k_c Σ_b |K^c_ab| per cell-node, into the rate's scratch (not in use here).
          const double k = conductivity(model.rocks()[model.cell_rock()[c]], mean / nodes.size());
          const std::int64_t start = mesh.cell_offsets[c];
          for (std::size_t a = 0; a < nodes.size(); ++a)
            cell_flux_[start + a] = k * row_abs_sum_[start + a];
        }
      });
    tbb::parallel_for(tbb::blocked_range<std::size_t>(0, n, kGrain),
      [&](const tbb::blocked_range<std::size_t>& r) {
        for (std::size_t i = r.begin(); i != r.end(); ++i)
        {
          double s = 0.0;
          for (std::int64_t k = gather_start_[i]; k < gather_start_[i + 1]; ++k)
            s += cell_flux_[gather_[k]];
          stiffness[i] = s;
        }
      });
  });
  for (const Group& g : groups_)
    for (const NodeArea& na : g.nodes)
      stiffness[na.node] += na.area * face_stiffness(g.bc, na.emissivity, T[na.node]);
  const double lambda = arena.execute([&] { // max is exact under any partition
    return tbb::parallel_reduce(
      tbb::blocked_range<std::size_t>(0, n, kGrain), 0.0,
      [&](const tbb::blocked_range<std::size_t>& r, double worst) {
        for (std::size_t i = r.begin(); i != r.end(); ++i)
          if (!is_fixed_[i] && min_capacity_[i] > 0.0)
            worst = std::max(worst, stiffness[i] / min_capacity_[i]);
        return worst;
      },
      [](double a, double b) { return std::max(a, b); });
  });
  return lambda > 0.0 ? 2.0 / lambda : std::numeric_limits<double>::infinity();
}

std::vector<double> HeatOperator::steady_state(std::vector<double> T) const
{
  const ThermalModel& model = *model_;
  const Mesh& mesh = model.mesh();
  const ElementMatrices& em = model.elements();
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
    if (!is_fixed_[i] && model.node_volume(i) > 0.0)
      unknown[i] = m++;
  for (int iteration = 0; iteration < 100; ++iteration)
  {
    std::vector<Eigen::Triplet<double>> entries;
    Eigen::VectorXd rhs = Eigen::VectorXd::Zero(m);
    for (std::size_t i = 0; i < n; ++i)
      if (unknown[i] >= 0)
        rhs[unknown[i]] += model.node_source(i);
    for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    {
      const auto nodes = mesh.nodes(c);
      const std::size_t p = nodes.size();
      double mean = 0.0;
      for (std::int64_t node : nodes)
        mean += T[node];
      const double k = conductivity(model.rocks()[model.cell_rock()[c]], mean / p);
      const double* K = em.stiffness.data() + em.stiffness_offsets[c];
      for (std::size_t a = 0; a < p; ++a)
      {
        const std::int64_t row = unknown[nodes[a]];
        if (row < 0)
          continue;
        for (std::size_t b = 0; b < p; ++b)
        {
          const std::int64_t col = unknown[nodes[b]];
          if (col >= 0)
            entries.emplace_back(row, col, k * K[a * p + b]);
          else
            rhs[row] -= k * K[a * p + b] * T[nodes[b]];
        }
      }
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
