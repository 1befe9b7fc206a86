// Element matrices, Jacobian checks and boundary faces.
#include "ember/geometry.h"

#include <gtest/gtest.h>

#include <Eigen/Dense>

#include <cmath>
#include <numeric>
#include <string>

using namespace ember;

namespace
{

using Vec3 = Eigen::Vector3d;

Vec3 vec(const Point& p) { return { p[0], p[1], p[2] }; }

Mesh single_cell(CellType type, const std::vector<Point>& pts)
{
  Mesh m;
  m.points = pts;
  std::vector<std::int64_t> ids(pts.size());
  std::iota(ids.begin(), ids.end(), 0);
  m.add_cell(type, ids, 0);
  return m;
}

// Reference cells in valid VTK order.
const std::vector<Point> unit_tet = { { 0, 0, 0 }, { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 } };
const std::vector<Point> unit_hex = { { 0, 0, 0 }, { 1, 0, 0 }, { 1, 1, 0 }, { 0, 1, 0 },
  { 0, 0, 1 }, { 1, 0, 1 }, { 1, 1, 1 }, { 0, 1, 1 } };
// VTK wedge: (0,1,2) seen from (3,4,5) is clockwise (its right-hand normal points away).
const std::vector<Point> unit_wedge = { { 0, 0, 0 }, { 0, 1, 0 }, { 1, 0, 0 }, { 0, 0, 1 },
  { 0, 1, 1 }, { 1, 0, 1 } };
const std::vector<Point> unit_pyramid = { { 0, 0, 0 }, { 1, 0, 0 }, { 1, 1, 0 }, { 0, 1, 0 },
  { 0.5, 0.5, 1 } };

// Outward faces of the VTK hexahedron (independent copy for the tests).
const int hex_faces[6][4] = { { 0, 4, 7, 3 }, { 1, 2, 6, 5 }, { 0, 1, 5, 4 }, { 3, 7, 6, 2 },
  { 0, 3, 2, 1 }, { 4, 5, 6, 7 } };

// A general affine map x -> A x + b with det A = 2.1 (shear, stretch, rotation).
Eigen::Matrix3d affine_A()
{
  Eigen::Matrix3d A;
  A << 1.5, 0.3, -0.2, 0.1, 1.2, 0.4, 0.2, -0.1, 1.1;
  return A;
}
const Vec3 affine_b(0.7, -2.0, 3.5);

std::vector<Point> affine(const std::vector<Point>& pts)
{
  std::vector<Point> out;
  for (const Point& p : pts)
  {
    const Vec3 x = affine_A() * vec(p) + affine_b;
    out.push_back({ x[0], x[1], x[2] });
  }
  return out;
}

double total(const std::vector<double>& v) { return std::accumulate(v.begin(), v.end(), 0.0); }

/// Global K T.
std::vector<double> apply_K(const Mesh& m, const ElementMatrices& em, const std::vector<double>& T)
{
  std::vector<double> r(m.n_points(), 0.0);
  for (std::size_t c = 0; c < m.n_cells(); ++c)
  {
    const auto nodes = m.nodes(c);
    const std::size_t n = nodes.size();
    const double* K = em.stiffness.data() + em.stiffness_offsets[c];
    for (std::size_t a = 0; a < n; ++a)
      for (std::size_t b = 0; b < n; ++b)
        r[nodes[a]] += K[a * n + b] * T[nodes[b]];
  }
  return r;
}

std::vector<double> linear_field(const Mesh& m, const Vec3& g, double t0)
{
  std::vector<double> T;
  for (const Point& p : m.points)
    T.push_back(t0 + g.dot(vec(p)));
  return T;
}

/// For a linear T = g·x: ∫∇N_a·g dV = ∮ N_a g·n dA, which on planar faces is node_area·(g·n).
std::vector<double> boundary_flux(const Mesh& m, const std::vector<BoundaryFace>& faces, const Vec3& g)
{
  std::vector<double> f(m.n_points(), 0.0);
  for (const auto& face : faces)
    for (int a = 0; a < face.n_nodes; ++a)
      f[face.nodes[a]] += face.node_area[a] * g.dot(vec(face.normal));
  return f;
}

/// Checks the discrete patch test on every node of the mesh (boundary faces must be planar).
void expect_patch_test(const Mesh& m, double tol)
{
  const ElementMatrices em = compute_element_matrices(m);
  const auto faces = find_boundary_faces(m);
  const Vec3 g(0.3, -1.7, 2.2);
  const auto KT = apply_K(m, em, linear_field(m, g, 5.0));
  const auto flux = boundary_flux(m, faces, g);
  for (std::size_t p = 0; p < m.n_points(); ++p)
    EXPECT_NEAR(KT[p], flux[p], tol) << "node " << p;
}

/// Element-level invariants: symmetric, rows sum to zero, diagonal positive, Σ V_a = V > 0.
void expect_element_invariants(const Mesh& m, const ElementMatrices& em)
{
  ASSERT_EQ(em.stiffness_offsets.size(), m.n_cells() + 1);
  ASSERT_EQ(em.nodal_volume.size(), m.cell_nodes.size());
  ASSERT_EQ(em.cell_volume.size(), m.n_cells());
  for (std::size_t c = 0; c < m.n_cells(); ++c)
  {
    const auto n = static_cast<std::size_t>(m.cell_offsets[c + 1] - m.cell_offsets[c]);
    ASSERT_EQ(static_cast<std::size_t>(em.stiffness_offsets[c + 1] - em.stiffness_offsets[c]), n * n);
    const double* K = em.stiffness.data() + em.stiffness_offsets[c];
    const double scale = std::abs(K[0]);
    double vsum = 0;
    for (std::size_t a = 0; a < n; ++a)
    {
      double row = 0;
      for (std::size_t b = 0; b < n; ++b)
      {
        row += K[a * n + b];
        EXPECT_NEAR(K[a * n + b], K[b * n + a], 1e-13 * scale) << "cell " << c;
      }
      EXPECT_NEAR(row, 0.0, 1e-12 * scale) << "cell " << c << " row " << a;
      EXPECT_GT(K[a * n + a], 0.0);
      EXPECT_GT(em.nodal_volume[m.cell_offsets[c] + a], 0.0);
      vsum += em.nodal_volume[m.cell_offsets[c] + a];
    }
    EXPECT_GT(em.cell_volume[c], 0.0);
    EXPECT_NEAR(vsum, em.cell_volume[c], 1e-13 * em.cell_volume[c]) << "cell " << c;
  }
}

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

/// Appends `other` to `m`, sharing points given by identical coordinates.
void append_mesh(Mesh& m, const Mesh& other, int region)
{
  std::vector<std::int64_t> map;
  for (const Point& p : other.points)
  {
    auto it = std::find(m.points.begin(), m.points.end(), p);
    if (it == m.points.end())
    {
      m.points.push_back(p);
      it = m.points.end() - 1;
    }
    map.push_back(it - m.points.begin());
  }
  for (std::size_t c = 0; c < other.n_cells(); ++c)
  {
    std::vector<std::int64_t> ids;
    for (const auto id : other.nodes(c))
      ids.push_back(map[id]);
    m.add_cell(other.cell_types[c], ids, region);
  }
}

/// Unit cube [x0,x0+1]x[0,1]^2 split into 6 pyramids with the apex at its centre.
Mesh cube_of_pyramids(double x0)
{
  Mesh m;
  for (const Point& p : unit_hex)
    m.points.push_back({ p[0] + x0, p[1], p[2] });
  m.points.push_back({ x0 + 0.5, 0.5, 0.5 });
  for (const auto& f : hex_faces)
  {
    // Reversed outward face: the base normal points inward, toward the apex.
    const std::vector<std::int64_t> ids = { f[3], f[2], f[1], f[0], 8 };
    m.add_cell(CellType::Pyramid, ids, 0);
  }
  return m;
}

/// Unit cube [x0,x0+1]x[0,1]^2 split into 2 wedges along the vertical diagonal plane.
Mesh cube_of_wedges(double x0)
{
  Mesh m;
  for (const Point& p : unit_hex)
    m.points.push_back({ p[0] + x0, p[1], p[2] });
  // Bottom triangles clockwise seen from above (VTK wedge convention), top = bottom + 4.
  const std::vector<std::int64_t> w1 = { 0, 2, 1, 4, 6, 5 }, w2 = { 0, 3, 2, 4, 7, 6 };
  m.add_cell(CellType::Wedge, w1, 0);
  m.add_cell(CellType::Wedge, w2, 0);
  return m;
}

/// [0,3]x[0,1]x[0,1]: 6 pyramids, a hexahedron and 2 wedges, face-conforming.
Mesh mixed_mesh()
{
  Mesh m = cube_of_pyramids(0.0);
  append_mesh(m, make_box_hex({ 1, 0, 0 }, { 2, 1, 1 }, { 1, 1, 1 }), 1);
  append_mesh(m, cube_of_wedges(2.0), 2);
  return m;
}

Vec3 centroid(const Mesh& m, std::span<const std::int64_t> ids)
{
  Vec3 c = Vec3::Zero();
  for (const auto id : ids)
    c += vec(m.points[id]);
  return c / static_cast<double>(ids.size());
}

/// Outward normals, unit length, node areas sum to area; returns the total area.
double check_faces(const Mesh& m, const std::vector<BoundaryFace>& faces)
{
  double area = 0;
  for (std::size_t i = 0; i < faces.size(); ++i)
  {
    const auto& f = faces[i];
    const Vec3 n = vec(f.normal);
    EXPECT_NEAR(n.norm(), 1.0, 1e-14);
    const Vec3 out = centroid(m, std::span(f.nodes.data(), f.n_nodes)) - centroid(m, m.nodes(f.cell));
    EXPECT_GT(out.dot(n), 0.0) << "face " << i << " of cell " << f.cell << " points inward";
    double s = 0;
    for (int a = 0; a < f.n_nodes; ++a)
      s += f.node_area[a];
    EXPECT_NEAR(s, f.area, 1e-14 * f.area);
    if (i > 0)
    {
      EXPECT_LE(faces[i - 1].cell, f.cell) << "faces must be sorted by cell";
    }
    area += f.area;
  }
  return area;
}

} // namespace

