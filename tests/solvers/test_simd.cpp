// The vectorised node loops give the scalar loops' results bit for bit, at every SIMD level
// this processor runs (simd.h). The reference is the project's own scalar path, which the
// verification tests check against published solutions; here only equality is at stake.
#include "test_support.h"

#include "ember/simd.h"

#include <gtest/gtest.h>

#include <cstring>
#include <limits>
#include <random>
#include <string>

using namespace ember;
using namespace ember::testing;

namespace
{
Rock waples_host()
{
  Rock r = simple_rock("host", 2.5, 2600, 900);
  r.heat_capacity.law = HeatCapacity::Law::WaplesWaples;
  return r;
}
Rock basalt_with_latent()
{
  Rock r = simple_rock("basalt", 2.2, 2800, 1100);
  r.latent_heat = 4e5;
  r.solidus = 980;
  r.liquidus = 1180;
  return r;
}

template <class Real>
bool same_bits(Real a, Real b)
{
  return std::memcmp(&a, &b, sizeof a) == 0;
}
} // namespace

TEST(Simd, LevelsAreOrderedAndTheUnsupportedOnesRefused)
{
  SimdLevelGuard guard;
  const std::vector<SimdLevel> levels = supported_simd_levels();
  ASSERT_FALSE(levels.empty());
  EXPECT_EQ(levels.front(), SimdLevel::Scalar);
  EXPECT_EQ(levels.back(), best_simd_level());
  for (SimdLevel level : levels)
  {
    set_simd_level(level);
    EXPECT_EQ(simd_level(), level) << simd_level_name(level);
  }
  if (best_simd_level() != SimdLevel::AVX2)
  {
    EXPECT_THROW(set_simd_level(SimdLevel::AVX2), std::invalid_argument);
  }
}

// Blocks of every length 0 … 40, and the rest of the row, at every offset 0 … 8 of a row of
// nodes that mixes: single-rock runs of both rocks, rock-contact nodes (two shares), steps
// that stay in one phase (one settled Newton step), steps ending near or across the solidus
// and liquidus (iterations), a stale inverse capacity of 0, and a NaN heat content.
TEST(Simd, BlockTemperaturesEqualTheOneNodeSolveAtEveryLevel)
{
  SimdLevelGuard guard;
  // 96 cells in a row: rocks in runs of 5 to 17 cells, so rock contacts fall at every lane
  // and runs of one rock fill whole blocks of lanes at some offsets and not at others.
  const int cells = 96;
  Mesh mesh = make_box_hex({ 0, 0, 0 }, { double(cells), 1, 1 }, { cells, 1, 1 });
  std::vector<int> rock(cells, 0);
  for (int c = 0; c < cells; ++c)
    rock[c] = (c / 17 + c / 29) % 2;
  ThermalModel model(mesh, { waples_host(), basalt_with_latent() }, rock);
  const std::size_t n = mesh.n_points();

  std::mt19937 random(12345); // fixed seed: the same cases every run
  std::uniform_real_distribution<double> temperature(-20.0, 1400.0), change(-1.0, 1.0);
  // A step's change of T: mostly below a kelvin (one settled Newton step), some of 10 and
  // 60 K (iterations).
  const auto step = [&](std::size_t i) { return change(random) * (i % 10 == 9 ? 60.0 : i % 10 == 8 ? 10.0 : 0.5); };
  std::vector<double> E(n), E_old(n), T_old(n);
  std::vector<float> inverse_capacity_old(n);
  const double kinks[] = { 980.0, 1180.0 };
  for (std::size_t i = 0; i < n; ++i)
  {
    T_old[i] = i % 7 == 3 ? kinks[i % 2] + change(random) * 0.5 : temperature(random);
    E_old[i] = model.energy(i, T_old[i]);
    E[i] = model.energy(i, T_old[i] + (i % 5 == 0 ? 1e-3 : step(i)));
    inverse_capacity_old[i] =
      i % 11 == 4 ? 0.0f : static_cast<float>(1.0 / model.capacity(i, T_old[i]));
  }
  E[n / 2] = std::numeric_limits<double>::quiet_NaN();

  std::vector<double> T_reference(n);
  std::vector<float> inverse_capacity_reference(n);
  for (std::size_t i = 0; i < n; ++i)
  {
    inverse_capacity_reference[i] = inverse_capacity_old[i];
    T_reference[i] =
      model.temperature_after_change(i, E[i], E_old[i], T_old[i], inverse_capacity_reference[i]);
  }
  int compared = 0;
  for (SimdLevel level : supported_simd_levels())
  {
    set_simd_level(level);
    for (std::size_t first = 0; first <= 8; ++first)
      for (std::size_t count = 0; count <= 41; ++count)
      {
        if (count == 41)
          count = n - first; // the rest of the row: every contact and run
        std::vector<double> T(T_old.begin() + first, T_old.begin() + first + count);
        std::vector<float> inverse_capacity(
          inverse_capacity_old.begin() + first, inverse_capacity_old.begin() + first + count);
        model.temperatures_after_change(
          first, count, E.data() + first, E_old.data() + first, T.data(), inverse_capacity.data());
        for (std::size_t k = 0; k < count; ++k)
        {
          const std::size_t i = first + k;
          ASSERT_TRUE(same_bits(T[k], T_reference[i]))
            << simd_level_name(level) << ": node " << i << " T " << T[k] << " vs "
            << T_reference[i];
          ASSERT_TRUE(same_bits(inverse_capacity[k], inverse_capacity_reference[i]))
            << simd_level_name(level) << ": node " << i;
          ++compared;
        }
      }
  }
  EXPECT_GT(compared, 1000);
  // The cases are the ones promised: both kinds of node and of Newton path occur.
  std::size_t contacts = 0;
  for (std::size_t i = 0; i < n; ++i)
    contacts += model.shares(i).size() > 1;
  EXPECT_GT(contacts, 8u);
}

