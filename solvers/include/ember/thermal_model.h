/**
 * @file thermal_model.h
 * @brief Mesh + rock types per cell → nodal control volumes with their heat content.
 *
 * Vertex-centred finite elements with a lumped mass: node i owns the volume shares
 * V_ci = ∫_c N_i dV of its adjoining cells. Its heat content is
 *   E_i(T) = Σ_c ρ_c V_ci h_c(T)            [J]
 * so a node on a material interface carries the heat capacity and latent heat of each
 * adjoining cell's share, and E_i is strictly increasing in T (inverted by temperature()).
 */
#pragma once

#include "ember/geometry.h"
#include "ember/mesh.h"
#include "ember/node_cells.h"
#include "ember/rock.h"

#include <cmath>
#include <cstdint>
#include <vector>

namespace ember
{

/// Mass of one rock type inside a node's control volume.
struct NodeShare
{
  int rock = 0;
  double mass = 0.0;   ///< [kg]
  double volume = 0.0; ///< [m³]
};

/**
 * One node's shares, read from the model's per-share arrays. The arrays are kept apart, not as
 * NodeShare structs, because T(E) runs on every node every step and needs only each share's
 * rock and mass: 9 bytes instead of a 24-byte struct (bench/README.md, item 20).
 */
class NodeShares
{
public:
  NodeShares(const std::uint8_t* rock, const double* mass, const double* volume, std::size_t size)
    : rock_(rock), mass_(mass), volume_(volume), size_(size)
  {
  }
  std::size_t size() const { return size_; }
  bool empty() const { return size_ == 0; }
  NodeShare operator[](std::size_t k) const { return { rock_[k], mass_[k], volume_[k] }; }

  struct Iterator
  {
    const NodeShares* shares;
    std::size_t k;
    NodeShare operator*() const { return (*shares)[k]; }
    Iterator& operator++()
    {
      ++k;
      return *this;
    }
    bool operator!=(const Iterator& other) const { return k != other.k; }
  };
  Iterator begin() const { return { this, 0 }; }
  Iterator end() const { return { this, size_ }; }

private:
  const std::uint8_t* rock_;
  const double* mass_;
  const double* volume_;
  std::size_t size_;
};

class ThermalModel
{
public:
  /// cell_rock[c] indexes `rocks`. Validates the rocks and the mesh (throws naming ids).
  ThermalModel(const Mesh& mesh, std::vector<Rock> rocks, std::vector<int> cell_rock);

  const Mesh& mesh() const { return *mesh_; }
  /// ∫ N_a dV of each cell's nodes [m³], aligned with Mesh::cell_nodes. (The element
  /// stiffness is not kept: the heat operator folds it into its edge weights.)
  const std::vector<double>& cell_node_volumes() const { return cell_node_volume_; }
  const std::vector<Rock>& rocks() const { return rocks_; }
  const std::vector<int>& cell_rock() const { return cell_rock_; }
  /// Each rock's enthalpy fit (h, dh/dT and their bounds), indexed like rocks().
  const std::vector<EnthalpyFit>& enthalpy_fits() const { return enthalpy_; }
  std::size_t n_nodes() const { return mesh_->n_points(); }
  /// The mesh's outer faces as the constructor's validate_mesh() found them (cell, local face).
  const std::vector<CellFace>& boundary_faces() const { return boundary_faces_; }

  /// Shares of node i (the rock types of its cells, ascending by first appearance).
  NodeShares shares(std::size_t node) const
  {
    const std::uint32_t first = share_offsets_[node];
    return { share_rock_.data() + first, share_mass_.data() + first,
      share_volume_.data() + first, share_offsets_[node + 1] - first };
  }
  double node_volume(std::size_t node) const { return node_volume_[node]; }
  /// Radiogenic heat production of the node's control volume [W].
  double node_source(std::size_t node) const { return node_source_[node]; }
  const std::vector<double>& node_sources() const { return node_source_; }