// ---------------------------------------------------------------------------------------------
// Volumes

TEST(Geometry, ReferenceCellVolumes)
{
  EXPECT_NEAR(compute_element_matrices(single_cell(CellType::Tetrahedron, unit_tet)).cell_volume[0], 1.0 / 6, 1e-15);
  EXPECT_NEAR(compute_element_matrices(single_cell(CellType::Hexahedron, unit_hex)).cell_volume[0], 1.0, 1e-15);
  EXPECT_NEAR(compute_element_matrices(single_cell(CellType::Wedge, unit_wedge)).cell_volume[0], 0.5, 1e-15);
  EXPECT_NEAR(compute_element_matrices(single_cell(CellType::Pyramid, unit_pyramid)).cell_volume[0], 1.0 / 3, 1e-15);
  // Oblique pyramid (apex not above the base centre): still base * height / 3.
  auto oblique = unit_pyramid;
  oblique[4] = { 0.1, 0.8, 2.0 };
  EXPECT_NEAR(compute_element_matrices(single_cell(CellType::Pyramid, oblique)).cell_volume[0], 2.0 / 3, 1e-14);
}

TEST(Geometry, AffineMappedCellsScaleVolumeByDeterminant)
{
  const double det = affine_A().determinant();
  const std::vector<std::pair<CellType, std::vector<Point>>> cells = {
    { CellType::Tetrahedron, unit_tet }, { CellType::Hexahedron, unit_hex },
    { CellType::Wedge, unit_wedge }, { CellType::Pyramid, unit_pyramid } };
  const double ref_volume[] = { 1.0 / 6, 1.0, 0.5, 1.0 / 3 };
  for (std::size_t i = 0; i < cells.size(); ++i)
  {
    const Mesh m = single_cell(cells[i].first, affine(cells[i].second));
    const ElementMatrices em = compute_element_matrices(m);
    EXPECT_NEAR(em.cell_volume[0], det * ref_volume[i], 1e-14) << cell_type_name(cells[i].first);
    expect_element_invariants(m, em);
  }
}

