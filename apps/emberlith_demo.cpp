// emberlith-demo — cools a built-in, invented model through the Emberlith core.
//
// Description:
//   A 20 m dolerite sill emplaced at 1150 °C, 150 m deep in shale under a 30 K/km geotherm.
//   Writes <output>/temperature.pvd with one .vtu per output time (point arrays Temperature
//   [°C] and MeltFraction, cell array RegionId), prints the energy ledger and where to look.
// Sample run:
//   build/release/bin/emberlith-demo --output demo-out
#include "ember/integrators.h"
#include "ember/simulation.h"

#include <vtkCellArray.h>
#include <vtkCellData.h>
#include <vtkDoubleArray.h>
#include <vtkIntArray.h>
#include <vtkNew.h>
#include <vtkPointData.h>
#include <vtkPoints.h>
#include <vtkUnstructuredGrid.h>
#include <vtkXMLUnstructuredGridWriter.h>

#include <chrono>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <string>

namespace
{
using namespace ember;

std::vector<double> graded_depths()
{
  // 10 m cells far from the sill, 2.5 m cells within 20 m of it (8 across its thickness).
  std::vector<double> z;
  double d = 300;
  while (d > 180 + 1e-9)
    z.push_back(-d), d -= 10;
  while (d > 120 + 1e-9)
    z.push_back(-d), d -= 2.5;
  while (d > 1e-9)
    z.push_back(-d), d -= 10;
  z.push_back(0);
  return z;
}

vtkNew<vtkUnstructuredGrid> to_vtk(const Mesh& mesh)
{
  vtkNew<vtkUnstructuredGrid> grid;
  vtkNew<vtkPoints> points;
  points->SetDataTypeToDouble();
  for (const auto& p : mesh.points)
    points->InsertNextPoint(p[0], p[1], p[2]);
  grid->SetPoints(points);
  vtkNew<vtkIntArray> region;
  region->SetName("RegionId");
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    vtkIdType ids[8];
    const auto nodes = mesh.nodes(c);
    for (std::size_t a = 0; a < nodes.size(); ++a)
      ids[a] = nodes[a];
    grid->InsertNextCell(VTK_HEXAHEDRON, static_cast<vtkIdType>(nodes.size()), ids);
    region->InsertNextValue(mesh.cell_region[c]);
  }
  grid->GetCellData()->AddArray(region);
  return grid;
}

void add_point_array(vtkUnstructuredGrid* grid, const char* name, const std::vector<double>& v)
{
  vtkNew<vtkDoubleArray> array;
  array->SetName(name);
  array->SetNumberOfValues(static_cast<vtkIdType>(v.size()));
  for (std::size_t i = 0; i < v.size(); ++i)
    array->SetValue(static_cast<vtkIdType>(i), v[i]);
  grid->GetPointData()->AddArray(array);
}
} // namespace

