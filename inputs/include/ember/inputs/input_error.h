/**
 * @file input_error.h
 * @brief The one error type for user-written input files (YAML), and the helpers that read
 *        YAML nodes so that every message names the file, line, column and key.
 */
#pragma once

#include <yaml-cpp/yaml.h>

#include <initializer_list>
#include <stdexcept>
#include <string>

namespace ember::inputs
{

/// Thrown for bad user input; what() reads "FILE:LINE:COLUMN: KEY: what is wrong (what is allowed)".
class InputError : public std::runtime_error
{
public:
  using std::runtime_error::runtime_error;
};

/// Where a node came from, for messages: the file (or "inline ..." text) and a key path.
struct YamlContext
{
  std::string origin; ///< file name, or a description such as "field data RockLibrary"
  std::string path;   ///< key path, e.g. "rocks[2].conductivity"

  YamlContext child(const std::string& key) const;
  YamlContext item(std::size_t index) const;
  /// Throw an InputError located at `node` (line and column are 1-based in the message).
  [[noreturn]] void fail(const YAML::Node& node, const std::string& what) const;
};

/// Parse a whole file; a syntax error or an unreadable file becomes an InputError.
YAML::Node load_yaml_file(const std::string& file);
/// Parse text (field data, inline blocks); `origin` names it in messages.
YAML::Node load_yaml_text(const std::string& text, const std::string& origin);
/// Read a whole text file; throws InputError naming the file if it cannot be read.
std::string read_text_file(const std::string& file);

/// Throw if `map` is not a map, or has a key not in `allowed` (the message lists them).
void check_keys(const YAML::Node& map, const YamlContext& ctx,
  std::initializer_list<const char*> allowed);
/// The value of a required key, or an InputError naming the missing key.
YAML::Node require(const YAML::Node& map, const char* key, const YamlContext& ctx);
/// A finite number (scalar), else an InputError naming the key and the text found.
double as_number(const YAML::Node& node, const YamlContext& ctx);
double number_or(const YAML::Node& map, const char* key, double fallback, const YamlContext& ctx);
int as_integer(const YAML::Node& node, const YamlContext& ctx);
std::string as_string(const YAML::Node& node, const YamlContext& ctx);
bool as_bool(const YAML::Node& node, const YamlContext& ctx);
/// Check `format:` (required) equals `supported`.
void check_format(const YAML::Node& root, int supported, const YamlContext& ctx);

} // namespace ember::inputs
