#include "ember/geometry.h"

#include "cell_faces.h"
#include "huge_pages.h"

#include <Eigen/Dense>

#include <algorithm>
#include <cmath>
#include <sstream>
#include <tuple>

/*
 * Reference elements (all isoparametric, so linear fields are reproduced exactly):
 *  - tetrahedron: P1 barycentric basis on the unit simplex; 1-point rule (constant gradients).
 *  - hexahedron: trilinear Q1 on [-1,1]^3; 2x2x2 Gauss for volumes, the 8-point vertex rule
 *    for the stiffness (see stiffness_quadrature: it keeps the maximum principle on bricks).
 *  - wedge: linear triangle (r,s) x linear segment zeta in [-1,1]; 3-point (degree 2) triangle
 *    rule x 2-point Gauss = 6 points.
 *  - pyramid: the standard rational pyramid basis, written as a hexahedron collapsed onto the
 *    apex (Duffy map): base nodes use the Q1 functions of hex nodes 0-3, the apex gets the sum
 *    of the four top functions, (1+zeta)/2. On the triangular faces it reduces to linear
 *    functions (conforming with tetrahedra), on the base to bilinear ones (conforming with
 *    hexahedra). Integrated with 2x2x2 Gauss in the hex reference.
 *
 * Why these rules suffice: in every case the map x(xi) is polynomial with det J of degree <= 2
 * per reference variable (or total degree <= 1 in the triangle variables), so volume,
 * ∫N_a dV and ∫∇N_a dV = ∫adj(J)^T ∇_xi N_a dxi are integrated exactly, on any (also
 * non-affine) cell. With linear-field reproduction this gives the patch test:
 * (K T)_a = ∫∇N_a dV · g exactly for T = g·x. The stiffness itself (rational integrand) is
 * exact only on affine tets/hexes/wedges.
 */

