/**
 * @file scenario.h
 * @brief A scenario file (YAML, `format: 1`): domain, layers, magmatic bodies, rocks, initial
 *        state, boundary conditions and run schedule — everything the runner needs. Schema and
 *        a commented example: docs/scenario-format.md.
 *
 * The file speaks the user's units (depths in metres below the domain top, °C, years, mW/m²,
 * degrees); the Scenario holds the core's (z up in metres, seconds, W/m², radians), so the
 * runner passes its members straight to ember::simulate.
 */
#pragma once

#include "ember/inputs/body_shapes.h"
#include "ember/inputs/region_map.h"
#include "ember/heat_operator.h"
#include "ember/integrators.h"
#include "ember/simulation.h"

#include <array>
#include <optional>
#include <string>
#include <vector>

namespace ember::inputs
{

/// The box the model fills. The ground surface is z = top; lava flows may stand on it.
struct Domain
{
  std::array<double, 2> x{}, y{}; ///< [m], lo < hi
  double top = 0.0;               ///< elevation of the ground surface [m]
  double bottom = 0.0;            ///< elevation of the base, top − depth [m]
};

/// How finely the model builder meshes (see model_builder.h).
struct MeshControls
{
  double cell_size = 0.0;   ///< far-field target cell size [m]
  int cells_across = 8;     ///< minimum cells across each body's thinnest dimension
  double max_growth = 1.25; ///< size ratio bound between neighbouring cells
  /// Multiplies resolution: cell_size / resolution, cells_across · resolution (at least 2).
  /// 1 = as written; tests and a quick look use e.g. 0.25.
  double resolution = 1.0;
  double effective_cell_size() const;
  int effective_cells_across() const;
};

/// A horizontal layer from `z_top` down to the next layer (or the domain bottom).
struct Layer
{
  std::string name;
  int rock = 0;       ///< library index
  double z_top = 0.0; ///< elevation of its top [m]
  int region = 0;     ///< region id (= its index)
  std::optional<InitialMaturity> organic; ///< organic-bearing: EASY%Ro is computed in it
};

/// A magmatic body; `region` is its region id (number of layers + its index in the file).
struct Body
{
  std::string name;
  int rock = 0;             ///< library index
  double temperature = 0.0; ///< emplacement temperature [°C]
  double time = 0.0;        ///< emplacement time after the model start [s]
  int replaces = 0;         ///< rock its cells hold before `time`: the layer at its centre
  int region = 0;
  Shape shape;
  std::string location;     ///< "FILE:LINE:COL: bodies[i]", where the file defines it (for messages)
};

struct Scenario
{
  std::string file;             ///< where it was read from ("" for text)
  std::string title;            ///< optional free text
  Domain domain;
  MeshControls mesh;
  RockLibrary library;
  std::string library_file;     ///< resolved path if the rocks came from a file, else ""
  std::vector<Layer> layers;    ///< top to bottom, region ids 0..
  std::vector<Body> bodies;     ///< file order, region ids after the layers
  RegionMap regions;            ///< one entry per layer and body, ids as above
  InitialState initial;
  std::vector<BoundaryCondition> boundaries; ///< SI; one per surface (top, bottom, sides)
  double end_time = 0.0;                     ///< [s]
  std::vector<double> output_times;          ///< [s], strictly increasing, last = end_time
  IntegratorKind integrator = IntegratorKind::RKL2; ///< ember::IntegratorKind
  int threads = 0;                           ///< 0 = all available
  std::vector<std::string> arrays;           ///< output arrays wanted; empty = the runner's default

  /// Index of the layer holding elevation z [m] (top layer for z above the ground, bottom
  /// layer below the base).
  std::size_t layer_at(double z) const;
  /// SimulationSettings with the output times and thread count (other fields default).
  SimulationSettings settings() const;
  /// The core's emplacement events (bodies, with their times and temperatures).
  std::vector<Emplacement> emplacements() const;
};

/**
 * Read a scenario from its YAML root. `file` names it in messages and anchors a relative rock
 * library path (its folder); pass e.g. "inline scenario" for text. Throws InputError reading
 * "FILE:LINE:COL: key.path: what is wrong (what is allowed)".
 */
Scenario parse_scenario(const YAML::Node& root, const std::string& file);
Scenario load_scenario(const std::string& file);

/// The library as a rock-library YAML document (rock_library.h schema), full precision.
std::string rock_library_yaml(const Scenario& scenario);
/// The regions as a region-map YAML document (region_map.h schema), full precision.
std::string region_map_yaml(const Scenario& scenario);

} // namespace ember::inputs
