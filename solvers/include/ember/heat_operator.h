/**
 * @file heat_operator.h
 * @brief Nodal enthalpy balance dE_i/dt = conduction + sources + boundary fluxes.
 *
 *   dE_i/dt = − Σ_c k_c(T̄_c) Σ_b K^c_ib T_b  +  Σ_c V_ci A_c  +  Σ_f ∫_f N_i q_f dA
 *
 * k_c is evaluated at the cell's mean nodal temperature each call. Boundary fluxes q_f (into
 * the body, W/m²) per surface group: radiation −εσ(T⁴ − T_sky⁴) (T in K), convection
 * −h(T − T_fluid), both, a prescribed heat flow, or insulated. Fixed-temperature nodes are
 * held; the heat they pass is booked as boundary heat. Parallel loops gather per node in a
 * fixed order, so results do not depend on the thread count.
 */
#pragma once

#include "ember/thermal_model.h"

#include <oneapi/tbb/task_arena.h>

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

  /**
   * Forward-Euler stable step [s] for the current T: 2 / λ with λ a Gershgorin bound of the
   * linearised operator (conduction Σ_b k_c|K_ib| plus 4εσT³A and hA on boundary nodes) over
   * the smallest sensible capacity of each node. Latent heat only raises capacity, so the
   * bound stays safe across a phase change.
   */
  double stable_time_step(const std::vector<double>& T, tbb::task_arena& arena) const;

  /**
   * Steady conductive state: solves Σ_c k_c K^c T = sources + boundary heat (Eigen sparse
   * Cholesky, LDLᵀ), with fixed-temperature nodes held and convection included; Picard
   * iterations on k(T) from T_guess until max|ΔT| < 1e-9 K. Needs at least one
   * fixed-temperature or convection boundary; radiation boundaries are rejected (non-linear).
   */
  std::vector<double> steady_state(std::vector<double> T_guess) const;

  /// Nodes held at a fixed temperature, and that temperature, in ascending node order.
  const std::vector<std::pair<std::int64_t, double>>& fixed_nodes() const { return fixed_; }
  /// Rebuild node-dependent data after the model's rock assignment changed.
  void refresh();

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

  const ThermalModel* model_;
  std::vector<Group> groups_;
  std::vector<std::pair<std::int64_t, double>> fixed_;
  std::vector<char> is_fixed_;
  std::vector<double> min_capacity_; ///< per node, J/K, sensible heat only
  /// Σ_b |K^c_ab| per cell-node (aligned with cell_nodes): the geometric part of the
  /// Gershgorin bound, fixed by the mesh, so the stable step reads 8 bytes per cell-node
  /// instead of the element matrix row.
  std::vector<double> row_abs_sum_;
  /// Node i's cell-node entries (positions in cell_nodes) in ascending cell order, at
  /// gather_[gather_start_[i]] .. gather_[gather_start_[i+1]-1]: the fixed gather order
  /// behind determinism, flattened so the gather reads 4 bytes per entry and no cell offsets.
  std::vector<std::int64_t> gather_start_;
  std::vector<std::uint32_t> gather_;
  mutable std::vector<double> cell_flux_; ///< per cell-node scratch, aligned with cell_nodes
  mutable std::vector<double> node_stiffness_; ///< per node scratch of the stable step [W/K]
};

} // namespace ember