namespace ember
{
namespace
{

using Vec3 = Eigen::Vector3d;
constexpr int max_nodes = 8;
constexpr std::size_t max_listed_ids = 20;

std::string list_cells(const std::vector<std::int64_t>& ids)
{
  std::ostringstream s;
  s << (ids.size() == 1 ? "cell " : "cells ");
  const std::size_t shown = std::min(ids.size(), max_listed_ids);
  for (std::size_t i = 0; i < shown; ++i)
    s << (i ? ", " : "") << ids[i];
  if (ids.size() > shown)
    s << " and " << ids.size() - shown << " more (" << ids.size() << " in total)";
  return s.str();
}

// ---------------------------------------------------------------------------------------------
// Reference elements

struct QuadPoint
{
  std::array<double, 3> xi;
  double w;
};

const double g = 1.0 / std::sqrt(3.0); // 2-point Gauss abscissa on [-1,1]

std::vector<QuadPoint> gauss_2x2x2()
{
  std::vector<QuadPoint> q;
  for (const double z : { -g, g })
    for (const double y : { -g, g })
      for (const double x : { -g, g })
        q.push_back({ { x, y, z }, 1.0 });
  return q;
}

std::vector<QuadPoint> wedge_rule()
{
  // Strang-Fix 3-point triangle rule (degree 2, interior points), weights sum to 1/2.
  const double tri[3][2] = { { 1.0 / 6, 1.0 / 6 }, { 2.0 / 3, 1.0 / 6 }, { 1.0 / 6, 2.0 / 3 } };
  std::vector<QuadPoint> q;
  for (const double z : { -g, g })
    for (const auto& t : tri)
      q.push_back({ { t[0], t[1], z }, 1.0 / 6.0 });
  return q;
}

const std::vector<QuadPoint>& quadrature(CellType type)
{
  static const std::vector<QuadPoint> tet = { { { 0.25, 0.25, 0.25 }, 1.0 / 6.0 } };
  static const std::vector<QuadPoint> hex = gauss_2x2x2();
  static const std::vector<QuadPoint> wedge = wedge_rule();
  switch (type)
  {
  case CellType::Tetrahedron: return tet;
  case CellType::Hexahedron: return hex;
  case CellType::Wedge: return wedge;
  case CellType::Pyramid: return hex; // collapsed hexahedron
  }
  throw MeshError("invalid cell type");
}

// Stiffness of hexahedra by the vertex (trapezoidal) rule. On a brick, Gauss integration of
// ∇N_a·∇N_b couples nodes across face and body diagonals with positive weights once the aspect
// ratio exceeds √2, so the operator is no M-matrix and explicit steps undershoot (a graded mesh
// with 5 m cells across a sill and 100 m along it gave −64 °C in a 10 °C host). The vertex rule
// couples only along edges, with negative weights for any aspect ratio: the discrete maximum
// principle holds on bricks. It still integrates ∇N_a·g exactly on parallelepipeds (the patch
// test), and is second-order accurate like the Gauss rule (it is the 7-point finite-difference
// stencil on a regular grid). Volume shares keep the exact Gauss rule.
const std::vector<QuadPoint>& stiffness_quadrature(CellType type)
{
  static const std::vector<QuadPoint> vertex = [] {
    std::vector<QuadPoint> q;
    for (const double z : { -1.0, 1.0 })
      for (const double y : { -1.0, 1.0 })
        for (const double x : { -1.0, 1.0 })
          q.push_back({ { x, y, z }, 1.0 });
    return q;
  }();
  return type == CellType::Hexahedron ? vertex : quadrature(type);
}

// Reference coordinates of the VTK hexahedron nodes.
constexpr int hex_sign[8][3] = { { -1, -1, -1 }, { 1, -1, -1 }, { 1, 1, -1 }, { -1, 1, -1 },
  { -1, -1, 1 }, { 1, -1, 1 }, { 1, 1, 1 }, { -1, 1, 1 } };

struct ShapeValues
{
  std::array<double, max_nodes> N{};
  std::array<Vec3, max_nodes> dN{}; ///< reference gradients
};

void hex_shape(const std::array<double, 3>& xi, int n, ShapeValues& s)
{
  for (int a = 0; a < n; ++a)
  {
    double f[3];
    for (int d = 0; d < 3; ++d)
      f[d] = 1.0 + hex_sign[a][d] * xi[d];
    s.N[a] = f[0] * f[1] * f[2] / 8.0;
    s.dN[a] = Vec3(hex_sign[a][0] * f[1] * f[2], hex_sign[a][1] * f[0] * f[2],
                hex_sign[a][2] * f[0] * f[1]) / 8.0;
  }
}

ShapeValues shape(CellType type, const std::array<double, 3>& xi)
{
  ShapeValues s;
  const double r = xi[0], t = xi[1], z = xi[2];
  switch (type)
  {
  case CellType::Tetrahedron:
    s.N = { 1 - r - t - z, r, t, z };
    s.dN = { Vec3(-1, -1, -1), Vec3(1, 0, 0), Vec3(0, 1, 0), Vec3(0, 0, 1) };
    break;
  case CellType::Hexahedron: hex_shape(xi, 8, s); break;
  case CellType::Wedge:
  {
    // A valid VTK wedge has (0,1,2) clockwise seen from (3,4,5), so node 1 sits at s=1 and
    // node 2 at r=1: then a valid wedge has det J > 0.
    const double lam[3] = { 1 - r - t, t, r };
    const Vec3 dlam[3] = { Vec3(-1, -1, 0), Vec3(0, 1, 0), Vec3(1, 0, 0) };
    for (int i = 0; i < 3; ++i)
    {
      s.N[i] = lam[i] * (1 - z) / 2;
      s.N[i + 3] = lam[i] * (1 + z) / 2;
      s.dN[i] = dlam[i] * (1 - z) / 2 + Vec3(0, 0, -lam[i] / 2);
      s.dN[i + 3] = dlam[i] * (1 + z) / 2 + Vec3(0, 0, lam[i] / 2);
    }
    break;
  }
  case CellType::Pyramid:
    hex_shape(xi, 4, s); // base nodes 0-3
    s.N[4] = (1 + z) / 2; // apex = hex nodes 4-7 collapsed
    s.dN[4] = Vec3(0, 0, 0.5);
    break;
  }
  return s;
}

// Shape values at each point of a rule: the same for every cell of a type, so evaluated once
// per type rather than at every point of every cell (a tenth of set-up's instructions).
enum class Rule
{
  Volume,   ///< quadrature()
  Stiffness ///< stiffness_quadrature()
};
const std::vector<ShapeValues>& shapes_at(CellType type, Rule rule)
{
  static const auto table = [] {
    std::array<std::array<std::vector<ShapeValues>, 2>, 4> t;
    for (const CellType type :
      { CellType::Tetrahedron, CellType::Hexahedron, CellType::Wedge, CellType::Pyramid })
      for (const Rule rule : { Rule::Volume, Rule::Stiffness })
        for (const QuadPoint& q :
          rule == Rule::Volume ? quadrature(type) : stiffness_quadrature(type))
          t[static_cast<int>(type)][static_cast<int>(rule)].push_back(shape(type, q.xi));
    return t;
  }();
  return table[static_cast<int>(type)][static_cast<int>(rule)];
}

// Corner checks: tet (a,b,c,d) must have det(b-a, c-a, d-a) > 0. For hexes and wedges this is
// the Jacobian at corner a (edges to its three neighbours, right-handed in a valid VTK cell).
// The pyramid apex has det J = 0 in the collapsed map, so it is covered by the four base
// corner tets instead (apex above each base triangle).
using CornerTet = std::array<int, 4>;
const std::vector<CornerTet>& corner_tets(CellType type)
{
  static const std::vector<CornerTet> tet = { { 0, 1, 2, 3 } };
  static const std::vector<CornerTet> hex = { { 0, 1, 3, 4 }, { 1, 2, 0, 5 }, { 2, 3, 1, 6 },
    { 3, 0, 2, 7 }, { 4, 7, 5, 0 }, { 5, 4, 6, 1 }, { 6, 5, 7, 2 }, { 7, 6, 4, 3 } };
  static const std::vector<CornerTet> wedge = { { 0, 2, 1, 3 }, { 1, 0, 2, 4 }, { 2, 1, 0, 5 },
    { 3, 4, 5, 0 }, { 4, 5, 3, 1 }, { 5, 3, 4, 2 } };
  static const std::vector<CornerTet> pyramid = { { 0, 1, 3, 4 }, { 1, 2, 0, 4 }, { 2, 3, 1, 4 },
    { 3, 0, 2, 4 } };
  switch (type)
  {
  case CellType::Tetrahedron: return tet;
  case CellType::Hexahedron: return hex;
  case CellType::Wedge: return wedge;
  case CellType::Pyramid: return pyramid;
  }
  throw MeshError("invalid cell type");
}

// ---------------------------------------------------------------------------------------------
// Cell geometry

struct CellCoords
{
  int n = 0;
  std::array<Vec3, max_nodes> x{};
};

CellCoords coords(const Mesh& mesh, std::size_t c)
{
  CellCoords cc;
  const auto nodes = mesh.nodes(c);
  cc.n = static_cast<int>(nodes.size());
  for (int a = 0; a < cc.n; ++a)
  {
    const Point& p = mesh.points[nodes[a]];
    cc.x[a] = Vec3(p[0], p[1], p[2]);
  }
  return cc;
}

/// True if the cell's node ids exist and their count matches the type (safe to evaluate).
bool well_formed(const Mesh& mesh, std::size_t c)
{
  const auto nodes = mesh.nodes(c);
  if (static_cast<int>(nodes.size()) != n_cell_nodes(mesh.cell_types[c]))
    return false;
  const auto np = static_cast<std::int64_t>(mesh.n_points());
  return std::all_of(nodes.begin(), nodes.end(), [np](auto id) { return id >= 0 && id < np; });
}

/// Jacobian J_ij = ∂x_i/∂xi_j at a point with shape values s.
Eigen::Matrix3d jacobian(const CellCoords& cc, const ShapeValues& s)
{
  Eigen::Matrix3d J = Eigen::Matrix3d::Zero();
  for (int a = 0; a < cc.n; ++a)
    J += cc.x[a] * s.dN[a].transpose();
  return J;
}

bool jacobian_ok(CellType type, const CellCoords& cc)
{
  // "Non-positive" with a tolerance relative to the cell size, so a flattened cell whose
  // determinant is round-off noise (±1e-17) counts as degenerate. !(det > tol) also catches NaN.
  Eigen::AlignedBox3d box;
  for (int a = 0; a < cc.n; ++a)
    box.extend(cc.x[a]);
  const double h = box.diagonal().norm();
  const double tol = 1e-12 * h * h * h;
  for (const auto& t : corner_tets(type))
  {
    Eigen::Matrix3d E;
    E << cc.x[t[1]] - cc.x[t[0]], cc.x[t[2]] - cc.x[t[0]], cc.x[t[3]] - cc.x[t[0]];
    if (!(E.determinant() > tol))
      return false;
  }
  for (const ShapeValues& shape_values : shapes_at(type, Rule::Volume))
    if (!(jacobian(cc, shape_values).determinant() > tol))
      return false;
  return true;
}

void check_ids(const Mesh& mesh)
{
  if (mesh.cell_offsets.size() != mesh.n_cells() + 1)
    throw MeshError("mesh cell_offsets must have n_cells()+1 entries");
  std::vector<std::int64_t> bad;
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    if (!well_formed(mesh, c))
      bad.push_back(static_cast<std::int64_t>(c));
  if (!bad.empty())
    throw MeshError(list_cells(bad) +
      ": node count does not match the cell type or node ids are out of range");
}

/// Outward area, node shares and normal of one face (nodes in outward order).
BoundaryFace face_geometry(const Mesh& mesh, std::int64_t cell, const std::array<std::int64_t, 4>& ids, int n)
{
  BoundaryFace f;
  f.cell = cell;
  f.n_nodes = n;
  f.nodes = ids;
  Vec3 x[4];
  for (int a = 0; a < n; ++a)
    x[a] = Vec3(mesh.points[ids[a]][0], mesh.points[ids[a]][1], mesh.points[ids[a]][2]);

  Vec3 area_vector = Vec3::Zero();
  if (n == 3)
  {
    area_vector = 0.5 * (x[1] - x[0]).cross(x[2] - x[0]);
    f.area = area_vector.norm();
    for (int a = 0; a < 3; ++a)
      f.node_area[a] = f.area / 3.0; // ∫ N_a dA of a linear triangle
  }
  else
  {
    // Bilinear quad on [-1,1]^2, nodes counter-clockwise: 2x2 Gauss on |x_u × x_v|, exact for a
    // planar parallelogram and a good approximation for a warped face.
    constexpr int su[4] = { -1, 1, 1, -1 }, sv[4] = { -1, -1, 1, 1 };
    for (const double u : { -g, g })
      for (const double v : { -g, g })
      {
        Vec3 xu = Vec3::Zero(), xv = Vec3::Zero();
        double N[4];
        for (int a = 0; a < 4; ++a)
        {
          N[a] = (1 + su[a] * u) * (1 + sv[a] * v) / 4;
          xu += su[a] * (1 + sv[a] * v) / 4 * x[a];
          xv += sv[a] * (1 + su[a] * u) / 4 * x[a];
        }
        const Vec3 c = xu.cross(xv);
        const double dA = c.norm();
        area_vector += c;
        f.area += dA;
        for (int a = 0; a < 4; ++a)
          f.node_area[a] += N[a] * dA;
      }
  }
  const double len = area_vector.norm();
  if (len > 0)
    for (int d = 0; d < 3; ++d)
      f.normal[d] = area_vector[d] / len;
  return f;
}

} // namespace

std::vector<std::int64_t> cells_with_bad_jacobian(const Mesh& mesh)
{
  std::vector<std::int64_t> bad;
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    // A cell whose nodes cannot be looked up has no valid Jacobian either.
    if (!well_formed(mesh, c) || !jacobian_ok(mesh.cell_types[c], coords(mesh, c)))
      bad.push_back(static_cast<std::int64_t>(c));
  }
  return bad;
}

