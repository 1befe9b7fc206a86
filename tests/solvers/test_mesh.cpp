// Mesh construction, VTK import and validation.
#include "ember/mesh.h"

#include <gtest/gtest.h>

#include <numeric>
#include <set>
#include <string>
#include <utility>

using namespace ember;

namespace
{

/// Runs f, expects a MeshError and returns its message (empty if none was thrown).
template <class F> std::string mesh_error(F&& f)
{
  try
  {
    f();
  }
  catch (const MeshError& e)
  {
    return e.what();
  }
  ADD_FAILURE() << "expected MeshError";
  return {};
}

bool contains(const std::string& s, const std::string& part) { return s.find(part) != std::string::npos; }

const std::vector<Point> unit_cube_hex = { { 0, 0, 0 }, { 1, 0, 0 }, { 1, 1, 0 }, { 0, 1, 0 },
  { 0, 0, 1 }, { 1, 0, 1 }, { 1, 1, 1 }, { 0, 1, 1 } };

/// n_cells unit tets side by side along x (each with its own 4 points); VTK arrays.
struct VtkArrays
{
  std::vector<Point> points;
  std::vector<std::uint8_t> types;
  std::vector<std::int64_t> offsets{ 0 };
  std::vector<std::int64_t> conn;
  std::vector<int> regions;
  void add(std::uint8_t type, std::vector<std::int64_t> ids, int region = 0)
  {
    types.push_back(type);
    conn.insert(conn.end(), ids.begin(), ids.end());
    offsets.push_back(static_cast<std::int64_t>(conn.size()));
    regions.push_back(region);
  }
  Mesh build() const { return mesh_from_vtk_arrays(points, types, offsets, conn, regions); }
};

VtkArrays tets_along_x(int n)
{
  VtkArrays a;
  for (int c = 0; c < n; ++c)
  {
    const double x = 2.0 * c;
    const auto base = static_cast<std::int64_t>(a.points.size());
    a.points.insert(a.points.end(), { { x, 0, 0 }, { x + 1, 0, 0 }, { x, 1, 0 }, { x, 0, 1 } });
    a.add(10, { base, base + 1, base + 2, base + 3 });
  }
  return a;
}

} // namespace

TEST(Mesh, CellTypeNodeCountsAndNames)
{
  EXPECT_EQ(n_cell_nodes(CellType::Tetrahedron), 4);
  EXPECT_EQ(n_cell_nodes(CellType::Hexahedron), 8);
  EXPECT_EQ(n_cell_nodes(CellType::Wedge), 6);
  EXPECT_EQ(n_cell_nodes(CellType::Pyramid), 5);
  EXPECT_STREQ(cell_type_name(CellType::Tetrahedron), "tetrahedron");
  EXPECT_STREQ(cell_type_name(CellType::Hexahedron), "hexahedron");
  EXPECT_STREQ(cell_type_name(CellType::Wedge), "wedge");
  EXPECT_STREQ(cell_type_name(CellType::Pyramid), "pyramid");
}

// Edges by the VTK node ordering (VTK file-format documentation, linear cell types): rings of
// the hexahedron (0–3 bottom, 4–7 top) and of the pyramid's base joined in order, the wedge's
// two triangles, and the columns joining them (hex i–i+4, wedge i–i+3) or the pyramid's apex;
// every pair of a tetrahedron. No duplicates. (tests/filters checks the tables against VTK's.)
TEST(Mesh, CellEdgesFollowVtkOrdering)
{
  auto rule = [](CellType type, int i, int j) {
    switch (type)
    {
    case CellType::Tetrahedron: return true;
    case CellType::Hexahedron:
      return (i / 4 == j / 4 && (j % 4 == (i + 1) % 4 || i % 4 == (j + 1) % 4)) || j == i + 4;
    case CellType::Wedge: return i / 3 == j / 3 || j == i + 3;
    case CellType::Pyramid: return j == 4 || j == i + 1 || (i == 0 && j == 3);
    }
    return false;
  };
  for (CellType type : { CellType::Tetrahedron, CellType::Hexahedron, CellType::Wedge,
         CellType::Pyramid })
  {
    std::set<std::pair<int, int>> expected, got;
    const int n = n_cell_nodes(type);
    for (int i = 0; i < n; ++i)
      for (int j = i + 1; j < n; ++j)
        if (rule(type, i, j))
          expected.insert({ i, j });
    for (const auto& e : cell_edges(type))
      EXPECT_TRUE(got.insert({ std::min(e[0], e[1]), std::max(e[0], e[1]) }).second)
        << cell_type_name(type) << " repeats edge " << e[0] << "-" << e[1];
    EXPECT_EQ(got, expected) << cell_type_name(type);
    EXPECT_EQ(cell_edges(type).size(), std::size_t(type == CellType::Tetrahedron ? 6
        : type == CellType::Hexahedron ? 12 : type == CellType::Wedge ? 9 : 8));
  }
}

