/**
 * @class vtkEmberRockAssignment
 * @brief Gives each cell of a mesh of geological bodies its rock type and thermal properties.
 *
 * Input: any vtkDataSet of linear 3-D cells (or a composite of them, appended with coincident
 * points merged) with a cell array of region ids (input array 0, default "RegionId").
 * A rock-property library file and a region map file (YAML; schemas in the README) say which
 * rock each region is and which regions are intrusions (emplacement temperature and time).
 *
 * Output: an unstructured grid with cell arrays RegionId, RockIndex and the properties in user
 * units (names carry the unit, e.g. Density_kg_per_m3), field data RegionNames/RegionIds, and the
 * two input texts as field data, which vtkEmberCoolingSimulation reads. On any problem (2-D
 * cells, inverted cells, missing region array, unknown region ids, unreadable file, invalid
 * property) an error naming the file, line, region or cell ids is reported and the output is
 * empty — never a half-right model.
 */
#pragma once

#include "EmberlithFiltersModule.h"

#include <vtkUnstructuredGridAlgorithm.h>

#include <string>

class EMBERLITHFILTERS_EXPORT vtkEmberRockAssignment : public vtkUnstructuredGridAlgorithm
{
public:
  static vtkEmberRockAssignment* New();
  vtkTypeMacro(vtkEmberRockAssignment, vtkUnstructuredGridAlgorithm);
  void PrintSelf(ostream& os, vtkIndent indent) override;

  /// Rock-property library file (YAML).
  vtkSetStringMacro(RockLibraryFile);
  vtkGetStringMacro(RockLibraryFile);
  /// Region map file (YAML).
  vtkSetStringMacro(RegionMapFile);
  vtkGetStringMacro(RegionMapFile);

  /**
   * Use these texts instead of the files (the runner passes what a scenario file defines);
   * `origin` names the text in messages. An empty text means "read the file".
   */
  void SetRockLibraryText(const std::string& text, const std::string& origin);
  void SetRegionMapText(const std::string& text, const std::string& origin);

protected:
  vtkEmberRockAssignment();
  ~vtkEmberRockAssignment() override;
  int FillInputPortInformation(int port, vtkInformation* info) override;
  int RequestData(vtkInformation*, vtkInformationVector**, vtkInformationVector*) override;

private:
  vtkEmberRockAssignment(const vtkEmberRockAssignment&) = delete;
  void operator=(const vtkEmberRockAssignment&) = delete;

  char* RockLibraryFile = nullptr;
  char* RegionMapFile = nullptr;
  std::string LibraryText, LibraryOrigin, MapText, MapOrigin;
};
