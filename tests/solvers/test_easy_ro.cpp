// EASY%Ro kinetics on prescribed temperature histories against an independent python
// reference (tests/reference/easy_ro_reference.py: scipy solve_ivp, cross-checked with the
// exponential-integral closed form). Model: Sweeney & Burnham (1990), AAPG Bull. 74(10),
// 1559–1570; values also tabulated in shared/reference/verification.md §8.
#include "ember/easy_ro.h"
#include "ember/simulation.h"

#include <gtest/gtest.h>

#include <cmath>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

using namespace ember;

namespace
{
struct ReferenceCase
{
  std::string name;
  double reflectance = 0, fraction = 0;
  std::vector<std::pair<double, double>> points; // (t [yr], T [°C])
};

std::vector<ReferenceCase> read_reference()
{
  const std::string path = std::string(EMBER_REFERENCE_DIR) + "/easy_ro_expected.txt";
  std::ifstream in(path);
  if (!in)
    throw std::runtime_error("cannot open " + path);
  std::vector<ReferenceCase> cases;
  std::string line;
  while (std::getline(in, line))
  {
    if (line.empty() || line[0] == '#')
      continue;
    std::istringstream head(line);
    std::string tag;
    ReferenceCase c;
    std::size_t n = 0;
    head >> tag >> c.name >> c.reflectance >> c.fraction >> n;
    if (tag != "case" || !head)
      throw std::runtime_error("bad line in " + path + ": " + line);
    for (std::size_t k = 0; k < n; ++k)
    {
      double t, T;
      in >> t >> T;
      c.points.emplace_back(t, T);
    }
    std::getline(in, line); // rest of the last point's line
    cases.push_back(std::move(c));
  }
  return cases;
}

EasyRoState run_history(const ReferenceCase& c, int substeps)
{
  EasyRoState state{};
  for (std::size_t k = 0; k + 1 < c.points.size(); ++k)
  {
    const auto [t0, T0] = c.points[k];
    const auto [t1, T1] = c.points[k + 1];
    for (int j = 0; j < substeps; ++j)
    {
      const double a = T0 + (T1 - T0) * j / substeps, b = T0 + (T1 - T0) * (j + 1) / substeps;
      easy_ro_advance(state, a, b, (t1 - t0) * kSecondsPerYear / substeps);
    }
  }
  return state;
}
} // namespace

// The published range 0.20–4.69 %Ro (Sweeney & Burnham 1990): exp(−1.6) and
// exp(−1.6 + 3.7·Σw) with Σw = 0.85. Tolerance: the rounding of the published two decimals.
TEST(EasyRo, PublishedRangeAndWeights)
{
  double sum = 0;
  for (double w : EasyRoKinetics::weights)
    sum += w;
  EXPECT_NEAR(sum, 0.85, 1e-15);
  EXPECT_NEAR(easy_ro_minimum(), 0.20, 0.005);
  EXPECT_NEAR(easy_ro_maximum(), 4.69, 0.005);
  EXPECT_DOUBLE_EQ(easy_ro_reflectance(EasyRoState{}), easy_ro_minimum());
  EasyRoState done;
  done.fill(1e6);
  EXPECT_DOUBLE_EQ(easy_ro_reflectance(done), easy_ro_maximum());
}

// Constant heating (1, 10, 100 K/Myr), fast contact ramps, isothermal holds at 100–500 °C
// for 1 yr–1 Myr and path-additivity histories, one advance per linear segment. The scheme is
// exact for a linear ramp, so the only error is round-off and the reference ODE's rtol 1e-12:
// tolerance 1e-9 relative in %Ro (verification.md §0 asks 1e-6 for ODE-level checks). Every
// result also lies in the model's range [0.2019, 4.688].
TEST(EasyRo, MatchesIndependentReference)
{
  const auto cases = read_reference();
  ASSERT_GE(cases.size(), 30u);
  for (const ReferenceCase& c : cases)
  {
    const EasyRoState state = run_history(c, 1);
    const double ro = easy_ro_reflectance(state);
    EXPECT_NEAR(ro / c.reflectance, 1.0, 1e-9) << c.name;
    EXPECT_NEAR(easy_ro_fraction(state), c.fraction, 1e-9) << c.name;
    EXPECT_GE(ro, easy_ro_minimum() * (1 - 1e-15)) << c.name;
    EXPECT_LE(ro, easy_ro_maximum() * (1 + 1e-15)) << c.name;
  }
}

// The integrals add along a history, and each step is exact for its linear ramp: splitting a
// segment into many steps must not change the answer beyond round-off (1e-12 relative).
TEST(EasyRo, IndependentOfStepCount)
{
  for (const ReferenceCase& c : read_reference())
  {
    const double one = easy_ro_reflectance(run_history(c, 1));
    for (int substeps : { 7, 1000 })
      EXPECT_NEAR(easy_ro_reflectance(run_history(c, substeps)) / one, 1.0, 1e-12)
        << c.name << ", " << substeps << " steps";
  }
}