  /// Heat content E_i(T) [J] and its derivative dE_i/dT [J/K] (latent term included).
  double energy(std::size_t node, double T) const;
  double capacity(std::size_t node, double T) const;
  /// Volume-weighted melt fraction of the node's control volume.
  double melt_fraction(std::size_t node, double T) const;
  /**
   * T such that E_i(T) = E [°C]: Newton's method on the monotone E_i from T_guess,
   * safeguarded by the bracket its iterates build, which is bisected whenever a Newton step
   * leaves it (the kinks at solidus and liquidus make plain Newton cycle). Stops when a Newton
   * correction is below 1e-9 (1 + |T|) K, returning the corrected value (in the quadratic
   * regime far more accurate than that), when the bracket is below 1e-12 (1 + |T|) K, or, on
   * single-rock nodes, when newton_settled() bounds the corrected value's error below
   * 1e-9 (1 + |T|) K.
   */
  double temperature(std::size_t node, double E, double T_guess) const;
  /**
   * T(E) after E_old → E at a node that was at T_old, starting Newton from the first-order
   * guess T_old + (E − E_old) · inverse_capacity, where `inverse_capacity` is 1/(dE_i/dT)
   * as the previous solve returned it (0: start from T_old); updated in place. With the
   * guess, most nodes converge on one enthalpy evaluation (bench/README.md); the result is
   * the same solve, only reached sooner. On single-rock nodes Newton stops as soon as
   * Taylor's bound on the error after its step (from the rock's curvature and capacity
   * bounds, EnthalpyFit) is within the tolerance. The slope is kept in single precision: it
   * only places the first guess (whose error the Newton step squares), and the update pass
   * streams it every step (bench/README.md, item 20).
   */
  double temperature_after_change(
    std::size_t node, double E, double E_old, double T_old, float& inverse_capacity) const
  {
    const double guess = T_old + (E - E_old) * static_cast<double>(inverse_capacity);
    double slope; // 1/(dE/dT) where the solve evaluated it last
    double T = guess;
    // Inline: one Newton step on a single-rock node, the path nearly every node takes. Not
    // settled (near a solidus or liquidus, or several rocks): iterate on from there.
    const std::uint32_t share = share_offsets_[node];
    if (share_offsets_[node + 1] - share != 1 ||
        !settled_newton_step(enthalpy_[share_rock_[share]], share_mass_[share], E, guess, T, slope))
      T = solve_temperature(
        node, E, std::isfinite(T) ? T : (std::isfinite(guess) ? guess : T_old), slope);
    inverse_capacity = static_cast<float>(slope);
    return T;
  }

  /**
   * Whether nodes node … node + count − 1 have one share each, all of one rock; if so, that
   * rock and their masses (side by side in the share arrays: one share per node). The vector
   * T(E) asks it for every block of lanes.
   */
  bool one_rock_run(std::size_t node, std::size_t count, int& rock, const double*& mass) const
  {
    const std::uint32_t first = share_offsets_[node];
    bool one = share_offsets_[node + count] - first == count;
    for (std::size_t l = 1; l < count; ++l) // with the total: one share per node
      one = one && share_offsets_[node + l] == first + l;
    if (!one)
      return false;
    for (std::size_t l = 1; l < count; ++l)
      one = one && share_rock_[first + l] == share_rock_[first];
    rock = share_rock_[first];
    mass = share_mass_.data() + first;
    return one;
  }

  /**
   * temperature_after_change() for nodes first … first + count − 1 at once: E, E_old, T (in:
   * T_old, out: T) and inverse_capacity point at the block's first node. Runs of single-rock
   * nodes of one rock take the Newton step several nodes at a time (simd.h); the results are
   * the one-node call's, bit for bit.
   */
  void temperatures_after_change(std::size_t first, std::size_t count, const double* E,
    const double* E_old, double* T, float* inverse_capacity) const;

  /// Change the rock of the listed cells (an emplacement); node shares are rebuilt.
  void set_cell_rock(const std::vector<std::int64_t>& cells, int rock);

private:
  void build_shares();
  double solve_temperature(std::size_t node, double E, double T_guess,
    double& inverse_capacity) const;
  /**
   * Whether the Newton step from T (residual r = E(T) − E, C = dE/dT at T) on a node of one
   * rock of mass m lands within the stopping tolerance 1e-9 (1 + |T|) of the root. The error
   * after the step is at most m·curvature_bound·r² / (2 C F²) with F = m·capacity_floor ≤
   * dE/dT (Taylor's theorem), valid when no solidus or liquidus lies within |r| / F of T, the
   * farthest the root can be. Multiplied out: no division.
   */
  static bool newton_settled(const EnthalpyFit& fit, double m, double T, double r, double C)
  {
    const double floor = m * fit.capacity_floor;
    return floor > 0.0 && fit.kink_distance(T) * floor > std::abs(r) &&
      m * fit.curvature_bound * r * r <= 2e-9 * (1.0 + std::abs(T)) * C * floor * floor;
  }
  /// One Newton step for m h(T) = E from T_guess: sets T and inverse_capacity (1/(dE/dT) at
  /// T_guess); true if newton_settled. With newton_settled and EnthalpyFit::evaluate it is
  /// written again for vectors of nodes in thermal_model_batch.cpp: change them together
  /// (test_simd fails on any difference in bits).
  static bool settled_newton_step(const EnthalpyFit& fit, double m, double E, double T_guess,
    double& T, double& inverse_capacity)
  {
    double h, c;
    fit.evaluate(T_guess, h, c);
    const double r = m * h - E, C = m * c;
    inverse_capacity = 1.0 / C;
    T = T_guess - r * inverse_capacity;
    return newton_settled(fit, m, T_guess, r, C);
  }

  const Mesh* mesh_;
  std::vector<CellFace> boundary_faces_;
  std::vector<double> cell_node_volume_;
  std::vector<Rock> rocks_;
  std::vector<EnthalpyFit> enthalpy_; ///< per rock
  std::vector<int> cell_rock_;
  std::vector<std::uint32_t> share_offsets_;
  /// Node i's shares are entries [share_offsets_[i], share_offsets_[i+1]) of these three.
  std::vector<std::uint8_t> share_rock_;
  std::vector<double> share_mass_;
  std::vector<double> share_volume_;
  std::vector<double> node_volume_;
  std::vector<double> node_source_;
};

} // namespace ember
