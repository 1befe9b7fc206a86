// What a built model holds (for the runner's `check`): counts, volumes, memory, time step.
#include "ember/inputs/model_builder.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <sstream>

namespace ember::inputs
{
namespace
{

/// Volume of an axis-aligned hexahedron of the box: product of its corner-to-corner extents.
double box_cell_volume(const Mesh& mesh, std::size_t c)
{
  const auto nodes = mesh.nodes(c);
  const Point& a = mesh.points[nodes[0]];
  const Point& b = mesh.points[nodes[6]];
  return (b[0] - a[0]) * (b[1] - a[1]) * (b[2] - a[2]);
}

/**
 * Bytes the core's main arrays take for a run, per cell and per node (from the members of
 * Mesh, ThermalModel, HeatOperator and the driver for 8-node hexahedra, about one cell per
 * node; bench/README.md has the measured figures):
 * per cell: connectivity 64 + offsets 8 + type/region 5, nodal volumes 64, rock 4 → ~145;
 * per node: point 24, shares ~24, volume/source 16, offsets 4, heat-operator edges ~6·13 + 13,
 * E/T and the integrator's vectors 8·8 → ~223, plus 16 per stored snapshot (T and melt
 * fraction). The peak comes while the operator is built: the element matrices (stiffness 64·8,
 * offsets 8, nodal volumes 64, volume 8) and the node-to-cell index (8 per cell-node) then
 * take 656 B per cell more, counted here.
 * An estimate: allocator overhead and the viewer's copies are not counted.
 */
double memory_estimate(std::size_t cells, std::size_t nodes, std::size_t snapshots)
{
  return (145.0 + 656.0) * double(cells) + (223.0 + 16.0 * double(snapshots)) * double(nodes);
}

double stable_step(const Scenario& scenario, const BuiltModel& model)
{
  // Every body in place at its emplacement temperature: the hottest, stiffest state of the run
  // for radiation, and each body's own rock.
  std::vector<int> cell_rock(model.mesh.n_cells());
  for (std::size_t c = 0; c < cell_rock.size(); ++c)
    cell_rock[c] = scenario.regions.find(model.mesh.cell_region[c])->rock;
  const ThermalModel thermal(model.mesh, scenario.library.rocks, cell_rock);
  const HeatOperator op(thermal, scenario.boundaries);
  std::vector<double> T = initial_temperatures(model.mesh, scenario.initial);
  for (std::size_t c = 0; c < cell_rock.size(); ++c)
    for (const Body& body : scenario.bodies)
      if (body.region == model.mesh.cell_region[c])
        for (const auto n : model.mesh.nodes(c))
          T[n] = std::max(T[n], body.temperature);
  tbb::task_arena arena(scenario.threads > 0 ? scenario.threads : tbb::task_arena::automatic);
  return op.stable_time_step(T, arena);
}

} // namespace

ModelSummary describe(const Scenario& scenario, const BuiltModel& model, bool with_time_step)
{
  ModelSummary s;
  s.cells = model.mesh.n_cells();
  s.nodes = model.mesh.n_points();
  for (int a = 0; a < 3; ++a)
  {
    const auto& l = model.lines[a];
    s.min_cell_size[a] = std::numeric_limits<double>::max();
    for (std::size_t i = 1; i < l.size(); ++i)
    {
      s.min_cell_size[a] = std::min(s.min_cell_size[a], l[i] - l[i - 1]);
      s.max_cell_size[a] = std::max(s.max_cell_size[a], l[i] - l[i - 1]);
    }
  }
  for (const RegionEntry& r : scenario.regions.regions)
    s.regions.push_back({ r.id, r.name, 0, 0.0, 0.0, false });
  for (std::size_t c = 0; c < s.cells; ++c)
  {
    RegionCells& r = s.regions[static_cast<std::size_t>(model.mesh.cell_region[c])];
    ++r.cells;
    r.volume += box_cell_volume(model.mesh, c);
  }
  for (const Body& body : scenario.bodies)
  {
    RegionCells& r = s.regions[static_cast<std::size_t>(body.region)];
    r.is_body = true;
    r.analytic_volume = analytic_volume(body.shape);
  }
  s.memory_bytes = memory_estimate(s.cells, s.nodes, scenario.output_times.size());
  if (with_time_step)
    s.stable_time_step = stable_step(scenario, model);
  return s;
}

std::string summary_text(const ModelSummary& s)
{
  std::ostringstream out;
  char line[512];
  std::snprintf(line, sizeof line, "cells %zu, nodes %zu, memory about %.0f MB\n", s.cells, s.nodes,
    s.memory_bytes / 1e6);
  out << line;
  for (int a = 0; a < 3; ++a)
  {
    std::snprintf(line, sizeof line, "cell size along %c: %.3g to %.3g m\n", "xyz"[a],
      s.min_cell_size[a], s.max_cell_size[a]);
    out << line;
  }
  for (const RegionCells& r : s.regions)
  {
    if (r.is_body)
    {
      const double error = r.volume / r.analytic_volume - 1.0;
      // 10 %: rule of thumb for "the shape is not resolved", common practice, no source.
      std::snprintf(line, sizeof line, "region %d '%s' (body): %zu cells, %.4g m³ (shape: %.4g m³, %+.1f %%)%s\n",
        r.region, r.name.c_str(), r.cells, r.volume, r.analytic_volume, 100.0 * error,
        std::abs(error) > 0.1 ? " - coarsely resolved: raise mesh.resolution" : "");
    }
    else
      std::snprintf(line, sizeof line, "region %d '%s' (layer): %zu cells, %.4g m³\n", r.region,
        r.name.c_str(), r.cells, r.volume);
    out << line;
  }
  if (s.stable_time_step > 0.0)
  {
    std::snprintf(line, sizeof line, "forward-Euler stable step with all bodies hot: %.3g years\n",
      s.stable_time_step / kSecondsPerYear);
    out << line;
  }
  return out.str();
}

} // namespace ember::inputs