int main(int argc, char* argv[])
{
  try
  {
    std::filesystem::path output = "emberlith-demo-output";
    for (int i = 1; i < argc; ++i)
    {
      const std::string arg = argv[i];
      if (arg == "--output" && i + 1 < argc)
        output = argv[++i];
      else
      {
        std::cerr << "usage: emberlith-demo [--output DIR]\n";
        return 2;
      }
    }
    if (std::filesystem::exists(output))
    {
      std::cerr << "error: output folder " << output << " exists; refusing to overwrite it\n";
      return 2;
    }

    // 1. Model: graded box of hexahedra, sill region 1 between 140 and 160 m depth.
    std::vector<double> xy;
    for (int i = 0; i <= 16; ++i)
      xy.push_back(-200 + 25.0 * i);
    Mesh mesh = make_graded_box_hex(xy, xy, graded_depths());
    for (std::size_t c = 0; c < mesh.n_cells(); ++c)
    {
      double x = 0, y = 0, z = 0;
      for (auto n : mesh.nodes(c))
        x += mesh.points[n][0] / 8, y += mesh.points[n][1] / 8, z += mesh.points[n][2] / 8;
      if (z < -140 && z > -160 && x * x + y * y < 120.0 * 120.0)
        mesh.cell_region[c] = 1;
    }
    Rock shale;
    shale.name = "organic-rich shale";
    shale.density = 2450;
    shale.conductivity = { Conductivity::Law::VosteenSchellschmidt, 1.8, false };
    shale.heat_capacity = { HeatCapacity::Law::WaplesWaples, 850 };
    shale.heat_production = 1.5e-6;
    Rock dolerite;
    dolerite.name = "dolerite";
    dolerite.density = 2900;
    dolerite.conductivity = { Conductivity::Law::ZothHaenel, 0, true, 1.18, 474 };
    dolerite.heat_capacity = { HeatCapacity::Law::Constant, 1000 };
    dolerite.latent_heat = 4e5;
    dolerite.solidus = 980;
    dolerite.liquidus = 1150;
    ThermalModel model(mesh, { shale, dolerite }, std::vector<int>(mesh.n_cells(), 0));

    BoundaryCondition top;
    top.kind = BoundaryCondition::Kind::FixedTemperature;
    top.side = Side::Top;
    top.temperature = 10;
    BoundaryCondition base;
    base.kind = BoundaryCondition::Kind::HeatFlux;
    base.side = Side::Bottom;
    base.heat_flux = 0.060;
    SimulationSettings settings;
    for (int k = 0; k < 12; ++k)
      settings.output_times.push_back(std::pow(10.0, k * 3.0 / 11.0) * kSecondsPerYear);

    // 2. Solve.
    std::printf("emberlith-demo: %zu nodes, %zu cells; sill 20 m thick at 150 m depth\n",
      mesh.n_points(), mesh.n_cells());
    const auto start = std::chrono::steady_clock::now();
    const auto integrator = make_integrator(); // RKL2, the default
    const auto result = simulate(model, { top, base },
      { InitialState::Kind::Geotherm, 10.0, 0.030, 0.0 }, { { 1, 1, 0.0, 1150.0 } }, settings,
      *integrator);
    const double wall =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();

    // 3. Write the time series.
    std::filesystem::create_directories(output);
    vtkNew<vtkUnstructuredGrid> grid = to_vtk(mesh);
    std::ofstream pvd(output / "temperature.pvd");
    pvd << "<?xml version=\"1.0\"?>\n<VTKFile type=\"Collection\" version=\"0.1\">\n"
           "  <Collection>\n";
    double max_contact = 0;
    for (std::size_t k = 0; k < result.snapshots.size(); ++k)
    {
      const Snapshot& snap = result.snapshots[k];
      vtkNew<vtkUnstructuredGrid> frame;
      frame->ShallowCopy(grid);
      add_point_array(frame, "Temperature", snap.temperature);
      add_point_array(frame, "MeltFraction", snap.melt_fraction);
      const std::string name = "temperature_" + std::to_string(k) + ".vtu";
      vtkNew<vtkXMLUnstructuredGridWriter> writer;
      writer->SetFileName((output / name).c_str());
      writer->SetInputData(frame);
      if (!writer->Write())
        throw std::runtime_error("could not write " + (output / name).string());
      pvd << "    <DataSet timestep=\"" << snap.time / kSecondsPerYear << "\" file=\"" << name
          << "\"/>\n";
      for (std::size_t i = 0; i < mesh.n_points(); ++i)
        if (std::abs(mesh.points[i][2] + 160) < 1e-6 && std::abs(mesh.points[i][0]) < 1 &&
          std::abs(mesh.points[i][1]) < 1)
          max_contact = std::max(max_contact, snap.temperature[i]);
    }
    pvd << "  </Collection>\n</VTKFile>\n";

    // 4. Summary.
    std::printf("solved %zu steps (%zu operator applications, %s) in %.1f s; energy imbalance "
                "%.2e (relative)\n",
      result.steps, result.operator_applications,
      integrator_name(IntegratorKind::RKL2).c_str(), wall, result.ledger.relative_imbalance());
    std::printf("highest sampled temperature at the sill's lower contact (centre): %.0f °C\n",
      max_contact);
    std::printf("results: %s (times in years)\n",
      std::filesystem::absolute(output / "temperature.pvd").c_str());
    std::printf("Caution: model estimates from uncertain inputs; not for decisions on site access,"
                " drilling or well design. Follow local regulations, authorities and licensed"
                " professionals.\n");
    return 0;
  }
  catch (const std::exception& e)
  {
    std::cerr << "emberlith-demo: error: " << e.what() << "\n";
    return 1;
  }
}
