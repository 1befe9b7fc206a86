// The filters without the viewer: the snapshot cache (memory budget, spill, clean-up), the
// simulation filter against the core library on the same model (identical numbers whether
// snapshots stay in memory or are spilled to disk), inputs other than unstructured grids
// (image data, multiblock of bodies), and the refusals. The reference for the numbers is the
// core itself (its own verification is in tests/solvers); here the point is that the filters
// change nothing on the way.
#include "EmberSnapshotCache.h"
#include "EmberVtkConversion.h"
#include "vtkEmberCoolingSimulation.h"
#include "vtkEmberIsothermDepth.h"
#include "vtkEmberRockAssignment.h"

#include "ember/inputs/region_map.h"

#include <vtkCellData.h>
#include <vtkHexahedron.h>
#include <vtkPyramid.h>
#include <vtkTetra.h>
#include <vtkWedge.h>
#include <vtkDataArray.h>
#include <vtkDoubleArray.h>
#include <vtkImageData.h>
#include <vtkIntArray.h>
#include <vtkMultiBlockDataSet.h>
#include <vtkNew.h>
#include <vtkPointData.h>
#include <vtkPolyData.h>
#include <vtkStreamingDemandDrivenPipeline.h>
#include <vtkUnstructuredGrid.h>

#include <boost/filesystem/operations.hpp>
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <set>
#include <utility>

using ember::bridge::SnapshotCache;

namespace
{
const char* kRocks = R"(format: 1
rocks:
  - {name: host, density: 2500, conductivity: 2.5, heat_capacity: 1000}
  - {name: basalt, density: 2800, conductivity: 2.0, heat_capacity: 1100,
     latent_heat: 400000, solidus: 1000, liquidus: 1150}
)";
const char* kRegions = R"(format: 1
regions:
  - {id: 0, rock: host}
  - {id: 1, rock: basalt, emplacement: {temperature: 1150}}
)";

// 10 × 10 × 10 m³ image with a 4 m-thick hot layer in the middle (region 1).
vtkNew<vtkImageData> layered_image()
{
  vtkNew<vtkImageData> image;
  image->SetDimensions(6, 6, 11);
  image->SetSpacing(2, 2, 1);
  image->SetOrigin(0, 0, -10);
  vtkNew<vtkIntArray> region;
  region->SetName("RegionId");
  for (vtkIdType c = 0; c < image->GetNumberOfCells(); ++c)
  {
    double b[6];
    image->GetCell(c)->GetBounds(b);
    const double z = 0.5 * (b[4] + b[5]);
    region->InsertNextValue(z > -7 && z < -3 ? 1 : 0);
  }
  image->GetCellData()->AddArray(region);
  return image;
}

vtkNew<vtkEmberRockAssignment> assignment(vtkDataObject* input)
{
  vtkNew<vtkEmberRockAssignment> rocks;
  rocks->SetInputData(input);
  rocks->SetRockLibraryText(kRocks, "rocks");
  rocks->SetRegionMapText(kRegions, "regions");
  return rocks;
}
} // namespace

TEST(SnapshotCache, SpillsBeyondBudgetAndReadsBackExactly)
{
  SnapshotCache::Frame frame;
  frame.arrays.push_back({ "T", false, { 1.0 / 3.0, 2.0, 1e300 } });
  frame.arrays.push_back({ "f", true, { 0.25, 1.0 / 3.0 } });
  frame.scalars.emplace_back("heat", -5.5);
  std::string folder;
  {
    SnapshotCache cache(150); // bytes: room for one frame (~110 bytes) only
    for (int k = 0; k < 3; ++k)
    {
      frame.time = k;
      cache.add(frame);
    }
    EXPECT_EQ(cache.size(), 3u);
    EXPECT_EQ(cache.frames_on_disk(), 2u);
    folder = cache.spill_folder();
    EXPECT_TRUE(boost::filesystem::exists(folder));
    const auto back = cache.get(2);
    EXPECT_EQ(back.time, 2.0);
    EXPECT_EQ(back.arrays[0].values, frame.arrays[0].values); // double kept bit for bit
    EXPECT_EQ(back.arrays[1].values[1], static_cast<double>(static_cast<float>(1.0 / 3.0)));
    EXPECT_EQ(back.scalars[0].second, -5.5);
  }
  EXPECT_FALSE(boost::filesystem::exists(folder)) << "spill folder left behind";
}

