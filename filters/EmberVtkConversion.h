// Conversions between VTK data and the Emberlith core (private to the filters module).
#pragma once

#include "ember/mesh.h"

#include <vtkSmartPointer.h>

#include <string>
#include <vector>

class vtkDataObject;
class vtkDataSet;
class vtkFieldData;
class vtkUnstructuredGrid;

namespace ember::bridge
{
/**
 * Any data set, or a composite of data sets (bodies as blocks), as one unstructured grid.
 * An unstructured grid is passed through (shallow copy, point order kept); other data sets
 * are converted; composites are appended with coincident points merged, so that bodies meshed
 * separately touch their host. Returns null for a data object that holds no data set.
 */
vtkSmartPointer<vtkUnstructuredGrid> as_unstructured_grid(vtkDataObject* input);

/**
 * The core mesh of `grid` with the region of each cell from the cell array `region_array`.
 * Throws ember::MeshError naming cells that are not linear 3-D cells, region values that are
 * not integers, or a missing array (listing the cell arrays that exist).
 */
Mesh to_core_mesh(vtkUnstructuredGrid* grid, const std::string& region_array);

/// Region id per cell from a cell array (throws as above).
std::vector<int> region_ids(vtkDataSet* data, const std::string& region_array);

void add_point_array(vtkDataSet* data, const char* name, const std::vector<double>& values);
void add_point_array_float(vtkDataSet* data, const char* name, const std::vector<double>& values);
void add_cell_array(vtkDataSet* data, const char* name, const std::vector<double>& values);

/// A one-value string field array (empty string if absent).
std::string field_text(vtkFieldData* fd, const char* name);
void set_field_text(vtkFieldData* fd, const char* name, const std::string& text);
} // namespace ember::bridge