namespace
{
void throw_bad_jacobians(const std::vector<std::int64_t>& bad)
{
  throw MeshError(list_cells(bad) + (bad.size() == 1 ? " has" : " have") +
    " a non-positive Jacobian determinant (inverted, degenerate or not in VTK node order)");
}

void require_positive_jacobians(const Mesh& mesh)
{
  check_ids(mesh);
  const auto bad = cells_with_bad_jacobian(mesh);
  if (!bad.empty())
    throw_bad_jacobians(bad);
}

// Adds cell c's ∫ N_a dV to V[a] and returns its volume; clears `positive` if a Jacobian
// determinant at the volume quadrature points is not positive.
double add_nodal_volumes(
  const Mesh& mesh, std::size_t c, const CellCoords& cc, double* V, bool& positive)
{
  double volume = 0.0;
  const std::vector<QuadPoint>& rule = quadrature(mesh.cell_types[c]);
  const std::vector<ShapeValues>& shapes = shapes_at(mesh.cell_types[c], Rule::Volume);
  for (std::size_t k = 0; k < rule.size(); ++k)
  {
    const ShapeValues& s = shapes[k];
    const double det = jacobian(cc, s).determinant();
    positive = positive && det > 0.0;
    const double dV = rule[k].w * det;
    for (int a = 0; a < cc.n; ++a)
      V[a] += s.N[a] * dV;
    volume += dV;
  }
  return volume;
}
} // namespace