TEST(CoolingSimulationFilter, MatchesCoreAndSpillingChangesNothing)
{
  auto image = layered_image();
  auto rocks = assignment(image);
  auto run = [&](double budget_mb) {
    vtkNew<vtkEmberCoolingSimulation> sim;
    sim->SetInputConnection(rocks->GetOutputPort());
    sim->SetIntegrator(vtkEmberCoolingSimulation::FORWARD_EULER);
    sim->SetTopCondition(vtkEmberCoolingSimulation::FIXED_TEMPERATURE);
    sim->SetBottomCondition(vtkEmberCoolingSimulation::INSULATED);
    sim->SetOutputSchedule(vtkEmberCoolingSimulation::EXPLICIT_LIST);
    for (double t : { 0.01, 0.03, 0.1 })
      sim->AddOutputTime(t);
    sim->SetMemoryBudget(budget_mb);
    sim->UpdateInformation();
    sim->UpdateTimeStep(0.1);
    vtkNew<vtkUnstructuredGrid> out;
    out->DeepCopy(sim->GetOutput());
    EXPECT_EQ(sim->GetSolveCount(), 1);
    sim->UpdateTimeStep(0.01); // back in time: served from the cache
    EXPECT_EQ(sim->GetSolveCount(), 1);
    return out;
  };
  auto in_memory = run(1024.0);
  auto spilled = run(0.0);
  vtkDataArray* a = in_memory->GetPointData()->GetArray("Temperature");
  vtkDataArray* b = spilled->GetPointData()->GetArray("Temperature");
  ASSERT_TRUE(a && b);
  for (vtkIdType i = 0; i < a->GetNumberOfTuples(); ++i)
    ASSERT_EQ(a->GetTuple1(i), b->GetTuple1(i));

  // The core on the same model: voxels → hexahedra, same rocks, same conditions.
  rocks->Update();
  auto* grid = vtkUnstructuredGrid::SafeDownCast(rocks->GetOutput());
  const auto library = ember::inputs::parse_rock_library(
    ember::inputs::load_yaml_text(kRocks, "r"), { "r", "" });
  const auto map = ember::inputs::parse_region_map(
    ember::inputs::load_yaml_text(kRegions, "m"), library, { "m", "" });
  const ember::Mesh mesh = ember::bridge::to_core_mesh(grid, "RegionId");
  const auto setup = ember::inputs::make_model_setup(library, map, mesh.cell_region);
  ember::ThermalModel model(mesh, setup.rocks, setup.cell_rock);
  ember::BoundaryCondition top;
  top.kind = ember::BoundaryCondition::Kind::FixedTemperature;
  top.temperature = 10.0;
  ember::SimulationSettings settings;
  for (double t : { 0.01, 0.03, 0.1 })
    settings.output_times.push_back(t * ember::kSecondsPerYear);
  ember::ForwardEuler euler;
  const auto result = ember::simulate(model, { top },
    { ember::InitialState::Kind::Geotherm, 10.0, 0.030, 0.0 }, setup.emplacements, settings, euler);
  const auto& T = result.snapshots.back().temperature;
  double worst = 0.0;
  for (vtkIdType i = 0; i < a->GetNumberOfTuples(); ++i)
    worst = std::max(worst, std::abs(a->GetTuple1(i) - T[static_cast<std::size_t>(i)]));
  EXPECT_EQ(worst, 0.0);
  EXPECT_GT(*std::max_element(T.begin(), T.end()), 500.0); // the layer is there and hot
}

TEST(RockAssignmentFilter, MultiblockBodiesAreJoinedAtSharedPoints)
{
  // Two blocks: the host below, the layer above, meeting at z = -5 (shared points merged).
  vtkNew<vtkImageData> host, layer;
  host->SetDimensions(3, 3, 3);
  host->SetOrigin(0, 0, -7);
  layer->SetDimensions(3, 3, 3);
  layer->SetOrigin(0, 0, -5);
  for (auto [image, id] : { std::pair{ host.Get(), 0 }, std::pair{ layer.Get(), 1 } })
  {
    vtkNew<vtkIntArray> region;
    region->SetName("RegionId");
    for (vtkIdType c = 0; c < image->GetNumberOfCells(); ++c)
      region->InsertNextValue(id);
    image->GetCellData()->AddArray(region);
  }
  vtkNew<vtkMultiBlockDataSet> blocks;
  blocks->SetBlock(0, host);
  blocks->SetBlock(1, layer);
  auto rocks = assignment(blocks);
  rocks->Update();
  auto* out = vtkUnstructuredGrid::SafeDownCast(rocks->GetOutput());
  EXPECT_EQ(out->GetNumberOfCells(), 16);
  EXPECT_EQ(out->GetNumberOfPoints(), 9 * 5); // 5 levels, not 6: the contact is shared
  EXPECT_NE(out->GetCellData()->GetArray("Density_kg_per_m3"), nullptr);
}

