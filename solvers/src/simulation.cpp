#include "ember/simulation.h"

#include <oneapi/tbb/blocked_range.h>
#include <oneapi/tbb/parallel_for.h>

#include <algorithm>
#include <cmath>
#include <sstream>

namespace ember
{
namespace
{
constexpr std::size_t kGrain = 2048;

double total_energy(const std::vector<double>& E)
{
  double s = 0.0; // sequential: one fixed summation order
  for (double e : E)
    s += e;
  return s;
}

void check_settings(const SimulationSettings& s)
{
  if (s.output_times.empty())
    throw std::invalid_argument("no output times given");
  for (std::size_t i = 0; i < s.output_times.size(); ++i)
  {
    const double t = s.output_times[i];
    if (!std::isfinite(t) || t <= 0.0)
      throw std::invalid_argument("output time " + std::to_string(i) + " (" +
        std::to_string(t / kSecondsPerYear) + " yr) must be after the start (> 0)");
    if (i > 0 && t <= s.output_times[i - 1])
      throw std::invalid_argument("output times out of order: entry " + std::to_string(i) +
        " (" + std::to_string(t / kSecondsPerYear) + " yr) is not after entry " +
        std::to_string(i - 1) + " (" + std::to_string(s.output_times[i - 1] / kSecondsPerYear) +
        " yr)");
  }
  if (!(s.safety > 0.0 && s.safety <= 1.0))
    throw std::invalid_argument("time-step safety factor must lie in (0, 1]");
}

// First node (lowest id) whose temperature is NaN/Inf or outside the guard range.
void guard(const std::vector<double>& T, const SimulationSettings& s, std::size_t step, double t)
{
  for (std::size_t i = 0; i < T.size(); ++i)
    if (!std::isfinite(T[i]) || T[i] < s.min_temperature || T[i] > s.max_temperature)
    {
      std::ostringstream msg;
      msg << "temperature " << T[i] << " °C at node " << i << " after step " << step
          << " (t = " << t / kSecondsPerYear << " yr) is outside the physical range ["
          << s.min_temperature << ", " << s.max_temperature
          << "] °C; the run was stopped (check properties, boundary values and time step)";
      throw SimulationError(msg.str());
    }
}

// Put region `ev.region` in place at ev.temperature: each node's share of the region's
// cells takes the new rock at the emplacement temperature, the rest of the node keeps its
// temperature. Returns the heat added [J].
double emplace(ThermalModel& model, const HeatOperator& op, const Emplacement& ev,
  std::vector<double>& E, std::vector<double>& T)
{
  const Mesh& mesh = model.mesh();
  std::vector<std::int64_t> cells;
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    if (mesh.cell_region[c] == ev.region)
      cells.push_back(static_cast<std::int64_t>(c));
  if (cells.empty())
    throw std::invalid_argument(
      "emplacement of region " + std::to_string(ev.region) + ": no cell has this region id");
  model.set_cell_rock(cells, ev.rock);
  std::vector<double> intruded(model.n_nodes(), 0.0); // intrusion volume per node [m³]
  const std::vector<double>& volume = model.cell_node_volumes();
  for (std::int64_t c : cells)
  {
    const auto nodes = mesh.nodes(c);
    for (std::size_t a = 0; a < nodes.size(); ++a)
      intruded[nodes[a]] += volume[mesh.cell_offsets[c] + a];
  }
  const Rock& rock = model.rocks()[ev.rock];
  std::vector<char> fixed(model.n_nodes(), 0);
  for (const auto& [node, value] : op.fixed_nodes())
    fixed[node] = 1;
  double added = 0.0;
  for (std::size_t i = 0; i < model.n_nodes(); ++i)
  {
    if (intruded[i] == 0.0)
      continue;
    const double mass = intruded[i] * rock.density;
    double E_new = model.energy(i, T[i]);
    if (!fixed[i])
      E_new += mass * (specific_enthalpy(rock, ev.temperature) - specific_enthalpy(rock, T[i]));
    added += E_new - E[i];
    E[i] = E_new;
    if (!fixed[i])
      T[i] = model.temperature(i, E_new, 0.5 * (T[i] + ev.temperature));
  }
  return added;
}
} // namespace

double EnergyLedger::relative_imbalance() const
{
  const double scale = std::max({ std::abs(initial), std::abs(boundary), std::abs(source),
    std::abs(emplaced), std::abs(stored_change) });
  return scale > 0.0 ? imbalance() / scale : 0.0;
}

void hold_fixed(const HeatOperator& op, std::vector<double>& T)
{
  for (const auto& [node, value] : op.fixed_nodes())
    T[node] = value;
}

Integrator::Step ForwardEuler::advance(const ThermalModel& model, const HeatOperator& op,
  double dt_max, double safety, std::vector<double>& E, std::vector<double>& T,
  tbb::task_arena& arena)
{
  PowerTally power;
  const double dt_stable = safety * op.rate_and_stable_step(T, rate_, power, arena);
  // Split the interval evenly rather than leave a sliver at its end.
  const double dt = dt_max / std::max(1.0, std::ceil(dt_max / dt_stable * (1.0 - 1e-12)));
  inverse_capacity_.resize(E.size(), 0.0f); // a stale one only makes a worse first guess
  arena.execute([&] { // update and T(E) in one pass over the nodes
    tbb::parallel_for(tbb::blocked_range<std::size_t>(0, E.size(), kGrain),
      [&](const tbb::blocked_range<std::size_t>& r) {
        update_heat_and_temperature(model, r.begin(), r.end(), E.data(), T.data(),
          inverse_capacity_.data(), [&](std::size_t i, double E_old) { return E_old + dt * rate_[i]; });
      });
  });
  hold_fixed(op, T);
  return { dt, { power.boundary * dt, power.source * dt }, 1 };
}

std::vector<double> initial_temperatures(const Mesh& mesh, const InitialState& state)
{
  std::vector<double> T(mesh.n_points(), state.surface_temperature);
  if (state.kind == InitialState::Kind::Geotherm)
    for (std::size_t i = 0; i < T.size(); ++i)
      T[i] += state.gradient * (state.z_top - mesh.points[i][2]);
  return T;
}

SimulationResult simulate(ThermalModel& model, const std::vector<BoundaryCondition>& conditions,
  const InitialState& initial, const std::vector<Emplacement>& emplacements,
  const SimulationSettings& settings, Integrator& integrator, const StepObserver& observer,
  StepRecorder* recorder)
{
  check_settings(settings);
  for (const Emplacement& ev : emplacements)
  {
    if (ev.rock < 0 || ev.rock >= static_cast<int>(model.rocks().size()))
      throw std::invalid_argument(
        "emplacement of region " + std::to_string(ev.region) + ": unknown rock index");
    if (!(ev.time >= 0.0))
      throw std::invalid_argument(
        "emplacement of region " + std::to_string(ev.region) + ": time must be >= 0");
  }
  tbb::task_arena arena(settings.threads > 0 ? settings.threads : tbb::task_arena::automatic);
  HeatOperator op(model, conditions);
  std::vector<double> T = initial_temperatures(model.mesh(), initial);
  if (initial.kind == InitialState::Kind::SteadyState)
    T = op.steady_state(std::move(T));
  for (const auto& [node, value] : op.fixed_nodes())
    T[node] = value;
  std::vector<double> E(model.n_nodes());
  for (std::size_t i = 0; i < E.size(); ++i)
    E[i] = model.energy(i, T[i]);

  std::vector<Emplacement> events = emplacements;
  std::stable_sort(events.begin(), events.end(),
    [](const Emplacement& a, const Emplacement& b) { return a.time < b.time; });
  std::size_t next_event = 0;
  auto apply_due_events = [&](double t, EnergyLedger* ledger) {
    bool changed = false;
    while (next_event < events.size() && events[next_event].time <= t)
    {
      const double added = emplace(model, op, events[next_event++], E, T);
      if (ledger)
        ledger->emplaced += added;
      changed = true;
    }
    if (changed)
      op.refresh();
    return changed;
  };
  apply_due_events(0.0, nullptr); // bodies present from the start are part of the initial state

  SimulationResult result;
  result.ledger.initial = total_energy(E);
  guard(T, settings, 0, 0.0);
  if (recorder)
    recorder->start(0.0, T, model, arena);
  const double end = settings.output_times.back();
  double t = 0.0;
  for (double t_out : settings.output_times)
  {
    while (t < t_out)
    {
      const double stop =
        next_event < events.size() ? std::min(t_out, events[next_event].time) : t_out;
      const Integrator::Step step =
        integrator.advance(model, op, stop - t, settings.safety, E, T, arena);
      t = (stop - (t + step.dt) <= 1e-9 * step.dt) ? stop : t + step.dt;
      ++result.steps;
      result.operator_applications += step.operator_applications;
      result.ledger.boundary += step.energy.boundary;
      result.ledger.source += step.energy.source;
      guard(T, settings, result.steps, t);
      if (recorder)
        recorder->update(t, T, model, arena);
      if (apply_due_events(t, &result.ledger) && recorder)
        recorder->update(t, T, model, arena); // the emplacement's jump, a step of zero length
      if (observer && !observer({ result.steps, t, step.dt, end }))
      {
        result.cancelled = true;
        result.ledger.stored_change = total_energy(E) - result.ledger.initial;
        return result;
      }
    }
    Snapshot snap{ t, T, std::vector<double>(T.size()), result.ledger.boundary, {} };
    if (recorder)
      recorder->write(snap, model);
    for (std::size_t i = 0; i < T.size(); ++i)
      snap.melt_fraction[i] = model.melt_fraction(i, T[i]);
    if (settings.snapshot_sink)
      settings.snapshot_sink(std::move(snap));
    else
      result.snapshots.push_back(std::move(snap));
  }
  result.ledger.stored_change = total_energy(E) - result.ledger.initial;
  return result;
}

} // namespace ember
