// Conversions between VTK data and the Emberlith core (also used by the runner in apps/).
#pragma once
// Plain C++ for the filters and the runner; nothing here for the wrappers to see.
#ifndef __VTK_WRAP__

#include "EmberlithFiltersModule.h"
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
EMBERLITHFILTERS_EXPORT vtkSmartPointer<vtkUnstructuredGrid> as_unstructured_grid(vtkDataObject* input);

/**
 * The core mesh of `grid` with the region of each cell from the cell array `region_array`.
 * Throws ember::MeshError naming cells that are not linear 3-D cells, region values that are
 * not integers, or a missing array (listing the cell arrays that exist).
 */
EMBERLITHFILTERS_EXPORT Mesh to_core_mesh(vtkUnstructuredGrid* grid, const std::string& region_array);

/// The core mesh as an unstructured grid with the cell array RegionId.
EMBERLITHFILTERS_EXPORT vtkSmartPointer<vtkUnstructuredGrid> to_vtk_grid(const Mesh& mesh);

/// Region id per cell from a cell array (throws as above).
EMBERLITHFILTERS_EXPORT std::vector<int> region_ids(vtkDataSet* data, const std::string& region_array);

EMBERLITHFILTERS_EXPORT void add_point_array(vtkDataSet* data, const char* name, const std::vector<double>& values);
EMBERLITHFILTERS_EXPORT void add_point_array_float(vtkDataSet* data, const char* name, const std::vector<double>& values);
EMBERLITHFILTERS_EXPORT void add_cell_array(vtkDataSet* data, const char* name, const std::vector<double>& values);

/// A one-value string field array (empty string if absent).
EMBERLITHFILTERS_EXPORT std::string field_text(vtkFieldData* fd, const char* name);
EMBERLITHFILTERS_EXPORT void set_field_text(vtkFieldData* fd, const char* name, const std::string& text);
} // namespace ember::bridge
#endif
