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

  /// Shares of node i (the rock types of its cells, ascending by first appearance).
  std::span<const NodeShare> shares(std::size_t node) const
  {
    return { shares_.data() + share_offsets_[node],
      static_cast<std::size_t>(share_offsets_[node + 1] - share_offsets_[node]) };
  }
  double node_volume(std::size_t node) const { return node_volume_[node]; }
  /// Radiogenic heat production of the node's control volume [W].
  double node_source(std::size_t node) const { return node_source_[node]; }

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
   * bounds, EnthalpyFit) is within the tolerance.
   */
  double temperature_after_change(
    std::size_t node, double E, double E_old, double T_old, double& inverse_capacity) const
  {
    const double guess = T_old + (E - E_old) * inverse_capacity;
    // Inline: one Newton step on a single-rock node, the path nearly every node takes.
    if (share_offsets_[node + 1] - share_offsets_[node] == 1)
    {
      const NodeShare& share = shares_[share_offsets_[node]];
      double T;
      if (settled_newton_step(enthalpy_[share.rock], share.mass, E, guess, T, inverse_capacity))
        return T;
      if (std::isfinite(T)) // not settled (near a solidus or liquidus): iterate on from there
        return solve_temperature(node, E, T, inverse_capacity);
    }
    return solve_temperature(node, E, std::isfinite(guess) ? guess : T_old, inverse_capacity);
  }

  /**
   * temperature_after_change() for nodes first … first + count − 1 at once: E, E_old, T (in:
   * T_old, out: T) and inverse_capacity point at the block's first node. Runs of single-rock
   * nodes of one rock take the Newton step several nodes at a time (simd.h); the results are
   * the one-node call's, bit for bit.
   */
  void temperatures_after_change(std::size_t first, std::size_t count, const double* E,
    const double* E_old, double* T, double* inverse_capacity) const;

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
  std::vector<double> cell_node_volume_;
  std::vector<Rock> rocks_;
  std::vector<EnthalpyFit> enthalpy_; ///< per rock
  std::vector<int> cell_rock_;
  std::vector<std::uint32_t> share_offsets_;
  std::vector<NodeShare> shares_;
  std::vector<double> node_volume_;
  std::vector<double> node_source_;
};

} // namespace ember
