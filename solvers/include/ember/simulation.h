/**
 * @file simulation.h
 * @brief Time integration of the nodal enthalpy balance, with emplacement events, an energy
 *        ledger and guards against non-physical states.
 *
 * The prognostic variable is the nodal heat content E_i [J]; temperature is recovered per node
 * by ThermalModel::temperature(). An Integrator advances E over one step given the operator;
 * the Simulation driver picks step sizes that land exactly on output and event times.
 */
#pragma once

#include "ember/heat_operator.h"

#include <algorithm>
#include <functional>
#include <memory>
#include <string>
#include <vector>

namespace ember
{

inline constexpr double kSecondsPerYear = 365.25 * 86400.0;

/// Initial temperature field before per-region overrides.
struct InitialState
{
  enum class Kind
  {
    Uniform,  ///< T = surface_temperature everywhere
    Geotherm, ///< T = surface_temperature + gradient · (z_top − z)
    SteadyState ///< steady conduction for the run's boundary conditions and heat production
  };
  Kind kind = Kind::Uniform;
  double surface_temperature = 10.0; ///< [°C]
  double gradient = 0.0;             ///< [K/m], positive: warmer downward
  double z_top = 0.0;                ///< model top [m]; ignored for Uniform
};

/// A region that enters at `time` with `temperature`, made of `rock` (an index into rocks).
/// Before that its cells keep the rock they were given (the host it replaces).
struct Emplacement
{
  int region = 0;
  int rock = 0;
  double time = 0.0;        ///< [s]; 0 = present from the start
  double temperature = 0.0; ///< [°C]
};

struct Snapshot;
/// Receives each snapshot as it is made (so a caller can keep it within a memory budget).
using SnapshotSink = std::function<void(Snapshot&&)>;

struct SimulationSettings
{
  std::vector<double> output_times; ///< [s], strictly increasing, > 0
  double safety = 0.9;              ///< fraction of the forward-Euler stable step
  int threads = 0;                  ///< 0 = all available
  double min_temperature = -100.0;  ///< guard [°C]
  double max_temperature = 3000.0;  ///< guard [°C]
  /// If set, snapshots go here instead of into SimulationResult::snapshots.
  SnapshotSink snapshot_sink;
};

/// Energy bookkeeping over the run [J]. imbalance = stored − boundary − source − emplaced.
struct EnergyLedger
{
  double initial = 0.0, stored_change = 0.0, boundary = 0.0, source = 0.0, emplaced = 0.0;
  double imbalance() const { return stored_change - boundary - source - emplaced; }
  double relative_imbalance() const;
};

/// A named per-node array (SI units, temperatures in °C), e.g. "PeakTemperature".
struct PointField
{
  std::string name;
  std::vector<double> values;
};

struct Snapshot
{
  double time = 0.0;                ///< [s]
  std::vector<double> temperature;  ///< [°C] per node
  std::vector<double> melt_fraction;
  double boundary_heat = 0.0;       ///< cumulative heat in through boundaries since t = 0 [J]
  std::vector<PointField> point_fields; ///< products of a StepRecorder at this time, if any
};

struct StepInfo
{
  std::size_t step;
  double time, dt, end_time; ///< [s]
};
/// Called on the caller's thread after every step; return false to cancel.
using StepObserver = std::function<bool(const StepInfo&)>;

struct SimulationResult
{
  std::vector<Snapshot> snapshots;
  EnergyLedger ledger;
  std::size_t steps = 0;
  std::size_t operator_applications = 0;
  bool cancelled = false;
};

/**
 * Optional hook for products computed inside the solve (thermal history, see
 * thermal_history.h). The driver calls start() once with the initial state (bodies present at
 * t = 0 included), update() after every step with the step's end time and temperatures (and
 * once more, with the same time, after emplacements applied at that time: a step of zero
 * length), and write() at every output time. Between two calls the temperature of each node
 * is taken linear in time. Called on the caller's thread; may use `arena` for parallel work.
 */
class StepRecorder
{
public:
  virtual ~StepRecorder() = default;
  virtual void start(double t, const std::vector<double>& T, const ThermalModel& model,
    tbb::task_arena& arena) = 0;
  virtual void update(double t, const std::vector<double>& T, const ThermalModel& model,
    tbb::task_arena& arena) = 0;
  /// Add this recorder's arrays to the snapshot taken at snapshot.time.
  virtual void write(Snapshot& snapshot, const ThermalModel& model) = 0;
};

/// Thrown when the state leaves the physical range or becomes NaN; names step, time and node.
class SimulationError : public std::runtime_error
{
public:
  using std::runtime_error::runtime_error;
};

/// Advances heat content E by at most `dt_max` [s]; returns the step actually taken.
class Integrator
{
public:
  virtual ~Integrator() = default;
  struct Step
  {
    double dt = 0.0;
    PowerTally energy; ///< boundary and source heat over the step [J]
    std::size_t operator_applications = 0;
  };
  /// T holds temperatures consistent with E on entry and is updated on exit.
  virtual Step advance(const ThermalModel& model, const HeatOperator& op, double dt_max,
    double safety, std::vector<double>& E, std::vector<double>& T, tbb::task_arena& arena) = 0;
};

/// Forward Euler on the enthalpy: E⁺ = E + Δt·R(T(E)), Δt = safety · stable step.
class ForwardEuler final : public Integrator
{
public:
  Step advance(const ThermalModel& model, const HeatOperator& op, double dt_max, double safety,
    std::vector<double>& E, std::vector<double>& T, tbb::task_arena& arena) override;

private:
  std::vector<double> rate_;
  std::vector<float> inverse_capacity_; ///< 1/(dE/dT) from each node's last T(E) solve: its next first guess
};

/**
 * The integrators' update pass over nodes [begin, end): E[i] = new_energy(i, E[i]), then T(E)
 * from the node's last T and inverse capacity (ThermalModel::temperatures_after_change), in
 * blocks small enough to keep the old E in L1.
 */
template <class NewEnergy>
void update_heat_and_temperature(const ThermalModel& model, std::size_t begin, std::size_t end,
  double* E, double* T, float* inverse_capacity, const NewEnergy& new_energy)
{
  constexpr std::size_t kBlock = 256;
  double E_old[kBlock];
  for (std::size_t b = begin; b < end; b += kBlock)
  {
    const std::size_t m = std::min(kBlock, end - b);
    for (std::size_t k = 0; k < m; ++k)
    {
      E_old[k] = E[b + k];
      E[b + k] = new_energy(b + k, E_old[k]);
    }
    model.temperatures_after_change(b, m, E + b, E_old, T + b, inverse_capacity + b);
  }
}

/// Put the held (fixed-temperature) nodes back at their values after a T(E) pass.
void hold_fixed(const HeatOperator& op, std::vector<double>& T);

/// Initial nodal temperatures from the state, before emplacements.
std::vector<double> initial_temperatures(const Mesh& mesh, const InitialState& state);

/**
 * Run the model. `model` is modified by emplacement events (cells change rock). A `recorder`,
 * if given, is started, updated after every step and written into every snapshot.
 * Throws std::invalid_argument for bad settings (output list out of order, ...), naming them.
 */
SimulationResult simulate(ThermalModel& model, const std::vector<BoundaryCondition>& conditions,
  const InitialState& initial, const std::vector<Emplacement>& emplacements,
  const SimulationSettings& settings, Integrator& integrator, const StepObserver& observer = {},
  StepRecorder* recorder = nullptr);

} // namespace ember
