// emberlith — runs cooling scenarios headless, with the same filters as the viewer plugin.
//
//   emberlith run SCENARIO.yaml -o OUTPUT [--force] [--threads N] [--resolution F]
//   emberlith check SCENARIO.yaml [--resolution F]
//   emberlith describe OUTPUT
//   emberlith brief OUTPUT [--isotherms 100,300,600] [--cut half|quadrant|none] [--size WxH] ...
//
// Exit codes: 0 success, 1 internal error, 2 bad input (scenario, mesh, properties, command
// line), 3 output folder exists (not replaced), 4 the solve stopped (non-physical state).
#include "result_folder.h"
#include "runner.h"

#include "vtkEmberCoolingSimulation.h"

#include "ember/inputs/input_error.h"
#include "ember/mesh.h"
#include "ember/rock.h"
#include "ember/simulation.h"

#include <CLI/CLI.hpp>
#include <vtkObject.h>

#include <cstdio>
#include <unistd.h>

int main(int argc, char** argv)
{
  using namespace emberlith;
  CLI::App app{ "emberlith " EMBERLITH_VERSION
                " — cooling of magmatic bodies and their thermal aureoles, headless.\n"
                "Exit codes: 0 ok, 1 internal error, 2 bad input, 3 output exists, 4 solve stopped." };
  app.require_subcommand(1);
  RunRequest run;
  std::optional<double> resolution;
  auto* run_cmd = app.add_subcommand("run", "run a scenario and write a result folder");
  run_cmd->add_option("scenario", run.scenario, "scenario file (YAML)")->required()->check(CLI::ExistingFile);
  run_cmd->add_option("-o,--output", run.output, "result folder to create")->required();
  run_cmd->add_flag("--force", run.force, "replace an earlier Emberlith result in that folder");
  run_cmd->add_option("--threads", run.threads, "worker threads (default: the scenario's, or all cores)")
    ->check(CLI::NonNegativeNumber);
  run_cmd->add_option("--resolution", run.resolution, "multiply the scenario's mesh resolution (e.g. 0.5 for a quick look)")
    ->check(CLI::PositiveNumber);
  bool quiet = false;
  run_cmd->add_flag("-q,--quiet", quiet, "no progress line");

  std::string check_file;
  auto* check_cmd = app.add_subcommand("check", "validate a scenario and print the model, without solving");
  check_cmd->add_option("scenario", check_file, "scenario file (YAML)")->required()->check(CLI::ExistingFile);
  check_cmd->add_option("--resolution", resolution, "multiply the scenario's mesh resolution")
    ->check(CLI::PositiveNumber);

  std::string folder;
  auto* describe_cmd = app.add_subcommand("describe", "list the times, arrays and ranges of a result folder");
  describe_cmd->add_option("folder", folder, "result folder")->required();

  BriefRequest brief;
  auto* brief_cmd = app.add_subcommand("brief", "render the briefing movie, poster and cooling curves of a result folder");
  brief_cmd->add_option("folder", brief.folder, "result folder")->required();
  brief_cmd->add_option("-o,--output", brief.output, "where to put them (default: FOLDER/briefing)");
  brief_cmd->add_option("--isotherms", brief.isotherms, "isotherm temperatures in °C, comma-separated (default: chosen from the run)");
  brief_cmd->add_option("--cut", brief.cut, "cut-away: half, quadrant or none")->check(CLI::IsMember({ "half", "quadrant", "none" }));
  brief_cmd->add_option("--size", brief.size, "frame size WxH in pixels");
  brief_cmd->add_option("--fps", brief.fps, "movie frames per second")->check(CLI::PositiveNumber);
  brief_cmd->add_option("--title", brief.title, "title on the pictures");
  brief_cmd->add_option("--poster-time", brief.poster_time, "poster time in years (default: when the largest body has solidified)");
  brief_cmd->add_flag("--force", brief.force, "replace an earlier briefing folder");

  try
  {
    app.parse(argc, argv);
  }
  catch (const CLI::ParseError& e)
  {
    const int code = app.exit(e);
    return code == 0 ? kOk : kBadInput;
  }

  // The filters report through VTK's output window; here we report their messages ourselves.
  vtkObject::GlobalWarningDisplayOff();
  try
  {
    if (*run_cmd)
    {
      run.progress = !quiet;
      return run_scenario(run);
    }
    if (*check_cmd)
      return check_scenario(check_file, resolution);
    if (*brief_cmd)
      return brief_result(brief);
    return describe_result(folder);
  }
  catch (const ember::inputs::InputError& e)
  {
    std::fprintf(stderr, "emberlith: error: %s\n", e.what());
    return kBadInput;
  }
  catch (const ember::MeshError& e)
  {
    std::fprintf(stderr, "emberlith: error in the model's mesh: %s\n", e.what());
    return kBadInput;
  }
  catch (const ember::PropertyError& e)
  {
    std::fprintf(stderr, "emberlith: error in the rock properties: %s\n", e.what());
    return kBadInput;
  }
  catch (const std::invalid_argument& e)
  {
    std::fprintf(stderr, "emberlith: error: %s\n", e.what());
    return kBadInput;
  }
  catch (const OutputExists& e)
  {
    std::fprintf(stderr, "emberlith: %s\n", e.what());
    return kOutputExists;
  }
  catch (const SimulationFailed& e)
  {
    std::fprintf(stderr, "emberlith: %s\n", e.what());
    return e.code;
  }
  catch (const std::exception& e)
  {
    std::fprintf(stderr, "emberlith: internal error: %s\n", e.what());
    return kInternalError;
  }
}
