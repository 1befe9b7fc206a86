#include "ember/body_summary.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <sstream>

namespace ember
{
namespace
{
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

// Solidification time of a set of nodes: NaN if none was ever molten, +∞ if any still is,
// else the latest.
struct LatestSolidification
{
  bool any = false, still_molten = false;
  double latest = -kInf;
  void add(double t)
  {
    if (std::isnan(t))
      return;
    any = true;
    if (std::isinf(t))
      still_molten = true;
    else
      latest = std::max(latest, t);
  }
  double value() const { return !any ? kNaN : (still_molten ? kInf : latest); }
};

double at(std::span<const double> f, std::size_t i)
{
  return f.empty() ? kNaN : f[i];
}

double distance(const Point& a, const Point& b)
{
  return std::hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
}

// Largest distance from the body's boundary nodes to a host node reached from them through
// host nodes whose value exceeds `limit` (breadth-first over cell neighbours). 0 if none.
double aureole_thickness(const ThermalModel& model, const std::vector<char>& in_body,
  const std::vector<char>& in_any_body, const std::vector<std::size_t>& boundary,
  std::span<const double> value, double limit)
{
  if (value.empty() || boundary.empty()) // not recorded, or a body filling the whole mesh
    return kNaN;
  const Mesh& mesh = model.mesh();
  std::vector<char> seen(model.n_nodes(), 0);
  std::vector<std::size_t> queue(boundary.begin(), boundary.end());
  for (std::size_t i : boundary)
    seen[i] = 1;
  double thickness = 0.0;
  for (std::size_t head = 0; head < queue.size(); ++head)
  {
    const std::size_t i = queue[head];
    if (!in_body[i]) // a reached host node: measure it
    {
      double nearest = kInf;
      for (std::size_t b : boundary)
        nearest = std::min(nearest, distance(mesh.points[i], mesh.points[b]));
      thickness = std::max(thickness, nearest);
    }
    for (const CellSlot& slot : model.cells_of(i))
      for (std::int64_t j : mesh.nodes(slot.cell))
        if (!seen[j] && !in_any_body[j] && value[j] > limit)
        {
          seen[j] = 1;
          queue.push_back(static_cast<std::size_t>(j));
        }
  }
  return thickness;
}
} // namespace

void validate(const BodySummarySettings& s, const Mesh& mesh)
{
  if (!(s.recovery_factor >= 0.0 && s.recovery_factor <= 1.0))
  {
    std::ostringstream msg;
    msg << "body summary: recovery factor " << s.recovery_factor << " must lie in [0, 1]";
    throw std::invalid_argument(msg.str());
  }
  for (int body : s.bodies)
    if (std::find(mesh.cell_region.begin(), mesh.cell_region.end(), body) ==
      mesh.cell_region.end())
      throw std::invalid_argument("body summary: body region " + std::to_string(body) +
        " does not exist (no cell carries this region id)");
  auto finite = [](double v, const char* what) {
    if (!std::isfinite(v))
    {
      std::ostringstream msg;
      msg << "body summary: " << what << " " << v << " is not finite";
      throw std::invalid_argument(msg.str());
    }
  };
  finite(s.reference_temperature, "reference temperature [°C]");
  finite(s.aureole_temperature, "aureole temperature [°C]");
  finite(s.aureole_reflectance, "aureole reflectance [%Ro]");
}

BodySummary summarize_bodies(const ThermalModel& model, double time, const std::vector<double>& T,
  const NodeHistory& history, const BodySummarySettings& settings)
{
  const Mesh& mesh = model.mesh();
  const ElementMatrices& em = model.elements();
  const double T_ref = settings.reference_temperature;
  std::map<int, RegionSummary> by_region; // ascending region id
  std::map<int, double> melt_volume;
  // Cell by cell in ascending order: one fixed summation order, whatever the thread count.
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    const int region = mesh.cell_region[c];
    RegionSummary& row = by_region[region];
    row.region = region;
    const Rock& rock = model.rocks()[model.cell_rock()[c]];
    const double h_ref = specific_enthalpy(rock, T_ref);
    const auto nodes = mesh.nodes(c);
    for (std::size_t a = 0; a < nodes.size(); ++a)
    {
      const double V = em.nodal_volume[mesh.cell_offsets[c] + a];
      const double Ta = T[nodes[a]];
      row.volume += V;
      melt_volume[region] += V * melt_fraction(rock, Ta);
      row.heat_in_place += rock.density * V * (specific_enthalpy(rock, Ta) - h_ref);
    }
  }

