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

double euclidean(const Point& a, const Point& b)
{
  return std::hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);
}

// Distance from a query point to the nearest of a fixed set of points, by a uniform bucket
// grid (about one point per bucket for points filling a volume; fewer for a surface) searched
// in growing cubic rings around the query's bucket until no closer point can remain. Replaces
// a brute-force scan over all boundary nodes for every aureole node.
class NearestPoint
{
public:
  explicit NearestPoint(std::vector<Point> points)
    : points_(std::move(points))
  {
    lo_ = hi_ = points_.front();
    for (const Point& p : points_)
      for (int d = 0; d < 3; ++d)
      {
        lo_[d] = std::min(lo_[d], p[d]);
        hi_[d] = std::max(hi_[d], p[d]);
      }
    const double extent = std::max({ hi_[0] - lo_[0], hi_[1] - lo_[1], hi_[2] - lo_[2] });
    const double per_axis = std::max(1.0, std::cbrt(double(points_.size())));
    size_ = extent > 0.0 ? extent / per_axis : 1.0;
    for (int d = 0; d < 3; ++d)
      dims_[d] = static_cast<std::int64_t>((hi_[d] - lo_[d]) / size_) + 1;
    // Counting sort of the points into buckets (CSR).
    offsets_.assign(dims_[0] * dims_[1] * dims_[2] + 1, 0);
    std::vector<std::int64_t> bucket(points_.size());
    for (std::size_t i = 0; i < points_.size(); ++i)
    {
      const auto c = cell_of(points_[i]);
      bucket[i] = (c[2] * dims_[1] + c[1]) * dims_[0] + c[0];
      ++offsets_[bucket[i] + 1];
    }
    for (std::size_t b = 1; b < offsets_.size(); ++b)
      offsets_[b] += offsets_[b - 1];
    order_.resize(points_.size());
    std::vector<std::int64_t> fill(offsets_.begin(), offsets_.end() - 1);
    for (std::size_t i = 0; i < points_.size(); ++i)
      order_[fill[bucket[i]]++] = i;
  }

  double distance(const Point& q) const
  {
    std::array<std::int64_t, 3> c;
    std::int64_t r_max = 0;
    for (int d = 0; d < 3; ++d)
    {
      c[d] = static_cast<std::int64_t>(std::floor((q[d] - lo_[d]) / size_));
      r_max = std::max({ r_max, std::abs(c[d]), std::abs(c[d] - (dims_[d] - 1)) });
    }
    double best = kInf;
    for (std::int64_t r = 0; r <= r_max; ++r)
    {
      // every bucket at Chebyshev distance r from the query's (possibly outside the grid)
      for (std::int64_t k = std::max<std::int64_t>(0, c[2] - r);
           k <= std::min(dims_[2] - 1, c[2] + r); ++k)
        for (std::int64_t j = std::max<std::int64_t>(0, c[1] - r);
             j <= std::min(dims_[1] - 1, c[1] + r); ++j)
          for (std::int64_t i = std::max<std::int64_t>(0, c[0] - r);
               i <= std::min(dims_[0] - 1, c[0] + r); ++i)
          {
            if (std::max({ std::abs(i - c[0]), std::abs(j - c[1]), std::abs(k - c[2]) }) != r)
              continue;
            const std::int64_t b = (k * dims_[1] + j) * dims_[0] + i;
            for (std::int64_t n = offsets_[b]; n < offsets_[b + 1]; ++n)
              best = std::min(best, euclidean(q, points_[order_[n]]));
          }
      // Buckets beyond ring r lie at least r bucket sizes from the query.
      if (best <= r * size_)
        break;
    }
    return best;
  }

private:
  std::array<std::int64_t, 3> cell_of(const Point& p) const
  {
    std::array<std::int64_t, 3> c;
    for (int d = 0; d < 3; ++d)
      c[d] = std::clamp<std::int64_t>(
        static_cast<std::int64_t>((p[d] - lo_[d]) / size_), 0, dims_[d] - 1);
    return c;
  }

  std::vector<Point> points_;
  Point lo_{}, hi_{};
  double size_ = 1.0;
  std::array<std::int64_t, 3> dims_{};
  std::vector<std::int64_t> offsets_;
  std::vector<std::size_t> order_;
};

// Largest distance from the body's boundary nodes to a host node reached from them through
// host nodes whose value exceeds `limit` (breadth-first over cell neighbours). 0 if none.
double aureole_thickness(const ThermalModel& model, const NodeCells& cells,
  const std::vector<char>& in_any_body,
  const std::vector<std::size_t>& boundary, const NearestPoint& nearest,
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
    if (!in_any_body[i]) // a reached host node, not a boundary node we started from
      thickness = std::max(thickness, nearest.distance(mesh.points[i]));
    for (const CellSlot& slot : cells.of(i))
      for (std::int64_t j : mesh.nodes(slot.cell))
        if (!seen[j] && !in_any_body[j] && value[j] > limit)
        {
          seen[j] = 1;
          queue.push_back(static_cast<std::size_t>(j));
        }
  }
  return thickness;
}

struct Contact
{
  double temperature = kNaN, distance = kNaN;
};

