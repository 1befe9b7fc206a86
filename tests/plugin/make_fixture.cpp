// Writes the plugin test's inputs and the core library's answer for the same model:
//   fixture.vtu        box of host rock (region 0) with two intrusions (regions 1 and 2)
//   rocks.yaml, regions.yaml   rock-property library and region map
//   reference.csv      node id, x, y, z, then the core's temperature at each output time
//   bad_2d.vtu         a mesh of triangles (must be refused)
//   no_region.vtu      the box without a RegionId array (must be refused)
// Usage: emberlith-test-fixture OUTPUT_DIR
// The model and its parameters are made up for the test; check_plugin.py sets the same ones
// on the filters (keep the two in step).
#include "../inputs/sample_rocks.h"
#include "EmberVtkConversion.h"
#include "ember/inputs/region_map.h"
#include "ember/simulation.h"

#include <vtkCellData.h>
#include <vtkIntArray.h>
#include <vtkNew.h>
#include <vtkPoints.h>
#include <vtkUnstructuredGrid.h>
#include <vtkXMLUnstructuredGridWriter.h>

#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>

namespace
{
using namespace ember;

// The input tests' two sample rocks (test values, no source).
const std::string kRocks = "format: 1\nrocks:\n" + ember::testing::kSampleRockList;

const char* kRegions = R"(format: 1
regions:
  - {id: 0, name: Host, rock: shale}
  - id: 1
    name: Early sill
    rock: dolerite
    emplacement: {temperature: 1150, time: 0}
  - id: 2
    name: Late dike
    rock: dolerite
    emplacement: {temperature: 1120, time: 5, replaces: shale}
)";

// The times check_plugin.py sets as an explicit list [yr].
const double kTimes[] = { 1, 3, 10, 30, 100 };

// The fixture mesh as the viewer reads it; without RegionId for the refusal test.
vtkSmartPointer<vtkUnstructuredGrid> to_grid(const Mesh& mesh, bool with_region)
{
  vtkSmartPointer<vtkUnstructuredGrid> grid = ember::bridge::to_vtk_grid(mesh);
  if (!with_region)
    grid->GetCellData()->RemoveArray("RegionId");
  return grid;
}

void write(vtkUnstructuredGrid* grid, const std::filesystem::path& file)
{
  vtkNew<vtkXMLUnstructuredGridWriter> writer;
  writer->SetFileName(file.c_str());
  writer->SetInputData(grid);
  writer->SetDataModeToBinary(); // inline: Debian 12's expat cannot re-read appended data
  if (!writer->Write())
    throw std::runtime_error("cannot write " + file.string());
}
} // namespace

int main(int argc, char* argv[])
{
  if (argc != 2)
  {
    std::cerr << "usage: emberlith-test-fixture OUTPUT_DIR\n";
    return 2;
  }
  try
  {
    const std::filesystem::path dir = argv[1];
    std::filesystem::create_directories(dir);
    Mesh mesh = make_box_hex({ -100, -100, -200 }, { 100, 100, 0 }, { 12, 12, 16 });
    for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    {
      Point m{ 0, 0, 0 };
      for (auto n : mesh.nodes(c))
        for (int d = 0; d < 3; ++d)
          m[d] += mesh.points[n][d] / 8;
      if (std::abs(m[2] + 100) < 15 && std::abs(m[0]) < 60 && std::abs(m[1]) < 60)
        mesh.cell_region[c] = 1;
      else if (std::abs(m[0] - 70) < 10 && m[2] > -90 && m[2] < -40)
        mesh.cell_region[c] = 2;
    }
    write(to_grid(mesh, true), dir / "fixture.vtu");
    write(to_grid(mesh, false), dir / "no_region.vtu");
    std::ofstream(dir / "rocks.yaml") << kRocks;
    std::ofstream(dir / "regions.yaml") << kRegions;

    vtkNew<vtkUnstructuredGrid> flat; // two triangles: not 3-D cells
    vtkNew<vtkPoints> quad;
    quad->InsertNextPoint(0, 0, 0);
    quad->InsertNextPoint(1, 0, 0);
    quad->InsertNextPoint(1, 1, 0);
    quad->InsertNextPoint(0, 1, 0);
    flat->SetPoints(quad);
    const vtkIdType t0[3] = { 0, 1, 2 }, t1[3] = { 0, 2, 3 };
    flat->InsertNextCell(VTK_TRIANGLE, 3, t0);
    flat->InsertNextCell(VTK_TRIANGLE, 3, t1);
    vtkNew<vtkIntArray> region;
    region->SetName("RegionId");
    region->InsertNextValue(0);
    region->InsertNextValue(0);
    flat->GetCellData()->AddArray(region);
    write(flat, dir / "bad_2d.vtu");

    // The core's answer, with the filters' defaults: geotherm 10 °C + 30 K/km from the top,
    // top held at 10 °C, 60 mW/m² in at the base, insulated sides; forward Euler.
    const auto library = inputs::parse_rock_library(inputs::load_yaml_text(kRocks, "rocks"), { "rocks", "" });
    const auto map =
      inputs::parse_region_map(inputs::load_yaml_text(kRegions, "regions"), library, { "regions", "" });
    const auto setup = inputs::make_model_setup(library, map, mesh.cell_region);
    ThermalModel model(mesh, setup.rocks, setup.cell_rock);
    BoundaryCondition top, base, sides;
    top.kind = BoundaryCondition::Kind::FixedTemperature;
    top.side = Side::Top;
    top.temperature = 10;
    base.kind = BoundaryCondition::Kind::HeatFlux;
    base.side = Side::Bottom;
    base.heat_flux = 0.060;
    sides.side = Side::Sides;
    SimulationSettings settings;
    for (double t : kTimes)
      settings.output_times.push_back(t * kSecondsPerYear);
    ForwardEuler integrator;
    const auto result = simulate(model, { top, base, sides },
      { InitialState::Kind::Geotherm, 10.0, 0.030, 0.0 }, setup.emplacements, settings, integrator);
    std::ofstream csv(dir / "reference.csv");
    csv.precision(17);
    csv << "node,x,y,z";
    for (double t : kTimes)
      csv << ",T_" << t << "yr";
    csv << "\n";
    for (std::size_t i = 0; i < mesh.n_points(); i += 7) // every 7th node is a probe
    {
      csv << i << "," << mesh.points[i][0] << "," << mesh.points[i][1] << "," << mesh.points[i][2];
      for (const auto& snap : result.snapshots)
        csv << "," << snap.temperature[i];
      csv << "\n";
    }
    std::printf("fixture: %zu nodes, %zu cells, %zu steps; written to %s\n", mesh.n_points(),
      mesh.n_cells(), result.steps, dir.c_str());
    return 0;
  }
  catch (const std::exception& e)
  {
    std::cerr << "emberlith-test-fixture: error: " << e.what() << "\n";
    return 1;
  }
}