  // Node membership per region (a node belongs to every region among its cells).
  std::vector<char> in_any_body(model.n_nodes(), 0);
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    if (std::find(settings.bodies.begin(), settings.bodies.end(), mesh.cell_region[c]) !=
      settings.bodies.end())
      for (std::int64_t j : mesh.nodes(c))
        in_any_body[j] = 1;

  BodySummary out;
  out.time = time;
  RegionSummary& total = out.model;
  total.region = -1;
  double total_melt = 0.0;
  LatestSolidification all_nodes;
  for (std::size_t i = 0; i < model.n_nodes(); ++i)
    if (!model.cells_of(i).empty())
      all_nodes.add(at(history.solidification_time, i));
  total.solidification_time = all_nodes.value();
  total.contact_temperature = total.aureole_thickness_temperature =
    total.aureole_thickness_reflectance = kNaN;

  for (auto& [region, row] : by_region)
  {
    row.melt_volume_fraction = row.volume > 0.0 ? melt_volume[region] / row.volume : 0.0;
    row.recoverable_heat = settings.recovery_factor * row.heat_in_place;
    total.volume += row.volume;
    total_melt += melt_volume[region];
    total.heat_in_place += row.heat_in_place;

    // Nodes of the region, and its boundary nodes (also in a cell of another region).
    std::vector<char> in_region(model.n_nodes(), 0);
    std::vector<std::size_t> boundary;
    LatestSolidification nodes;
    for (std::size_t i = 0; i < model.n_nodes(); ++i)
    {
      bool inside = false, outside = false;
      for (const CellSlot& slot : model.cells_of(i))
        (mesh.cell_region[slot.cell] == region ? inside : outside) = true;
      if (!inside)
        continue;
      in_region[i] = 1;
      nodes.add(at(history.solidification_time, i));
      if (outside)
        boundary.push_back(i);
    }
    row.solidification_time = nodes.value();
    row.contact_temperature = row.aureole_thickness_temperature =
      row.aureole_thickness_reflectance = kNaN;
    if (std::find(settings.bodies.begin(), settings.bodies.end(), region) ==
      settings.bodies.end())
      continue;
    double contact = boundary.empty() ? kNaN : -kInf;
    for (std::size_t i : boundary)
      contact = std::max(contact, at(history.peak_temperature, i));
    row.contact_temperature = contact;
    row.aureole_thickness_temperature = aureole_thickness(model, in_region, in_any_body,
      boundary, history.peak_temperature, settings.aureole_temperature);
    row.aureole_thickness_reflectance = aureole_thickness(
      model, in_region, in_any_body, boundary, history.reflectance, settings.aureole_reflectance);
    // fmax ignores NaN: the model's value is the largest over the bodies that have one.
    total.contact_temperature = std::fmax(total.contact_temperature, row.contact_temperature);
    total.aureole_thickness_temperature =
      std::fmax(total.aureole_thickness_temperature, row.aureole_thickness_temperature);
    total.aureole_thickness_reflectance =
      std::fmax(total.aureole_thickness_reflectance, row.aureole_thickness_reflectance);
  }
  total.melt_volume_fraction = total.volume > 0.0 ? total_melt / total.volume : 0.0;
  total.recoverable_heat = settings.recovery_factor * total.heat_in_place;
  for (auto& [region, row] : by_region)
    out.regions.push_back(row);
  return out;
}

} // namespace ember
