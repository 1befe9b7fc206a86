/**
 * @class vtkEmberIsotherms
 * @brief Isotherm surfaces of a temperature field at a list of temperatures [°C].
 *
 * Input: any data set with the point array "Temperature" (or another point array chosen as
 * input array 0). Output: the surfaces as polygons, each carrying the cell array "Isotherm"
 * with its temperature [°C] (colour or threshold by it; one value per surface), and the field
 * array "IsothermValues" listing the requested values in order.
 */
#pragma once

#include "EmberlithFiltersModule.h"

#include <vtkPolyDataAlgorithm.h>

#include <vector>

class EMBERLITHFILTERS_EXPORT vtkEmberIsotherms : public vtkPolyDataAlgorithm
{
public:
  static vtkEmberIsotherms* New();
  vtkTypeMacro(vtkEmberIsotherms, vtkPolyDataAlgorithm);
  void PrintSelf(ostream& os, vtkIndent indent) override;

  void AddIsotherm(double celsius);
  void ClearIsotherms();
  int GetNumberOfIsotherms() const { return static_cast<int>(this->Values.size()); }

protected:
  vtkEmberIsotherms();
  ~vtkEmberIsotherms() override = default;
  int FillInputPortInformation(int port, vtkInformation* info) override;
  int RequestData(vtkInformation*, vtkInformationVector**, vtkInformationVector*) override;

private:
  vtkEmberIsotherms(const vtkEmberIsotherms&) = delete;
  void operator=(const vtkEmberIsotherms&) = delete;
  std::vector<double> Values;
};
