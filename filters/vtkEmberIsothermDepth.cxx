#include "vtkEmberIsothermDepth.h"

#include "EmberFieldNames.h"

#include <vtkCellArray.h>
#include <vtkCellLocator.h>
#include <vtkContourFilter.h>
#include <vtkDataSet.h>
#include <vtkDoubleArray.h>
#include <vtkFieldData.h>
#include <vtkIdList.h>
#include <vtkInformation.h>
#include <vtkInformationVector.h>
#include <vtkNew.h>
#include <vtkObjectFactory.h>
#include <vtkPointData.h>
#include <vtkPoints.h>
#include <vtkPolyData.h>
#include <vtkProbeFilter.h>
#include <vtkUnsignedCharArray.h>

#include <cmath>
#include <limits>

vtkStandardNewMacro(vtkEmberIsothermDepth);

vtkEmberIsothermDepth::vtkEmberIsothermDepth()
{
  this->SetInputArrayToProcess(
    0, 0, 0, vtkDataObject::FIELD_ASSOCIATION_POINTS, ember::bridge::kTemperature);
}

int vtkEmberIsothermDepth::FillInputPortInformation(int, vtkInformation* info)
{
  info->Set(vtkAlgorithm::INPUT_REQUIRED_DATA_TYPE(), "vtkDataSet");
  return 1;
}

int vtkEmberIsothermDepth::RequestData(
  vtkInformation*, vtkInformationVector** inputVector, vtkInformationVector* outputVector)
{
  vtkDataSet* input = vtkDataSet::GetData(inputVector[0], 0);
  vtkPolyData* output = vtkPolyData::GetData(outputVector, 0);
  vtkDataArray* scalars = this->GetInputArrayToProcess(0, inputVector);
  if (!scalars)
  {
    vtkErrorMacro(<< "the input has no point array of temperatures (expected '"
                  << ember::bridge::kTemperature << "' from the cooling simulation)");
    return 0;
  }
  const int nx = this->Resolution[0], ny = this->Resolution[1];
  if (nx < 2 || ny < 2 || double(nx) * ny > 1e8)
  {
    vtkErrorMacro(<< "map resolution " << nx << " x " << ny << " is invalid (each at least 2, at most 1e8 points)");
    return 0;
  }
  double b[6];
  input->GetBounds(b);
  const double z_top = b[5], height = b[5] - b[4];
  const double inset = 1e-9 * std::max({ b[1] - b[0], b[3] - b[2], height, 1.0 });

  // The isotherm surface, and a locator to cast the vertical lines against it.
  vtkNew<vtkContourFilter> contour;
  contour->SetInputData(input);
  contour->SetInputArrayToProcess(0, 0, 0, vtkDataObject::FIELD_ASSOCIATION_POINTS, scalars->GetName());
  contour->SetValue(0, this->Isotherm);
  contour->Update();
  vtkPolyData* surface = contour->GetOutput();
  vtkNew<vtkCellLocator> locator;
  const bool any = surface->GetNumberOfCells() > 0;
  if (any)
  {
    locator->SetDataSet(surface);
    locator->BuildLocator();
  }

  // Grid points just inside the lateral extent, and the temperature just below the top there.
  vtkNew<vtkPoints> top_points;
  top_points->SetNumberOfPoints(static_cast<vtkIdType>(nx) * ny);
  for (int j = 0; j < ny; ++j)
    for (int i = 0; i < nx; ++i)
    {
      const double x = b[0] + inset + (b[1] - b[0] - 2 * inset) * i / (nx - 1);
      const double y = b[2] + inset + (b[3] - b[2] - 2 * inset) * j / (ny - 1);
      top_points->SetPoint(static_cast<vtkIdType>(j) * nx + i, x, y, z_top - inset);
    }
  vtkNew<vtkPolyData> probe_input;
  probe_input->SetPoints(top_points);
  vtkNew<vtkProbeFilter> probe;
  probe->SetInputData(probe_input);
  probe->SetSourceData(input);
  probe->Update();
  vtkDataArray* top_T = probe->GetOutput()->GetPointData()->GetArray(scalars->GetName());
  vtkDataArray* valid = probe->GetOutput()->GetPointData()->GetArray(probe->GetValidPointMaskArrayName());

  vtkNew<vtkPoints> points;
  points->SetNumberOfPoints(top_points->GetNumberOfPoints());
  vtkNew<vtkDoubleArray> depth;
  depth->SetName("IsothermDepth_m");
  depth->SetNumberOfValues(top_points->GetNumberOfPoints());
  vtkNew<vtkUnsignedCharArray> crossed;
  crossed->SetName("Crossed");
  crossed->SetNumberOfValues(top_points->GetNumberOfPoints());
  vtkNew<vtkPoints> hits;
  vtkNew<vtkIdList> hit_cells;
  const double nan = std::numeric_limits<double>::quiet_NaN();
  for (vtkIdType p = 0; p < top_points->GetNumberOfPoints(); ++p)
  {
    double x[3];
    top_points->GetPoint(p, x);
    double d = nan;
    if (valid && valid->GetTuple1(p) != 0 && top_T && top_T->GetTuple1(p) >= this->Isotherm)
      d = 0.0; // the top is already at or above the isotherm temperature
    else if (any)
    {
      const double p1[3] = { x[0], x[1], z_top + height };
      const double p2[3] = { x[0], x[1], b[4] - height };
      hits->Reset();
      hit_cells->Reset();
      locator->IntersectWithLine(p1, p2, 0.0, hits, hit_cells);
      double z_best = -std::numeric_limits<double>::infinity();
      for (vtkIdType h = 0; h < hits->GetNumberOfPoints(); ++h)
        z_best = std::max(z_best, hits->GetPoint(h)[2]);
      if (hits->GetNumberOfPoints() > 0)
        d = std::max(0.0, z_top - z_best);
    }
    depth->SetValue(p, d);
    crossed->SetValue(p, std::isnan(d) ? 0 : 1);
    points->SetPoint(p, x[0], x[1], this->PlaceAtIsotherm && !std::isnan(d) ? z_top - d : z_top);
    if (p % 1024 == 0)
    {
      this->UpdateProgress(double(p) / top_points->GetNumberOfPoints());
      if (this->CheckAbort())
        break;
    }
  }

  vtkNew<vtkCellArray> quads;
  for (int j = 0; j + 1 < ny; ++j)
    for (int i = 0; i + 1 < nx; ++i)
    {
      const vtkIdType a = static_cast<vtkIdType>(j) * nx + i;
      const vtkIdType quad[4] = { a, a + 1, a + 1 + nx, a + nx };
      quads->InsertNextCell(4, quad);
    }
  output->SetPoints(points);
  output->SetPolys(quads);
  output->GetPointData()->AddArray(depth);
  output->GetPointData()->AddArray(crossed);
  output->GetPointData()->SetActiveScalars("IsothermDepth_m");
  output->GetFieldData()->PassData(input->GetFieldData());
  vtkNew<vtkDoubleArray> value;
  value->SetName("Isotherm_C");
  value->InsertNextValue(this->Isotherm);
  output->GetFieldData()->AddArray(value);
  return 1;
}

void vtkEmberIsothermDepth::PrintSelf(ostream& os, vtkIndent indent)
{
  this->Superclass::PrintSelf(os, indent);
  os << indent << "Isotherm: " << this->Isotherm << " °C\n";
  os << indent << "Resolution: " << this->Resolution[0] << " x " << this->Resolution[1] << "\n";
}
