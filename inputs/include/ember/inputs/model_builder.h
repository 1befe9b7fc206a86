/**
 * @file model_builder.h
 * @brief Scenario → hexahedral mesh with a region id per cell (VTK-free), and a summary of it.
 *
 * Grading: along each axis the node lines are fine where a body is (at least
 * MeshControls::cells_across cells across its thinnest dimension) and grow away from it, by at
 * most MeshControls::max_growth between neighbouring cells, up to the far-field cell size.
 * Flat faces (sill floors, lava bases and tops, faces of an axis-aligned dike) become node
 * planes where the grading allows; layer tops do not (a cell takes the layer at its centre).
 *
 * Rasterisation: a cell belongs to a body when at least half of it lies inside, judged by
 * 4×4×4 sub-cell samples (the midpoint rule on the cell's volume fraction). Cells start in
 * the layer holding their centre; bodies override layers, and later bodies override earlier
 * ones. Cells above the ground that no body fills (beside a lava flow) are air: they are left
 * out, with the nodes only they used.
 */
#pragma once

#include "ember/inputs/scenario.h"
#include "ember/mesh.h"

#include <array>
#include <cstddef>
#include <string>
#include <vector>

namespace ember::inputs
{

/// Where an axis must be fine: cells no larger than `size` between lo and hi [m].
struct AxisZone
{
  double lo = 0.0, hi = 0.0, size = 0.0;
};

/**
 * Strictly increasing node coordinates from lo to hi [m], equidistributing ∫ dx / s(x) where
 * s is the zones' sizes (each zone padded by one of its cells per side, so body faces sit in
 * uniform spacing) growing linearly away from them at slope ln(max_growth)/2, capped at
 * far_size. Cells are no larger than s, and neighbours differ by at most max_growth (the
 * slope bounds the change of ln s over two cells). Fixed nodes (flat body faces) split the
 * line into segments that round their cell counts separately; a fixed node is kept only if
 * both its segments' roundings keep the cells beside it within max_growth of each other, which
 * holds where s is uniform around it (a zone's face).
 */
std::vector<double> graded_line(double lo, double hi, double far_size, double max_growth,
  const std::vector<AxisZone>& zones, const std::vector<double>& fixed_nodes = {});

struct BuiltModel
{
  Mesh mesh;                              ///< hexahedra; Mesh::cell_region = scenario region ids
  std::vector<std::string> region_names;  ///< by region id (layers, then bodies)
  std::array<std::vector<double>, 3> lines; ///< the box's node lines x, y, z [m] before air removal
};

/// Build the model. Throws InputError naming a body that ends up with no cell.
BuiltModel build_model(const Scenario& scenario);

struct RegionCells
{
  int region = 0;
  std::string name;
  std::size_t cells = 0;
  double volume = 0.0;          ///< of its cells [m³]
  double analytic_volume = 0.0; ///< bodies: from the shape's formula [m³]; layers: 0
  bool is_body = false;
};

struct ModelSummary
{
  std::size_t cells = 0, nodes = 0;
  std::array<double, 3> min_cell_size{}, max_cell_size{}; ///< along x, y, z [m]
  std::vector<RegionCells> regions;                     ///< by region id
  /// Rough peak memory of a run in the core [bytes]: mesh, element matrices, nodal model,
  /// operator scratch, integrator vectors and the stored snapshots (no VTK copies).
  double memory_bytes = 0.0;
  /// Forward-Euler stable step with every body emplaced at its temperature [s]; 0 if not asked.
  double stable_time_step = 0.0;
};

/// Counts, volumes per region and the memory estimate; with_time_step also builds the thermal
/// model and operator once (a few seconds for a million cells) for the stable step.
ModelSummary describe(const Scenario& scenario, const BuiltModel& model, bool with_time_step = true);

/// The summary as lines of text for a terminal (units: m, m³, MB, years).
std::string summary_text(const ModelSummary& summary);

} // namespace ember::inputs
