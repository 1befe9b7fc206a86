// `emberlith run`: scenario → model builder → the plugin's filters → result folder.
#include "progress_line.h"
#include "result_folder.h"
#include "runner.h"

#include "EmberVtkConversion.h"
#include "vtkEmberCoolingSimulation.h"
#include "vtkEmberRockAssignment.h"

#include "ember/inputs/model_builder.h"
#include "ember/inputs/scenario.h"
#include "ember/body_summary.h"

#include <vtkCallbackCommand.h>
#include <vtkCommand.h>
#include <vtkDataArray.h>
#include <vtkFieldData.h>
#include <vtkNew.h>
#include <vtkPointData.h>
#include <vtkUnstructuredGrid.h>
#include <vtkXMLUnstructuredGridWriter.h>
#include <vtksys/MD5.h>

#include <nlohmann/json.hpp>

#include <atomic>
#include <chrono>
#include <csignal>
#include <cstdio>
#include <ctime>
#include <cmath>
#include <fstream>
#include <limits>
#include <sstream>

namespace fs = std::filesystem;

namespace emberlith
{
const char* const kCaution =
  "Caution: these are model estimates from uncertain inputs (body shapes, emplacement "
  "temperatures and times, rock properties, boundary conditions) and a conduction-only model. "
  "Do not use them to decide access to a lava field, a drilling plan or a well design; follow "
  "local regulations and the instructions of civil-protection and other authorities, and rely "
  "on licensed professionals.";

namespace
{
std::string md5_of_file(const fs::path& file)
{
  std::ifstream in(file, std::ios::binary);
  std::ostringstream bytes;
  bytes << in.rdbuf();
  const std::string text = bytes.str();
  vtksysMD5* md5 = vtksysMD5_New();
  vtksysMD5_Initialize(md5);
  vtksysMD5_Append(md5, reinterpret_cast<const unsigned char*>(text.data()), static_cast<int>(text.size()));
  char hex[33] = {};
  vtksysMD5_FinalizeHex(md5, hex);
  vtksysMD5_Delete(md5);
  return hex;
}

void write_vtu(vtkUnstructuredGrid* grid, const fs::path& file)
{
  vtkNew<vtkXMLUnstructuredGridWriter> writer;
  writer->SetFileName(file.c_str());
  writer->SetInputData(grid);
  writer->SetDataModeToBinary(); // inline: Debian 12's expat cannot re-read appended data
  if (!writer->Write())
    throw std::runtime_error("cannot write " + file.string() + " (disk full or no permission?)");
}

// Where the cooling curves look: a body's centre, its lower contact below the centre, and a
// point in the aureole half the body's local thickness further down.
nlohmann::json probes(const ember::Mesh& mesh, int region)
{
  std::vector<char> in_body(mesh.n_points(), 0);
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    if (mesh.cell_region[c] == region)
      for (auto n : mesh.nodes(c))
        in_body[static_cast<std::size_t>(n)] = 1;
  ember::Point centre{ 0, 0, 0 };
  std::size_t count = 0;
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
    if (in_body[i])
    {
      for (int d = 0; d < 3; ++d)
        centre[d] += mesh.points[i][d];
      ++count;
    }
  if (count == 0)
    return nlohmann::json::object();
  for (double& v : centre)
    v /= static_cast<double>(count);
  // The body's nodes on the vertical line nearest the centre.
  double best = std::numeric_limits<double>::infinity();
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
    if (in_body[i])
      best = std::min(best, std::hypot(mesh.points[i][0] - centre[0], mesh.points[i][1] - centre[1]));
  double z_lo = std::numeric_limits<double>::infinity(), z_hi = -z_lo;
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
    if (in_body[i] && std::hypot(mesh.points[i][0] - centre[0], mesh.points[i][1] - centre[1]) <= best + 1e-6)
    {
      z_lo = std::min(z_lo, mesh.points[i][2]);
      z_hi = std::max(z_hi, mesh.points[i][2]);
    }
  const double x = centre[0], y = centre[1];
  return { { "centre", { x, y, 0.5 * (z_lo + z_hi) } }, { "contact", { x, y, z_lo } },
    { "aureole", { x, y, z_lo - 0.5 * (z_hi - z_lo) } } };
}

std::string utc_now()
{
  const std::time_t now = std::time(nullptr);
  char text[32];
  std::strftime(text, sizeof text, "%Y-%m-%dT%H:%M:%SZ", std::gmtime(&now));
  return text;
}

std::atomic<bool> g_interrupted{ false };
extern "C" void on_signal(int) { g_interrupted = true; }

// Progress events of the simulation filter → the terminal line; Ctrl-C → abort the solve, so
// the staging folder is removed on the way out instead of left behind.
struct ProgressRelay
{
  ProgressLine* line;
  double end_years;
  bool solving = true;
  static void relay(vtkObject* caller, unsigned long, void* self, void*)
  {
    auto* me = static_cast<ProgressRelay*>(self);
    auto* algorithm = static_cast<vtkAlgorithm*>(caller);
    if (g_interrupted)
      algorithm->SetAbortExecute(1);
    if (!me->solving)
      return; // serving frames afterwards reports progress too
    const double f = algorithm->GetProgress();
    me->line->update(f, "t = " + natural_time(f * me->end_years * ember::kSecondsPerYear));
  }
};
} // namespace

int run_scenario(const RunRequest& request)
{
  using namespace ember;
  const auto wall_start = std::chrono::steady_clock::now();
  inputs::Scenario scenario = inputs::load_scenario(request.scenario.string());
  if (request.resolution)
    scenario.mesh.resolution = *request.resolution;
  if (request.threads)
    scenario.threads = *request.threads;
  ResultFolder folder(request.output, request.force); // refuse early, before the solve

  const inputs::BuiltModel model = inputs::build_model(scenario);
  std::printf("emberlith: %s — %zu cells, %zu nodes, %zu bodies\n", request.scenario.c_str(),
    model.mesh.n_cells(), model.mesh.n_points(), scenario.bodies.size());
  std::fflush(stdout); // before the progress line on stderr

  // The same filters as in the viewer, fed what the scenario defines.
  vtkSmartPointer<vtkUnstructuredGrid> grid = bridge::to_vtk_grid(model.mesh);
  const std::string library_yaml = inputs::rock_library_yaml(scenario);
  const std::string regions_yaml = inputs::region_map_yaml(scenario);
  vtkNew<vtkEmberRockAssignment> rocks;
  rocks->SetInputData(grid);
  rocks->SetRockLibraryText(library_yaml, request.scenario.string() + " (rocks)");
  rocks->SetRegionMapText(regions_yaml, request.scenario.string() + " (regions)");
  vtkNew<vtkEmberCoolingSimulation> sim;
  sim->SetInputConnection(rocks->GetOutputPort());
  sim->SetBoundaryConditions(scenario.boundaries);
  sim->SetInitialStateOverride(scenario.initial);
  sim->SetOutputSchedule(vtkEmberCoolingSimulation::EXPLICIT_LIST);
  std::vector<double> years;
  for (double t : scenario.output_times)
  {
    years.push_back(t / kSecondsPerYear);
    sim->AddOutputTime(years.back());
  }
  sim->SetIntegrator(scenario.integrator == IntegratorKind::ForwardEuler
      ? vtkEmberCoolingSimulation::FORWARD_EULER
      : vtkEmberCoolingSimulation::RKL2);
  sim->SetThreads(scenario.threads);

  ProgressLine line("solving", request.progress);
  ProgressRelay relay{ &line, years.back() };
  vtkNew<vtkCallbackCommand> on_progress;
  on_progress->SetCallback(&ProgressRelay::relay);
  on_progress->SetClientData(&relay);
  sim->AddObserver(vtkCommand::ProgressEvent, on_progress);
  std::signal(SIGINT, on_signal);
  std::signal(SIGTERM, on_signal);
  sim->UpdateInformation();
  sim->UpdateTimeStep(years.front());
  relay.solving = false;
  if (sim->GetSolveCount() != 1)
  {
    line.done();
    using F = vtkEmberCoolingSimulation::Failure;
    const F kind = sim->GetLastFailure();
    throw SimulationFailed(kind == F::Input ? kBadInput : kind == F::Stopped ? kRunStopped : kInternalError,
      (kind == F::Stopped ? "the run stopped: " : "error: ") + sim->GetLastErrorMessage());
  }
  line.done("t = " + natural_time(scenario.output_times.back()));

  // The time series, the model's inputs (to reopen in the viewer), the provenance.
  const fs::path out = folder.staging();
  fs::create_directories(out / "frames");
  fs::create_directories(out / "model");
  std::ofstream pvd(out / "temperature.pvd");
  pvd << "<?xml version=\"1.0\"?>\n<VTKFile type=\"Collection\" version=\"0.1\">\n  <Collection>\n";
  nlohmann::json frames = nlohmann::json::array();
  for (std::size_t k = 0; k < years.size(); ++k)
  {
    sim->UpdateTimeStep(years[k]);
    vtkNew<vtkUnstructuredGrid> frame;
    frame->ShallowCopy(sim->GetOutput());
    char name[64];
    std::snprintf(name, sizeof name, "frames/temperature_%04zu.vtu", k);
    write_vtu(frame, out / name);
    pvd << "    <DataSet timestep=\"" << years[k] << "\" file=\"" << name << "\"/>\n";
    frames.push_back({ { "time_yr", years[k] }, { "file", name } });
  }
  pvd << "  </Collection>\n</VTKFile>\n";
  pvd.close();
  write_vtu(grid, out / "model" / "mesh.vtu");
  std::ofstream(out / "model" / "rocks.yaml") << library_yaml;
  std::ofstream(out / "model" / "regions.yaml") << regions_yaml;
  fs::copy_file(request.scenario, out / "model" / "scenario.yaml");

  // Per-body table through time (long format: one row per output time and region).
  const auto& summaries = sim->GetBodySummaries();
  std::ofstream csv(out / "bodies.csv");
  csv << "time_yr,region,name,volume_m3,melt_volume_fraction,heat_in_place_J,recoverable_heat_J,"
         "solidification_time_yr,contact_temperature_C,contact_distance_m,aureole_by_temperature_m,"
         "aureole_by_easyro_m\n";
  csv.precision(10);
  for (const BodySummary& at : summaries)
  {
    std::vector<ember::RegionSummary> rows = at.regions;
    rows.push_back(at.model);
    for (const ember::RegionSummary& r : rows)
      csv << at.time / kSecondsPerYear << "," << r.region << ",\""
          << (r.region < 0 ? std::string("whole model") : sim->GetRegionName(r.region)) << "\","
          << r.volume << "," << r.melt_volume_fraction << "," << r.heat_in_place << ","
          << r.recoverable_heat << "," << r.solidification_time / kSecondsPerYear << ","
          << r.contact_temperature << "," << r.contact_distance << ","
          << r.aureole_thickness_temperature << ","
          << r.aureole_thickness_reflectance << "\n";
  }
  csv.close();
  nlohmann::json bodies = nlohmann::json::array();
  for (const inputs::Body& body : scenario.bodies)
  {
    nlohmann::json b = { { "name", body.name }, { "region", body.region },
      { "emplaced_yr", body.time / kSecondsPerYear }, { "temperature_C", body.temperature },
      { "probes", probes(model.mesh, body.region) } };
    if (!summaries.empty())
      for (const ember::RegionSummary& r : summaries.back().regions)
        if (r.region == body.region)
        {
          b["volume_m3"] = r.volume;
          // JSON has no NaN or infinity: null = never molten or still molten at the end.
          b["solidified_yr"] = std::isfinite(r.solidification_time)
            ? nlohmann::json(r.solidification_time / kSecondsPerYear) : nlohmann::json();
          b["contact_temperature_C"] = r.contact_temperature;
          b["contact_distance_m"] = r.contact_distance;
          b["aureole_by_temperature_m"] = r.aureole_thickness_temperature;
          b["aureole_by_easyro_m"] = r.aureole_thickness_reflectance;
        }
    bodies.push_back(b);
  }

  const EnergyLedger ledger = sim->GetEnergyLedger();
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - wall_start).count();
  nlohmann::json provenance = {
    { "program", "emberlith" },
    { "version", EMBERLITH_VERSION },
    { "created_utc", utc_now() },
    { "scenario", fs::absolute(request.scenario).string() },
    { "scenario_md5", md5_of_file(request.scenario) },
    { "mesh", { { "cells", model.mesh.n_cells() }, { "nodes", model.mesh.n_points() },
                { "resolution_factor", scenario.mesh.resolution } } },
    { "integrator", integrator_name(scenario.integrator) },
    { "threads", scenario.threads },
    { "time_steps", sim->GetStepsTaken() },
    { "operator_applications", sim->GetOperatorApplications() },
    { "energy_ledger_J", { { "initial", ledger.initial }, { "stored_change", ledger.stored_change },
                           { "boundary", ledger.boundary }, { "radiogenic", ledger.source },
                           { "emplaced", ledger.emplaced }, { "imbalance", ledger.imbalance() },
                           { "relative_imbalance", ledger.relative_imbalance() } } },
    { "wall_time_s", wall },
    { "frames", frames },
    { "bodies", bodies },
  };
  std::ofstream(out / kProvenanceFile) << provenance.dump(2) << "\n";
  folder.commit();

  std::printf("solved %lld steps (%lld operator applications) in %.1f s; energy imbalance %.1e (relative)\n",
    static_cast<long long>(sim->GetStepsTaken()), static_cast<long long>(sim->GetOperatorApplications()),
    wall, ledger.relative_imbalance());
  for (const auto& b : bodies)
  {
    const auto& solid = b.value("solidified_yr", nlohmann::json());
    std::printf("  %-22s solidified %-28s max contact %6.0f °C (%.3g m into the host)   aureole (peak T > threshold) %.3g m\n",
      b["name"].get<std::string>().c_str(),
      solid.is_number()
        ? (natural_time((solid.get<double>() - b["emplaced_yr"].get<double>()) * kSecondsPerYear) + " after emplacement").c_str()
        : "not by the end",
      b.value("contact_temperature_C", std::nan("")), b.value("contact_distance_m", std::nan("")),
      b.value("aureole_by_temperature_m", std::nan("")));
  }
  std::printf("results: %s\n  open in the viewer: paraview %s\n", fs::absolute(folder.target()).c_str(),
    (fs::absolute(folder.target()) / "temperature.pvd").c_str());
  std::printf("%s\n", kCaution);
  return kOk;
}
} // namespace emberlith
