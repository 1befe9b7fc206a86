// emberlith-bench — measures the explicit solver against this machine's memory bandwidth.
//
// One process run prints one machine-readable line per figure:
//   figure name=<id> value=<number> unit=<unit> [key=value ...]
// and free-text lines starting with '#'. See bench/README.md for what each figure means, the
// targets of issue #7 and the figures measured.
//
// Usage: emberlith-bench [--quick] [--section NAME]...
//   --quick      small sizes (seconds; used by the ctest smoke test)
//   --section    stream | step | csr | growth | memory | sill (repeatable; default all)
//                | profile (only when named: 300 full-physics steps per mesh, for perf record;
//                  20 with --quick, for callgrind)
#include "ember/integrators.h"
#include "ember/rkl2.h"
#include "ember/simd.h"
#include "ember/simulation.h"

#include <oneapi/tbb/blocked_range.h>
#include <oneapi/tbb/parallel_for.h>
#include <oneapi/tbb/task_arena.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <fstream>
#include <functional>
#include <memory>
#include <set>
#include <string>
#include <vector>

using namespace ember;

namespace
{
using Clock = std::chrono::steady_clock;

bool quick = false;
// Figures are quoted at 1 and 2 threads: the machine kind has 2 cores (issue #7).
constexpr int kThreadCounts[] = { 1, 2 };

void figure(const std::string& name, double value, const char* unit, const std::string& extra = "")
{
  std::printf("figure name=%s value=%.6g unit=%s%s%s\n",
              name.c_str(),
              value,
              unit,
              extra.empty() ? "" : " ",
              extra.c_str());
  std::fflush(stdout);
}

// Best (shortest) wall time of `repeats` runs of f [s]: the machines are shared and noisy, the
// minimum is the most repeatable estimate of what the code itself costs.
double best_time(int repeats, const std::function<void()>& f)
{
  double best = 1e300;
  for (int r = 0; r < repeats; ++r)
  {
    const auto t0 = Clock::now();
    f();
    best = std::min(best, std::chrono::duration<double>(Clock::now() - t0).count());
  }
  return best;
}

// Wall times of functions timed in `rounds` rounds that each run every function `repeats`
// times in turn: per round the best of its repeats, and the best over all rounds [s]. The load
// of a shared machine drifts over minutes (the CSR yardstick alone moved by 45 % between two
// runs) and jumps over seconds; alternating compares the step and the yardstick under the same
// conditions, so their ratio is far steadier than either figure.
struct InterleavedTimes
{
  std::vector<std::vector<double>> per_round; ///< [round][function]
  std::vector<double> best;                   ///< [function]
  /// Median over the rounds of time(b) / time(a) within one round: the ratio least moved by
  /// a load that changes between rounds.
  double median_ratio(std::size_t a, std::size_t b) const
  {
    std::vector<double> r;
    for (const auto& t : per_round)
      r.push_back(t[b] / t[a]);
    std::sort(r.begin(), r.end());
    const std::size_t m = r.size() / 2;
    return r.size() % 2 ? r[m] : 0.5 * (r[m - 1] + r[m]);
  }
};
InterleavedTimes interleaved_times(
  const std::vector<std::function<void()>>& fs, int rounds, int repeats)
{
  InterleavedTimes t;
  t.best.assign(fs.size(), 1e300);
  for (int round = 0; round < rounds; ++round)
  {
    t.per_round.emplace_back(fs.size());
    for (std::size_t f = 0; f < fs.size(); ++f)
    {
      t.per_round.back()[f] = best_time(repeats, fs[f]);
      t.best[f] = std::min(t.best[f], t.per_round.back()[f]);
    }
  }
  return t;
}

double resident_bytes()
{
  std::ifstream statm("/proc/self/statm");
  double pages = 0, resident = 0;
  statm >> pages >> resident;
  return resident * 4096.0;
}

// ---- STREAM-style triad a = b + s·c (McCalpin's STREAM convention: 24 bytes per element) ----
double stream_triad(int threads)
{
  const std::size_t n = quick ? (std::size_t(1) << 22) : (std::size_t(1) << 25); // 3×256 MB
  std::vector<double> a(n), b(n), c(n);
  tbb::task_arena arena(threads);
  auto fill = [&]
  {
    tbb::parallel_for(tbb::blocked_range<std::size_t>(0, n, 1 << 16),
                      [&](const tbb::blocked_range<std::size_t>& r)
                      {
                        for (std::size_t i = r.begin(); i != r.end(); ++i)
                          a[i] = 0.0, b[i] = 1.0,
                          c[i] = 2.0; // first touch by the threads that use them
                      });
  };
  arena.execute(fill);
  const double t =
    best_time(quick ? 3 : 10,
              [&]
              {
                arena.execute(
                  [&]
                  {
                    tbb::parallel_for(tbb::blocked_range<std::size_t>(0, n, 1 << 16),
                                      [&](const tbb::blocked_range<std::size_t>& r)
                                      {
                                        for (std::size_t i = r.begin(); i != r.end(); ++i)
                                          a[i] = b[i] + 3.0 * c[i];
                                      });
                  });
              });
  return 24.0 * n / t;
}

// ---- The benchmark model: a sill with latent heat in host rock, T-dependent k and c ----------
struct Problem
{
  Mesh mesh;
  std::unique_ptr<ThermalModel> model;
  std::unique_ptr<HeatOperator> op;
  std::vector<double> T, E;
};

// Box of ~nodes nodes (cube of cells), hexahedra or tetrahedra; the middle fifth in z is a
// sill whose nodes sit inside its crystallisation interval, so latent heat is active there.
// With `linear` the same model has constant k and c and no latent heat: the step is then
// the data layout alone (rate, one division-free T(E)), for comparison with the full physics.
Problem make_problem(double nodes, bool tets, bool linear = false)
{
  const int cells = std::max(2, static_cast<int>(std::lround(std::cbrt(nodes))) - 1);
  const double L = 1000.0;
  Problem p;
  p.mesh = tets ? make_box_tet({ 0, 0, -L }, { L, L, 0 }, { cells, cells, cells })
                : make_box_hex({ 0, 0, -L }, { L, L, 0 }, { cells, cells, cells });
  for (std::size_t c = 0; c < p.mesh.n_cells(); ++c)
  {
    const double z = p.mesh.points[p.mesh.nodes(c)[0]][2];
    if (z > -0.6 * L && z < -0.4 * L)
      p.mesh.cell_region[c] = 1;
  }
  Rock host;
  host.name = "shale";
  host.density = 2500;
  host.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  host.conductivity.crystalline = false;
  host.conductivity.k_ref = 1.8;
  host.heat_capacity.law = HeatCapacity::Law::WaplesWaples;
  host.heat_capacity.c_ref = 900;
  Rock sill;
  sill.name = "dolerite";
  sill.density = 2900;
  sill.conductivity.law = Conductivity::Law::VosteenSchellschmidt;
  sill.conductivity.k_ref = 2.2;
  sill.heat_capacity.c_ref = 1100;
  sill.latent_heat = 4e5;
  sill.solidus = 980;
  sill.liquidus = 1150;
  if (linear)
    for (Rock* r : { &host, &sill })
    {
      r->conductivity.law = Conductivity::Law::Constant;
      r->heat_capacity.law = HeatCapacity::Law::Constant;
      r->latent_heat = 0.0;
    }
  std::vector<int> rock(p.mesh.n_cells());
  for (std::size_t c = 0; c < rock.size(); ++c)
    rock[c] = p.mesh.cell_region[c];
  p.model = std::make_unique<ThermalModel>(p.mesh, std::vector<Rock>{ host, sill }, rock);
  BoundaryCondition top;
  top.kind = BoundaryCondition::Kind::FixedTemperature;
  top.temperature = 10;
  BoundaryCondition base;
  base.kind = BoundaryCondition::Kind::HeatFlux;
  base.side = Side::Bottom;
  base.heat_flux = 0.06;
  p.op = std::make_unique<HeatOperator>(*p.model, std::vector<BoundaryCondition>{ top, base });
  const std::size_t n = p.mesh.n_points();
  p.T.resize(n);
  p.E.resize(n);
  for (std::size_t i = 0; i < n; ++i)
  {
    const double z = p.mesh.points[i][2];
    p.T[i] = (z > -0.6 * L && z < -0.4 * L) ? 1060.0 : 10.0 - 0.03 * z;
    p.E[i] = p.model->energy(i, p.T[i]);
  }
  for (const auto& [node, value] : p.op->fixed_nodes())
    p.T[node] = value;
  return p;
}

// One full forward-Euler step at the stable step (rate with the stability bound in one pass,
// then update and T(E) in a second), as a run takes it: the step is the stable one, so T(E) does
// the Newton work of a real step. Over the repeats the state moves by a few stable steps, which
// does not change the cost. The returned function takes one step; it is warmed up once here.
std::function<void()> step_function(Problem& p, tbb::task_arena& arena,
  SimdLevel level = best_simd_level())
{
  auto fe = std::make_shared<ForwardEuler>();
  constexpr double kAnyInterval = 1e15; // s; the stable step is far shorter
  auto step = [&p, &arena, fe, level] {
    set_simd_level(level);
    fe->advance(*p.model, *p.op, kAnyInterval, 0.9, p.E, p.T, arena);
  };
  step(); // allocations
  return step;
}

// Node-updates per second of that step.
double step_throughput(Problem& p, int threads, int repeats)
{
  tbb::task_arena arena(threads);
  return p.mesh.n_points() / best_time(repeats, step_function(p, arena));
}

// Components of the step, to see where the time goes [s per call].
void step_breakdown(Problem& p, int threads, const std::string& mesh_name)
{
  tbb::task_arena arena(threads);
  std::vector<double> rate;
  PowerTally tally;
  const int repeats = quick ? 2 : 10;
  const double n = p.mesh.n_points();
  const std::string tag = "mesh=" + mesh_name + " threads=" + std::to_string(threads);
  figure("rate_throughput",
         n / best_time(repeats, [&] { p.op->rate(p.T, rate, tally, arena); }),
         "node-updates/s",
         tag);
  double dt = 0.0;
  figure("rate_and_stable_step_throughput",
         n / best_time(repeats, [&] { dt = p.op->rate_and_stable_step(p.T, rate, tally, arena); }),
         "node-updates/s",
         tag);
  // Update and T(E) over one stable step's change of E (with E and T already consistent the
  // Newton iteration would stop at once and flatter the figure); E and T are reset each time.
  const std::vector<double> T_old = p.T, E_old = p.E;
  std::vector<float> inverse_capacity_old(T_old.size()), inverse_capacity; // as the last solve leaves it
  for (std::size_t i = 0; i < T_old.size(); ++i)
    inverse_capacity_old[i] = static_cast<float>(1.0 / p.model->capacity(i, T_old[i]));
  figure("update_and_temperature_throughput",
         n / best_time(repeats,
                       [&]
                       {
                         std::copy(T_old.begin(), T_old.end(), p.T.begin());
                         std::copy(E_old.begin(), E_old.end(), p.E.begin());
                         inverse_capacity = inverse_capacity_old;
                         arena.execute([&] {
                           tbb::parallel_for(tbb::blocked_range<std::size_t>(0, p.E.size(), 2048),
                             [&](const tbb::blocked_range<std::size_t>& r) {
                               update_heat_and_temperature(*p.model, r.begin(), r.end(),
                                 p.E.data(), p.T.data(), inverse_capacity.data(),
                                 [&](std::size_t i, double E) { return E + 0.9 * dt * rate[i]; });
                             });
                         });
                       }),
         "node-updates/s",
         tag + " includes=copy-of-E-T-and-capacity");
  p.T = T_old;
  p.E = E_old;
}

// ---- CSR yardstick: y = A x with the assembled stiffness pattern of the same mesh ------------
struct Csr
{
  std::vector<std::int64_t> row_start;
  std::vector<std::int32_t> column; // 4 bytes + 8 bytes value = the yardstick's 12 B/nonzero
  std::vector<double> value;
};

Csr assemble_csr(const ThermalModel& model)
{
  const Mesh& mesh = model.mesh();
  const ElementMatrices em = compute_element_matrices(mesh);
  const std::size_t n = mesh.n_points();
  Csr a;
  a.row_start.assign(n + 1, 0);
  std::vector<std::pair<std::int64_t, double>> row;
  const NodeCells cells(mesh);
  for (std::size_t i = 0; i < n; ++i)
  {
    row.clear();
    for (const CellSlot& slot : cells.of(i))
    {
      const auto nodes = mesh.nodes(slot.cell);
      const std::size_t m = nodes.size();
      const double* K = em.stiffness.data() + em.stiffness_offsets[slot.cell] + slot.local * m;
      for (std::size_t b = 0; b < m; ++b)
        row.emplace_back(nodes[b], K[b]);
    }
    std::sort(row.begin(), row.end());
    for (std::size_t k = 0; k < row.size(); ++k)
    {
      if (k > 0 && row[k].first == row[k - 1].first)
      {
        a.value.back() += row[k].second;
        continue;
      }
      a.column.push_back(static_cast<std::int32_t>(row[k].first));
      a.value.push_back(row[k].second);
    }
    a.row_start[i + 1] = static_cast<std::int64_t>(a.value.size());
  }
  return a;
}

// y = A x with A the yardstick matrix; the returned function does one product (x = 1, warmed up).
std::function<void()> spmv_function(const Csr& a, tbb::task_arena& arena)
{
  const std::size_t n = a.row_start.size() - 1;
  auto x = std::make_shared<std::vector<double>>(n, 1.0);
  auto y = std::make_shared<std::vector<double>>(n, 0.0);
  auto spmv = [&a, &arena, x, y, n]
  {
    arena.execute(
      [&]
      {
        tbb::parallel_for(tbb::blocked_range<std::size_t>(0, n, 2048),
                          [&](const tbb::blocked_range<std::size_t>& r)
                          {
                            const double* xs = x->data();
                            for (std::size_t i = r.begin(); i != r.end(); ++i)
                            {
                              double s = 0.0;
                              for (std::int64_t k = a.row_start[i]; k < a.row_start[i + 1]; ++k)
                                s += a.value[k] * xs[a.column[k]];
                              (*y)[i] = s;
                            }
                          });
      });
  };
  spmv();
  return spmv;
}

// Bytes one forward-Euler step streams per node, counted from the arrays each pass reads or
// writes once (compulsory traffic; a written array counts 16 B per double: write-allocate plus
// write-back; the gathers along the edges are assumed to hit cache). Per pass:
//   conductivity: T 8, node rock 1, (T, k) pair out 32;
//   contact pairs: per (contact node, rock) node 4, rock 1, T 8, pair out 32;
//   rate + stable step: chunk start 1 (4 B per 4 nodes), (T, k) 16, source 8 (only if a node
//     has one; the benchmark model has none), inverse capacity (float) 4, node kind 1, rate
//     out 16; per edge slot (padding included) far-end offset 4 + half-weight 8; at contact
//     nodes the edge count 2 and a rock byte per edge (the count is also read in the few
//     other scalar chunks: not counted);
//   update + T(E): rate 8, E in/out 16, T in/out 16, last 1/capacity (float) in/out 8, share
//     offset 4, per node share its rock 1 and mass 8.
double step_bytes_per_node(const ThermalModel& model, const HeatOperator& op)
{
  const double n = model.n_nodes();
  double shares = 0;
  for (std::size_t i = 0; i < model.n_nodes(); ++i)
    shares += model.shares(i).size();
  const double rate = n * (8 + 1 + 32) + op.contact_pairs() * (4.0 + 1 + 8 + 32) +
    n * (1 + 16 + (op.has_sources() ? 8 : 0) + 4 + 1 + 16) + op.edge_slots() * (4.0 + 8) +
    op.contact_edge_entries() * 1.0 + op.contact_nodes() * 2.0;
  const double update = n * (8 + 16 + 16 + 8 + 4) + shares * (1 + 8);
  return (rate + update) / n;
}

// Solver state per node [B], counted from the containers a run keeps, with the input mesh
// (points, connectivity, cell types and regions) reported apart.
struct StateBytes
{
  double mesh, model, op, vectors;
};
StateBytes state_bytes_per_node(const ThermalModel& model, const HeatOperator& op,
  IntegratorKind kind)
{
  const Mesh& mesh = model.mesh();
  const double n = mesh.n_points(), cells = mesh.n_cells();
  const double slots = mesh.cell_nodes.size();
  double shares = 0;
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
    shares += model.shares(i).size();
  StateBytes b;
  b.mesh = (n * 24 + cells * (1 + 8 + 4) + slots * 8) / n;
  // cell rock, cell-node volumes, share offsets, share rock + mass + volume, node volume +
  // source, the outer faces (cell, local face)
  b.model = (cells * 4 + slots * 8 + (n + 1) * 4 + shares * (1 + 8 + 8) + n * 16 +
              model.boundary_faces().size() * double(sizeof(CellFace))) / n;
  b.op = op.bytes_per_node();
  // E, T + integrator: its vectors and the kept inverse capacities (float)
  b.vectors = 8 * 2 + 8 * (kind == IntegratorKind::RKL2 ? 6 : 1) + 4;
  return b;
}

// ---- Sections ---------------------------------------------------------------------------------
double triad_two_threads = 0.0;
/// Meshes the step, CSR and profile sections use (false: hexahedra, true: tetrahedra).
std::vector<bool> meshes = { false, true };

void section_stream()
{
  for (int threads : kThreadCounts)
  {
    const double bw = stream_triad(threads);
    if (threads == 2)
      triad_two_threads = bw;
    figure("stream_triad", bw / 1e9, "GB/s", "threads=" + std::to_string(threads));
  }
}

void section_step_and_csr(bool step, bool csr)
{
  if (triad_two_threads == 0.0)
    triad_two_threads = stream_triad(2);
  const double nodes = quick ? 1e5 : 1e6;
  const int rounds = quick ? 1 : 10, repeats = quick ? 2 : 5;
  for (bool tets : meshes)
  {
    const std::string mesh_name = tets ? "tet" : "hex";
    const auto setup_start = Clock::now();
    Problem p = make_problem(nodes, tets);
    // Building the mesh, the thermal model (mesh checks, volumes, shares) and the operator
    // (boundary faces, element matrices, edges): paid once per run, before the first step.
    figure("setup_time", std::chrono::duration<double>(Clock::now() - setup_start).count(), "s",
      "mesh=" + mesh_name + " nodes=" + std::to_string(p.mesh.n_points()) +
        " includes=mesh,model,operator");
    // The same model with constant properties. (Problems are not moved: the model points at
    // the mesh.)
    Problem q = step ? make_problem(nodes, tets, true) : Problem{};
    Csr a;
    if (csr)
      a = assemble_csr(*p.model);
    const std::string size = " nodes=" + std::to_string(p.mesh.n_points());
    std::printf(
      "# %s mesh: %zu nodes, %zu cells\n", mesh_name.c_str(), p.mesh.n_points(), p.mesh.n_cells());
    // Step (full physics), step (constant properties) and the yardstick's SpMV at 1 and 2
    // threads, all timed in alternating rounds (interleaved_times): the ratios between
    // them, scaling included, then compare runs made under the same load.
    // node-updates/s, indexed by threads; full_scalar: the full step with the node loops at
    // SimdLevel::Scalar, for the vector loops' speed-up (simd.h)
    double full[3] = {}, linear[3] = {}, full_scalar[3] = {}, spmv[3] = {};
    tbb::task_arena one(1), two(2);
    tbb::task_arena* arena_of[3] = { nullptr, &one, &two };
    std::vector<std::function<void()>> fs;
    for (int threads : kThreadCounts)
    {
      if (step)
      {
        fs.push_back(step_function(p, *arena_of[threads]));
        fs.push_back(step_function(q, *arena_of[threads]));
        fs.push_back(step_function(p, *arena_of[threads], SimdLevel::Scalar));
      }
      if (csr)
        fs.push_back(spmv_function(a, *arena_of[threads]));
    }
    const InterleavedTimes timed = interleaved_times(fs, rounds, repeats);
    const std::vector<double>& t = timed.best;
    set_simd_level(best_simd_level()); // for the breakdown below
    const std::size_t per_thread_count = fs.size() / 2;
    const double n = p.mesh.n_points();
    for (int threads : kThreadCounts)
    {
      const double* ts = t.data() + (threads - 1) * per_thread_count;
      const std::string tag = "mesh=" + mesh_name + " threads=" + std::to_string(threads);
      if (step)
      {
        full[threads] = n / ts[0];
        linear[threads] = n / ts[1];
        full_scalar[threads] = n / ts[2];
        const std::string simd = " simd=" + simd_level_name(best_simd_level());
        figure("step_throughput", full[threads], "node-updates/s",
          tag + size + " integrator=forward-euler physics=k(T),c(T),latent" + simd);
        figure("step_throughput", linear[threads], "node-updates/s",
          tag + size + " integrator=forward-euler physics=constant-k-c,no-latent" + simd);
        figure("step_throughput", full_scalar[threads], "node-updates/s",
          tag + size + " integrator=forward-euler physics=k(T),c(T),latent simd=scalar");
        figure("step_simd_speedup", full[threads] / full_scalar[threads], "ratio",
          tag + simd + " over=scalar timing=interleaved");
      }
      if (csr)
      {
        spmv[threads] = n / ts[per_thread_count - 1];
        figure("csr_spmv_throughput", spmv[threads], "node-updates/s", tag);
      }
      if (step)
        step_breakdown(p, threads, mesh_name);
    }
    if (step)
      figure("step_scaling_2t_over_1t", full[2] / full[1], "ratio",
        "mesh=" + mesh_name + " timing=interleaved");
    const double bytes = step_bytes_per_node(*p.model, *p.op);
    figure("edges_per_node", double(p.op->edge_entries()) / p.mesh.n_points(), "1",
      "mesh=" + mesh_name);
    figure("edge_slots_per_node", double(p.op->edge_slots()) / p.mesh.n_points(), "1",
      "mesh=" + mesh_name + " layout=SELL-4");
    figure("step_bytes_per_node", bytes, "B", "mesh=" + mesh_name + " method=counted");
    figure("step_roofline",
           triad_two_threads / bytes,
           "node-updates/s",
           "mesh=" + mesh_name + " threads=2 bandwidth=triad");
    if (csr)
    {
      const double nnz_per_row = double(a.value.size()) / p.mesh.n_points();
      const double csr_bytes = 12.0 * nnz_per_row + 16.0; // issue #7's yardstick definition
      figure("csr_nnz_per_row", nnz_per_row, "1", "mesh=" + mesh_name);
      figure("csr_yardstick_roofline",
             triad_two_threads / csr_bytes,
             "node-updates/s",
             "mesh=" + mesh_name + " threads=2 bytes_per_row=" + std::to_string(csr_bytes));
      // The nominal yardstick: exactly 27 (hex) or 15 (tet) nonzeros per row.
      const double nominal_bytes = 12.0 * (tets ? 15 : 27) + 16.0;
      figure("csr_yardstick_roofline_nominal",
             triad_two_threads / nominal_bytes,
             "node-updates/s",
             "mesh=" + mesh_name + " threads=2 bytes_per_row=" + std::to_string(nominal_bytes));
      if (step)
      {
        figure("step_over_csr_roofline",
               full[2] / (triad_two_threads / csr_bytes),
               "ratio",
               "mesh=" + mesh_name + " threads=2 target=0.8");
        figure("step_over_csr_measured",
               full[2] / spmv[2],
               "ratio",
               "mesh=" + mesh_name + " threads=2 target=0.8 timing=interleaved");
        // The same ratio round by round (step and SpMV timed seconds apart), median of rounds.
        figure("step_over_csr_measured",
               timed.median_ratio(per_thread_count, 2 * per_thread_count - 1),
               "ratio",
               "mesh=" + mesh_name + " threads=2 target=0.8 timing=round-median rounds=" +
                 std::to_string(rounds));
        figure("step_over_csr_measured",
               linear[2] / spmv[2],
               "ratio",
               "mesh=" + mesh_name + " threads=2 physics=constant-k-c,no-latent timing=interleaved");
      }
    }
    if (step)
      figure("step_over_own_roofline",
             full[2] / (triad_two_threads / bytes),
             "ratio",
             "mesh=" + mesh_name + " threads=2");
  }
}

void section_growth()
{
  std::vector<double> sizes =
    quick ? std::vector<double>{ 1e4, 1e5 } : std::vector<double>{ 1e4, 1e5, 1e6, 4e6 };
  for (double nodes : sizes)
  {
    Problem p = make_problem(nodes, false);
    const int repeats = nodes < 1e6 ? 40 : nodes < 2e6 ? 15 : 6;
    figure("step_throughput_growth",
           step_throughput(p, 2, repeats),
           "node-updates/s",
           "mesh=hex threads=2 nodes=" + std::to_string(p.mesh.n_points()));
  }
}

void section_memory()
{
  const double nodes = quick ? 1e5 : 1e6;
  const double before = resident_bytes();
  Problem p = make_problem(nodes, false);
  tbb::task_arena arena(2);
  Rkl2 rkl2;
  rkl2.advance(*p.model, *p.op, 1.0, 0.9, p.E, p.T, arena); // allocates its vectors
  const double n = p.mesh.n_points();
  figure("state_bytes_per_node_measured",
         (resident_bytes() - before) / n,
         "B",
         "mesh=hex integrator=rkl2 method=resident-set-growth target=300");
  for (IntegratorKind kind : { IntegratorKind::RKL2, IntegratorKind::ForwardEuler })
  {
    const StateBytes b = state_bytes_per_node(*p.model, *p.op, kind);
    const std::string tag = "mesh=hex integrator=" + integrator_name(kind) + " method=container-sizes";
    figure("state_bytes_per_node_counted", b.model + b.op + b.vectors, "B",
      tag + " scope=solver target=300");
    figure("state_bytes_per_node_counted", b.mesh + b.model + b.op + b.vectors, "B",
      tag + " scope=solver+input-mesh");
    figure("state_bytes_per_node_part", b.mesh, "B", "part=input-mesh");
    figure("state_bytes_per_node_part", b.model, "B", "part=thermal-model");
    figure("state_bytes_per_node_part", b.op, "B", "part=heat-operator");
    figure("state_bytes_per_node_part", b.vectors, "B", "part=E,T,integrator " + tag);
  }
}

// Reference time-to-solution problem (issue #7): a 100 m sill (b = 50 m) emplaced at 1150 °C in
// host rock at 50 °C of the same properties (κ = 1e-6 m²/s), 10 kyr, against the
// instantaneous-sheet solution θ = ½[erf((b − x)/2√κt) + erf((b + x)/2√κt)] (Carslaw & Jaeger
// 1959, ch. 2). A column of 5 m cubes from the symmetry plane to 3 km; error = max |θ error| over
// all nodes and 20 log-spaced outputs from 100 yr.
void section_sill()
{
  const double b = 50.0, k = 2.5, rho = 2500, c = 1000, T0 = 1150, Th = 50;
  const double kappa = k / (rho * c);
  const double extent = 3000.0;
  const int cells = quick ? 300 : 600; // b a whole number of cells
  const double w = extent / cells;
  std::vector<double> times(20);
  for (int i = 0; i < 20; ++i)
    times[i] = 100 * kSecondsPerYear * std::pow(100.0, i / 19.0);
  auto theta = [&](double x, double t)
  {
    const double s = 2 * std::sqrt(kappa * t);
    return 0.5 * (std::erf((b - x) / s) + std::erf((b + x) / s));
  };
  for (IntegratorKind kind : { IntegratorKind::ForwardEuler, IntegratorKind::RKL2 })
  {
    Mesh mesh = make_box_hex({ 0, 0, -extent }, { w, w, 0 }, { 1, 1, cells });
    for (std::size_t cell = 0; cell < mesh.n_cells(); ++cell)
      if (mesh.points[mesh.nodes(cell)[0]][2] + extent < b - 1e-9)
        mesh.cell_region[cell] = 1;
    Rock rock;
    rock.name = "rock";
    rock.density = rho;
    rock.conductivity.k_ref = k;
    rock.heat_capacity.c_ref = c;
    ThermalModel model(mesh, { rock }, std::vector<int>(mesh.n_cells(), 0));
    SimulationSettings s;
    s.output_times = times;
    s.threads = 2;
    const auto integrator = make_integrator(kind);
    SimulationResult result;
    const auto t0 = Clock::now();
    result = simulate(
      model, {}, { InitialState::Kind::Uniform, Th }, { { 1, 0, 0.0, T0 } }, s, *integrator);
    const double wall = std::chrono::duration<double>(Clock::now() - t0).count();
    double worst = 0, contact = 0;
    for (const Snapshot& snap : result.snapshots)
      for (std::size_t i = 0; i < mesh.n_points(); ++i)
      {
        const double x = mesh.points[i][2] + extent;
        const double err = std::abs((snap.temperature[i] - Th) / (T0 - Th) - theta(x, snap.time));
        worst = std::max(worst, err);
        if (std::abs(x - b) < 1e-6 * w)
          contact = std::max(contact, err);
      }
    const std::string tag =
      "integrator=" + integrator_name(kind) + " threads=2 nodes=" + std::to_string(mesh.n_points());
    figure("sill_wall", wall, "s", tag);
    figure("sill_operator_applications", double(result.operator_applications), "1", tag);
    figure("sill_max_theta_error", worst, "1", tag + " target=0.01");
    figure("sill_contact_theta_error", contact, "1", tag + " target=0.01");
  }
}
// No figures: the step alone, long enough for a sampling profiler to see inside it
// (`perf record -F 1999 emberlith-bench --section profile`), or, with --quick (20 steps on
// 10⁵-node meshes), short enough to count instructions under callgrind (bench/README.md).
void section_profile()
{
  const int steps = quick ? 20 : 300;
  for (bool tets : meshes)
  {
    Problem p = make_problem(quick ? 1e5 : 1e6, tets);
    tbb::task_arena arena(2);
    ForwardEuler fe;
    const auto start = Clock::now();
    for (int s = 0; s < steps; ++s)
      fe.advance(*p.model, *p.op, 1e15, 0.9, p.E, p.T, arena);
    std::printf("# profile %s: %zu nodes, %d steps in %.2f s\n", tets ? "tet" : "hex",
                p.mesh.n_points(), steps,
                std::chrono::duration<double>(Clock::now() - start).count());
  }
}
} // namespace

