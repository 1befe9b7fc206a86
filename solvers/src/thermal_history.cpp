#include "ember/thermal_history.h"

#include <oneapi/tbb/blocked_range.h>
#include <oneapi/tbb/parallel_for.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <sstream>

namespace ember
{
namespace
{
constexpr std::size_t kGrain = 2048;
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

// Lowest solidus among the node's rock shares that melt: the node's melt fraction (a
// volume-weighted mean of its shares') is zero exactly at and below it.
double node_solidus(const ThermalModel& model, std::size_t node)
{
  double solidus = kInf;
  for (const NodeShare& s : model.shares(node))
  {
    const Rock& rock = model.rocks()[s.rock];
    if (rock.latent_heat > 0.0)
      solidus = std::min(solidus, rock.solidus);
  }
  return solidus;
}

void check(const ThermalModel& model, const ThermalHistorySettings& s)
{
  for (std::size_t k = 0; k < s.thresholds.size(); ++k)
  {
    const double th = s.thresholds[k];
    if (!std::isfinite(th) || th <= s.min_temperature || th >= s.max_temperature)
    {
      std::ostringstream msg;
      msg << "thermal history: threshold " << k << " (" << th
          << " °C) lies outside the model's temperature range (" << s.min_temperature << ", "
          << s.max_temperature << ") °C";
      throw std::invalid_argument(msg.str());
    }
    for (std::size_t j = 0; j < k; ++j)
      if (s.thresholds[j] == th) // two arrays of the same name
      {
        std::ostringstream msg;
        msg << "thermal history: threshold " << k << " (" << th << " °C) repeats threshold " << j;
        throw std::invalid_argument(msg.str());
      }
  }
  const Mesh& mesh = model.mesh();
  for (const OrganicRegion& o : s.organic)
  {
    if (std::find(mesh.cell_region.begin(), mesh.cell_region.end(), o.region) ==
      mesh.cell_region.end())
      throw std::invalid_argument("thermal history: organic-bearing region " +
        std::to_string(o.region) + " does not exist (no cell carries this region id)");
    const InitialMaturity& m = o.initial;
    std::ostringstream msg;
    msg << "thermal history: initial maturity of organic region " << o.region << ": ";
    if (!std::isfinite(m.surface_temperature))
      throw std::invalid_argument(msg.str() + "surface temperature is not finite");
    if (m.kind == InitialMaturity::Kind::Burial && !(m.age >= 0.0 && std::isfinite(m.age)))
    {
      msg << "burial age " << m.age << " s must be finite and >= 0";
      throw std::invalid_argument(msg.str());
    }
    if (m.kind == InitialMaturity::Kind::Reflectance)
    {
      try
      {
        easy_ro_state_for_reflectance(m.reflectance, m.heating_rate, m.surface_temperature);
      }
      catch (const std::invalid_argument& e)
      {
        throw std::invalid_argument(msg.str() + e.what());
      }
    }
  }
  if (s.summary)
    validate(*s.summary, mesh);
}
} // namespace

std::string ThermalHistory::time_above_name(double threshold)
{
  char buffer[64];
  std::snprintf(buffer, sizeof buffer, "TimeAbove%gC", threshold);
  return buffer;
}

ThermalHistory::ThermalHistory(const ThermalModel& model, ThermalHistorySettings settings)
  : settings_(std::move(settings))
{
  check(model, settings_);
  // Compact index of organic-bearing nodes, ascending node id; region taken from the node's
  // lowest-numbered organic cell (NodeCells lists cells ascending).
  const Mesh& mesh = model.mesh();
  organic_index_.assign(model.n_nodes(), -1);
  const NodeCells cells(mesh);
  for (std::size_t i = 0; i < model.n_nodes(); ++i)
    for (const CellSlot& slot : cells.of(i))
    {
      const int region = mesh.cell_region[slot.cell];
      const auto it = std::find_if(settings_.organic.begin(), settings_.organic.end(),
        [region](const OrganicRegion& o) { return o.region == region; });
      if (it != settings_.organic.end())
      {
        organic_index_[i] = static_cast<std::int32_t>(organic_region_of_.size());
        organic_region_of_.push_back(static_cast<int>(it - settings_.organic.begin()));
        break;
      }
    }
  kinetics_.assign(organic_region_of_.size(), EasyRoState{});
}

void ThermalHistory::start(double t, const std::vector<double>& T, const ThermalModel& model,
  tbb::task_arena&)
{
  const std::size_t n = model.n_nodes();
  if (organic_index_.size() != n || T.size() != n)
    throw std::invalid_argument("thermal history: set up for a model of " +
      std::to_string(organic_index_.size()) + " nodes, started on one of " + std::to_string(n));
  time_ = t;
  previous_T_ = T;
  peak_ = T;
  peak_time_.assign(n, t);
  molten_.assign(n, 0);
  solidified_.assign(n, kNaN);
  for (std::size_t i = 0; i < n; ++i)
    if (model.melt_fraction(i, T[i]) > 0.0)
    {
      molten_[i] = 1;
      solidified_[i] = kInf;
    }
  time_above_.assign(n * settings_.thresholds.size(), 0.0);
  summaries_.clear();
  // Initial maturity per organic node. The Reflectance state is the same for every node of a
  // region, so it is inverted once per region.
  std::vector<std::optional<EasyRoState>> by_region(settings_.organic.size());
  for (std::size_t i = 0; i < n; ++i)
  {
    const std::int32_t k = organic_index_[i];
    if (k < 0)
      continue;
    const int r = organic_region_of_[k];
    const InitialMaturity& m = settings_.organic[r].initial;
    switch (m.kind)
    {
      case InitialMaturity::Kind::Unreacted:
        kinetics_[k] = EasyRoState{};
        break;
      case InitialMaturity::Kind::Reflectance:
        if (!by_region[r])
          by_region[r] =
            easy_ro_state_for_reflectance(m.reflectance, m.heating_rate, m.surface_temperature);
        kinetics_[k] = *by_region[r];
        break;
      case InitialMaturity::Kind::Burial:
        kinetics_[k] = easy_ro_burial_state(m.surface_temperature, T[i], m.age);
        break;
    }
  }
}

void ThermalHistory::update(double t, const std::vector<double>& T, const ThermalModel& model,
  tbb::task_arena& arena)
{
  if (previous_T_.size() != model.n_nodes())
    throw std::logic_error("thermal history: update() before start()");
  if (!(t >= time_))
    throw std::logic_error("thermal history: time runs backwards (" + std::to_string(t) +
      " s after " + std::to_string(time_) + " s)");
  const double t0 = time_, dt = t - time_;
  const std::size_t n_thresholds = settings_.thresholds.size();
  arena.execute([&] {
    tbb::parallel_for(tbb::blocked_range<std::size_t>(0, model.n_nodes(), kGrain),
      [&](const tbb::blocked_range<std::size_t>& range) {
        for (std::size_t i = range.begin(); i != range.end(); ++i)
        {
          const double T0 = previous_T_[i], T1 = T[i];
          // A linear segment peaks at an end; strict '>' keeps the first time of a plateau.
          if (T1 > peak_[i])
          {
            peak_[i] = T1;
            peak_time_[i] = t;
          }
          for (std::size_t k = 0; k < n_thresholds && dt > 0.0; ++k)
          {
            const double th = settings_.thresholds[k];
            double above = 0.0;
            if (T0 > th && T1 > th)
              above = dt;
            else if (T0 > th || T1 > th) // one crossing: the part of the segment above θ
              above = dt * (std::max(T0, T1) - th) / std::abs(T1 - T0);
            time_above_[i * n_thresholds + k] += above;
          }
          const bool molten = model.melt_fraction(i, T1) > 0.0;
          if (molten)
          {
            molten_[i] = 1;
            solidified_[i] = kInf;
          }
          else if (molten_[i])
          {
            // Crossed the node's solidus during the segment: interpolate the crossing time.
            const double Ts = node_solidus(model, i);
            double when = t;
            if (dt > 0.0 && T0 > T1 && std::isfinite(Ts))
              when = t0 + dt * std::clamp((T0 - Ts) / (T0 - T1), 0.0, 1.0);
            solidified_[i] = when;
            molten_[i] = 0;
          }
          if (organic_index_[i] >= 0)
            easy_ro_advance(kinetics_[organic_index_[i]], T0, T1, dt);
          previous_T_[i] = T1;
        }
      });
  });
  time_ = t;
}

std::vector<double> ThermalHistory::time_above(std::size_t k) const
{
  const std::size_t n_thresholds = settings_.thresholds.size();
  std::vector<double> out(peak_.size());
  for (std::size_t i = 0; i < out.size(); ++i)
    out[i] = time_above_[i * n_thresholds + k];
  return out;
}

std::vector<double> ThermalHistory::reflectance() const
{
  std::vector<double> out(organic_index_.size(), kNaN);
  for (std::size_t i = 0; i < out.size(); ++i)
    if (organic_index_[i] >= 0)
      out[i] = easy_ro_reflectance(kinetics_[organic_index_[i]]);
  return out;
}

void ThermalHistory::write(Snapshot& snapshot, const ThermalModel& model)
{
  auto& fields = snapshot.point_fields;
  fields.push_back({ "PeakTemperature", peak_ });
  fields.push_back({ "PeakTemperatureTime", peak_time_ });
  fields.push_back({ "SolidificationTime", solidified_ });
  for (std::size_t k = 0; k < settings_.thresholds.size(); ++k)
    fields.push_back({ time_above_name(settings_.thresholds[k]), time_above(k) });
  if (!settings_.organic.empty())
    fields.push_back({ "EasyRo", reflectance() });
  if (settings_.summary)
  {
    const std::vector<double> ro =
      settings_.organic.empty() ? std::vector<double>{} : fields.back().values;
    summaries_.push_back(summarize_bodies(model, snapshot.time, snapshot.temperature,
      { peak_, solidified_, ro }, *settings_.summary));
  }
}

} // namespace ember