TEST(Geometry, NodalVolumesOfAffineTetAndHexAreEqualShares)
{
  const ElementMatrices tet = compute_element_matrices(single_cell(CellType::Tetrahedron, affine(unit_tet)));
  for (const double v : tet.nodal_volume)
    EXPECT_NEAR(v, tet.cell_volume[0] / 4, 1e-15);
  const ElementMatrices hex = compute_element_matrices(single_cell(CellType::Hexahedron, affine(unit_hex)));
  for (const double v : hex.nodal_volume)
    EXPECT_NEAR(v, hex.cell_volume[0] / 8, 1e-15);
  // Pyramid apex: N = (1+zeta)/2 weighted by det J ~ (1-zeta)^2 integrates to exactly V/4.
  const ElementMatrices pyr = compute_element_matrices(single_cell(CellType::Pyramid, unit_pyramid));
  EXPECT_NEAR(pyr.nodal_volume[4], pyr.cell_volume[0] / 4, 1e-15);
}

TEST(Geometry, BoxVolumesSumToBoxVolume)
{
  const std::array<double, 3> lo = { -1, 0, 2 }, hi = { 2, 0.5, 4 };
  const double box = 3 * 0.5 * 2;
  for (const Mesh& m : { make_box_hex(lo, hi, { 3, 2, 4 }), make_box_tet(lo, hi, { 3, 2, 4 }),
         make_graded_box_hex({ -1, -0.9, 0, 2 }, { 0, 0.1, 0.5 }, { 2, 3.9, 4 }) })
  {
    const ElementMatrices em = compute_element_matrices(m);
    EXPECT_NEAR(total(em.cell_volume), box, 1e-13);
    EXPECT_NEAR(total(em.nodal_volume), box, 1e-13);
    expect_element_invariants(m, em);
  }
}

TEST(Geometry, PerturbedInteriorNodeKeepsBoxVolume)
{
  // Trilinear cells sharing bilinear faces tile the box exactly even when non-affine.
  Mesh m = make_box_hex({ 0, 0, 0 }, { 2, 2, 2 }, { 2, 2, 2 });
  m.points[13] = { 1.2, 0.8, 1.3 }; // the centre node
  const ElementMatrices em = compute_element_matrices(m);
  EXPECT_NEAR(total(em.cell_volume), 8.0, 1e-13);
  expect_element_invariants(m, em);
}

