#include "ember/inputs/input_error.h"

#include <cmath>
#include <fstream>
#include <sstream>

namespace ember::inputs
{

YamlContext YamlContext::child(const std::string& key) const
{
  return { origin, path.empty() ? key : path + "." + key };
}

YamlContext YamlContext::item(std::size_t index) const
{
  return { origin, path + "[" + std::to_string(index) + "]" };
}

void YamlContext::fail(const YAML::Node& node, const std::string& what) const
{
  std::ostringstream msg;
  msg << origin;
  const YAML::Mark mark = node.IsDefined() ? node.Mark() : YAML::Mark::null_mark();
  if (mark.line >= 0)
    msg << ":" << mark.line + 1 << ":" << mark.column + 1;
  msg << ": ";
  if (!path.empty())
    msg << path << ": ";
  msg << what;
  throw InputError(msg.str());
}

std::string read_text_file(const std::string& file)
{
  std::ifstream in(file, std::ios::binary);
  if (!in)
    throw InputError(file + ": cannot open the file for reading");
  std::ostringstream text;
  text << in.rdbuf();
  if (in.bad())
    throw InputError(file + ": read error");
  return text.str();
}

YAML::Node load_yaml_text(const std::string& text, const std::string& origin)
{
  try
  {
    return YAML::Load(text);
  }
  catch (const YAML::ParserException& e)
  {
    std::ostringstream msg;
    msg << origin << ":" << e.mark.line + 1 << ":" << e.mark.column + 1
        << ": not valid YAML: " << e.msg;
    throw InputError(msg.str());
  }
}

YAML::Node load_yaml_file(const std::string& file)
{
  return load_yaml_text(read_text_file(file), file);
}

void check_keys(const YAML::Node& map, const YamlContext& ctx,
  std::initializer_list<const char*> allowed)
{
  if (!map.IsMap())
    ctx.fail(map, "expected a map of keys");
  for (const auto& kv : map)
  {
    const std::string key = kv.first.as<std::string>();
    bool known = false;
    for (const char* a : allowed)
      known = known || key == a;
    if (!known)
    {
      std::string list;
      for (const char* a : allowed)
        list += (list.empty() ? "" : ", ") + std::string(a);
      ctx.child(key).fail(kv.first, "unknown key (allowed here: " + list + ")");
    }
  }
}

YAML::Node require(const YAML::Node& map, const char* key, const YamlContext& ctx)
{
  if (!map.IsMap())
    ctx.fail(map, "expected a map of keys");
  YAML::Node value = map[key];
  if (!value.IsDefined() || value.IsNull())
    ctx.fail(map, std::string("missing required key '") + key + "'");
  return value;
}

double as_number(const YAML::Node& node, const YamlContext& ctx)
{
  if (!node.IsScalar())
    ctx.fail(node, "expected a number");
  double value = 0.0;
  if (!YAML::convert<double>::decode(node, value) || !std::isfinite(value))
    ctx.fail(node, "expected a finite number, found '" + node.Scalar() + "'");
  return value;
}

double number_or(const YAML::Node& map, const char* key, double fallback, const YamlContext& ctx)
{
  const YAML::Node value = map[key];
  if (!value.IsDefined() || value.IsNull())
    return fallback;
  return as_number(value, ctx.child(key));
}

int as_integer(const YAML::Node& node, const YamlContext& ctx)
{
  if (!node.IsScalar())
    ctx.fail(node, "expected an integer");
  int value = 0;
  if (!YAML::convert<int>::decode(node, value))
    ctx.fail(node, "expected an integer, found '" + node.Scalar() + "'");
  return value;
}

std::string as_string(const YAML::Node& node, const YamlContext& ctx)
{
  if (!node.IsScalar() || node.Scalar().empty())
    ctx.fail(node, "expected a non-empty text value");
  return node.Scalar();
}

bool as_bool(const YAML::Node& node, const YamlContext& ctx)
{
  bool value = false;
  if (!node.IsScalar() || !YAML::convert<bool>::decode(node, value))
    ctx.fail(node, "expected true or false");
  return value;
}

void check_format(const YAML::Node& root, int supported, const YamlContext& ctx)
{
  const int format = as_integer(require(root, "format", ctx), ctx.child("format"));
  if (format != supported)
    ctx.child("format").fail(root["format"],
      "format " + std::to_string(format) + " is not supported (this version reads format " +
        std::to_string(supported) + ")");
}

} // namespace ember::inputs
