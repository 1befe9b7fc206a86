// The model builder: grading, cells across bodies, rasterised volumes against the shapes'
// formulas, layers by depth, air beside lava flows. (Geometry checks: the reference values are
// the textbook volume formulas, computed here.)
#include "ember/inputs/model_builder.h"
#include "sample_rocks.h"
#include "volume_check.h"

#include <gtest/gtest.h>

#include <cmath>
#include <numbers>

using namespace ember;
using namespace ember::inputs;
using ember::testing::expect_volume;
using ember::testing::max_cell_in;

namespace
{
/// A scenario with one body (YAML lines `body`, indented as a list item) in a 2 km box.
Scenario with_body(const std::string& body, const std::string& mesh = "{cell_size: 200}")
{
  const std::string text = "format: 1\n"
                           "domain: {x: [-1000, 1000], y: [-1000, 1000], depth: 2000}\n"
                           "mesh: " + mesh + "\n"
                           "rocks:\n" + ember::testing::kSampleRockList +
    "layers:\n  - {name: Upper, rock: shale, top: 0}\n  - {name: Lower, rock: dolerite, top: 1230}\n"
    "bodies:\n" + body +
    "initial: {kind: geotherm, surface_temperature: 10, gradient: 30}\n"
    "boundaries: {top: {kind: fixed_temperature, temperature: 10}, bottom: {kind: heat_flow, heat_flow: 60}}\n"
    "run: {end: 1000, outputs: {first: 1, count: 4}}\n";
  return parse_scenario(load_yaml_text(text, "t.yaml"), "t.yaml");
}

double max_ratio(const std::vector<double>& line)
{
  double r = 1.0;
  for (std::size_t i = 2; i < line.size(); ++i)
  {
    const double a = line[i - 1] - line[i - 2], b = line[i] - line[i - 1];
    r = std::max(r, std::max(a / b, b / a));
  }
  return r;
}

double max_cell(const std::vector<double>& line)
{
  double h = 0.0;
  for (std::size_t i = 1; i < line.size(); ++i)
    h = std::max(h, line[i] - line[i - 1]);
  return h;
}

/// Shadow areas of a slab: Σ over its face pairs of face area × |normal component|.
std::array<double, 3> slab_shadow(const Dike& d)
{
  const Point n = d.normal(), st = d.strike_vector(), dd = d.dip_vector();
  std::array<double, 3> a{};
  for (int k = 0; k < 3; ++k)
    a[k] = d.length * d.height * std::abs(n[k]) + d.width * d.height * std::abs(st[k]) +
      d.width * d.length * std::abs(dd[k]);
  return a;
}

int region_at(const BuiltModel& m, double x, double y, double z)
{
  for (std::size_t c = 0; c < m.mesh.n_cells(); ++c)
  {
    const Point& a = m.mesh.points[m.mesh.nodes(c)[0]];
    const Point& b = m.mesh.points[m.mesh.nodes(c)[6]];
    if (a[0] <= x && x < b[0] && a[1] <= y && y < b[1] && a[2] <= z && z < b[2])
      return m.mesh.cell_region[c];
  }
  return -1;
}
} // namespace

TEST(GradedLine, RespectsZoneSizesFarSizeAndGrowth)
{
  for (const double g : { 1.1, 1.25, 1.3 })
  {
    const std::vector<AxisZone> zones = { { -10, 10, 1.0 }, { 300, 420, 7.0 } };
    const auto line = graded_line(-1000, 1000, 50, g, zones, { -10.0, 10.0 });
    EXPECT_DOUBLE_EQ(line.front(), -1000);
    EXPECT_DOUBLE_EQ(line.back(), 1000);
    for (std::size_t i = 1; i < line.size(); ++i)
      ASSERT_GT(line[i], line[i - 1]);
    EXPECT_LE(max_ratio(line), g) << "growth " << g;
    EXPECT_LE(max_cell(line), 50 * (1 + 1e-9));
    EXPECT_LE(max_cell_in(line, -10, 10), 1.0 * (1 + 1e-9));
    EXPECT_LE(max_cell_in(line, 300, 420), 7.0 * (1 + 1e-9));
    // The zone's faces are nodes, with exactly 20 uniform cells between them.
    const auto lo = std::find(line.begin(), line.end(), -10.0), hi = std::find(line.begin(), line.end(), 10.0);
    ASSERT_NE(lo, line.end());
    ASSERT_NE(hi, line.end());
    EXPECT_EQ(hi - lo, 20);
  }
  // A fixed node too close to the end for its segment to round well is dropped, not forced.
  const auto line = graded_line(0, 100, 20, 1.25, {}, { 99.0 });
  EXPECT_EQ(std::find(line.begin(), line.end(), 99.0), line.end());
  EXPECT_LE(max_ratio(line), 1.25);
}