TEST(Geometry, CubeSplitIntoWedgesAndPyramids)
{
  const ElementMatrices w = compute_element_matrices(cube_of_wedges(0));
  ASSERT_EQ(w.cell_volume.size(), 2u);
  EXPECT_NEAR(w.cell_volume[0], 0.5, 1e-15);
  EXPECT_NEAR(w.cell_volume[1], 0.5, 1e-15);
  const ElementMatrices p = compute_element_matrices(cube_of_pyramids(0));
  ASSERT_EQ(p.cell_volume.size(), 6u);
  for (const double v : p.cell_volume)
    EXPECT_NEAR(v, 1.0 / 6, 1e-15);
  EXPECT_NEAR(total(p.nodal_volume), 1.0, 1e-14);
}

// The thermal model takes its volumes from compute_nodal_volumes, the operator its weights from
// compute_element_matrices: both must see the same volumes, bit for bit, on every cell type.
TEST(Geometry, NodalVolumesAloneEqualThoseOfTheElementMatrices)
{
  Mesh box = make_box_hex({ 0, 0, 0 }, { 3, 2, 2 }, { 3, 2, 2 });
  box.points[box.n_points() / 2][0] += 0.21; // a distorted interior node
  for (const Mesh& m : { box, make_box_tet({ 0, 0, 0 }, { 2, 2, 1 }, { 2, 2, 1 }),
         cube_of_wedges(0), cube_of_pyramids(0) })
  {
    const std::vector<double> alone = compute_nodal_volumes(m);
    const ElementMatrices em = compute_element_matrices(m);
    ASSERT_EQ(alone.size(), em.nodal_volume.size());
    for (std::size_t k = 0; k < alone.size(); ++k)
      EXPECT_EQ(alone[k], em.nodal_volume[k]) << "entry " << k;
  }
  Mesh bad = make_box_hex({ 0, 0, 0 }, { 4, 1, 1 }, { 4, 1, 1 });
  std::swap(bad.cell_nodes[bad.cell_offsets[3] + 1], bad.cell_nodes[bad.cell_offsets[3] + 2]);
  const std::string msg = mesh_error([&] { compute_nodal_volumes(bad); });
  EXPECT_NE(msg.find("cell 3 has a non-positive Jacobian"), std::string::npos) << msg;
}

// The operator takes its edge weights from compute_element_stiffness (the model has checked
// the mesh and has the volumes): the same stiffness blocks, bit for bit, on every cell type.
TEST(Geometry, StiffnessAloneEqualsThatOfTheElementMatrices)
{
  Mesh box = make_box_hex({ 0, 0, 0 }, { 3, 2, 2 }, { 3, 2, 2 });
  box.points[box.n_points() / 2][0] += 0.21; // a distorted interior node
  for (const Mesh& m : { box, make_box_tet({ 0, 0, 0 }, { 2, 2, 1 }, { 2, 2, 1 }),
         cube_of_wedges(0), cube_of_pyramids(0) })
  {
    const ElementMatrices alone = compute_element_stiffness(m);
    const ElementMatrices em = compute_element_matrices(m);
    EXPECT_EQ(alone.stiffness_offsets, em.stiffness_offsets);
    ASSERT_EQ(alone.stiffness.size(), em.stiffness.size());
    for (std::size_t k = 0; k < alone.stiffness.size(); ++k)
      EXPECT_EQ(alone.stiffness[k], em.stiffness[k]) << "entry " << k;
    EXPECT_TRUE(alone.nodal_volume.empty());
  }
  Mesh bad = make_box_hex({ 0, 0, 0 }, { 4, 1, 1 }, { 4, 1, 1 });
  std::swap(bad.cell_nodes[bad.cell_offsets[3] + 1], bad.cell_nodes[bad.cell_offsets[3] + 2]);
  const std::string msg = mesh_error([&] { compute_element_stiffness(bad); });
  EXPECT_NE(msg.find("cell 3 has a non-positive Jacobian"), std::string::npos) << msg;
}

// ---------------------------------------------------------------------------------------------
// Stiffness

TEST(Geometry, TetStiffnessMatchesP1Formula)
{
  const std::vector<Point> pts = { { 0.1, 0.2, -0.3 }, { 1.3, 0.1, 0.2 }, { 0.4, 1.1, 0.0 },
    { 0.2, 0.5, 0.9 } };
  const ElementMatrices em = compute_element_matrices(single_cell(CellType::Tetrahedron, pts));
  // ∇λ_a = -(outward area vector of the face opposite a) / (3V).
  const Vec3 x[4] = { vec(pts[0]), vec(pts[1]), vec(pts[2]), vec(pts[3]) };
  const double V = (x[1] - x[0]).cross(x[2] - x[0]).dot(x[3] - x[0]) / 6;
  ASSERT_GT(V, 0);
  EXPECT_NEAR(em.cell_volume[0], V, 1e-15);
  Vec3 grad[4];
  for (int a = 0; a < 4; ++a)
  {
    const Vec3 &p = x[(a + 1) % 4], &q = x[(a + 2) % 4], &r = x[(a + 3) % 4];
    Vec3 n = (q - p).cross(r - p) / 2; // some orientation; flip to point away from node a
    if (n.dot(p - x[a]) < 0)
      n = -n;
    grad[a] = -n / (3 * V);
  }
  for (int a = 0; a < 4; ++a)
    for (int b = 0; b < 4; ++b)
      EXPECT_NEAR(em.stiffness[a * 4 + b], V * grad[a].dot(grad[b]), 1e-14) << a << "," << b;
}

