#include "ember/thermal_model.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>

namespace ember
{

ThermalModel::ThermalModel(const Mesh& mesh, std::vector<Rock> rocks, std::vector<int> cell_rock)
  : mesh_(&mesh)
  , rocks_(std::move(rocks))
  , cell_rock_(std::move(cell_rock))
{
  if (rocks_.empty())
    throw PropertyError("no rock types given");
  if (rocks_.size() > 256)
    throw PropertyError(std::to_string(rocks_.size()) + " rock types given; at most 256");
  for (const Rock& rock : rocks_)
  {
    validate(rock);
    enthalpy_.push_back(enthalpy_fit(rock));
  }
  if (cell_rock_.size() != mesh.n_cells())
    throw PropertyError("rock assignment has " + std::to_string(cell_rock_.size()) +
      " entries for " + std::to_string(mesh.n_cells()) + " cells");
  for (std::size_t c = 0; c < cell_rock_.size(); ++c)
    if (cell_rock_[c] < 0 || cell_rock_[c] >= static_cast<int>(rocks_.size()))
      throw PropertyError("cell " + std::to_string(c) + " (region " +
        std::to_string(mesh.cell_region[c]) + ") has no rock type");
  boundary_faces_ = validate_mesh(mesh).boundary_faces;
  cell_node_volume_ = compute_nodal_volumes(mesh);
  build_shares();
}

void ThermalModel::build_shares()
{
  const Mesh& mesh = *mesh_;
  const std::size_t n = mesh.n_points();
  share_offsets_.assign(n + 1, 0);
  share_rock_.clear();
  share_mass_.clear();
  share_volume_.clear();
  node_volume_.assign(n, 0.0);
  node_source_.assign(n, 0.0);
  std::vector<NodeShare> local;
  const NodeCells cells(mesh);
  for (std::size_t i = 0; i < n; ++i)
  {
    local.clear();
    for (const CellSlot& slot : cells.of(i))
    {
      const int rock = cell_rock_[slot.cell];
      const double volume =
        cell_node_volume_[mesh.cell_offsets[slot.cell] + slot.local];
      auto it = std::find_if(
        local.begin(), local.end(), [rock](const NodeShare& s) { return s.rock == rock; });
      if (it == local.end())
        local.push_back({ rock, 0.0, 0.0 });
      it = std::find_if(
        local.begin(), local.end(), [rock](const NodeShare& s) { return s.rock == rock; });
      it->volume += volume;
      node_volume_[i] += volume;
      node_source_[i] += volume * rocks_[rock].heat_production;
    }
    for (const NodeShare& s : local)
    {
      share_rock_.push_back(static_cast<std::uint8_t>(s.rock));
      share_mass_.push_back(s.volume * rocks_[s.rock].density);
      share_volume_.push_back(s.volume);
    }
    share_offsets_[i + 1] = static_cast<std::uint32_t>(share_rock_.size());
  }
}

double ThermalModel::energy(std::size_t node, double T) const
{
  double E = 0.0;
  for (const NodeShare& s : shares(node))
    E += s.mass * enthalpy_[s.rock].enthalpy(T);
  return E;
}

double ThermalModel::capacity(std::size_t node, double T) const
{
  double C = 0.0;
  for (const NodeShare& s : shares(node))
    C += s.mass * enthalpy_[s.rock].capacity(T);
  return C;
}

double ThermalModel::melt_fraction(std::size_t node, double T) const
{
  double melt = 0.0, volume = 0.0;
  for (const NodeShare& s : shares(node))
  {
    melt += s.volume * enthalpy_[s.rock].melt_fraction(T);
    volume += s.volume;
  }
  return volume > 0.0 ? melt / volume : 0.0;
}

namespace
{
// Solves E(T) = E_target for a strictly increasing E with derivative C = dE/dT > 0, where
// eval(T) returns {E(T), C(T)}. Newton from the guess (a step's change is small: two or three
// iterations), with a bracket built from the iterates themselves: each Newton step heads for
// the side not yet seen and never leaves the bracket before both sides are known. Once they
// are, any step that leaves it is replaced by bisection (the kinks at solidus and liquidus
// make plain Newton cycle). inverse_C is 1/(dE/dT) at the last iterate evaluated.
// settled(T, residual, C) may declare the Newton step from T final without evaluating at its end.
template <class Eval, class Settled>
double invert(
  const Eval& eval, const Settled& settled, double E_target, double T_guess, double& inverse_C)
{
  double lo = -std::numeric_limits<double>::infinity();
  double hi = std::numeric_limits<double>::infinity();
  double T = T_guess;
  for (int iteration = 0; iteration < 200; ++iteration)
  {
    const auto [E, C] = eval(T);
    inverse_C = 1.0 / C;
    const double residual = E - E_target;
    if (residual == 0.0)
      return T;
    (residual > 0.0 ? hi : lo) = T;
    const double newton = T - residual * inverse_C;
    if (settled(T, residual, C))
      return newton;
    if (!(newton > lo && newton < hi) && !(std::isfinite(lo) && std::isfinite(hi)))
      return T; // correction below round-off (newton == T) before both sides are known
    const double next = (newton > lo && newton < hi) ? newton : 0.5 * (lo + hi);
    if (std::abs(next - T) <= 1e-9 * (1.0 + std::abs(T)) || hi - lo <= 1e-12 * (1.0 + std::abs(T)))
      return next;
    T = next;
  }
  return T;
}

struct EnergyAndCapacity
{
  double E, C;
};
} // namespace

double ThermalModel::temperature(std::size_t node, double E, double T_guess) const
{
  double inverse_capacity = 0.0;
  return solve_temperature(node, E, T_guess, inverse_capacity);
}

double ThermalModel::solve_temperature(
  std::size_t node, double E, double T_guess, double& inverse_capacity) const
{
  inverse_capacity = 0.0;
  const auto node_shares = shares(node);
  if (node_shares.empty())
    return T_guess; // unreferenced point: no control volume, keeps its value
  if (!std::isfinite(E))
    return E;
  if (node_shares.size() == 1) // most nodes: one rock, E = m h(T)
  {
    const EnthalpyFit& fit = enthalpy_[node_shares[0].rock];
    const double m = node_shares[0].mass;
    const auto settled = [&fit, m](double T, double r, double C) {
      return newton_settled(fit, m, T, r, C);
    };
    return invert(
      [&fit, m](double T) {
        EnergyAndCapacity ec;
        fit.evaluate(T, ec.E, ec.C);
        ec.E *= m;
        ec.C *= m;
        return ec;
      },
      settled, E, T_guess, inverse_capacity);
  }
  return invert(
    [&](double T) {
      EnergyAndCapacity ec{ 0.0, 0.0 };
      for (const NodeShare& s : node_shares)
      {
        double h, c;
        enthalpy_[s.rock].evaluate(T, h, c);
        ec.E += s.mass * h;
        ec.C += s.mass * c;
      }
      return ec;
    },
    [](double, double, double) { return false; }, E, T_guess, inverse_capacity);
}

void ThermalModel::set_cell_rock(const std::vector<std::int64_t>& cells, int rock)
{
  for (std::int64_t c : cells)
    cell_rock_[c] = rock;
  build_shares();
}

} // namespace ember