TEST(ModelBuilder, FlatSillHasEnoughCellsAcrossAndItsVolume)
{
  const Scenario s = with_body("  - {name: S, type: sill, rock: dolerite, temperature: 1150, "
                               "centre: [50, -30], depth: 800, radius: 600, thickness: 20}\n");
  const BuiltModel m = build_model(s);
  validate_mesh(m.mesh);
  int across = 0; // cells of the sill in the column through its centre
  for (std::size_t c = 0; c < m.mesh.n_cells(); ++c)
  {
    const Point& a = m.mesh.points[m.mesh.nodes(c)[0]];
    const Point& b = m.mesh.points[m.mesh.nodes(c)[6]];
    if (a[0] <= 50 && b[0] > 50 && a[1] <= -30 && b[1] > -30 && m.mesh.cell_region[c] == 2)
      ++across;
  }
  EXPECT_GE(across, 8);
  for (int a = 0; a < 3; ++a)
    EXPECT_LE(max_ratio(m.lines[a]), s.mesh.max_growth);
  // Floor and roof lie on node planes (no z term).
  const double R = 600, t = 20;
  const double coarse = expect_volume(s, m, { 2 * R * t, 2 * R * t, 0.0 }, "flat sill");

  // Finer: the volume error shrinks with the cell size.
  Scenario fine = s;
  fine.mesh.resolution = 2.0;
  const BuiltModel mf = build_model(fine);
  const double finer = expect_volume(fine, mf, { 2 * R * t, 2 * R * t, 0.0 }, "flat sill, resolution 2");
  EXPECT_LT(std::abs(finer), std::abs(coarse));
}

TEST(ModelBuilder, PlutonDikeLavaAndSaucerVolumes)
{
  {
    const Scenario s = with_body("  - {name: P, type: pluton, rock: dolerite, temperature: 900, "
                                 "centre: [0, 0], depth: 1000, semi_axes: [700, 400, 300], strike: 30}\n");
    const auto box = bounding_box(s.bodies[0].shape);
    const double hx = 0.5 * (box[1][0] - box[0][0]), hy = 0.5 * (box[1][1] - box[0][1]);
    // Shadows of an ellipsoid with a vertical axis c: along z π a b; along x π hy c; along y π hx c.
    const double pi = std::numbers::pi;
    expect_volume(s, build_model(s), { pi * hy * 300, pi * hx * 300, pi * 700 * 400 }, "pluton");
  }
  for (const char* orientation : { "strike: 0, dip: 90", "strike: 30, dip: 90", "strike: 90, dip: 60" })
  {
    const Scenario s = with_body(std::string("  - {name: D, type: dike, rock: dolerite, temperature: 1100, "
                                             "centre: [0, 0], depth: 1000, ") + orientation +
      ", width: 10, length: 800, height: 600}\n");
    auto shadow = slab_shadow(std::get<Dike>(s.bodies[0].shape));
    const BuiltModel m = build_model(s);
    if (std::string(orientation) == "strike: 0, dip: 90")
    {
      shadow[0] = 0.0; // its faces lie on node planes x = ±5
      int across = 0;  // cells of the dike along x through its centre
      for (std::size_t i = 1; i < m.lines[0].size(); ++i)
        across += region_at(m, 0.5 * (m.lines[0][i - 1] + m.lines[0][i]), 0.5, -1000.5) == 2;
      EXPECT_GE(across, 8);
    }
    expect_volume(s, m, shadow, orientation);
  }
  {
    const Scenario s = with_body("  - {name: S, type: sill, rock: dolerite, temperature: 1150, centre: [0, 0], "
                                 "depth: 900, radius: 800, thickness: 30, saucer: {inner_radius: 400, inclination: 20}}\n");
    // Floor and rim: shadow along z π R², sideways the rim's height plus thickness over 2R.
    const double R = 800, side = 2 * R * (std::get<Sill>(s.bodies[0].shape).rim_rise() + 30);
    expect_volume(s, build_model(s), { side, side, std::numbers::pi * R * R }, "saucer sill");
  }
}

