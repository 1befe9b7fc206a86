// Reading a scenario file: domain, mesh controls, rocks, layers, initial state, boundaries, run.
#include "scenario_parts.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <numbers>

namespace ember::inputs
{
namespace detail
{

std::array<double, 2> number_pair(const YAML::Node& node, const YamlContext& ctx)
{
  if (!node.IsSequence() || node.size() != 2)
    ctx.fail(node, "expected a list of two numbers [a, b]");
  return { as_number(node[0], ctx.item(0)), as_number(node[1], ctx.item(1)) };
}

double positive(const YAML::Node& map, const char* key, const YamlContext& ctx)
{
  const double value = as_number(require(map, key, ctx), ctx.child(key));
  if (value <= 0.0)
    ctx.child(key).fail(map[key], "must be > 0, found " + map[key].Scalar());
  return value;
}

double angle_or(const YAML::Node& map, const char* key, double fallback_deg, double lo, double hi,
  const YamlContext& ctx)
{
  const double deg = number_or(map, key, fallback_deg, ctx);
  if (deg < lo || deg > hi)
    ctx.child(key).fail(map[key], "angle in degrees must lie in [" + std::to_string(int(lo)) +
        ", " + std::to_string(int(hi)) + "]");
  return deg * std::numbers::pi / 180.0;
}

} // namespace detail

namespace
{
using namespace detail;

Domain parse_domain(const YAML::Node& node, const YamlContext& ctx)
{
  check_keys(node, ctx, { "x", "y", "depth", "top" });
  Domain d;
  d.x = number_pair(require(node, "x", ctx), ctx.child("x"));
  d.y = number_pair(require(node, "y", ctx), ctx.child("y"));
  for (const char* axis : { "x", "y" })
  {
    const auto r = number_pair(node[axis], ctx.child(axis));
    if (r[0] >= r[1])
      ctx.child(axis).fail(node[axis], "the range must be increasing: [low, high] in metres");
  }
  d.top = number_or(node, "top", 0.0, ctx);
  d.bottom = d.top - positive(node, "depth", ctx);
  return d;
}

MeshControls parse_mesh(const YAML::Node& node, const YamlContext& ctx)
{
  check_keys(node, ctx, { "cell_size", "cells_across", "max_growth", "resolution" });
  MeshControls m;
  m.cell_size = positive(node, "cell_size", ctx);
  if (node["cells_across"])
  {
    m.cells_across = as_integer(node["cells_across"], ctx.child("cells_across"));
    if (m.cells_across < 1 || m.cells_across > 64)
      ctx.child("cells_across").fail(node["cells_across"], "must lie in [1, 64]");
  }
  m.max_growth = number_or(node, "max_growth", m.max_growth, ctx);
  if (m.max_growth < 1.05 || m.max_growth > 1.5)
    ctx.child("max_growth").fail(node["max_growth"],
      "must lie in [1.05, 1.5] (neighbouring cells differing more degrade the solution)");
  m.resolution = number_or(node, "resolution", 1.0, ctx);
  if (m.resolution <= 0.0)
    ctx.child("resolution").fail(node["resolution"], "must be > 0 (1 = as written, < 1 coarser)");
  return m;
}

RockLibrary parse_rocks(const YAML::Node& node, const YamlContext& ctx, const std::string& file,
  std::string& library_file)
{
  if (node.IsScalar())
  {
    // A path, relative to the scenario file's folder.
    const std::filesystem::path path =
      std::filesystem::path(file).parent_path() / as_string(node, ctx);
    library_file = path.string();
    if (!std::filesystem::is_regular_file(path))
      ctx.fail(node, "cannot read the rock library '" + library_file +
          "' (allowed: a path relative to the scenario file, or an inline list of rocks)");
    return load_rock_library(library_file);
  }
  // Inline list: the rock-library schema under this key; positions stay those of this file.
  YAML::Node root;
  root["format"] = 1;
  root["rocks"] = node;
  return parse_rock_library(root, { ctx.origin, "" });
}

std::vector<Layer> parse_layers(const YAML::Node& list, const YamlContext& ctx,
  const RockLibrary& library, const Domain& domain)
{
  if (!list.IsSequence() || list.size() == 0)
    ctx.fail(list, "expected a non-empty list of layers, from the top down");
  std::vector<Layer> layers;
  for (std::size_t i = 0; i < list.size(); ++i)
  {
    const YAML::Node node = list[i];
    const YamlContext item = ctx.item(i);
    check_keys(node, item, { "name", "rock", "top", "organic" });
    Layer layer;
    layer.rock = rock_index(require(node, "rock", item), library, item.child("rock"));
    layer.name = node["name"] ? as_string(node["name"], item.child("name")) : library.rocks[layer.rock].name;
    const double depth = as_number(require(node, "top", item), item.child("top"));
    const double previous = i == 0 ? -1.0 : domain.top - layers.back().z_top;
    if (i == 0 && depth != 0.0)
      item.child("top").fail(node["top"], "the first layer must start at the top (depth 0 m)");
    if (i > 0 && (depth <= previous || depth >= domain.top - domain.bottom))
      item.child("top").fail(node["top"], "layer tops must increase downward and lie inside the "
        "domain's depth (allowed: " + std::to_string(previous) + " < top < " +
          std::to_string(domain.top - domain.bottom) + " m)");
    layer.z_top = domain.top - depth;
    layer.region = static_cast<int>(i);
    if (node["organic"])
      layer.organic = parse_organic(node["organic"], item.child("organic"));
    layers.push_back(std::move(layer));
  }
  return layers;
}

InitialState parse_initial(const YAML::Node& node, const YamlContext& ctx, const Domain& domain,
  double& basal_heat_flow)
{
  const std::string kind = as_string(require(node, "kind", ctx), ctx.child("kind"));
  InitialState s;
  s.z_top = domain.top;
  if (kind == "uniform")
  {
    check_keys(node, ctx, { "kind", "temperature" });
    s.kind = InitialState::Kind::Uniform;
    s.surface_temperature = as_number(require(node, "temperature", ctx), ctx.child("temperature"));
  }
  else if (kind == "geotherm")
  {
    check_keys(node, ctx, { "kind", "surface_temperature", "gradient" });
    s.kind = InitialState::Kind::Geotherm;
    s.surface_temperature =
      as_number(require(node, "surface_temperature", ctx), ctx.child("surface_temperature"));
    s.gradient = 1e-3 * as_number(require(node, "gradient", ctx), ctx.child("gradient")); // K/km → K/m
  }
  else if (kind == "steady")
  {
    check_keys(node, ctx, { "kind", "surface_temperature", "basal_heat_flow" });
    s.kind = InitialState::Kind::SteadyState;
    s.surface_temperature = number_or(node, "surface_temperature", 10.0, ctx); // starting guess
    basal_heat_flow = 1e-3 * positive(node, "basal_heat_flow", ctx);         // mW/m² → W/m²
  }
  else
    ctx.child("kind").fail(node["kind"],
      "'" + kind + "' is not an initial state (allowed: uniform, geotherm, steady)");
  return s;
}

BoundaryCondition parse_boundary(const YAML::Node& node, const YamlContext& ctx, Side side,
  std::size_t index)
{
  BoundaryCondition bc;
  bc.side = side;
  const std::string kind = as_string(require(node, "kind", ctx), ctx.child("kind"));
  const bool radiates = kind == "radiation" || kind == "radiation_convection";
  const bool convects = kind == "convection" || kind == "radiation_convection";
  if (kind == "insulated")
    check_keys(node, ctx, { "kind" });
  else if (kind == "fixed_temperature")
  {
    check_keys(node, ctx, { "kind", "temperature" });
    bc.kind = BoundaryCondition::Kind::FixedTemperature;
    bc.temperature = as_number(require(node, "temperature", ctx), ctx.child("temperature"));
  }
  else if (kind == "heat_flow")
  {
    check_keys(node, ctx, { "kind", "heat_flow" });
    bc.kind = BoundaryCondition::Kind::HeatFlux;
    bc.heat_flux = 1e-3 * as_number(require(node, "heat_flow", ctx), ctx.child("heat_flow"));
  }
  else if (radiates || convects)
  {
    if (radiates && convects)
      check_keys(node, ctx, { "kind", "emissivity", "sky_temperature", "transfer_coefficient", "fluid_temperature" });
    else if (radiates)
      check_keys(node, ctx, { "kind", "emissivity", "sky_temperature" });
    else
      check_keys(node, ctx, { "kind", "transfer_coefficient", "fluid_temperature" });
    bc.kind = radiates && convects ? BoundaryCondition::Kind::RadiationConvection
      : radiates                    ? BoundaryCondition::Kind::Radiation
                                    : BoundaryCondition::Kind::Convection;
    if (radiates)
    {
      bc.emissivity = number_or(node, "emissivity", -1.0, ctx); // absent: the rocks' own
      bc.sky_temperature = as_number(require(node, "sky_temperature", ctx), ctx.child("sky_temperature"));
    }
    if (convects)
    {
      bc.transfer_coefficient = positive(node, "transfer_coefficient", ctx);
      bc.fluid_temperature = as_number(require(node, "fluid_temperature", ctx), ctx.child("fluid_temperature"));
    }
  }
  else
    ctx.child("kind").fail(node["kind"], "'" + kind + "' is not a boundary kind (allowed: insulated, "
      "fixed_temperature, heat_flow, radiation, convection, radiation_convection)");
  try
  {
    validate(bc, index);
  }
  catch (const std::invalid_argument& e)
  {
    ctx.fail(node, e.what());
  }
  return bc;
}

std::vector<BoundaryCondition> parse_boundaries(const YAML::Node& node, const YamlContext& ctx,
  const InitialState& initial, double basal_heat_flow)
{
  check_keys(node, ctx, { "top", "bottom", "sides" });
  const bool steady = initial.kind == InitialState::Kind::SteadyState;
  std::vector<BoundaryCondition> list;
  const std::pair<const char*, Side> surfaces[] = { { "top", Side::Top }, { "bottom", Side::Bottom },
    { "sides", Side::Sides } };
  for (const auto& [key, side] : surfaces)
  {
    const YAML::Node bc = node[key];
    if (side == Side::Bottom && steady)
    {
      if (bc)
        ctx.child(key).fail(bc, "with a steady initial state the bottom boundary is the "
          "initial.basal_heat_flow; remove one of them");
      BoundaryCondition basal;
      basal.kind = BoundaryCondition::Kind::HeatFlux;
      basal.side = Side::Bottom;
      basal.heat_flux = basal_heat_flow;
      list.push_back(basal);
      continue;
    }
    if (!bc && side == Side::Sides)
    {
      BoundaryCondition insulated;
      insulated.side = Side::Sides;
      list.push_back(insulated);
      continue;
    }
    list.push_back(parse_boundary(require(node, key, ctx), ctx.child(key), side, list.size()));
  }
  using K = BoundaryCondition::Kind;
  if (steady && list[0].kind != K::FixedTemperature && list[0].kind != K::Convection)
    ctx.child("top").fail(node["top"], "a steady initial state needs a top boundary of kind "
      "fixed_temperature or convection (radiation is non-linear and not solved for steady state)");
  return list;
}

void parse_run(const YAML::Node& node, const YamlContext& ctx, Scenario& s)
{
  check_keys(node, ctx, { "end", "outputs", "integrator", "threads", "arrays" });
  const double end = positive(node, "end", ctx);
  s.end_time = end * kSecondsPerYear;
  const YAML::Node out = require(node, "outputs", ctx);
  const YamlContext octx = ctx.child("outputs");
  std::vector<double> years;
  if (out.IsSequence())
  {
    for (std::size_t i = 0; i < out.size(); ++i)
    {
      const double t = as_number(out[i], octx.item(i));
      const double previous = years.empty() ? 0.0 : years.back();
      if (t <= previous || t > end)
        octx.item(i).fail(out[i], "output times must increase strictly, be > 0 and not pass "
          "run.end (allowed here: " + std::to_string(previous) + " < t <= " + std::to_string(end) + " years)");
      years.push_back(t);
    }
    if (years.empty())
      octx.fail(out, "expected at least one output time");
  }
  else
  {
    check_keys(out, octx, { "first", "count" });
    const double first = positive(out, "first", octx);
    const int count = as_integer(require(out, "count", octx), octx.child("count"));
    if (count < 1 || count > 10000)
      octx.child("count").fail(out["count"], "must lie in [1, 10000]");
    if (first >= end && count > 1)
      octx.child("first").fail(out["first"], "must be before run.end (" + std::to_string(end) + " years)");
    // Log-spaced from first to end, both included: cooling slows roughly with log time.
    for (int i = 0; i < count; ++i)
      years.push_back(count == 1 ? end : first * std::pow(end / first, double(i) / (count - 1)));
    years.back() = end;
  }
  if (years.back() < end)
    years.push_back(end);
  for (const double t : years)
    s.output_times.push_back(t * kSecondsPerYear);
  s.output_times.back() = s.end_time; // exact, whatever the rounding of the spacing

  const std::string integrator = node["integrator"] ? as_string(node["integrator"], ctx.child("integrator")) : "rkl2";
  if (integrator == "rkl2")
    s.integrator = IntegratorKind::RKL2;
  else if (integrator == "forward-euler")
    s.integrator = IntegratorKind::ForwardEuler;
  else
    ctx.child("integrator").fail(node["integrator"],
      "'" + integrator + "' is not an integrator (allowed: rkl2, forward-euler)");
  if (node["threads"])
  {
    s.threads = as_integer(node["threads"], ctx.child("threads"));
    if (s.threads < 0)
      ctx.child("threads").fail(node["threads"], "must be >= 0 (0 = all available)");
  }
  if (const YAML::Node arrays = node["arrays"])
  {
    if (!arrays.IsSequence())
      ctx.child("arrays").fail(arrays, "expected a list of array names, e.g. [Temperature, MeltFraction]");
    for (std::size_t i = 0; i < arrays.size(); ++i)
    {
      const std::string name = as_string(arrays[i], ctx.child("arrays").item(i));
      if (std::find(s.arrays.begin(), s.arrays.end(), name) != s.arrays.end())
        ctx.child("arrays").item(i).fail(arrays[i], "array '" + name + "' is listed twice");
      s.arrays.push_back(name);
    }
  }
}

} // namespace

double MeshControls::effective_cell_size() const { return cell_size / resolution; }

int MeshControls::effective_cells_across() const
{
  return std::max(2, static_cast<int>(std::lround(cells_across * resolution)));
}

std::size_t Scenario::layer_at(double z) const
{
  std::size_t i = 0;
  while (i + 1 < layers.size() && layers[i + 1].z_top >= z)
    ++i;
  return i;
}

SimulationSettings Scenario::settings() const
{
  SimulationSettings s;
  s.output_times = output_times;
  s.threads = threads;
  return s;
}

std::vector<Emplacement> Scenario::emplacements() const
{
  std::vector<Emplacement> list;
  for (const Body& b : bodies)
    list.push_back({ b.region, b.rock, b.time, b.temperature });
  return list;
}

Scenario parse_scenario(const YAML::Node& root, const std::string& file)
{
  const YamlContext ctx{ file, "" };
  check_keys(root, ctx, { "format", "title", "domain", "mesh", "rocks", "layers", "bodies",
    "initial", "boundaries", "run" });
  check_format(root, 1, ctx);
  Scenario s;
  s.file = file;
  if (root["title"])
    s.title = as_string(root["title"], ctx.child("title"));
  s.domain = parse_domain(require(root, "domain", ctx), ctx.child("domain"));
  s.mesh = parse_mesh(require(root, "mesh", ctx), ctx.child("mesh"));
  s.library = parse_rocks(require(root, "rocks", ctx), ctx.child("rocks"), file, s.library_file);
  s.layers = parse_layers(require(root, "layers", ctx), ctx.child("layers"), s.library, s.domain);
  for (const Layer& layer : s.layers)
    s.regions.regions.push_back({ layer.region, layer.name, layer.rock, std::nullopt, layer.organic });

  if (const YAML::Node bodies = root["bodies"])
  {
    const YamlContext bctx = ctx.child("bodies");
    if (!bodies.IsSequence())
      bctx.fail(bodies, "expected a list of bodies");
    for (std::size_t i = 0; i < bodies.size(); ++i)
    {
      Body body = parse_body(bodies[i], bctx.item(i), s);
      body.region = static_cast<int>(s.layers.size() + i);
      for (const RegionEntry& r : s.regions.regions)
        if (r.name == body.name)
          bctx.item(i).child("name").fail(bodies[i]["name"], "the name '" + body.name +
              "' is already used by a layer or body (names must be unique)");
      s.regions.regions.push_back({ body.region, body.name, body.rock,
        RegionEntry::Intrusion{ body.temperature, body.time, body.replaces }, std::nullopt });
      s.bodies.push_back(std::move(body));
    }
  }

  double basal_heat_flow = 0.0;
  s.initial = parse_initial(require(root, "initial", ctx), ctx.child("initial"), s.domain, basal_heat_flow);
  s.boundaries = parse_boundaries(require(root, "boundaries", ctx), ctx.child("boundaries"), s.initial, basal_heat_flow);
  parse_run(require(root, "run", ctx), ctx.child("run"), s);
  return s;
}

Scenario load_scenario(const std::string& file)
{
  return parse_scenario(load_yaml_file(file), file);
}

} // namespace ember::inputs