// Mean Arrhenius factor on a linear ramp against composite Simpson quadrature in 1/T-space
// (independent of both branches of the implementation), across the switch between the
// Gauss–Legendre and the closed-form branches (exponent change Δx = 1). Tolerance 1e-11
// relative (Simpson with 20000 panels on these smooth integrands: ~1e-14, plus the round-off
// of its sum).
TEST(EasyRo, MeanArrheniusFactorAgainstQuadrature)
{
  auto simpson = [](double a, double T0, double T1) {
    const int n = 20000;
    double s = 0;
    for (int k = 0; k <= n; ++k)
    {
      const double T = T0 + (T1 - T0) * k / n;
      const double w = (k == 0 || k == n) ? 1 : (k % 2 ? 4 : 2);
      s += w * std::exp(-a / T);
    }
    return s / (3.0 * n);
  };
  for (double a : { 17109.5, 25000.0, 36231.8 })
    for (double T0 : { 293.15, 573.15, 1423.15 })
      for (double dx : { 1e-9, 4e-8, 6e-8, 7e-4, 9e-4, 0.02, 0.03, 0.13, 0.15, 0.999, 1.001,
             3.0, 30.0 })
      {
        // T1 such that a/T0 − a/T1 = ±dx (heating and cooling)
        const double T1 = 1.0 / (1.0 / T0 - dx / a);
        if (!(T1 > 0))
          continue;
        const double exact = simpson(a, T0, T1);
        EXPECT_NEAR(mean_arrhenius_factor(a, T0, T1) / exact, 1.0, 1e-11)
          << "a " << a << " T0 " << T0 << " dx " << dx;
        EXPECT_NEAR(mean_arrhenius_factor(a, T1, T0) / exact, 1.0, 1e-11)
          << "cooling, a " << a << " T0 " << T0 << " dx " << dx;
      }
}

// The batched step (all 20 reactions at once, shared exponentials) agrees with the per-reaction
// mean factor to round-off (1e-13 relative) over the whole range of exponent changes.
TEST(EasyRo, BatchedStepMatchesPerReactionFactor)
{
  const double dt = 1e9;
  for (double T0 : { 20.0, 300.0, 1100.0 })
    for (double dT : { 0.0, 1e-7, 1e-5, 1e-3, 0.1, 1.0, 10.0, 100.0, -50.0 })
    {
      EasyRoState state{};
      easy_ro_advance(state, T0, T0 + dT, dt);
      for (int i = 0; i < kEasyRoReactions; ++i)
      {
        const double a = EasyRoKinetics::activation_energy(i) / EasyRoKinetics::gas_constant;
        const double expected = EasyRoKinetics::frequency_factor * dt *
          mean_arrhenius_factor(a, T0 + 273.15, T0 + dT + 273.15);
        EXPECT_NEAR(state[i] / expected, 1.0, 1e-13) << "T0 " << T0 << " dT " << dT << " i " << i;
      }
    }
}

// Initial maturity: a burial ramp is one exact step; a given %Ro is inverted to the state on
// a constant-heating path and reproduces the value (bisection to 1e-11 K → 1e-10 relative).
TEST(EasyRo, InitialMaturity)
{
  const double Myr = 1e6 * kSecondsPerYear;
  for (const ReferenceCase& c : read_reference())
  {
    if (c.name == "heating_10K_per_Myr_to_150C")
    {
      EXPECT_NEAR(easy_ro_reflectance(easy_ro_burial_state(20, 150, 13 * Myr)) / c.reflectance,
        1.0, 1e-9);
    }
  }
  for (double rate : { 1.0, 10.0 })
    for (double ro : { 0.25, 0.6, 1.2, 3.0, 4.6 })
    {
      const EasyRoState s = easy_ro_state_for_reflectance(ro, rate / Myr, 10.0);
      EXPECT_NEAR(easy_ro_reflectance(s) / ro, 1.0, 1e-10) << ro << " at " << rate << " K/Myr";
    }
  const EasyRoState zero = easy_ro_state_for_reflectance(easy_ro_minimum(), 1 / Myr, 10.0);
  for (double I : zero)
    EXPECT_EQ(I, 0.0);
  // Bad input names the value.
  for (double bad : { 0.1, 4.7, -1.0, double(NAN) })
  {
    try
    {
      easy_ro_state_for_reflectance(bad, 1 / Myr, 10.0);
      ADD_FAILURE() << "no exception for " << bad;
    }
    catch (const std::invalid_argument& e)
    {
      EXPECT_NE(std::string(e.what()).find("%Ro"), std::string::npos) << e.what();
    }
  }
  EXPECT_THROW(easy_ro_state_for_reflectance(1.0, 0.0, 10.0), std::invalid_argument);
  EXPECT_THROW(easy_ro_burial_state(10, 100, -1.0), std::invalid_argument);
}
