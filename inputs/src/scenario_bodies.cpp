// Reading the `bodies:` list of a scenario: one shape per type, checked against the domain.
#include "scenario_parts.h"

#include <cmath>
#include <numbers>
#include <sstream>

namespace ember::inputs::detail
{
namespace
{

constexpr double kDegree = std::numbers::pi / 180.0;

struct Placement
{
  std::array<double, 2> centre;
  double z;
};

/// `centre: [x, y]` and `depth:` (below the domain top) → plan centre and elevation.
Placement placement(const YAML::Node& node, const YamlContext& ctx, const Domain& domain)
{
  return { number_pair(require(node, "centre", ctx), ctx.child("centre")),
    domain.top - as_number(require(node, "depth", ctx), ctx.child("depth")) };
}

Sill parse_sill(const YAML::Node& node, const YamlContext& ctx, const Domain& domain)
{
  check_keys(node, ctx, { "name", "type", "rock", "temperature", "time", "centre", "depth",
    "radius", "thickness", "saucer" });
  Sill s;
  const Placement p = placement(node, ctx, domain);
  s.centre = p.centre;
  s.z = p.z;
  s.radius = positive(node, "radius", ctx);
  s.thickness = positive(node, "thickness", ctx);
  s.inner_radius = s.radius;
  if (const YAML::Node saucer = node["saucer"])
  {
    const YamlContext sctx = ctx.child("saucer");
    check_keys(saucer, sctx, { "inner_radius", "inclination", "rim_rise" });
    s.inner_radius = positive(saucer, "inner_radius", sctx);
    if (s.inner_radius >= s.radius)
      sctx.child("inner_radius").fail(saucer["inner_radius"],
        "the saucer's flat floor must be smaller than the sill's radius (" +
          std::to_string(s.radius) + " m)");
    if (saucer["inclination"].IsDefined() == saucer["rim_rise"].IsDefined())
      sctx.fail(saucer, "give exactly one of 'inclination' (degrees) or 'rim_rise' (m)");
    if (saucer["inclination"])
      s.inclination = angle_or(saucer, "inclination", 0.0, 0.0, 80.0, sctx);
    else
      s.inclination = std::atan(positive(saucer, "rim_rise", sctx) / (s.radius - s.inner_radius));
  }
  return s;
}

Dike parse_dike(const YAML::Node& node, const YamlContext& ctx, const Domain& domain)
{
  check_keys(node, ctx, { "name", "type", "rock", "temperature", "time", "centre", "depth",
    "strike", "dip", "width", "length", "height" });
  Dike d;
  const Placement p = placement(node, ctx, domain);
  d.centre = p.centre;
  d.z = p.z;
  d.strike = angle_or(node, "strike", 0.0, -360.0, 360.0, ctx);
  d.dip = angle_or(node, "dip", 90.0, 0.0, 90.0, ctx);
  d.width = positive(node, "width", ctx);
  d.length = positive(node, "length", ctx);
  d.height = positive(node, "height", ctx);
  return d;
}

Pluton parse_pluton(const YAML::Node& node, const YamlContext& ctx, const Domain& domain)
{
  check_keys(node, ctx, { "name", "type", "rock", "temperature", "time", "centre", "depth",
    "semi_axes", "strike" });
  Pluton b;
  const Placement p = placement(node, ctx, domain);
  b.centre = p.centre;
  b.z = p.z;
  const YAML::Node axes = require(node, "semi_axes", ctx);
  const YamlContext actx = ctx.child("semi_axes");
  if (!axes.IsSequence() || axes.size() != 3)
    actx.fail(axes, "expected three semi-axes [a, b, c] in metres (along strike, across, vertical)");
  for (std::size_t i = 0; i < 3; ++i)
  {
    b.semi_axes[i] = as_number(axes[i], actx.item(i));
    if (b.semi_axes[i] <= 0.0)
      actx.item(i).fail(axes[i], "a semi-axis must be > 0 m");
  }
  b.strike = angle_or(node, "strike", 0.0, -360.0, 360.0, ctx);
  return b;
}

LavaFlow parse_lava_flow(const YAML::Node& node, const YamlContext& ctx, const Domain& domain)
{
  check_keys(node, ctx, { "name", "type", "rock", "temperature", "time", "outline", "thickness",
    "base_depth" });
  LavaFlow f;
  const YAML::Node outline = require(node, "outline", ctx);
  const YamlContext octx = ctx.child("outline");
  if (!outline.IsSequence() || outline.size() < 3)
    octx.fail(outline, "expected a polygon: a list of at least three [x, y] points in metres");
  for (std::size_t i = 0; i < outline.size(); ++i)
    f.outline.push_back(number_pair(outline[i], octx.item(i)));
  if (f.plan_area() <= 0.0)
    octx.fail(outline, "the outline encloses no area");
  f.thickness = positive(node, "thickness", ctx);
  if (const YAML::Node base = node["base_depth"])
  {
    f.on_surface = false;
    f.base_z = domain.top - as_number(base, ctx.child("base_depth"));
  }
  else
    f.base_z = domain.top; // standing on the ground surface
  return f;
}

std::string range_text(double lo, double hi)
{
  std::ostringstream s;
  s << "[" << lo << ", " << hi << "]";
  return s.str();
}

void check_inside(const Shape& shape, const YamlContext& ctx, const YAML::Node& node,
  const Domain& domain)
{
  const auto [lo, hi] = bounding_box(shape);
  const bool on_surface = std::holds_alternative<LavaFlow>(shape) && std::get<LavaFlow>(shape).on_surface;
  const double z_hi = on_surface ? std::get<LavaFlow>(shape).base_z + std::get<LavaFlow>(shape).thickness
                                 : domain.top;
  const double dlo[3] = { domain.x[0], domain.y[0], domain.bottom };
  const double dhi[3] = { domain.x[1], domain.y[1], z_hi };
  // Round-off slack: a body touching the domain's face exactly is inside.
  const double slack = 1e-9 * (domain.x[1] - domain.x[0] + domain.y[1] - domain.y[0] + domain.top - domain.bottom);
  for (int a = 0; a < 3; ++a)
    if (lo[a] < dlo[a] - slack || hi[a] > dhi[a] + slack)
    {
      const std::string axis = a < 2 ? std::string(1, "xy"[a]) : "depth";
      const double l = a < 2 ? lo[a] : domain.top - hi[a], h = a < 2 ? hi[a] : domain.top - lo[a];
      const double dl = a < 2 ? dlo[a] : domain.top - dhi[a], dh = a < 2 ? dhi[a] : domain.top - dlo[a];
      ctx.fail(node, std::string("the ") + shape_name(shape) + " reaches outside the domain: its " +
          axis + " extent " + range_text(l, h) + " m is not within the domain's " + range_text(dl, dh) +
          " m (allowed: bodies wholly inside the domain; lava flows may stand on the ground)");
    }
}

} // namespace

Body parse_body(const YAML::Node& node, const YamlContext& ctx, const Scenario& scenario)
{
  const std::string type = as_string(require(node, "type", ctx), ctx.child("type"));
  Body body;
  if (type == "sill")
    body.shape = parse_sill(node, ctx, scenario.domain);
  else if (type == "dike")
    body.shape = parse_dike(node, ctx, scenario.domain);
  else if (type == "pluton")
    body.shape = parse_pluton(node, ctx, scenario.domain);
  else if (type == "lava_flow")
    body.shape = parse_lava_flow(node, ctx, scenario.domain);
  else
    ctx.child("type").fail(node["type"],
      "'" + type + "' is not a body type (allowed: sill, dike, pluton, lava_flow)");
  check_inside(body.shape, ctx, node, scenario.domain);

  body.name = as_string(require(node, "name", ctx), ctx.child("name"));
  body.location = ctx.origin + ":" + std::to_string(node.Mark().line + 1) + ":" +
    std::to_string(node.Mark().column + 1) + ": " + ctx.path;
  body.rock = rock_index(require(node, "rock", ctx), scenario.library, ctx.child("rock"));
  const RegionEntry::Intrusion timing = parse_emplacement(node, ctx);
  body.temperature = timing.temperature;
  body.time = timing.time;

  // Before its emplacement a body's cells hold the rock of the layer at its centre.
  const auto [lo, hi] = bounding_box(body.shape);
  const auto* flow = std::get_if<LavaFlow>(&body.shape);
  if (flow && flow->on_surface && body.time > 0.0)
    ctx.child("time").fail(node["time"], "a lava flow standing on the ground must be emplaced at "
      "time 0 (before then its cells would be air, which the model does not hold); give it a "
      "base_depth to place it inside the domain, or start the model when it arrives");
  body.replaces = body.time > 0.0 ? scenario.layers[scenario.layer_at(0.5 * (lo[2] + hi[2]))].rock : body.rock;
  return body;
}

} // namespace ember::inputs::detail