TEST(Mesh, AddCellBuildsCsrAndRejectsWrongNodeCount)
{
  Mesh m;
  m.points = unit_cube_hex;
  const std::vector<std::int64_t> hex = { 0, 1, 2, 3, 4, 5, 6, 7 };
  const std::vector<std::int64_t> tet = { 0, 1, 3, 4 };
  m.add_cell(CellType::Hexahedron, hex, 3);
  m.add_cell(CellType::Tetrahedron, tet, 5);
  ASSERT_EQ(m.n_cells(), 2u);
  EXPECT_EQ(m.cell_offsets, (std::vector<std::int64_t>{ 0, 8, 12 }));
  EXPECT_EQ(std::vector<std::int64_t>(m.nodes(1).begin(), m.nodes(1).end()), tet);
  EXPECT_EQ(m.cell_region, (std::vector<int>{ 3, 5 }));

  const std::string msg = mesh_error([&] { m.add_cell(CellType::Wedge, tet, 0); });
  EXPECT_TRUE(contains(msg, "cell 2")) << msg;
  EXPECT_EQ(m.n_cells(), 2u) << "a rejected cell must not be half-added";
}

TEST(Mesh, FromVtkArraysAcceptsAllLinearTypes)
{
  VtkArrays a;
  a.points = unit_cube_hex;
  a.points.push_back({ 0.5, 0.5, 2 });
  a.add(10, { 0, 1, 3, 4 }, 1);
  a.add(12, { 0, 1, 2, 3, 4, 5, 6, 7 }, 2);
  a.add(13, { 0, 3, 1, 4, 7, 5 }, 3);
  a.add(14, { 4, 5, 6, 7, 8 }, 4);
  const Mesh m = a.build();
  ASSERT_EQ(m.n_cells(), 4u);
  EXPECT_EQ(m.cell_types, (std::vector<CellType>{ CellType::Tetrahedron, CellType::Hexahedron,
                            CellType::Wedge, CellType::Pyramid }));
  EXPECT_EQ(m.cell_region, (std::vector<int>{ 1, 2, 3, 4 }));
  EXPECT_EQ(m.cell_nodes, a.conn);
}

TEST(Mesh, FromVtkArraysEmptyRegionsMeanRegionZero)
{
  VtkArrays a = tets_along_x(2);
  const Mesh m = mesh_from_vtk_arrays(a.points, a.types, a.offsets, a.conn, {});
  EXPECT_EQ(m.cell_region, (std::vector<int>{ 0, 0 }));
}

TEST(Mesh, FromVtkArraysVoxelIsReorderedToHexahedron)
{
  VtkArrays a;
  // Voxel nodes are lexicographic: x fastest, then y, then z.
  a.points = { { 0, 0, 0 }, { 1, 0, 0 }, { 0, 1, 0 }, { 1, 1, 0 }, { 0, 0, 1 }, { 1, 0, 1 },
    { 0, 1, 1 }, { 1, 1, 1 } };
  a.add(11, { 0, 1, 2, 3, 4, 5, 6, 7 });
  const Mesh m = a.build();
  ASSERT_EQ(m.cell_types.at(0), CellType::Hexahedron);
  EXPECT_EQ(m.cell_nodes, (std::vector<std::int64_t>{ 0, 1, 3, 2, 4, 5, 7, 6 }));
  EXPECT_NO_THROW(validate_mesh(m));
}

TEST(Mesh, FromVtkArraysNamesTriangleCells)
{
  VtkArrays a = tets_along_x(5);
  a.types[1] = 5; // triangles (4 ids, but the type is what is wrong)
  a.types[3] = 5;
  const std::string msg = mesh_error([&] { a.build(); });
  EXPECT_TRUE(contains(msg, "cells 1, 3 are not linear 3-D cells")) << msg;
  EXPECT_TRUE(contains(msg, "VTK type 5 = triangle")) << msg;
  EXPECT_FALSE(contains(msg, "cells 0")) << msg;
}

TEST(Mesh, FromVtkArraysGroupsCodesAndNamesQuadraticCells)
{
  VtkArrays a = tets_along_x(3);
  a.types[0] = 24;
  a.types[2] = 9;
  const std::string msg = mesh_error([&] { a.build(); });
  EXPECT_TRUE(contains(msg, "cell 0 is not a linear 3-D cell (VTK type 24")) << msg;
  EXPECT_TRUE(contains(msg, "VTK type 24 = quadratic tetra")) << msg;
  EXPECT_TRUE(contains(msg, "cell 2 is not a linear 3-D cell (VTK type 9")) << msg;
  EXPECT_TRUE(contains(msg, "VTK type 9 = quad")) << msg;
}

