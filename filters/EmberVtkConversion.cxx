#include "EmberVtkConversion.h"

#include <vtkAppendFilter.h>
#include <vtkCellArray.h>
#include <vtkCellData.h>
#include <vtkCompositeDataIterator.h>
#include <vtkCompositeDataSet.h>
#include <vtkDataArray.h>
#include <vtkDoubleArray.h>
#include <vtkFieldData.h>
#include <vtkFloatArray.h>
#include <vtkIntArray.h>
#include <vtkNew.h>
#include <vtkPointData.h>
#include <vtkPoints.h>
#include <vtkStringArray.h>
#include <vtkUnsignedCharArray.h>
#include <vtkUnstructuredGrid.h>

#include <cmath>

namespace ember::bridge
{

vtkSmartPointer<vtkUnstructuredGrid> as_unstructured_grid(vtkDataObject* input)
{
  if (auto* grid = vtkUnstructuredGrid::SafeDownCast(input))
  {
    auto copy = vtkSmartPointer<vtkUnstructuredGrid>::New();
    copy->ShallowCopy(grid);
    return copy;
  }
  vtkNew<vtkAppendFilter> append;
  if (auto* data = vtkDataSet::SafeDownCast(input))
    append->AddInputData(data);
  else if (auto* composite = vtkCompositeDataSet::SafeDownCast(input))
  {
    append->MergePointsOn(); // bodies meshed as separate blocks must share their contact nodes
    vtkSmartPointer<vtkCompositeDataIterator> it;
    it.TakeReference(composite->NewIterator());
    for (it->InitTraversal(); !it->IsDoneWithTraversal(); it->GoToNextItem())
      if (auto* block = vtkDataSet::SafeDownCast(it->GetCurrentDataObject()))
        if (block->GetNumberOfCells() > 0)
          append->AddInputData(block);
    if (append->GetNumberOfInputConnections(0) == 0)
      return nullptr;
  }
  else
    return nullptr;
  append->Update();
  auto grid = vtkSmartPointer<vtkUnstructuredGrid>::New();
  grid->ShallowCopy(append->GetOutput());
  return grid;
}

vtkSmartPointer<vtkUnstructuredGrid> to_vtk_grid(const Mesh& mesh)
{
  static const int vtk_type[] = { VTK_TETRA, VTK_HEXAHEDRON, VTK_WEDGE, VTK_PYRAMID };
  auto grid = vtkSmartPointer<vtkUnstructuredGrid>::New();
  vtkNew<vtkPoints> points;
  points->SetDataTypeToDouble();
  points->SetNumberOfPoints(static_cast<vtkIdType>(mesh.n_points()));
  for (std::size_t i = 0; i < mesh.n_points(); ++i)
    points->SetPoint(static_cast<vtkIdType>(i), mesh.points[i].data());
  grid->SetPoints(points);
  grid->Allocate(static_cast<vtkIdType>(mesh.n_cells()));
  vtkNew<vtkIntArray> region;
  region->SetName("RegionId");
  region->SetNumberOfValues(static_cast<vtkIdType>(mesh.n_cells()));
  std::vector<vtkIdType> ids;
  for (std::size_t c = 0; c < mesh.n_cells(); ++c)
  {
    const auto nodes = mesh.nodes(c);
    ids.assign(nodes.begin(), nodes.end());
    grid->InsertNextCell(vtk_type[static_cast<int>(mesh.cell_types[c])], static_cast<vtkIdType>(ids.size()), ids.data());
    region->SetValue(static_cast<vtkIdType>(c), mesh.cell_region[c]);
  }
  grid->GetCellData()->AddArray(region);
  return grid;
}

std::vector<int> region_ids(vtkDataSet* data, const std::string& region_array)
{
  vtkDataArray* array = data->GetCellData()->GetArray(region_array.c_str());
  if (!array)
  {
    std::string names;
    for (int i = 0; i < data->GetCellData()->GetNumberOfArrays(); ++i)
      if (const char* n = data->GetCellData()->GetArrayName(i))
        names += (names.empty() ? "" : ", ") + std::string(n);
    throw MeshError("the input has no cell array '" + region_array + "' of region ids (its cell arrays: " +
      (names.empty() ? std::string("none") : names) + ")");
  }
  if (array->GetNumberOfComponents() != 1)
    throw MeshError("cell array '" + region_array + "' must have one component per cell");
  const vtkIdType n = array->GetNumberOfTuples();
  std::vector<int> ids(static_cast<std::size_t>(n));
  for (vtkIdType c = 0; c < n; ++c)
  {
    const double v = array->GetTuple1(c);
    if (!std::isfinite(v) || v != std::round(v) || std::abs(v) > 1e9)
      throw MeshError("cell array '" + region_array + "': value " + std::to_string(v) + " at cell " +
        std::to_string(c) + " is not an integer region id");
    ids[static_cast<std::size_t>(c)] = static_cast<int>(v);
  }
  return ids;
}

Mesh to_core_mesh(vtkUnstructuredGrid* grid, const std::string& region_array)
{
  const std::vector<int> regions = region_ids(grid, region_array);
  std::vector<Point> points(static_cast<std::size_t>(grid->GetNumberOfPoints()));
  for (std::size_t i = 0; i < points.size(); ++i)
    grid->GetPoint(static_cast<vtkIdType>(i), points[i].data());
  const vtkIdType n_cells = grid->GetNumberOfCells();
  std::vector<std::uint8_t> types(static_cast<std::size_t>(n_cells));
  std::vector<std::int64_t> offsets(static_cast<std::size_t>(n_cells) + 1, 0);
  std::vector<std::int64_t> connectivity;
  connectivity.reserve(static_cast<std::size_t>(grid->GetCells()->GetNumberOfConnectivityIds()));
  vtkCellArray* cells = grid->GetCells();
  vtkIdType npts = 0;
  const vtkIdType* pts = nullptr;
  for (vtkIdType c = 0; c < n_cells; ++c)
  {
    types[static_cast<std::size_t>(c)] = static_cast<std::uint8_t>(grid->GetCellType(c));
    cells->GetCellAtId(c, npts, pts);
    connectivity.insert(connectivity.end(), pts, pts + npts);
    offsets[static_cast<std::size_t>(c) + 1] = static_cast<std::int64_t>(connectivity.size());
  }
  return mesh_from_vtk_arrays(std::move(points), types, offsets, connectivity, regions);
}

namespace
{
template <class ArrayT>
void add_array(vtkFieldData* target, const char* name, const std::vector<double>& values)
{
  vtkNew<ArrayT> array;
  array->SetName(name);
  array->SetNumberOfValues(static_cast<vtkIdType>(values.size()));
  for (std::size_t i = 0; i < values.size(); ++i)
    array->SetValue(static_cast<vtkIdType>(i), static_cast<typename ArrayT::ValueType>(values[i]));
  target->AddArray(array);
}
} // namespace

void add_point_array(vtkDataSet* data, const char* name, const std::vector<double>& values)
{
  add_array<vtkDoubleArray>(data->GetPointData(), name, values);
}

void add_point_array_float(vtkDataSet* data, const char* name, const std::vector<double>& values)
{
  add_array<vtkFloatArray>(data->GetPointData(), name, values);
}

void add_cell_array(vtkDataSet* data, const char* name, const std::vector<double>& values)
{
  add_array<vtkDoubleArray>(data->GetCellData(), name, values);
}

std::string field_text(vtkFieldData* fd, const char* name)
{
  auto* array = vtkStringArray::SafeDownCast(fd ? fd->GetAbstractArray(name) : nullptr);
  return array && array->GetNumberOfValues() > 0 ? array->GetValue(0) : std::string();
}

void set_field_text(vtkFieldData* fd, const char* name, const std::string& text)
{
  vtkNew<vtkStringArray> array;
  array->SetName(name);
  array->InsertNextValue(text);
  fd->AddArray(array);
}

} // namespace ember::bridge