std::vector<double> compute_nodal_volumes(const Mesh& mesh)
{
  check_ids(mesh);
  std::vector<double> nodal_volume;
  reserve_on_huge_pages(nodal_volume, mesh.cell_nodes.size());
  nodal_volume.assign(mesh.cell_nodes.size(), 0.0);
  std::vector<std::int64_t> bad;
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    bool positive = true;
    add_nodal_volumes(
      mesh, c, coords(mesh, c), nodal_volume.data() + mesh.cell_offsets[c], positive);
    if (!positive)
      bad.push_back(static_cast<std::int64_t>(c));
  }
  if (!bad.empty())
    throw_bad_jacobians(bad);
  return nodal_volume;
}

namespace
{
// Adds cell c's ∫ ∇N_a·∇N_b dV to the n×n block K; false if a Jacobian determinant at the
// stiffness quadrature points is not positive.
bool add_stiffness(CellType type, const CellCoords& cc, double* K)
{
  const int n = cc.n;
  const std::vector<QuadPoint>& rule = stiffness_quadrature(type);
  const std::vector<ShapeValues>& shapes = shapes_at(type, Rule::Stiffness);
  bool positive = true;
  for (std::size_t k = 0; k < rule.size(); ++k)
  {
    const ShapeValues& s = shapes[k];
    const Eigen::Matrix3d J = jacobian(cc, s);
    const double det = J.determinant();
    positive = positive && det > 0.0;
    const double dV = rule[k].w * det;
    const Eigen::Matrix3d Jinv_t = J.inverse().transpose();
    std::array<Vec3, max_nodes> grad;
    for (int a = 0; a < n; ++a)
      grad[a] = Jinv_t * s.dN[a]; // ∇N = J^-T ∇_xi N
    for (int a = 0; a < n; ++a)
      for (int b = 0; b < n; ++b)
        K[a * n + b] += grad[a].dot(grad[b]) * dV;
  }
  return positive;
}
} // namespace