TEST(Mesh, FromVtkArraysTruncatesLongIdLists)
{
  VtkArrays a = tets_along_x(30);
  for (auto& t : a.types)
    t = 5;
  const std::string msg = mesh_error([&] { a.build(); });
  EXPECT_TRUE(contains(msg, "cells 0, 1, 2,")) << msg;
  EXPECT_TRUE(contains(msg, ", 19 and 10 more (30 in total)")) << msg;
  EXPECT_FALSE(contains(msg, ", 20")) << msg;
}

TEST(Mesh, FromVtkArraysNamesNodeCountMismatch)
{
  VtkArrays a = tets_along_x(2);
  a.add(12, { 0, 1, 2, 3, 4, 5, 6 }); // hexahedron with 7 nodes
  const std::string msg = mesh_error([&] { a.build(); });
  EXPECT_TRUE(contains(msg, "cell 2 has a node count")) << msg;
}

TEST(Mesh, FromVtkArraysNamesOutOfRangeNodes)
{
  VtkArrays a = tets_along_x(3);
  a.conn[5] = 99;  // cell 1
  a.conn[11] = -1; // cell 2
  const std::string msg = mesh_error([&] { a.build(); });
  EXPECT_TRUE(contains(msg, "cells 1, 2 reference point ids outside [0, 12)")) << msg;
}

TEST(Mesh, FromVtkArraysRejectsInconsistentOffsets)
{
  VtkArrays a = tets_along_x(2);
  std::vector<std::int64_t> end_offsets(a.offsets.begin() + 1, a.offsets.end()); // .vtu style
  EXPECT_THROW(mesh_from_vtk_arrays(a.points, a.types, end_offsets, a.conn, a.regions), MeshError);
  a.regions.pop_back();
  EXPECT_THROW(a.build(), MeshError);
}

TEST(Mesh, BoxHexNumberingIsXFastest)
{
  const Mesh m = make_box_hex({ 0, 0, 0 }, { 3, 2, 1 }, { 3, 2, 1 });
  ASSERT_EQ(m.n_points(), 4u * 3u * 2u);
  ASSERT_EQ(m.n_cells(), 6u);
  EXPECT_EQ(m.points[1], (Point{ 1, 0, 0 }));
  EXPECT_EQ(m.points[4], (Point{ 0, 1, 0 }));
  EXPECT_EQ(m.points[12], (Point{ 0, 0, 1 }));
  EXPECT_EQ(m.points.back(), (Point{ 3, 2, 1 }));
  // Cell 0 in VTK hexahedron order.
  EXPECT_EQ(std::vector<std::int64_t>(m.nodes(0).begin(), m.nodes(0).end()),
    (std::vector<std::int64_t>{ 0, 1, 5, 4, 12, 13, 17, 16 }));
  EXPECT_EQ(m.cell_region, std::vector<int>(6, 0));
  const MeshReport r = validate_mesh(m);
  EXPECT_EQ(r.n_pieces, 1u);
  EXPECT_TRUE(r.unreferenced_points.empty());
}

TEST(Mesh, BoxTetIsValidAndConnected)
{
  const Mesh m = make_box_tet({ 0, 0, 0 }, { 1, 2, 3 }, { 2, 3, 2 });
  EXPECT_EQ(m.n_cells(), 6u * 12u);
  EXPECT_EQ(m.n_points(), 3u * 4u * 3u);
  const MeshReport r = validate_mesh(m); // throws if any tet is inverted
  EXPECT_EQ(r.n_pieces, 1u) << "face-connected only if neighbouring hexes split conformingly";
  EXPECT_EQ(m.cell_region, std::vector<int>(m.n_cells(), 0));
}

TEST(Mesh, GradedBoxUsesGivenLinesAndRejectsBadOnes)
{
  const Mesh m = make_graded_box_hex({ 0, 0.1, 1 }, { -1, 1 }, { -5, -2, 0 });
  EXPECT_EQ(m.n_cells(), 4u);
  EXPECT_EQ(m.points[1], (Point{ 0.1, -1, -5 }));
  EXPECT_EQ(m.points.back(), (Point{ 1, 1, 0 }));
  EXPECT_NO_THROW(validate_mesh(m));
  EXPECT_THROW(make_graded_box_hex({ 0, 1, 1 }, { 0, 1 }, { 0, 1 }), MeshError);
  EXPECT_THROW(make_graded_box_hex({ 0, 1 }, { 0 }, { 0, 1 }), MeshError);
  EXPECT_THROW(make_box_hex({ 0, 0, 0 }, { 1, 1, 1 }, { 1, 0, 1 }), MeshError);
}

