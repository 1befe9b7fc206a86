/**
 * @file thermal_history.h
 * @brief Per-node thermal history recorded inside the solve: peak temperature and its time,
 *        solidification time, time above temperature thresholds, EASY%Ro of organic-bearing
 *        rock, and (optionally) the per-body summary table at every output time.
 *
 * Between two driver calls (the ends of a step, however long: forward-Euler steps or RKL2
 * super-steps alike) each node's temperature is taken linear in time, and every product is
 * exact for that linear history: the peak of a linear segment is at an end, the time above a
 * threshold and the solidification time come from the segment's crossing, and the EASY%Ro
 * increment is the exact linear-ramp integral (easy_ro.h). Each node is updated on its own, so
 * results are bitwise identical for any thread count.
 *
 * Point arrays written into each Snapshot (names are public API, used by the filters):
 *  - "PeakTemperature"        [°C]  highest temperature so far (start value included)
 *  - "PeakTemperatureTime"    [s]   first time that peak was reached
 *  - "SolidificationTime"     [s]   when the node's melt fraction last fell to zero; NaN if
 *                                   the node has never been molten, +∞ while it still is
 *  - "TimeAbove<θ>C"          [s]   time spent above threshold θ, one array per threshold
 *                                   (e.g. "TimeAbove300C", θ printed with %g)
 *  - "EasyRo"                 [%Ro] vitrinite reflectance; NaN on nodes that are not organic
 *
 * Memory: 8·(4 + n_thresholds) + 5 bytes per node (previous T, peak, peak time,
 * solidification time, time above each threshold, a molten flag, a 4-byte organic index) plus
 * 164 bytes (20 reaction integrals, its region's index) per organic-bearing node only.
 */
#pragma once

#include "ember/body_summary.h"
#include "ember/easy_ro.h"
#include "ember/simulation.h"

#include <cstdint>
#include <optional>
#include <vector>

namespace ember
{

/// Maturity of organic-bearing rock at the start of the run.
struct InitialMaturity
{
  enum class Kind
  {
    Unreacted,   ///< all reactions at zero: 0.2019 %Ro
    Reflectance, ///< a given %Ro, as reached by heating at `heating_rate` from `surface_temperature`
    Burial       ///< heated at a constant rate from `surface_temperature` to the node's
                 ///< temperature at the start of the run over `age` (a node touching a body
                 ///< present at t = 0 starts partly at the body's temperature: emplace such
                 ///< bodies just after t = 0 if that matters)
  };
  Kind kind = Kind::Unreacted;
  double reflectance = 0.5;            ///< Reflectance: initial vitrinite reflectance [%Ro]
  /// Reflectance: rate of the equivalent burial path [K/s]; 3 K/Myr by default, a typical
  /// basin burial heating rate (common practice, no source). It only sets how the progress
  /// is split among the 20 reactions.
  double heating_rate = 3.0 / (1e6 * kSecondsPerYear);
  double age = 0.0;                    ///< Burial: duration of the burial path [s]
  double surface_temperature = 10.0;   ///< start of the path [°C]
};

/// A region whose rock carries vitrinite (EASY%Ro is tracked on the nodes of its cells).
struct OrganicRegion
{
  int region = 0;
  InitialMaturity initial;
};

struct ThermalHistorySettings
{
  std::vector<double> thresholds;     ///< [°C]; one "TimeAbove" array per entry
  std::vector<OrganicRegion> organic; ///< organic-bearing regions
  /// The model's temperature range [°C] (SimulationSettings' guard range); thresholds must
  /// lie strictly inside it.
  double min_temperature = -100.0, max_temperature = 3000.0;
  /// If set, the per-region and whole-model summary is computed at every output time.
  std::optional<BodySummarySettings> summary;
};

class ThermalHistory final : public StepRecorder
{
public:
  /**
   * Validates the settings against the model: throws std::invalid_argument naming the value
   * for a threshold that is not finite, outside the model's temperature range or repeated, an
   * organic
   * region id that no cell carries, invalid initial maturity, or invalid summary settings.
   * start() throws if the model is not the one (by node count) the history was set up for.
   * A node belonging to several organic regions takes the maturity of the region of its
   * lowest-numbered organic cell.
   */
  ThermalHistory(const ThermalModel& model, ThermalHistorySettings settings);

  void start(double t, const std::vector<double>& T, const ThermalModel& model,
    tbb::task_arena& arena) override;
  void update(double t, const std::vector<double>& T, const ThermalModel& model,
    tbb::task_arena& arena) override;
  void write(Snapshot& snapshot, const ThermalModel& model) override;

  const ThermalHistorySettings& settings() const { return settings_; }
  const std::vector<double>& peak_temperature() const { return peak_; }      ///< [°C]
  const std::vector<double>& peak_time() const { return peak_time_; }        ///< [s]
  const std::vector<double>& solidification_time() const { return solidified_; } ///< [s]
  /// Time above threshold k [s] for every node.
  std::vector<double> time_above(std::size_t k) const;
  /// EASY%Ro per node [%Ro], NaN where the rock is not organic-bearing.
  std::vector<double> reflectance() const;
  /// Index of node i's kinetic state, or −1 if the node is not organic-bearing.
  std::int32_t organic_index(std::size_t node) const { return organic_index_[node]; }
  std::size_t n_organic_nodes() const { return kinetics_.size(); }
  /// Summary tables, one per write() (empty unless settings().summary is set).
  const std::vector<BodySummary>& summaries() const { return summaries_; }
  /// Array name for threshold θ [°C]: "TimeAbove" + %g + "C".
  static std::string time_above_name(double threshold);

private:
  ThermalHistorySettings settings_;
  double time_ = 0.0;
  std::vector<double> previous_T_;
  std::vector<double> peak_, peak_time_, solidified_;
  std::vector<double> time_above_; ///< node-major: [node · n_thresholds + k]
  std::vector<char> molten_;
  std::vector<std::int32_t> organic_index_;
  std::vector<int> organic_region_of_;  ///< per organic node: index into settings_.organic
  std::vector<EasyRoState> kinetics_;
  std::vector<BodySummary> summaries_;
};

} // namespace ember
