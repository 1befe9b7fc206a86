#include "ember/inputs/rock_library.h"

namespace ember::inputs
{
namespace
{

Conductivity parse_conductivity(const YAML::Node& node, const YamlContext& ctx)
{
  Conductivity k;
  if (node.IsScalar())
  {
    k.law = Conductivity::Law::Constant;
    k.k_ref = as_number(node, ctx);
    return k;
  }
  check_keys(node, ctx, { "law", "at_25C", "class", "A", "B", "minimum" });
  const std::string law = as_string(require(node, "law", ctx), ctx.child("law"));
  k.k_min = number_or(node, "minimum", k.k_min, ctx);
  if (law == "constant")
  {
    k.law = Conductivity::Law::Constant;
    k.k_ref = as_number(require(node, "at_25C", ctx), ctx.child("at_25C"));
  }
  else if (law == "vosteen-schellschmidt")
  {
    k.law = Conductivity::Law::VosteenSchellschmidt;
    k.k_ref = as_number(require(node, "at_25C", ctx), ctx.child("at_25C"));
    const std::string cls = as_string(require(node, "class", ctx), ctx.child("class"));
    if (cls != "crystalline" && cls != "sedimentary")
      ctx.child("class").fail(node["class"], "'" + cls + "' is not a class (allowed: crystalline, sedimentary)");
    k.crystalline = cls == "crystalline";
  }
  else if (law == "zoth-haenel")
  {
    k.law = Conductivity::Law::ZothHaenel;
    k.a = as_number(require(node, "A", ctx), ctx.child("A"));
    k.b = as_number(require(node, "B", ctx), ctx.child("B"));
  }
  else
    ctx.child("law").fail(node["law"],
      "'" + law + "' is not a conductivity law (allowed: constant, vosteen-schellschmidt, zoth-haenel)");
  return k;
}

HeatCapacity parse_heat_capacity(const YAML::Node& node, const YamlContext& ctx)
{
  HeatCapacity c;
  if (node.IsScalar())
  {
    c.c_ref = as_number(node, ctx);
    return c;
  }
  check_keys(node, ctx, { "law", "at_20C" });
  const std::string law = as_string(require(node, "law", ctx), ctx.child("law"));
  c.c_ref = as_number(require(node, "at_20C", ctx), ctx.child("at_20C"));
  if (law == "constant")
    c.law = HeatCapacity::Law::Constant;
  else if (law == "waples-waples")
    c.law = HeatCapacity::Law::WaplesWaples;
  else
    ctx.child("law").fail(node["law"],
      "'" + law + "' is not a heat-capacity law (allowed: constant, waples-waples)");
  return c;
}

Rock parse_rock(const YAML::Node& node, const YamlContext& ctx)
{
  check_keys(node, ctx, { "name", "density", "conductivity", "heat_capacity", "latent_heat",
    "solidus", "liquidus", "heat_production", "emissivity", "source" });
  Rock rock;
  rock.name = as_string(require(node, "name", ctx), ctx.child("name"));
  rock.density = as_number(require(node, "density", ctx), ctx.child("density"));
  rock.conductivity = parse_conductivity(require(node, "conductivity", ctx), ctx.child("conductivity"));
  rock.heat_capacity =
    parse_heat_capacity(require(node, "heat_capacity", ctx), ctx.child("heat_capacity"));
  rock.latent_heat = number_or(node, "latent_heat", 0.0, ctx);
  if (rock.latent_heat > 0.0)
  {
    rock.solidus = as_number(require(node, "solidus", ctx), ctx.child("solidus"));
    rock.liquidus = as_number(require(node, "liquidus", ctx), ctx.child("liquidus"));
  }
  rock.heat_production = 1e-6 * number_or(node, "heat_production", 0.0, ctx); // µW/m³ → W/m³
  rock.emissivity = number_or(node, "emissivity", rock.emissivity, ctx);
  try
  {
    validate(rock);
  }
  catch (const PropertyError& e)
  {
    ctx.fail(node, e.what());
  }
  return rock;
}

} // namespace

std::optional<int> RockLibrary::find(const std::string& name) const
{
  for (std::size_t i = 0; i < rocks.size(); ++i)
    if (rocks[i].name == name)
      return static_cast<int>(i);
  return std::nullopt;
}

std::string RockLibrary::names() const
{
  std::string list;
  for (const Rock& r : rocks)
    list += (list.empty() ? "'" : ", '") + r.name + "'";
  return list;
}

int rock_index(const YAML::Node& node, const RockLibrary& library, const YamlContext& ctx)
{
  const std::string name = as_string(node, ctx);
  const auto index = library.find(name);
  if (!index)
    ctx.fail(node, "rock type '" + name + "' is not in the rock library (it has: " +
        library.names() + ")");
  return *index;
}

RockLibrary parse_rock_library(const YAML::Node& root, const YamlContext& ctx)
{
  check_keys(root, ctx, { "format", "rocks" });
  check_format(root, 1, ctx);
  const YAML::Node list = require(root, "rocks", ctx);
  const YamlContext list_ctx = ctx.child("rocks");
  if (!list.IsSequence() || list.size() == 0)
    list_ctx.fail(list, "expected a non-empty list of rock types");
  RockLibrary library;
  for (std::size_t i = 0; i < list.size(); ++i)
  {
    const YamlContext item = list_ctx.item(i);
    Rock rock = parse_rock(list[i], item);
    if (library.find(rock.name))
      item.child("name").fail(list[i]["name"], "rock type '" + rock.name + "' is defined twice");
    library.rocks.push_back(std::move(rock));
    library.sources.push_back(list[i]["source"] ? list[i]["source"].as<std::string>() : "");
  }
  return library;
}

RockLibrary load_rock_library(const std::string& file)
{
  return parse_rock_library(load_yaml_file(file), { file, "" });
}

} // namespace ember::inputs
