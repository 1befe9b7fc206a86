#include "vtkEmberRockAssignment.h"

#include "EmberFieldNames.h"
#include "EmberVtkConversion.h"

#include "ember/inputs/region_map.h"

#include <vtkCellData.h>
#include <vtkDataObject.h>
#include <vtkDataSetAttributes.h>
#include <vtkFieldData.h>
#include <vtkInformation.h>
#include <vtkInformationVector.h>
#include <vtkIntArray.h>
#include <vtkNew.h>
#include <vtkObjectFactory.h>
#include <vtkStringArray.h>
#include <vtkUnstructuredGrid.h>

#include <cmath>
#include <limits>

vtkStandardNewMacro(vtkEmberRockAssignment);

vtkEmberRockAssignment::vtkEmberRockAssignment()
{
  this->SetInputArrayToProcess(
    0, 0, 0, vtkDataObject::FIELD_ASSOCIATION_CELLS, ember::bridge::kRegionId);
}

vtkEmberRockAssignment::~vtkEmberRockAssignment()
{
  this->SetRockLibraryFile(nullptr);
  this->SetRegionMapFile(nullptr);
}

void vtkEmberRockAssignment::SetRockLibraryText(const std::string& text, const std::string& origin)
{
  this->LibraryText = text;
  this->LibraryOrigin = origin;
  this->Modified();
}

void vtkEmberRockAssignment::SetRegionMapText(const std::string& text, const std::string& origin)
{
  this->MapText = text;
  this->MapOrigin = origin;
  this->Modified();
}

int vtkEmberRockAssignment::FillInputPortInformation(int, vtkInformation* info)
{
  info->Set(vtkAlgorithm::INPUT_REQUIRED_DATA_TYPE(), "vtkDataSet");
  info->Append(vtkAlgorithm::INPUT_REQUIRED_DATA_TYPE(), "vtkCompositeDataSet");
  return 1;
}

namespace
{
// The text of a property file, or the text given directly; `origin` is set to its name.
std::string input_text(const std::string& given, const std::string& given_origin, const char* file,
  const char* what, std::string& origin)
{
  if (!given.empty())
  {
    origin = given_origin;
    return given;
  }
  if (!file || !*file)
    throw ember::inputs::InputError(std::string("no ") + what + " file is set");
  origin = file;
  return ember::inputs::read_text_file(file);
}
} // namespace