TEST(ModelBuilder, LavaFlowStandsOnTheGroundWithAirBeside)
{
  const Scenario s = with_body("  - {name: L, type: lava_flow, rock: dolerite, temperature: 1150, "
                               "outline: [[-500, -300], [400, -350], [600, 200], [-100, 500]], thickness: 4}\n");
  const BuiltModel m = build_model(s);
  const MeshReport report = validate_mesh(m.mesh);
  EXPECT_EQ(report.n_pieces, 1u);
  EXPECT_TRUE(report.unreferenced_points.empty());
  // Every cell above the ground is lava; the top of the lava and the ground are node planes.
  for (std::size_t c = 0; c < m.mesh.n_cells(); ++c)
  {
    if (m.mesh.points[m.mesh.nodes(c)[6]][2] > 1e-9)
    {
      ASSERT_EQ(m.mesh.cell_region[c], 2) << "cell " << c;
    }
  }
  EXPECT_NE(std::find(m.lines[2].begin(), m.lines[2].end(), 0.0), m.lines[2].end());
  EXPECT_DOUBLE_EQ(m.lines[2].back(), 4.0);
  expect_volume(s, m, { 850 * 4.0, 1100 * 4.0, 0.0 }, "lava flow"); // base and top on node planes
  EXPECT_EQ(region_at(m, 0, 0, 2), 2);
  EXPECT_EQ(region_at(m, 0, 0, -2), 0);
  EXPECT_EQ(region_at(m, -900, -900, 2), -1); // air: no cell there
}

TEST(ModelBuilder, LayersByDepthAndLaterBodiesOverrideEarlierOnes)
{
  const Scenario s = with_body(
    "  - {name: A, type: sill, rock: dolerite, temperature: 1150, centre: [0, 0], depth: 800, radius: 600, thickness: 40}\n"
    "  - {name: B, type: dike, rock: shale, temperature: 900, centre: [0, 0], depth: 800, strike: 0, dip: 90, "
    "width: 20, length: 400, height: 200}\n");
  const BuiltModel m = build_model(s);
  ASSERT_EQ(m.region_names, (std::vector<std::string>{ "Upper", "Lower", "A", "B" }));
  for (std::size_t c = 0; c < m.mesh.n_cells(); ++c)
  {
    const int r = m.mesh.cell_region[c];
    if (r > 1)
      continue;
    const double zc = 0.5 * (m.mesh.points[m.mesh.nodes(c)[0]][2] + m.mesh.points[m.mesh.nodes(c)[6]][2]);
    ASSERT_EQ(r, zc > -1230 ? 0 : 1) << "cell " << c << " centre z " << zc;
  }
  EXPECT_EQ(region_at(m, 0, 0, -800), 3);   // the dike, written after the sill, wins
  EXPECT_EQ(region_at(m, 300, 0, -800), 2); // the sill beside it
  EXPECT_EQ(region_at(m, 300, 0, -700), 0);

  const ModelSummary summary = describe(s, m);
  double total = 0.0;
  for (const RegionCells& r : summary.regions)
    total += r.volume;
  EXPECT_NEAR(total, 2000.0 * 2000.0 * 2000.0, 1e-6 * total); // the cells fill the box
  EXPECT_EQ(summary.cells, m.mesh.n_cells());
  EXPECT_GT(summary.memory_bytes, 800.0 * double(summary.cells));
  EXPECT_GT(summary.stable_time_step, 0.0);
  EXPECT_NE(summary_text(summary).find("region 3 'B' (body)"), std::string::npos) << summary_text(summary);
}

TEST(ModelBuilder, TooManyCellsAndHiddenBodiesAreRefused)
{
  Scenario s = with_body("  - {name: S, type: sill, rock: dolerite, temperature: 1150, "
                         "centre: [0, 0], depth: 800, radius: 600, thickness: 20}\n");
  s.mesh.cell_size = 1.0;
  EXPECT_THROW(build_model(s), InputError);
  const Scenario hidden = with_body(
    "  - {name: A, type: sill, rock: dolerite, temperature: 1150, centre: [0, 0], depth: 800, radius: 100, thickness: 20}\n"
    "  - {name: B, type: pluton, rock: shale, temperature: 900, centre: [0, 0], depth: 800, semi_axes: [300, 300, 300]}\n");
  try
  {
    build_model(hidden);
    FAIL() << "no error";
  }
  catch (const InputError& e)
  {
    EXPECT_EQ(std::string(e.what()).rfind("t.yaml:", 0), 0u) << e.what();
    EXPECT_NE(std::string(e.what()).find(": bodies[0]: body 'A' has no cell left"), std::string::npos) << e.what();
  }
}
