/**
 * @class vtkEmberIsothermDepth
 * @brief Map of the depth below the model top to an isotherm (e.g. 150 °C for geothermal work).
 *
 * Over a horizontal nx × ny grid spanning the input's extent, a vertical line is cast down from
 * the model top; the isotherm's shallowest crossing along it gives the depth [m]. Where the top
 * itself is at or above the isotherm temperature the depth is 0; where the line never reaches
 * it the depth is NaN and "Crossed" is 0. Output: a quad surface with point arrays
 * "IsothermDepth_m" and "Crossed", placed at the isotherm's elevation (a relief of the
 * isotherm) or flat at the model top.
 */
#pragma once

#include "EmberlithFiltersModule.h"

#include <vtkPolyDataAlgorithm.h>

class EMBERLITHFILTERS_EXPORT vtkEmberIsothermDepth : public vtkPolyDataAlgorithm
{
public:
  static vtkEmberIsothermDepth* New();
  vtkTypeMacro(vtkEmberIsothermDepth, vtkPolyDataAlgorithm);
  void PrintSelf(ostream& os, vtkIndent indent) override;

  vtkSetMacro(Isotherm, double); ///< [°C]
  vtkGetMacro(Isotherm, double);
  vtkSetVector2Macro(Resolution, int); ///< grid points along x and y (≥ 2 each)
  vtkGetVector2Macro(Resolution, int);
  vtkSetMacro(PlaceAtIsotherm, bool);
  vtkGetMacro(PlaceAtIsotherm, bool);
  vtkBooleanMacro(PlaceAtIsotherm, bool);

protected:
  vtkEmberIsothermDepth();
  ~vtkEmberIsothermDepth() override = default;
  int FillInputPortInformation(int port, vtkInformation* info) override;
  int RequestData(vtkInformation*, vtkInformationVector**, vtkInformationVector*) override;

private:
  vtkEmberIsothermDepth(const vtkEmberIsothermDepth&) = delete;
  void operator=(const vtkEmberIsothermDepth&) = delete;

  double Isotherm = 150.0;
  int Resolution[2] = { 100, 100 };
  bool PlaceAtIsotherm = true;
};