int vtkEmberRockAssignment::RequestData(
  vtkInformation*, vtkInformationVector** inputVector, vtkInformationVector* outputVector)
{
  using namespace ember;
  vtkDataObject* input = vtkDataObject::GetData(inputVector[0], 0);
  vtkUnstructuredGrid* output = vtkUnstructuredGrid::GetData(outputVector, 0);
  output->Initialize();
  try
  {
    vtkSmartPointer<vtkUnstructuredGrid> grid = bridge::as_unstructured_grid(input);
    if (!grid || grid->GetNumberOfCells() == 0)
      throw MeshError("the input holds no cells");
    vtkInformation* array_info = this->GetInputArrayInformation(0);
    // Unset (as a fresh proxy in Python leaves it) means the documented default, RegionId.
    const char* chosen =
      array_info && array_info->Has(vtkDataObject::FIELD_NAME()) ? array_info->Get(vtkDataObject::FIELD_NAME()) : nullptr;
    const char* region_name = chosen && *chosen ? chosen : bridge::kRegionId;
    const Mesh mesh = bridge::to_core_mesh(grid, region_name);
    validate_mesh(mesh); // throws naming inverted or degenerate cells

    std::string library_origin, map_origin;
    const std::string library_text = input_text(
      this->LibraryText, this->LibraryOrigin, this->RockLibraryFile, "rock-property library", library_origin);
    const std::string map_text =
      input_text(this->MapText, this->MapOrigin, this->RegionMapFile, "region map", map_origin);
    const auto library = inputs::parse_rock_library(
      inputs::load_yaml_text(library_text, library_origin), { library_origin, "" });
    const auto map = inputs::parse_region_map(
      inputs::load_yaml_text(map_text, map_origin), library, { map_origin, "" });
    inputs::make_model_setup(library, map, mesh.cell_region); // throws on unmapped region ids

    output->ShallowCopy(grid);
    const std::size_t n = mesh.n_cells();
    const double nan = std::numeric_limits<double>::quiet_NaN();
    vtkNew<vtkIntArray> region;
    region->SetName(bridge::kRegionId);
    region->SetNumberOfValues(static_cast<vtkIdType>(n));
    vtkNew<vtkIntArray> rock_index;
    rock_index->SetName(bridge::kRockIndex);
    rock_index->SetNumberOfValues(static_cast<vtkIdType>(n));
    std::vector<double> density(n), k25(n), c20(n), production(n), latent(n), t_emp(n, nan), time_emp(n, nan);
    for (std::size_t c = 0; c < n; ++c)
    {
      const inputs::RegionEntry& entry = *map.find(mesh.cell_region[c]);
      // Show the rock the cell ends up as; before emplacement it holds the rock it replaces.
      const Rock& rock = library.rocks[static_cast<std::size_t>(entry.rock)];
      region->SetValue(static_cast<vtkIdType>(c), entry.id);
      rock_index->SetValue(static_cast<vtkIdType>(c), entry.rock);
      density[c] = rock.density;
      k25[c] = conductivity(rock, 25.0);
      c20[c] = heat_capacity(rock, 20.0);
      production[c] = rock.heat_production * 1e6;
      latent[c] = rock.latent_heat;
      if (entry.intrusion)
      {
        t_emp[c] = entry.intrusion->temperature;
        time_emp[c] = entry.intrusion->time / kSecondsPerYear;
      }
    }
    output->GetCellData()->AddArray(region);
    output->GetCellData()->AddArray(rock_index);
    bridge::add_cell_array(output, bridge::kDensity, density);
    bridge::add_cell_array(output, bridge::kConductivity, k25);
    bridge::add_cell_array(output, bridge::kHeatCapacity, c20);
    bridge::add_cell_array(output, bridge::kHeatProduction, production);
    bridge::add_cell_array(output, bridge::kLatentHeat, latent);
    bridge::add_cell_array(output, bridge::kEmplacementTemperature, t_emp);
    bridge::add_cell_array(output, bridge::kEmplacementTime, time_emp);
    output->GetCellData()->SetActiveScalars(bridge::kRegionId);

    vtkFieldData* fd = output->GetFieldData();
    vtkNew<vtkStringArray> names;
    names->SetName(bridge::kRegionNames);
    vtkNew<vtkIntArray> ids;
    ids->SetName(bridge::kRegionIds);
    for (const auto& entry : map.regions)
    {
      names->InsertNextValue(entry.name);
      ids->InsertNextValue(entry.id);
    }
    fd->AddArray(names);
    fd->AddArray(ids);
    bridge::set_field_text(fd, bridge::kRockLibraryText, library_text);
    bridge::set_field_text(fd, bridge::kRockLibraryOrigin, library_origin);
    bridge::set_field_text(fd, bridge::kRegionMapText, map_text);
    bridge::set_field_text(fd, bridge::kRegionMapOrigin, map_origin);
    return 1;
  }
  catch (const std::exception& e)
  {
    output->Initialize();
    vtkErrorMacro(<< e.what());
    return 0;
  }
}

void vtkEmberRockAssignment::PrintSelf(ostream& os, vtkIndent indent)
{
  this->Superclass::PrintSelf(os, indent);
  os << indent << "RockLibraryFile: " << (this->RockLibraryFile ? this->RockLibraryFile : "(none)") << "\n";
  os << indent << "RegionMapFile: " << (this->RegionMapFile ? this->RegionMapFile : "(none)") << "\n";
}