TEST(RockAssignmentFilter, UnknownRegionGivesNoOutput)
{
  auto image = layered_image();
  auto rocks = assignment(image);
  rocks->SetRegionMapText("format: 1\nregions:\n  - {id: 0, rock: host}\n", "short map");
  rocks->Update(); // reports "region ids that the region map does not list: 1 (first at cell ...)"
  EXPECT_EQ(rocks->GetOutput()->GetNumberOfCells(), 0);
}

TEST(IsothermDepthFilter, LinearGeothermGivesExactDepth)
{
  // T = 10 °C + 30 K/km · depth is linear, so linear interpolation puts 40 °C at exactly
  // 1000 m (the geotherm is the reference; no other source is needed).
  vtkNew<vtkImageData> image;
  image->SetDimensions(3, 3, 21);
  image->SetSpacing(500, 500, 100);
  image->SetOrigin(0, 0, -2000);
  vtkNew<vtkDoubleArray> T;
  T->SetName("Temperature");
  for (vtkIdType i = 0; i < image->GetNumberOfPoints(); ++i)
    T->InsertNextValue(10.0 + 0.030 * -image->GetPoint(i)[2]);
  image->GetPointData()->AddArray(T);
  vtkNew<vtkEmberIsothermDepth> map;
  map->SetInputData(image);
  map->SetIsotherm(40.0);
  map->SetResolution(4, 5);
  map->Update();
  vtkDataArray* depth = map->GetOutput()->GetPointData()->GetArray("IsothermDepth_m");
  ASSERT_NE(depth, nullptr);
  ASSERT_EQ(depth->GetNumberOfTuples(), 20);
  for (vtkIdType i = 0; i < 20; ++i)
    EXPECT_NEAR(depth->GetTuple1(i), 1000.0, 1e-6);
  map->SetIsotherm(100.0); // hotter than anything in the model: never crossed
  map->Update();
  EXPECT_TRUE(std::isnan(map->GetOutput()->GetPointData()->GetArray("IsothermDepth_m")->GetTuple1(0)));
  map->SetIsotherm(5.0); // colder than the top: the isotherm is at the surface
  map->Update();
  EXPECT_EQ(map->GetOutput()->GetPointData()->GetArray("IsothermDepth_m")->GetTuple1(0), 0.0);
}

// The core's cell edge tables (ember::cell_edges, used for the host-side contact temperature)
// against VTK's own (vtkTetra/vtkHexahedron/vtkWedge/vtkPyramid::GetEdgeArray), as unordered
// node pairs: the core's mesh follows VTK's node ordering.
TEST(CellEdges, MatchVtk)
{
  auto vtk_edges = [](vtkIdType n, const vtkIdType* (*edge)(vtkIdType)) {
    std::set<std::pair<int, int>> s;
    for (vtkIdType e = 0; e < n; ++e)
      s.insert({ int(std::min(edge(e)[0], edge(e)[1])), int(std::max(edge(e)[0], edge(e)[1])) });
    return s;
  };
  auto core_edges = [](ember::CellType type) {
    std::set<std::pair<int, int>> s;
    for (const auto& e : ember::cell_edges(type))
      s.insert({ std::min(e[0], e[1]), std::max(e[0], e[1]) });
    return s;
  };
  EXPECT_EQ(core_edges(ember::CellType::Tetrahedron),
    vtk_edges(vtkTetra::NumberOfEdges, &vtkTetra::GetEdgeArray));
  EXPECT_EQ(core_edges(ember::CellType::Hexahedron),
    vtk_edges(vtkHexahedron::NumberOfEdges, &vtkHexahedron::GetEdgeArray));
  EXPECT_EQ(core_edges(ember::CellType::Wedge),
    vtk_edges(vtkWedge::NumberOfEdges, &vtkWedge::GetEdgeArray));
  EXPECT_EQ(core_edges(ember::CellType::Pyramid),
    vtk_edges(vtkPyramid::NumberOfEdges, &vtkPyramid::GetEdgeArray));
}