namespace ember
{
// Reads what the bound leaves per flux-boundary node (Σ_b |A_ib| plus its faces' stiffness).
struct HeatOperatorProbe
{
  static const std::vector<double>& flux_stiffness(const HeatOperator& op)
  {
    return op.flux_stiffness_;
  }
};
} // namespace ember

// The conduction sweep (heat_operator_sweep.cpp): rate, stable step, each flux-boundary node's
// stiffness and the ledger at every level equal the scalar level's bits, for several
// temperature fields, on meshes that exercise every path: tetrahedra distorted (negative
// weights: the bound runs those chunks through the scalar code) and not (the bound's vector
// path), rows of unequal length (padded chunks), two rocks with k(T) (contact nodes and their
// per-rock pairs), radiation, heat-flow and fixed-temperature boundaries, and a node count that
// leaves the last chunk of 4 short; the regular case has heat production (the sweep reads
// sources only when some node has one). A third case, one rock and insulated, puts the largest
// rate, and so the step, in the vector chunks (with radiation it sits at the surface). Temperatures are finite: a padding slot turns an infinite
// T into NaN where the scalar code gives ±inf (simd.h).
TEST(Simd, ConductionSweepEqualsTheScalarSweepAtEveryLevel)
{
  SimdLevelGuard guard;
  for (int variant = 0; variant < 3; ++variant)
  {
    const bool distorted = variant == 0, one_rock = variant == 2;
    SCOPED_TRACE(distorted ? "distorted" : one_rock ? "one rock, insulated" : "regular, heat production");
    Mesh mesh = make_box_tet({ 0, 0, 0 }, { 6, 6, 10 }, { 6, 6, 10 });
    const std::size_t n = mesh.n_points();
    ASSERT_NE(n % 4, 0u) << "the last chunk should be short";
    if (distorted)
      distort_interior(mesh, { 6, 6, 10 }, 0.2);
    if (!one_rock)
      mark_layer(mesh, 4, 6); // contacts at mid-height, single-rock chunks above and below
    Rock host = waples_host();
    host.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
    // Heat production in one variant only: without any, the sweep reads no sources.
    host.heat_production = variant == 1 ? 2e-6 : 0.0;
    const ThermalModel model(mesh, { host, basalt_with_latent() }, mesh.cell_region);
    const auto condition = [](BoundaryCondition::Kind kind, Side side, double value) {
      BoundaryCondition bc;
      bc.kind = kind;
      bc.side = side;
      bc.heat_flux = bc.temperature = value; // the one this kind reads
      return bc;
    };
    const BoundaryCondition top = condition(BoundaryCondition::Kind::Radiation, Side::Top, 0),
      base = condition(BoundaryCondition::Kind::HeatFlux, Side::Bottom, 0.08),
      side = condition(BoundaryCondition::Kind::FixedTemperature, Side::Sides, 40);
    const HeatOperator op(model,
      one_rock ? std::vector<BoundaryCondition>{} : std::vector<BoundaryCondition>{ top, base, side });
    ASSERT_EQ(op.contact_nodes() > 0, !one_rock);
    ASSERT_EQ(op.has_sources(), variant == 1);
    ASSERT_GT(op.edge_slots(), op.edge_entries()) << "some chunks should be padded";
    tbb::task_arena arena(2);
    int negative = 0; // A_ij < 0: a negative weight
    for_each_operator_column(op, n, arena, [&](std::size_t j, const std::vector<double>& column) {
      for (std::size_t i = 0; i < n; ++i)
        negative += i != j && column[i] < 0.0;
    });
    if (distorted)
      ASSERT_GT(negative, 0) << "the distortion should make some weights negative";
    else
      ASSERT_EQ(negative, 0);

    struct Result
    {
      std::vector<double> rate, rate_bound, flux_stiffness;
      double step, step_alone;
      PowerTally tally;
    };
    std::mt19937 random(777); // fixed seed
    std::uniform_real_distribution<double> temperature(0.0, 1200.0);
    for (int field = 0; field < 8; ++field)
    {
      std::vector<double> T(n);
      for (double& t : T)
        t = temperature(random);
      const auto evaluate = [&] {
        Result r;
        op.rate(T, r.rate, r.tally, arena);
        PowerTally unused;
        r.step = op.rate_and_stable_step(T, r.rate_bound, unused, arena);
        r.flux_stiffness = HeatOperatorProbe::flux_stiffness(op);
        r.step_alone = op.stable_time_step(T, arena);
        return r;
      };
      set_simd_level(SimdLevel::Scalar);
      const Result reference = evaluate();
      ASSERT_TRUE(std::isfinite(reference.step));
      ASSERT_EQ(reference.step, reference.step_alone);
      ASSERT_EQ(reference.flux_stiffness.empty(), one_rock);
      ASSERT_EQ(reference.tally.source > 0.0, variant == 1);
      for (SimdLevel level : supported_simd_levels())
      {
        set_simd_level(level);
        const Result r = evaluate();
        const std::string name = simd_level_name(level) + ", field " + std::to_string(field);
        for (std::size_t i = 0; i < n; ++i)
        {
          ASSERT_TRUE(same_bits(r.rate[i], reference.rate[i]))
            << name << ": node " << i << " rate " << r.rate[i] << " vs " << reference.rate[i];
          ASSERT_TRUE(same_bits(r.rate_bound[i], reference.rate[i])) << name << ": node " << i;
        }
        for (std::size_t k = 0; k < reference.flux_stiffness.size(); ++k)
          ASSERT_TRUE(same_bits(r.flux_stiffness[k], reference.flux_stiffness[k]))
            << name << ": flux node " << k;
        EXPECT_TRUE(same_bits(r.step, reference.step)) << name;
        EXPECT_TRUE(same_bits(r.step_alone, reference.step)) << name;
        EXPECT_TRUE(same_bits(r.tally.boundary, reference.tally.boundary)) << name;
      }
    }
  }
}
