#include "vtkEmberIsotherms.h"

#include "EmberFieldNames.h"

#include <vtkAppendPolyData.h>
#include <vtkCellData.h>
#include <vtkContourFilter.h>
#include <vtkDataSet.h>
#include <vtkDoubleArray.h>
#include <vtkFieldData.h>
#include <vtkInformation.h>
#include <vtkInformationVector.h>
#include <vtkNew.h>
#include <vtkObjectFactory.h>
#include <vtkPointData.h>
#include <vtkPolyData.h>

vtkStandardNewMacro(vtkEmberIsotherms);

vtkEmberIsotherms::vtkEmberIsotherms()
{
  this->SetInputArrayToProcess(
    0, 0, 0, vtkDataObject::FIELD_ASSOCIATION_POINTS, ember::bridge::kTemperature);
}

void vtkEmberIsotherms::AddIsotherm(double celsius)
{
  this->Values.push_back(celsius);
  this->Modified();
}

void vtkEmberIsotherms::ClearIsotherms()
{
  if (!this->Values.empty())
  {
    this->Values.clear();
    this->Modified();
  }
}

int vtkEmberIsotherms::FillInputPortInformation(int, vtkInformation* info)
{
  info->Set(vtkAlgorithm::INPUT_REQUIRED_DATA_TYPE(), "vtkDataSet");
  return 1;
}

int vtkEmberIsotherms::RequestData(
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
  // One contour per value, so each surface can carry its own label.
  vtkNew<vtkAppendPolyData> append;
  vtkNew<vtkDoubleArray> listed;
  listed->SetName("IsothermValues");
  for (double value : this->Values)
  {
    listed->InsertNextValue(value);
    vtkNew<vtkContourFilter> contour;
    contour->SetInputData(input);
    contour->SetInputArrayToProcess(0, 0, 0, vtkDataObject::FIELD_ASSOCIATION_POINTS, scalars->GetName());
    contour->SetValue(0, value);
    contour->ComputeScalarsOn();
    contour->ComputeNormalsOn();
    contour->Update();
    vtkPolyData* surface = contour->GetOutput();
    vtkNew<vtkDoubleArray> label;
    label->SetName("Isotherm");
    label->SetNumberOfValues(surface->GetNumberOfCells());
    label->Fill(value);
    surface->GetCellData()->AddArray(label);
    append->AddInputData(surface);
    if (this->CheckAbort())
      break;
  }
  if (this->Values.empty())
    output->Initialize();
  else
  {
    append->Update();
    output->ShallowCopy(append->GetOutput());
  }
  output->GetFieldData()->PassData(input->GetFieldData());
  output->GetFieldData()->AddArray(listed);
  return 1;
}

void vtkEmberIsotherms::PrintSelf(ostream& os, vtkIndent indent)
{
  this->Superclass::PrintSelf(os, indent);
  os << indent << "Isotherms:";
  for (double v : this->Values)
    os << " " << v;
  os << " °C\n";
}
