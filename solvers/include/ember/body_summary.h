/**
 * @file body_summary.h
 * @brief Per-region and whole-model summary of a thermal state and its history: volume, melt
 *        fraction, heat in place, recoverable heat, time to full solidification, contact
 *        temperature and aureole thicknesses of intrusive bodies.
 *
 * Heat in place is the volumetric method of Muffler & Cataldi (1978), Geothermics 7, 53–89:
 * H = ρc V (T − T_ref), generalised with the rock's specific enthalpy so that latent heat and
 * c(T) count: H = Σ over the region's cells c and their nodes a of ρ_c V_ca (h_c(T_a) − h_c(T_ref)),
 * the same nodal control-volume shares the heat balance uses. H is signed (rock colder than
 * T_ref counts negative), so the whole-model value changes exactly as the energy ledger's
 * stored heat. Recoverable heat is R·H with a user recovery factor R.
 *
 * Nodes on a region's boundary belong to the region (their cells in the region count with
 * their volume shares; for nodal quantities such as solidification they count whole). The
 * contact temperature of a body is therefore read one node out, on the host side (see
 * RegionSummary::contact_temperature).
 * Temperatures in °C, times in s, volumes in m³, heat in J, distances in m.
 */
#pragma once

#include "ember/thermal_model.h"

#include <span>
#include <vector>

namespace ember
{

struct BodySummarySettings
{
  /// T_ref of the heat in place [°C]; the local mean annual surface temperature is the usual
  /// choice (Muffler & Cataldi 1978, convention recalled from memory, check).
  double reference_temperature = 10.0;
  /// R in [0, 1]. 0.1 lies in the 0.08–0.2 range of later USGS assessments (from memory,
  /// check; USGS Circular 790 used 0.25 for hydrothermal systems).
  double recovery_factor = 0.1;
  /// Region ids of the intrusive bodies: contact temperature and aureoles are reported for
  /// these only (NaN for other regions); the host of an aureole is every node outside them.
  std::vector<int> bodies;
  /// Aureole limit on the peak temperature [°C] (illustrative default, no source: set it for
  /// the question at hand, above the background peak temperature).
  double aureole_temperature = 300.0;
  /// Aureole limit on EASY%Ro [%Ro] (illustrative default, no source; above the background).
  double aureole_reflectance = 1.0;
};

/// Throws std::invalid_argument naming the value or region id: recovery factor outside [0, 1],
/// a body region no cell carries, non-finite temperatures or reflectance.
void validate(const BodySummarySettings& settings, const Mesh& mesh);

struct RegionSummary
{
  int region = -1;                  ///< region id; −1 for the whole model
  double volume = 0.0;              ///< [m³]
  double melt_volume_fraction = 0.0; ///< melt volume / volume [-]
  double heat_in_place = 0.0;       ///< Σ mass · (h(T) − h(T_ref)) [J]
  double recoverable_heat = 0.0;    ///< recovery factor · heat in place [J]
  /// Time the last of the region's nodes solidified [s]: NaN if none was ever molten, +∞ while
  /// any still is. Nodes on the contact of a body count for the body and the whole model, not
  /// for the host region around it (their control volumes hold the body's magma), so a host
  /// region reports its own melting, if any.
  double solidification_time = 0.0;
  /// Bodies only: maximum contact temperature [°C], read on the host side: the highest peak
  /// temperature among the host-side contact nodes, i.e. nodes of no body (of none of
  /// `BodySummarySettings::bodies`) joined by a cell edge to one of this body's boundary nodes.
  /// NaN if the body has no such node or no peak temperature was recorded.
  ///
  /// Why not the boundary nodes themselves: with a lumped enthalpy a boundary node's heat
  /// content is the sum of its body and host shares, E_i = Σ_c ρ_c V_ci h_c(T), so at
  /// emplacement it takes the temperature of a mixture of magma (with its latent heat) and
  /// cold host, whatever the cell size: for basaltic magma into cold sediment that lies near
  /// or in the magma's melting interval, where latent heat holds it until the node's magma
  /// share has frozen. The analytical contact temperature is far lower: half-way between host
  /// and magma temperature without latent heat (Carslaw & Jaeger 1959 ch. 2; the
  /// effusivity-weighted mean (e1 T1 + e2 T2)/(e1 + e2), e = √(kρc), for unequal rocks, same
  /// book, composite media, from memory) and T0 + (Tm − T0)/(1 + erf λ) for magma intruded at
  /// its melting point (Turcotte & Schubert 2002, solidification of a dike or sill; 0.62 of
  /// the way for L = 400 kJ/kg, c = 1 kJ/kg/K, ΔT = 1000 K, where the boundary node starts at
  /// 0.70). A host-side node holds host rock only, so its peak converges to the contact value
  /// as the cells shrink, first order in its distance d from the contact (about
  /// ΔT·(2/√π)(λd/b)/(1 + erf λ) low beside a sill of half-thickness b intruded at its
  /// melting point); `contact_distance` says how far from the contact it was taken.
  double contact_temperature = 0.0;
  /// Bodies only: distance from the host-side node that gave `contact_temperature` to the
  /// nearest of the body's boundary nodes [m] (the node spacing across the contact on a
  /// structured mesh); NaN when `contact_temperature` is NaN.
  double contact_distance = 0.0;
  /// Bodies only: largest distance from the body's boundary nodes to a host node whose peak
  /// temperature exceeded aureole_temperature [m], counting only host nodes connected to
  /// the body through such nodes (so neighbouring bodies' aureoles and a hot deep background
  /// not touching the body are excluded). Resolution: the node spacing.
  double aureole_thickness_temperature = 0.0;
  /// Same with EASY%Ro above aureole_reflectance (organic nodes only) [m].
  double aureole_thickness_reflectance = 0.0;
};

struct BodySummary
{
  double time = 0.0;                  ///< [s]
  std::vector<RegionSummary> regions; ///< one per region id present, ascending
  RegionSummary model;                ///< whole model (region −1); contact and aureole: the
                                      ///< maximum over the bodies, NaN without bodies;
                                      ///< contact_distance: that of the body giving the
                                      ///< maximum contact temperature
};

/// Per-node history the summary reads; empty spans are treated as "not recorded" (NaN).
struct NodeHistory
{
  std::span<const double> peak_temperature;    ///< [°C]
  std::span<const double> solidification_time; ///< [s], NaN never molten, +∞ still molten
  std::span<const double> reflectance;         ///< [%Ro], NaN where not organic
};

/// Summary of the state T [°C] at `time` with the model's current rock assignment.
BodySummary summarize_bodies(const ThermalModel& model, double time, const std::vector<double>& T,
  const NodeHistory& history, const BodySummarySettings& settings);

} // namespace ember
