// The subcommands of the `emberlith` command. Each returns the process exit code; errors of
// the user's input are thrown as ember::inputs::InputError (and friends) and mapped in main.
#pragma once

#include <filesystem>
#include <optional>
#include <stdexcept>
#include <string>

namespace emberlith
{
/// Exit codes (documented in the README and in `emberlith --help`).
enum ExitCode
{
  kOk = 0,
  kInternalError = 1, ///< a bug or an environment failure (disk full, ...)
  kBadInput = 2,      ///< scenario, mesh or property errors; bad command line
  kOutputExists = 3,  ///< refused to overwrite
  kRunStopped = 4     ///< the solve stopped: non-physical state or aborted
};

/// The simulation filter failed; `code` is kBadInput, kRunStopped or kInternalError.
struct SimulationFailed : std::runtime_error
{
  SimulationFailed(int exit_code, const std::string& message)
    : std::runtime_error(message), code(exit_code) {}
  int code;
};

struct RunRequest
{
  std::filesystem::path scenario;
  std::filesystem::path output;
  bool force = false;
  std::optional<int> threads;        ///< overrides the scenario's
  std::optional<double> resolution;  ///< overrides the scenario's mesh resolution factor
  bool progress = true;
};

struct BriefRequest
{
  std::filesystem::path folder;
  std::filesystem::path output; ///< default: FOLDER/briefing
  std::string isotherms;        ///< "100,300,600" (°C); empty: chosen from the run
  std::string cut = "half";     ///< half, quadrant or none
  std::string size = "1280x720";
  double fps = 6.0;
  std::string title;
  std::optional<double> poster_time; ///< [yr]
  bool force = false;
};

int run_scenario(const RunRequest& request);
int brief_result(const BriefRequest& request);
int check_scenario(const std::filesystem::path& scenario, std::optional<double> resolution);
int describe_result(const std::filesystem::path& folder);

/// The cautions every run prints (and the README and plugin help repeat).
extern const char* const kCaution;
} // namespace emberlith