TEST(Geometry, HexStiffnessOfUnitCubeIsTheSevenPointStencil)
{
  // Vertex-rule Q1 stiffness on the unit cube, worked by hand: each corner carries 1/8 of the
  // volume; at node 0's own corner |∇N_0|² = 3, at each of its three edge neighbours' corners
  // ∇N_0 has one unit component, so K_00 = (3 + 3)/8 = 3/4; K_01 = (−1 − 1)/8 = −1/4 along an
  // edge; face and body diagonals 0. This is the 7-point finite-difference Laplacian with
  // control-volume faces of 1/4 m² (the Gauss rule would give 1/3, 0, −1/12, −1/12).
  const ElementMatrices em = compute_element_matrices(single_cell(CellType::Hexahedron, unit_hex));
  EXPECT_NEAR(em.stiffness[0 * 8 + 0], 3.0 / 4, 1e-15);
  EXPECT_NEAR(em.stiffness[0 * 8 + 1], -1.0 / 4, 1e-15);
  EXPECT_NEAR(em.stiffness[0 * 8 + 2], 0.0, 1e-15);
  EXPECT_NEAR(em.stiffness[0 * 8 + 6], 0.0, 1e-15);
}

TEST(Geometry, HexStiffnessIsAnMMatrixAtAnyAspectRatio)
{
  // A 100 m × 100 m × 5 m brick (a graded mesh's cell beside a thin sill): every off-diagonal
  // coupling must be ≤ 0, else explicit steps leave the range of the data (maximum principle).
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { 100, 100, 5 }, { 1, 1, 1 });
  const ElementMatrices em = compute_element_matrices(mesh);
  for (int a = 0; a < 8; ++a)
    for (int b = 0; b < 8; ++b)
      if (a != b)
      {
        EXPECT_LE(em.stiffness[a * 8 + b], 0.0) << a << "," << b;
      }
}

TEST(Geometry, StiffnessInvariantsOnDistortedCells)
{
  // Non-affine but valid cells: symmetric, constants in the null space, Σ V_a = V.
  auto hex = unit_hex;
  hex[6] = { 1.3, 1.2, 1.4 };
  hex[1] = { 1.1, -0.1, 0.05 };
  auto wedge = unit_wedge;
  wedge[5] = { 1.2, 0.1, 1.3 };
  auto pyr = unit_pyramid;
  pyr[2] = { 1.2, 1.3, 0.1 }; // non-planar base
  for (const Mesh& m : { single_cell(CellType::Hexahedron, hex), single_cell(CellType::Wedge, wedge),
         single_cell(CellType::Pyramid, pyr) })
    expect_element_invariants(m, compute_element_matrices(m));
}

TEST(Geometry, PatchTestInteriorNodesOfBoxes)
{
  const Vec3 g(0.3, -1.7, 2.2);
  {
    Mesh m = make_box_hex({ 0, 0, 0 }, { 2, 2, 2 }, { 2, 2, 2 });
    m.points[13] = { 1.2, 0.8, 1.3 }; // distorted interior node: still exact
    const auto KT = apply_K(m, compute_element_matrices(m), linear_field(m, g, 1.0));
    EXPECT_NEAR(KT[13], 0.0, 1e-13);
  }
  {
    const Mesh m = make_box_tet({ 0, 0, 0 }, { 2, 3, 1 }, { 2, 2, 2 });
    const auto KT = apply_K(m, compute_element_matrices(m), linear_field(m, g, 1.0));
    EXPECT_NEAR(KT[13], 0.0, 1e-13);
  }
  {
    const Mesh m = cube_of_pyramids(0);
    const auto KT = apply_K(m, compute_element_matrices(m), linear_field(m, g, 1.0));
    EXPECT_NEAR(KT[8], 0.0, 1e-13) << "pyramid apex";
  }
}

TEST(Geometry, PatchTestBoundaryFluxHexBoxes)
{
  expect_patch_test(make_box_hex({ 0, 0, 0 }, { 1, 2, 3 }, { 3, 2, 2 }), 1e-12);
  expect_patch_test(make_graded_box_hex({ 0, 0.1, 0.5, 2 }, { -1, 0, 3 }, { 0, 0.01, 1 }), 1e-12);
  Mesh m = make_box_hex({ 0, 0, 0 }, { 3, 3, 3 }, { 3, 3, 3 });
  m.points[21] = { 1.1, 1.3, 0.8 }; // interior nodes (1,1,1) and (2,2,2)
  m.points[42] = { 2.2, 1.9, 2.1 };
  expect_patch_test(m, 1e-12);
  m.points = affine(m.points);
  expect_patch_test(m, 1e-12);
}

