#include "ember/inputs/region_map.h"

#include "ember/easy_ro.h"

#include <map>
#include <sstream>

namespace ember::inputs
{
const RegionEntry* RegionMap::find(int id) const
{
  for (const RegionEntry& r : regions)
    if (r.id == id)
      return &r;
  return nullptr;
}

RegionEntry::Intrusion parse_emplacement(const YAML::Node& map, const YamlContext& ctx)
{
  RegionEntry::Intrusion in;
  in.temperature = as_number(require(map, "temperature", ctx), ctx.child("temperature"));
  if (in.temperature < -100.0 || in.temperature > 3000.0)
    ctx.child("temperature").fail(map["temperature"], "emplacement temperature must lie in [-100, 3000] °C");
  const double years = number_or(map, "time", 0.0, ctx);
  if (years < 0.0)
    ctx.child("time").fail(map["time"], "emplacement time must be >= 0 years after the model start");
  in.time = years * kSecondsPerYear;
  return in;
}

std::optional<InitialMaturity> parse_organic(const YAML::Node& node, const YamlContext& ctx)
{
  if (node.IsScalar())
    return as_bool(node, ctx) ? std::optional<InitialMaturity>(InitialMaturity{}) : std::nullopt;
  check_keys(node, ctx, { "initial_reflectance", "burial_age" });
  if (node["initial_reflectance"] && node["burial_age"])
    ctx.fail(node, "give either initial_reflectance or burial_age, not both");
  InitialMaturity m;
  if (node["initial_reflectance"])
  {
    m.kind = InitialMaturity::Kind::Reflectance;
    m.reflectance = as_number(node["initial_reflectance"], ctx.child("initial_reflectance"));
    if (!(m.reflectance >= easy_ro_minimum() && m.reflectance < easy_ro_maximum()))
      ctx.child("initial_reflectance").fail(node["initial_reflectance"],
        "EASY%Ro spans " + std::to_string(easy_ro_minimum()) + " to " + std::to_string(easy_ro_maximum()) + " %Ro");
  }
  else if (node["burial_age"])
  {
    m.kind = InitialMaturity::Kind::Burial;
    const double myr = as_number(node["burial_age"], ctx.child("burial_age"));
    if (!(myr > 0.0))
      ctx.child("burial_age").fail(node["burial_age"], "burial age must be > 0 Myr");
    m.age = myr * 1e6 * kSecondsPerYear;
  }
  else
    ctx.fail(node, "expected true, false, {initial_reflectance: %Ro} or {burial_age: Myr}");
  return m;
}

void emit_organic(YAML::Emitter& out, const InitialMaturity& m)
{
  out << YAML::Key << "organic" << YAML::Value;
  if (m.kind == InitialMaturity::Kind::Reflectance)
    out << YAML::Flow << YAML::BeginMap << YAML::Key << "initial_reflectance" << YAML::Value << m.reflectance << YAML::EndMap;
  else if (m.kind == InitialMaturity::Kind::Burial)
    out << YAML::Flow << YAML::BeginMap << YAML::Key << "burial_age" << YAML::Value
        << m.age / (1e6 * kSecondsPerYear) << YAML::EndMap;
  else
    out << true;
}

RegionMap parse_region_map(const YAML::Node& root, const RockLibrary& library, const YamlContext& ctx)
{
  check_keys(root, ctx, { "format", "regions" });
  check_format(root, 1, ctx);
  const YAML::Node list = require(root, "regions", ctx);
  const YamlContext list_ctx = ctx.child("regions");
  if (!list.IsSequence() || list.size() == 0)
    list_ctx.fail(list, "expected a non-empty list of regions");
  RegionMap map;
  for (std::size_t i = 0; i < list.size(); ++i)
  {
    const YAML::Node node = list[i];
    const YamlContext item = list_ctx.item(i);
    check_keys(node, item, { "id", "name", "rock", "emplacement", "organic" });
    RegionEntry entry;
    entry.id = as_integer(require(node, "id", item), item.child("id"));
    if (map.find(entry.id))
      item.child("id").fail(node["id"], "region id " + std::to_string(entry.id) + " is listed twice");
    entry.name = node["name"] ? as_string(node["name"], item.child("name"))
                              : "region " + std::to_string(entry.id);
    entry.rock = rock_index(require(node, "rock", item), library, item.child("rock"));
    if (const YAML::Node e = node["emplacement"])
    {
      const YamlContext ectx = item.child("emplacement");
      check_keys(e, ectx, { "temperature", "time", "replaces" });
      RegionEntry::Intrusion in = parse_emplacement(e, ectx);
      if (e["replaces"])
        in.replaces = rock_index(e["replaces"], library, ectx.child("replaces"));
      else if (in.time > 0.0)
        ectx.fail(e, "a body emplaced after the start needs 'replaces': the rock its cells hold before then");
      else
        in.replaces = entry.rock;
      entry.intrusion = in;
    }
    if (node["organic"])
      entry.organic = parse_organic(node["organic"], item.child("organic"));
    map.regions.push_back(std::move(entry));
  }
  return map;
}

RegionMap load_region_map(const std::string& file, const RockLibrary& library)
{
  return parse_region_map(load_yaml_file(file), library, { file, "" });
}

ModelSetup make_model_setup(
  const RockLibrary& library, const RegionMap& map, std::span<const int> cell_region)
{
  ModelSetup setup;
  setup.rocks = library.rocks;
  setup.cell_rock.resize(cell_region.size());
  std::map<int, std::size_t> unknown; // region id → first cell
  for (std::size_t c = 0; c < cell_region.size(); ++c)
  {
    const RegionEntry* entry = map.find(cell_region[c]);
    if (!entry)
    {
      unknown.emplace(cell_region[c], c);
      continue;
    }
    setup.cell_rock[c] = entry->intrusion ? entry->intrusion->replaces : entry->rock;
  }
  if (!unknown.empty())
  {
    std::ostringstream msg;
    msg << "the mesh has region ids that the region map does not list:";
    for (const auto& [id, cell] : unknown)
      msg << " " << id << " (first at cell " << cell << ")";
    throw InputError(msg.str());
  }
  for (const RegionEntry& entry : map.regions)
    if (entry.intrusion)
      setup.emplacements.push_back(
        { entry.id, entry.rock, entry.intrusion->time, entry.intrusion->temperature });
  return setup;
}

} // namespace ember::inputs
