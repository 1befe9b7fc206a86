/**
 * @file region_map.h
 * @brief Which rock type each region of a mesh is, and which regions are intrusions (with
 *        emplacement temperature and time). Schema in the README, "Region map".
 */
#pragma once

#include "ember/inputs/rock_library.h"
#include "ember/simulation.h"
#include "ember/thermal_history.h"

#include <optional>
#include <span>
#include <string>
#include <vector>

namespace ember::inputs
{

struct RegionEntry
{
  int id = 0;
  std::string name;
  int rock = 0; ///< index into the rock library
  struct Intrusion
  {
    double temperature = 0.0; ///< emplacement temperature [°C]
    double time = 0.0;        ///< emplacement time after the model start [s]
    int replaces = 0;         ///< rock of the region's cells before emplacement (library index)
  };
  std::optional<Intrusion> intrusion;
  /// Organic-bearing: EASY%Ro is computed here, starting from this maturity.
  std::optional<InitialMaturity> organic;
};

struct RegionMap
{
  std::vector<RegionEntry> regions;
  const RegionEntry* find(int id) const;
};

/// `temperature` (°C, required) and `time` (years, default 0) of an emplacement, read from `map`
/// and checked; `replaces` is left 0 for the caller.
RegionEntry::Intrusion parse_emplacement(const YAML::Node& map, const YamlContext& ctx);

/**
 * The `organic:` key of a region or layer: `true` (unreacted at the start), `false`,
 * `{initial_reflectance: %Ro}` or `{burial_age: Myr}` (heated at a constant rate from the
 * surface to its starting temperature over that time). Returns nullopt for `false`.
 */
std::optional<InitialMaturity> parse_organic(const YAML::Node& node, const YamlContext& ctx);
/// Emit the same key (for re-written region maps).
void emit_organic(YAML::Emitter& out, const InitialMaturity& maturity);

/// Read a region map against a library (rock names must exist). Throws InputError with position.
RegionMap parse_region_map(const YAML::Node& root, const RockLibrary& library, const YamlContext& ctx);
RegionMap load_region_map(const std::string& file, const RockLibrary& library);

/// What the core needs to run: the rocks, the initial rock of each cell and the emplacements.
struct ModelSetup
{
  std::vector<Rock> rocks;
  std::vector<int> cell_rock;
  std::vector<Emplacement> emplacements;
};

/**
 * Map each cell's region to its rock. Throws InputError listing region ids that occur in the
 * mesh but not in the map (with the first cell id of each), so nothing runs on a wrong model.
 */
ModelSetup make_model_setup(
  const RockLibrary& library, const RegionMap& map, std::span<const int> cell_region);

} // namespace ember::inputs