TEST(Mesh, ValidateNamesInvertedCell)
{
  Mesh m = make_box_hex({ 0, 0, 0 }, { 3, 1, 1 }, { 3, 1, 1 });
  std::swap(m.cell_nodes[m.cell_offsets[2] + 0], m.cell_nodes[m.cell_offsets[2] + 1]);
  const std::string msg = mesh_error([&] { validate_mesh(m); });
  EXPECT_TRUE(contains(msg, "cell 2 has a non-positive Jacobian")) << msg;
  EXPECT_FALSE(contains(msg, "cell 0")) << msg;
}

TEST(Mesh, ValidateNamesInvertedTetInTetBox)
{
  Mesh m = make_box_tet({ 0, 0, 0 }, { 1, 1, 1 }, { 2, 1, 1 });
  std::swap(m.cell_nodes[m.cell_offsets[7] + 2], m.cell_nodes[m.cell_offsets[7] + 3]);
  const std::string msg = mesh_error([&] { validate_mesh(m); });
  EXPECT_TRUE(contains(msg, "cell 7 ")) << msg;
}

TEST(Mesh, ValidateRejectsFlatCell)
{
  Mesh m;
  m.points = { { 0, 0, 0 }, { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 }, { 1, 1, 0 } };
  const std::vector<std::int64_t> good = { 0, 1, 2, 3 }, flat = { 0, 1, 4, 2 };
  m.add_cell(CellType::Tetrahedron, good, 0);
  m.add_cell(CellType::Tetrahedron, flat, 0);
  const std::string msg = mesh_error([&] { validate_mesh(m); });
  EXPECT_TRUE(contains(msg, "cell 1 has")) << msg;
}

TEST(Mesh, ValidateNamesOutOfRangeNodes)
{
  Mesh m = make_box_hex({ 0, 0, 0 }, { 2, 1, 1 }, { 2, 1, 1 });
  m.cell_nodes[m.cell_offsets[1] + 3] = 1000;
  const std::string msg = mesh_error([&] { validate_mesh(m); });
  EXPECT_TRUE(contains(msg, "cell 1 references point ids outside")) << msg;
}

TEST(Mesh, ValidateReportsUnreferencedPoints)
{
  Mesh m = make_box_hex({ 0, 0, 0 }, { 1, 1, 1 }, { 1, 1, 1 });
  m.points.insert(m.points.begin() + 3, Point{ 9, 9, 9 }); // becomes point 3
  for (auto& id : m.cell_nodes)
    if (id >= 3)
      ++id;
  m.points.push_back({ 7, 7, 7 }); // point 9
  const MeshReport r = validate_mesh(m);
  EXPECT_EQ(r.unreferenced_points, (std::vector<std::int64_t>{ 3, 9 }));
  EXPECT_EQ(r.n_pieces, 1u);
}

TEST(Mesh, ValidateCountsSeparatePieces)
{
  Mesh a = make_box_hex({ 0, 0, 0 }, { 1, 1, 1 }, { 2, 1, 1 });
  const Mesh b = make_box_tet({ 5, 0, 0 }, { 6, 1, 1 }, { 1, 1, 1 });
  const auto shift = static_cast<std::int64_t>(a.n_points());
  a.points.insert(a.points.end(), b.points.begin(), b.points.end());
  for (std::size_t c = 0; c < b.n_cells(); ++c)
  {
    std::vector<std::int64_t> ids(b.nodes(c).begin(), b.nodes(c).end());
    for (auto& id : ids)
      id += shift;
    a.add_cell(b.cell_types[c], ids, 1);
  }
  const MeshReport r = validate_mesh(a);
  EXPECT_EQ(r.n_pieces, 2u);
  ASSERT_EQ(r.piece_of_cell.size(), 8u);
  EXPECT_EQ(r.piece_of_cell[0], 0);
  EXPECT_EQ(r.piece_of_cell[1], 0);
  for (std::size_t c = 2; c < 8; ++c)
    EXPECT_EQ(r.piece_of_cell[c], 1);
}

TEST(Mesh, CellsSharingOnlyAnEdgeAreSeparatePieces)
{
  // Two cubes touching along the edge x=1, y=1: not face-connected.
  Mesh m;
  m.points = unit_cube_hex;
  for (const Point& p : unit_cube_hex)
    m.points.push_back({ p[0] + 1, p[1] + 1, p[2] });
  // Reuse the shared edge nodes so the cubes really touch: node 2/6 of cube 0 = node 0/4 of cube 1.
  std::vector<std::int64_t> second = { 2, 9, 10, 11, 6, 13, 14, 15 };
  const std::vector<std::int64_t> first = { 0, 1, 2, 3, 4, 5, 6, 7 };
  m.add_cell(CellType::Hexahedron, first, 0);
  m.add_cell(CellType::Hexahedron, second, 0);
  const MeshReport r = validate_mesh(m);
  EXPECT_EQ(r.n_pieces, 2u);
  EXPECT_EQ(r.unreferenced_points, (std::vector<std::int64_t>{ 8, 12 }));
}