TEST(Geometry, PatchTestBoundaryFluxTetBoxes)
{
  Mesh m = make_box_tet({ 0, 0, 0 }, { 1, 2, 3 }, { 3, 2, 2 });
  expect_patch_test(m, 1e-12);
  m.points = affine(m.points);
  expect_patch_test(m, 1e-12);
}

TEST(Geometry, PatchTestBoundaryFluxMixedMesh)
{
  Mesh m = mixed_mesh();
  expect_patch_test(m, 1e-12);
  m.points = affine(m.points);
  expect_patch_test(m, 1e-12);
}

TEST(Geometry, VoxelGivesSameMatricesAsHexahedron)
{
  const std::vector<Point> voxel_pts = { { 0, 0, 0 }, { 2, 0, 0 }, { 0, 1, 0 }, { 2, 1, 0 },
    { 0, 0, 3 }, { 2, 0, 3 }, { 0, 1, 3 }, { 2, 1, 3 } };
  const std::vector<std::uint8_t> types = { 11 };
  const std::vector<std::int64_t> offsets = { 0, 8 }, conn = { 0, 1, 2, 3, 4, 5, 6, 7 };
  const Mesh vox = mesh_from_vtk_arrays(voxel_pts, types, offsets, conn, {});
  const Mesh hex = make_box_hex({ 0, 0, 0 }, { 2, 1, 3 }, { 1, 1, 1 });
  const ElementMatrices a = compute_element_matrices(vox), b = compute_element_matrices(hex);
  EXPECT_NEAR(a.cell_volume[0], 6.0, 1e-14);
  ASSERT_EQ(a.stiffness.size(), b.stiffness.size());
  for (std::size_t i = 0; i < a.stiffness.size(); ++i)
    EXPECT_NEAR(a.stiffness[i], b.stiffness[i], 1e-14);
}

// ---------------------------------------------------------------------------------------------
// Jacobian checks

TEST(Geometry, InvertedCellIsNamed)
{
  Mesh m = make_box_hex({ 0, 0, 0 }, { 4, 1, 1 }, { 4, 1, 1 });
  std::swap(m.cell_nodes[m.cell_offsets[3] + 1], m.cell_nodes[m.cell_offsets[3] + 2]);
  EXPECT_EQ(cells_with_bad_jacobian(m), (std::vector<std::int64_t>{ 3 }));
  const std::string msg = mesh_error([&] { compute_element_matrices(m); });
  EXPECT_NE(msg.find("cell 3 has a non-positive Jacobian"), std::string::npos) << msg;
}

TEST(Geometry, EveryCellTypeDetectsSwappedNodes)
{
  const std::vector<std::pair<CellType, std::vector<Point>>> cells = {
    { CellType::Tetrahedron, unit_tet }, { CellType::Hexahedron, unit_hex },
    { CellType::Wedge, unit_wedge }, { CellType::Pyramid, unit_pyramid } };
  for (const auto& [type, pts] : cells)
  {
    EXPECT_TRUE(cells_with_bad_jacobian(single_cell(type, pts)).empty()) << cell_type_name(type);
    auto swapped = pts;
    std::swap(swapped[0], swapped[1]);
    EXPECT_EQ(cells_with_bad_jacobian(single_cell(type, swapped)), (std::vector<std::int64_t>{ 0 }))
      << cell_type_name(type);
  }
}

TEST(Geometry, WedgeFollowsVtkOrientation)
{
  // vtkCellValidator (ParaView 5.11) calls this ordering -- (0,1,2) counter-clockwise seen from
  // (3,4,5) -- "faces oriented incorrectly"; its mirror image (unit_wedge) is valid.
  const std::vector<Point> mirrored = { { 0, 0, 0 }, { 1, 0, 0 }, { 0, 1, 0 }, { 0, 0, 1 },
    { 1, 0, 1 }, { 0, 1, 1 } };
  EXPECT_EQ(cells_with_bad_jacobian(single_cell(CellType::Wedge, mirrored)).size(), 1u);
  EXPECT_TRUE(cells_with_bad_jacobian(single_cell(CellType::Wedge, unit_wedge)).empty());
}

TEST(Geometry, DegenerateCellsAreRejected)
{
  auto flat_hex = unit_hex;
  for (int a = 4; a < 8; ++a)
    flat_hex[a][2] = 1e-17; // top face on the bottom face (round-off-level height)
  EXPECT_EQ(cells_with_bad_jacobian(single_cell(CellType::Hexahedron, flat_hex)).size(), 1u);
  auto flat_pyr = unit_pyramid;
  flat_pyr[4][2] = 0.0; // apex in the base plane
  EXPECT_EQ(cells_with_bad_jacobian(single_cell(CellType::Pyramid, flat_pyr)).size(), 1u);
  auto flat_wedge = unit_wedge;
  flat_wedge[2] = { 0, 0.5, 0 }; // bottom triangle collapsed to a segment
  EXPECT_EQ(cells_with_bad_jacobian(single_cell(CellType::Wedge, flat_wedge)).size(), 1u);
  auto nan_tet = unit_tet;
  nan_tet[3][1] = std::nan("");
  EXPECT_EQ(cells_with_bad_jacobian(single_cell(CellType::Tetrahedron, nan_tet)).size(), 1u);
}

