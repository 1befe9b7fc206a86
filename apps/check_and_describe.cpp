// `emberlith check` (validate a scenario and print the model without solving) and
// `emberlith describe` (what a result folder holds).
#include "result_folder.h"
#include "runner.h"

#include "ember/inputs/model_builder.h"
#include "ember/inputs/scenario.h"

#include <vtkDataArray.h>
#include <vtkNew.h>
#include <vtkPointData.h>
#include <vtkUnstructuredGrid.h>
#include <vtkXMLUnstructuredGridReader.h>

#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdio>
#include <fstream>

namespace fs = std::filesystem;

namespace emberlith
{
int check_scenario(const fs::path& file, std::optional<double> resolution)
{
  using namespace ember;
  inputs::Scenario scenario = inputs::load_scenario(file.string());
  if (resolution)
    scenario.mesh.resolution = *resolution;
  const inputs::BuiltModel model = inputs::build_model(scenario);
  const inputs::ModelSummary summary = inputs::describe(scenario, model, true);
  std::printf("%s: valid scenario%s%s\n", file.c_str(), scenario.title.empty() ? "" : " — ",
    scenario.title.c_str());
  std::printf("%s", inputs::summary_text(summary).c_str());
  // Forward-Euler steps to the end at the stable step: an upper bound of the work (RKL2 needs
  // far fewer operator applications, roughly the square root of this many per interval).
  if (summary.stable_time_step > 0.0)
  {
    const double steps = std::ceil(scenario.end_time / (0.9 * summary.stable_time_step));
    std::printf("end time %s, %zu output times; forward-Euler steps to the end: %.3g\n",
      natural_time(scenario.end_time).c_str(), scenario.output_times.size(), steps);
  }
  return kOk;
}

int describe_result(const fs::path& folder)
{
  std::ifstream in(folder / kProvenanceFile);
  if (!in)
    throw std::invalid_argument(folder.string() + " is not an Emberlith result folder (no " +
      kProvenanceFile + ")");
  const auto provenance = nlohmann::json::parse(in, nullptr, false);
  if (provenance.is_discarded() || provenance.value("program", "") != "emberlith")
    throw std::invalid_argument((folder / kProvenanceFile).string() + " is not an Emberlith provenance file");
  std::printf("%s\n  scenario %s (md5 %s)\n  made %s by emberlith %s; %s cells, %s nodes; %s steps, wall %.1f s\n",
    folder.c_str(), provenance.value("scenario", "?").c_str(), provenance.value("scenario_md5", "?").c_str(),
    provenance.value("created_utc", "?").c_str(), provenance.value("version", "?").c_str(),
    provenance["mesh"].value("cells", nlohmann::json()).dump().c_str(),
    provenance["mesh"].value("nodes", nlohmann::json()).dump().c_str(),
    provenance.value("time_steps", nlohmann::json()).dump().c_str(), provenance.value("wall_time_s", 0.0));
  std::printf("  %-10s %-12s %s\n", "time", "file", "arrays [min, max]");
  for (const auto& frame : provenance["frames"])
  {
    const fs::path file = folder / frame.value("file", "");
    vtkNew<vtkXMLUnstructuredGridReader> reader;
    reader->SetFileName(file.c_str());
    reader->Update();
    vtkUnstructuredGrid* grid = reader->GetOutput();
    std::string arrays;
    for (int a = 0; grid && a < grid->GetPointData()->GetNumberOfArrays(); ++a)
    {
      vtkDataArray* array = grid->GetPointData()->GetArray(a);
      if (!array)
        continue;
      double range[2];
      array->GetRange(range);
      char text[128];
      std::snprintf(text, sizeof text, "%s%s [%.4g, %.4g]", arrays.empty() ? "" : ", ", array->GetName(),
        range[0], range[1]);
      arrays += text;
    }
    std::printf("  %-10s %-12s %s\n",
      natural_time(frame.value("time_yr", 0.0) * 365.25 * 86400.0).c_str(),
      file.filename().c_str(), grid && grid->GetNumberOfPoints() ? arrays.c_str() : "(missing or unreadable)");
  }
  return kOk;
}
} // namespace emberlith