int main(int argc, char** argv)
{
  std::set<std::string> sections;
  for (int i = 1; i < argc; ++i)
  {
    static const std::set<std::string> known = { "stream", "step", "csr", "growth", "memory",
      "sill", "profile" };
    if (std::strcmp(argv[i], "--quick") == 0)
      quick = true;
    else if (std::strcmp(argv[i], "--section") == 0 && i + 1 < argc && known.count(argv[i + 1]))
      sections.insert(argv[++i]);
    else if (std::strcmp(argv[i], "--mesh") == 0 && i + 1 < argc &&
             (std::strcmp(argv[i + 1], "hex") == 0 || std::strcmp(argv[i + 1], "tet") == 0))
      meshes = { std::strcmp(argv[++i], "tet") == 0 };
    else
    {
      const bool has_value = i + 1 < argc &&
        (std::strcmp(argv[i], "--section") == 0 || std::strcmp(argv[i], "--mesh") == 0);
      std::fprintf(stderr, "%s: %s '%s'%s%s\n", argv[0],
        has_value ? "unknown value" : "unknown or incomplete option",
        has_value ? argv[i + 1] : argv[i], has_value ? " for " : "", has_value ? argv[i] : "");
      std::fprintf(stderr,
        "usage: %s [--quick] [--section stream|step|csr|growth|memory|sill|profile]... "
        "[--mesh hex|tet]\n",
        argv[0]);
      return 2;
    }
  }
  const bool profile = sections.erase("profile") > 0;
  if (profile && sections.empty())
  {
    section_profile();
    return 0;
  }
  auto want = [&](const char* s) { return sections.empty() || sections.count(s) > 0; };
  std::printf("# emberlith-bench%s: one 'figure' line per measured figure (bench/README.md)\n",
              quick ? " --quick" : "");
  {
    // Shared machines: the load when the run started says how much the figures can be trusted.
    std::ifstream loadavg("/proc/loadavg");
    std::string one, five, fifteen;
    loadavg >> one >> five >> fifteen;
    std::printf("# load average at start: %s %s %s (1, 5, 15 min)\n",
                one.c_str(),
                five.c_str(),
                fifteen.c_str());
  }
  if (want("memory")) // first, while the heap is fresh, so the resident-set growth is ours
    section_memory();
  if (want("stream"))
    section_stream();
  if (want("step") || want("csr"))
    section_step_and_csr(want("step"), want("csr"));
  if (want("growth"))
    section_growth();
  if (want("sill"))
    section_sill();
  if (profile)
    section_profile();
  return 0;
}