TEST(Geometry, NonConvexHexIsRejected)
{
  auto hex = unit_hex;
  hex[6] = { 0.3, 0.3, 0.3 }; // corner pushed through the cell: negative corner Jacobian
  EXPECT_EQ(cells_with_bad_jacobian(single_cell(CellType::Hexahedron, hex)).size(), 1u);
}

TEST(Geometry, OutOfRangeNodeIsAnErrorNotACrash)
{
  Mesh m = make_box_hex({ 0, 0, 0 }, { 2, 1, 1 }, { 2, 1, 1 });
  m.cell_nodes[m.cell_offsets[1]] = 500;
  EXPECT_EQ(cells_with_bad_jacobian(m), (std::vector<std::int64_t>{ 1 }));
  const std::string msg = mesh_error([&] { compute_element_matrices(m); });
  EXPECT_NE(msg.find("cell 1"), std::string::npos) << msg;
  EXPECT_THROW(find_boundary_faces(m), MeshError);
}

// ---------------------------------------------------------------------------------------------
// Boundary faces

TEST(Geometry, BoundaryFacesOfHexBox)
{
  const Mesh m = make_box_hex({ 0, 0, 0 }, { 1, 1, 1 }, { 2, 2, 2 });
  const auto faces = find_boundary_faces(m);
  ASSERT_EQ(faces.size(), 24u);
  EXPECT_NEAR(check_faces(m, faces), 6.0, 1e-14);
  for (const auto& f : faces)
  {
    EXPECT_EQ(f.n_nodes, 4);
    EXPECT_NEAR(f.area, 0.25, 1e-15);
    for (int a = 0; a < 4; ++a)
      EXPECT_NEAR(f.node_area[a], 0.0625, 1e-15);
    // Axis-aligned box: exactly one normal component is ±1.
    EXPECT_NEAR(std::abs(f.normal[0]) + std::abs(f.normal[1]) + std::abs(f.normal[2]), 1.0, 1e-15);
  }
}

TEST(Geometry, BoundaryFacesOfTetBox)
{
  const Mesh m = make_box_tet({ 0, 0, 0 }, { 1, 2, 3 }, { 2, 2, 2 });
  const auto faces = find_boundary_faces(m);
  // Every boundary square is cut into 2 triangles; a non-conforming split would leave interior
  // faces unmatched and inflate the count.
  ASSERT_EQ(faces.size(), 2u * 4u * 6u);
  EXPECT_NEAR(check_faces(m, faces), 2 * (1 * 2 + 2 * 3 + 1 * 3), 1e-13);
  for (const auto& f : faces)
    EXPECT_EQ(f.n_nodes, 3);
}

TEST(Geometry, BoundaryFacesOfDistortedHexUseBilinearArea)
{
  // A single warped face: areas from 2x2 Gauss, node shares still sum to the area.
  auto hex = unit_hex;
  hex[6] = { 1, 1, 1.5 };
  const Mesh m = single_cell(CellType::Hexahedron, hex);
  const auto faces = find_boundary_faces(m);
  ASSERT_EQ(faces.size(), 6u);
  check_faces(m, faces);
  // Bottom face untouched; the right face (1,2,6,5) is a planar trapezoid of area 1.25.
  EXPECT_NEAR(faces[4].area, 1.0, 1e-15);
  EXPECT_NEAR(faces[1].area, 1.25, 1e-14);
  // Exact ∫N_a dA on that trapezoid (dA grows linearly towards the tall edge 2-6).
  EXPECT_EQ(faces[1].nodes, (std::array<std::int64_t, 4>{ 1, 2, 6, 5 }));
  const double expected[4] = { 7.0 / 24, 1.0 / 3, 1.0 / 3, 7.0 / 24 };
  for (int a = 0; a < 4; ++a)
    EXPECT_NEAR(faces[1].node_area[a], expected[a], 1e-15) << a;
}

