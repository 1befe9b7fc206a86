/**
 * @file rock_library.h
 * @brief A named set of rock types read from YAML (schema in the README, "Rock-property
 *        library"). User units: W/(m·K), J/(kg·K), kg/m³, J/kg, °C, µW/m³; the core's Rock is SI.
 */
#pragma once

#include "ember/inputs/input_error.h"
#include "ember/rock.h"

#include <optional>
#include <string>
#include <vector>

namespace ember::inputs
{

struct RockLibrary
{
  std::vector<Rock> rocks;          ///< validated, SI
  std::vector<std::string> sources; ///< per rock: where its values come from (free text)

  /// Index of the rock called `name`, if any.
  std::optional<int> find(const std::string& name) const;
  /// Comma-separated rock names, for messages.
  std::string names() const;
};

/// The library index of the rock named by scalar `node`; else an InputError listing the names.
int rock_index(const YAML::Node& node, const RockLibrary& library, const YamlContext& ctx);

/**
 * Read a rock library from its YAML root (`format: 1`, `rocks:` list). Throws InputError naming
 * origin, line, column and key for unknown keys, missing keys, bad numbers, duplicate names and
 * property values the core rejects.
 */
RockLibrary parse_rock_library(const YAML::Node& root, const YamlContext& ctx);
RockLibrary load_rock_library(const std::string& file);

} // namespace ember::inputs