ElementMatrices compute_element_matrices(const Mesh& mesh)
{
  require_positive_jacobians(mesh);
  ElementMatrices em = compute_element_stiffness(mesh);
  em.nodal_volume.assign(mesh.cell_nodes.size(), 0.0);
  em.cell_volume.assign(mesh.n_cells(), 0.0);
  bool positive = true; // checked in full above
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    em.cell_volume[c] = add_nodal_volumes(
      mesh, c, coords(mesh, c), em.nodal_volume.data() + mesh.cell_offsets[c], positive);
  return em;
}

ElementMatrices compute_element_stiffness(const Mesh& mesh)
{
  check_ids(mesh);
  ElementMatrices em;
  em.stiffness_offsets.assign(mesh.n_cells() + 1, 0);
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    const auto n = static_cast<std::int64_t>(mesh.nodes(c).size());
    em.stiffness_offsets[c + 1] = em.stiffness_offsets[c] + n * n;
  }
  reserve_on_huge_pages(em.stiffness, static_cast<std::size_t>(em.stiffness_offsets.back()));
  em.stiffness.assign(static_cast<std::size_t>(em.stiffness_offsets.back()), 0.0);
  std::vector<std::int64_t> bad;
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    if (!add_stiffness(mesh.cell_types[c], coords(mesh, c),
          em.stiffness.data() + em.stiffness_offsets[c]))
      bad.push_back(static_cast<std::int64_t>(c));
  if (!bad.empty())
    throw_bad_jacobians(bad);
  return em;
}

std::vector<BoundaryFace> find_boundary_faces(const Mesh& mesh)
{
  check_ids(mesh);
  return boundary_face_geometry(mesh, faces_of_one_cell(sorted_cell_faces(mesh)));
}

std::vector<BoundaryFace> boundary_face_geometry(const Mesh& mesh,
  const std::vector<CellFace>& faces)
{
  std::vector<BoundaryFace> result;
  result.reserve(faces.size());
  for (const CellFace& f : faces)
  {
    const auto nodes = mesh.nodes(f.cell);
    const LocalFace& lf = local_faces(mesh.cell_types[f.cell])[f.local];
    std::array<std::int64_t, 4> ids{ -1, -1, -1, -1 };
    for (int i = 0; i < lf.n; ++i)
      ids[i] = nodes[lf.v[i]];
    result.push_back(face_geometry(mesh, f.cell, ids, lf.n));
  }
  return result;
}

Side classify_face(const BoundaryFace& face)
{
  const double c45 = std::sqrt(0.5);
  if (face.normal[2] > c45)
    return Side::Top;
  if (face.normal[2] < -c45)
    return Side::Bottom;
  return Side::Sides;
}

std::vector<std::size_t> select_faces(const Mesh& mesh, const std::vector<BoundaryFace>& faces,
  Side side, const std::vector<int>& regions)
{
  std::vector<std::size_t> selected;
  for (std::size_t i = 0; i < faces.size(); ++i)
  {
    if (classify_face(faces[i]) != side)
      continue;
    const int region = mesh.cell_region.at(static_cast<std::size_t>(faces[i].cell));
    if (!regions.empty() && std::find(regions.begin(), regions.end(), region) == regions.end())
      continue;
    selected.push_back(i);
  }
  return selected;
}

} // namespace ember