TEST(Geometry, SelectFacesBySideAndRegion)
{
  Mesh m = make_box_hex({ 0, 0, 0 }, { 1, 1, 1 }, { 2, 2, 2 });
  for (std::size_t c = 0; c < m.n_cells(); ++c)
    m.cell_region[c] = (c % 2 == 0) ? 1 : 0; // cells with x < 0.5
  const auto faces = find_boundary_faces(m);
  EXPECT_EQ(select_faces(m, faces, Side::Top).size(), 4u);
  EXPECT_EQ(select_faces(m, faces, Side::Bottom).size(), 4u);
  EXPECT_EQ(select_faces(m, faces, Side::Sides).size(), 16u);
  for (const auto i : select_faces(m, faces, Side::Top))
    EXPECT_NEAR(faces[i].normal[2], 1.0, 1e-15);
  EXPECT_EQ(select_faces(m, faces, Side::Top, { 1 }).size(), 2u);
  // x=0 side (4 faces) + y=0 and y=1 sides of the x<0.5 column (2 each).
  EXPECT_EQ(select_faces(m, faces, Side::Sides, { 1 }).size(), 8u);
  EXPECT_EQ(select_faces(m, faces, Side::Sides, { 0, 1 }).size(), 16u);
  EXPECT_TRUE(select_faces(m, faces, Side::Bottom, { 7 }).empty());
}

TEST(Geometry, ClassifyFaceAt45Degrees)
{
  BoundaryFace f;
  f.normal = { 0.6, 0, 0.8 };
  EXPECT_EQ(classify_face(f), Side::Top);
  f.normal = { 0.8, 0, 0.6 };
  EXPECT_EQ(classify_face(f), Side::Sides);
  f.normal = { 0, 0.6, -0.8 };
  EXPECT_EQ(classify_face(f), Side::Bottom);
  f.normal = { 0, 0.8, -0.6 };
  EXPECT_EQ(classify_face(f), Side::Sides);
}

TEST(Geometry, WedgeAndPyramidCubeBoundaries)
{
  const Mesh w = cube_of_wedges(0);
  const auto wf = find_boundary_faces(w);
  ASSERT_EQ(wf.size(), 8u); // 2+2 triangles on top/bottom, 4 side quads
  EXPECT_NEAR(check_faces(w, wf), 6.0, 1e-14);
  EXPECT_EQ(select_faces(w, wf, Side::Top).size(), 2u);
  EXPECT_EQ(select_faces(w, wf, Side::Bottom).size(), 2u);

  const Mesh p = cube_of_pyramids(0);
  const auto pf = find_boundary_faces(p);
  ASSERT_EQ(pf.size(), 6u); // only the bases; the 24 triangles pair up inside
  EXPECT_NEAR(check_faces(p, pf), 6.0, 1e-14);
  for (const auto& f : pf)
    EXPECT_EQ(f.n_nodes, 4);
}

TEST(Geometry, MixedMeshIsConnectedAndHasBoxBoundary)
{
  const Mesh m = mixed_mesh();
  ASSERT_EQ(m.n_cells(), 9u);
  const MeshReport r = validate_mesh(m);
  EXPECT_EQ(r.n_pieces, 1u);
  EXPECT_TRUE(r.unreferenced_points.empty());
  const ElementMatrices em = compute_element_matrices(m);
  EXPECT_NEAR(total(em.cell_volume), 3.0, 1e-14);
  expect_element_invariants(m, em);
  const auto faces = find_boundary_faces(m);
  // 5 pyramid bases + 4 hex faces + 4 wedge triangles + 3 wedge quads.
  ASSERT_EQ(faces.size(), 16u);
  EXPECT_NEAR(check_faces(m, faces), 14.0, 1e-13);
  EXPECT_EQ(select_faces(m, faces, Side::Top).size(), 4u);
  EXPECT_EQ(select_faces(m, faces, Side::Top, { 2 }).size(), 2u);
  EXPECT_EQ(select_faces(m, faces, Side::Sides, { 0 }).size(), 3u);
}

// validate_mesh reports the boundary faces it meets in its face sort, which the heat operator
// uses instead of sorting every face again: the same faces, in the same order, with the same
// geometry as find_boundary_faces, on every cell type.
TEST(Geometry, ValidateMeshReportsTheBoundaryFaces)
{
  for (const Mesh& m : { mixed_mesh(), cube_of_wedges(0), cube_of_pyramids(0),
         make_box_tet({ 0, 0, 0 }, { 3, 2, 1 }, { 3, 2, 1 }) })
  {
    const MeshReport r = validate_mesh(m);
    const auto expected = find_boundary_faces(m);
    const auto faces = boundary_face_geometry(m, r.boundary_faces);
    ASSERT_EQ(faces.size(), expected.size());
    ASSERT_FALSE(faces.empty());
    for (std::size_t f = 0; f < faces.size(); ++f)
    {
      EXPECT_EQ(faces[f].cell, expected[f].cell) << "face " << f;
      EXPECT_EQ(faces[f].nodes, expected[f].nodes) << "face " << f;
      EXPECT_EQ(faces[f].area, expected[f].area) << "face " << f;
    }
  }
  // Kuhn tetrahedra split each square of a 3 × 2 × 1 box's surface in two: 2 (6 + 3 + 2) × 2.
  EXPECT_EQ(validate_mesh(make_box_tet({ 0, 0, 0 }, { 3, 2, 1 }, { 3, 2, 1 })).boundary_faces.size(),
    44u);
}