// Highest peak temperature among the host-side contact nodes: nodes of no body joined by a
// cell edge to one of the body's boundary nodes (`in_any_body` also marks the boundary nodes,
// so they are never candidates). Ties go to the node nearer the contact, then to the lower
// node id, so the choice does not depend on the visiting order.
Contact host_side_contact(const ThermalModel& model, const NodeCells& cells,
  const std::vector<char>& in_any_body,
  const std::vector<std::size_t>& boundary, const NearestPoint& nearest,
  std::span<const double> peak)
{
  Contact best;
  if (peak.empty())
    return best;
  const Mesh& mesh = model.mesh();
  std::vector<std::size_t> candidates;
  for (std::size_t b : boundary)
    for (const CellSlot& slot : cells.of(b))
    {
      const auto nodes = mesh.nodes(slot.cell);
      for (const auto& edge : cell_edges(mesh.cell_types[slot.cell]))
      {
        const int local = static_cast<int>(slot.local);
        int other = -1;
        if (edge[0] == local)
          other = edge[1];
        else if (edge[1] == local)
          other = edge[0];
        if (other >= 0 && !in_any_body[nodes[other]])
          candidates.push_back(static_cast<std::size_t>(nodes[other]));
      }
    }
  std::sort(candidates.begin(), candidates.end());
  candidates.erase(std::unique(candidates.begin(), candidates.end()), candidates.end());
  for (std::size_t i : candidates)
  {
    const double T = peak[i];
    if (std::isnan(T) || T < best.temperature)
      continue;
    const double d = nearest.distance(mesh.points[i]);
    if (std::isnan(best.temperature) || T > best.temperature || d < best.distance)
      best = { T, d };
  }
  return best;
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
  const NodeCells cells(mesh); // built per summary, not kept by the model (memory)
  const std::vector<double>& cell_node_volume = model.cell_node_volumes();
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
      const double V = cell_node_volume[mesh.cell_offsets[c] + a];
      const double Ta = T[nodes[a]];
      row.volume += V;
      melt_volume[region] += V * melt_fraction(rock, Ta);
      row.heat_in_place += rock.density * V * (specific_enthalpy(rock, Ta) - h_ref);
    }
  }

  const auto is_body = [&settings](int region) {
    return std::find(settings.bodies.begin(), settings.bodies.end(), region) !=
      settings.bodies.end();
  };
  // Node membership per region (a node belongs to every region among its cells).
  std::vector<char> in_any_body(model.n_nodes(), 0);
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    if (is_body(mesh.cell_region[c]))
      for (std::int64_t j : mesh.nodes(c))
        in_any_body[j] = 1;

  BodySummary out;
  out.time = time;
  RegionSummary& total = out.model;
  total.region = -1;
  double total_melt = 0.0;
  total.contact_temperature = total.contact_distance = total.aureole_thickness_temperature =
    total.aureole_thickness_reflectance = kNaN;

  // One pass over the nodes: a node belongs to every region among its cells, and lies on the
  // boundary of each of them if its cells carry more than one region.
  LatestSolidification all_nodes; // nodes with a control volume
  std::map<int, LatestSolidification> solidification;
  std::map<int, std::vector<std::size_t>> boundary_of;
  std::vector<int> here;
  for (std::size_t i = 0; i < model.n_nodes(); ++i)
  {
    here.clear();
    for (const CellSlot& slot : cells.of(i))
      if (std::find(here.begin(), here.end(), mesh.cell_region[slot.cell]) == here.end())
        here.push_back(mesh.cell_region[slot.cell]);
    if (!here.empty())
      all_nodes.add(at(history.solidification_time, i));
    for (int region : here)
    {
      // A node on a body's contact carries the body's share of magma: its melting and
      // solidification belong to the body, not to the host region around it.
      if (is_body(region) || !in_any_body[i])
        solidification[region].add(at(history.solidification_time, i));
      if (here.size() > 1)
        boundary_of[region].push_back(i);
    }
  }

  total.solidification_time = all_nodes.value();

  for (auto& [region, row] : by_region)
  {
    row.melt_volume_fraction = row.volume > 0.0 ? melt_volume[region] / row.volume : 0.0;
    row.recoverable_heat = settings.recovery_factor * row.heat_in_place;
    total.volume += row.volume;
    total_melt += melt_volume[region];
    total.heat_in_place += row.heat_in_place;

    row.solidification_time = solidification[region].value();
    const std::vector<std::size_t>& boundary = boundary_of[region];
    row.contact_temperature = row.contact_distance = row.aureole_thickness_temperature =
      row.aureole_thickness_reflectance = kNaN;
    if (!is_body(region) ||
      boundary.empty()) // not a body, or a body filling the whole mesh
      continue;
    std::vector<Point> boundary_points;
    for (std::size_t b : boundary)
      boundary_points.push_back(mesh.points[b]);
    const NearestPoint nearest(std::move(boundary_points));
    const Contact contact =
      host_side_contact(model, cells, in_any_body, boundary, nearest, history.peak_temperature);
    row.contact_temperature = contact.temperature;
    row.contact_distance = contact.distance;
    row.aureole_thickness_temperature = aureole_thickness(model, cells, in_any_body, boundary, nearest,
      history.peak_temperature, settings.aureole_temperature);
    row.aureole_thickness_reflectance = aureole_thickness(model, cells, in_any_body, boundary, nearest,
      history.reflectance, settings.aureole_reflectance);
    // The model's contact is the largest over the bodies that have one (NaN ignored), with
    // the distance of the node that gave it; the first body in region order wins a tie.
    if (!std::isnan(row.contact_temperature) &&
      !(row.contact_temperature <= total.contact_temperature))
    {
      total.contact_temperature = row.contact_temperature;
      total.contact_distance = row.contact_distance;
    }
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
