#include "vtkEmberCoolingSimulation.h"

#include "EmberFieldNames.h"
#include "EmberSnapshotCache.h"
#include "EmberVtkConversion.h"

#include "ember/inputs/region_map.h"
#include "ember/integrators.h"
#include "ember/simulation.h"
#include "ember/thermal_history.h"

#include <vtkTable.h>
#include <map>

#include <vtkDoubleArray.h>
#include <vtkFieldData.h>
#include <vtkInformation.h>
#include <vtkInformationVector.h>
#include <vtkNew.h>
#include <vtkObjectFactory.h>
#include <vtkPointData.h>
#include <vtkStreamingDemandDrivenPipeline.h>
#include <vtkUnstructuredGrid.h>

#include <algorithm>
#include <limits>
#include <cmath>
#include <optional>
#include <sstream>

vtkStandardNewMacro(vtkEmberCoolingSimulation);

struct vtkEmberCoolingSimulation::Internals
{
  ember::bridge::SnapshotCache cache;
  vtkTimeStamp solved;        ///< when the cache was last filled
  vtkMTimeType input_mtime = 0;
  ember::EnergyLedger ledger;
  std::optional<std::vector<ember::BoundaryCondition>> conditions; ///< runner's explicit list
  std::optional<ember::InitialState> initial;                       ///< runner's override
  std::vector<ember::BodySummary> summaries;
  std::map<int, std::string> region_names;
  vtkSmartPointer<vtkTable> table;
};

vtkEmberCoolingSimulation::vtkEmberCoolingSimulation() : Internal(new Internals)
{
  this->SetNumberOfOutputPorts(2);
}

int vtkEmberCoolingSimulation::FillOutputPortInformation(int port, vtkInformation* info)
{
  info->Set(vtkDataObject::DATA_TYPE_NAME(), port == 0 ? "vtkUnstructuredGrid" : "vtkTable");
  return 1;
}

void vtkEmberCoolingSimulation::AddThreshold(double celsius)
{
  this->Thresholds.push_back(celsius);
  this->Modified();
}

void vtkEmberCoolingSimulation::ClearThresholds()
{
  if (!this->Thresholds.empty())
  {
    this->Thresholds.clear();
    this->Modified();
  }
}

const std::vector<ember::BodySummary>& vtkEmberCoolingSimulation::GetBodySummaries() const
{
  return this->Internal->summaries;
}

std::string vtkEmberCoolingSimulation::GetRegionName(int region) const
{
  const auto it = this->Internal->region_names.find(region);
  return it != this->Internal->region_names.end() ? it->second : "region " + std::to_string(region);
}

vtkEmberCoolingSimulation::~vtkEmberCoolingSimulation() = default;

void vtkEmberCoolingSimulation::AddOutputTime(double years)
{
  this->OutputTimes.push_back(years);
  this->Modified();
}

void vtkEmberCoolingSimulation::ClearOutputTimes()
{
  if (!this->OutputTimes.empty())
  {
    this->OutputTimes.clear();
    this->Modified();
  }
}

void vtkEmberCoolingSimulation::SetBoundaryConditions(
  const std::vector<ember::BoundaryCondition>& conditions)
{
  this->Internal->conditions = conditions;
  this->Modified();
}

void vtkEmberCoolingSimulation::SetInitialStateOverride(const ember::InitialState& state)
{
  this->Internal->initial = state;
  this->Modified();
}

ember::EnergyLedger vtkEmberCoolingSimulation::GetEnergyLedger() const
{
  return this->Internal->ledger;
}

std::vector<double> vtkEmberCoolingSimulation::GetOutputTimesYears() const
{
  if (this->OutputSchedule == EXPLICIT_LIST)
  {
    if (this->OutputTimes.empty())
      throw std::invalid_argument("the explicit list of output times is empty");
    return this->OutputTimes; // order and sign are checked by the core, naming the entry
  }
  const double first = this->FirstOutputTime, end = this->EndTime;
  const int n = this->NumberOfOutputs;
  if (!(end > 0.0) || !std::isfinite(end))
    throw std::invalid_argument("end time must be > 0 years");
  if (n < 1)
    throw std::invalid_argument("number of output times must be at least 1");
  if (n == 1)
    return { end };
  if (!(first > 0.0) || !(first < end))
    throw std::invalid_argument("first output time (" + std::to_string(first) +
      " yr) must lie between 0 and the end time (" + std::to_string(end) + " yr)");
  std::vector<double> times(static_cast<std::size_t>(n));
  for (int k = 0; k < n; ++k)
    times[static_cast<std::size_t>(k)] = first * std::pow(end / first, double(k) / (n - 1));
  times.back() = end; // exactly, not pow's rounding of it
  return times;
}

int vtkEmberCoolingSimulation::RequestInformation(
  vtkInformation*, vtkInformationVector**, vtkInformationVector* outputVector)
{
  try
  {
    const std::vector<double> times = this->GetOutputTimesYears();
    vtkInformation* info = outputVector->GetInformationObject(0);
    info->Set(vtkStreamingDemandDrivenPipeline::TIME_STEPS(), times.data(), static_cast<int>(times.size()));
    const double range[2] = { times.front(), times.back() };
    info->Set(vtkStreamingDemandDrivenPipeline::TIME_RANGE(), range, 2);
    return 1;
  }
  catch (const std::exception& e)
  {
    vtkErrorMacro(<< e.what());
    return 0;
  }
}

namespace
{
struct Aborted : std::runtime_error
{
  using std::runtime_error::runtime_error;
};

ember::BoundaryCondition make_condition(int kind, ember::Side side, double temperature,
  double heat_flow_mW, double emissivity, double sky, double h, double fluid)
{
  using Kind = ember::BoundaryCondition::Kind;
  static const Kind kinds[] = { Kind::Insulated, Kind::FixedTemperature, Kind::HeatFlux,
    Kind::Radiation, Kind::Convection, Kind::RadiationConvection };
  ember::BoundaryCondition bc;
  bc.kind = kinds[kind];
  bc.side = side;
  bc.temperature = temperature;
  bc.heat_flux = heat_flow_mW * 1e-3;
  bc.emissivity = emissivity;
  bc.sky_temperature = sky;
  bc.transfer_coefficient = h;
  bc.fluid_temperature = fluid;
  return bc;
}
} // namespace

void vtkEmberCoolingSimulation::Solve(vtkUnstructuredGrid* input)
{
  using namespace ember;
  vtkFieldData* fd = input->GetFieldData();
  const std::string library_text = bridge::field_text(fd, bridge::kRockLibraryText);
  const std::string map_text = bridge::field_text(fd, bridge::kRegionMapText);
  if (library_text.empty() || map_text.empty())
    throw std::invalid_argument("the input carries no rock properties: apply 'Assign Rock "
                                "Properties' (vtkEmberRockAssignment) to the mesh first");
  const std::string library_origin = bridge::field_text(fd, bridge::kRockLibraryOrigin);
  const std::string map_origin = bridge::field_text(fd, bridge::kRegionMapOrigin);
  const auto library = inputs::parse_rock_library(
    inputs::load_yaml_text(library_text, library_origin), { library_origin, "" });
  const auto map = inputs::parse_region_map(
    inputs::load_yaml_text(map_text, map_origin), library, { map_origin, "" });

  const Mesh mesh = bridge::to_core_mesh(input, bridge::kRegionId);
  const inputs::ModelSetup setup = inputs::make_model_setup(library, map, mesh.cell_region);
  ThermalModel model(mesh, setup.rocks, setup.cell_rock);

  std::vector<BoundaryCondition> conditions;
  if (this->Internal->conditions)
    conditions = *this->Internal->conditions;
  else
  {
    conditions.push_back(make_condition(this->TopCondition, Side::Top, this->TopTemperature,
      this->TopHeatFlow, this->TopEmissivity, this->TopSkyTemperature, this->TopTransferCoefficient,
      this->TopFluidTemperature));
    conditions.push_back(make_condition(this->BottomCondition, Side::Bottom, this->BottomTemperature,
      this->BottomHeatFlow, this->BottomEmissivity, this->BottomSkyTemperature,
      this->BottomTransferCoefficient, this->BottomFluidTemperature));
    conditions.push_back(make_condition(this->SidesCondition, Side::Sides, this->SidesTemperature,
      this->SidesHeatFlow, this->SidesEmissivity, this->SidesSkyTemperature,
      this->SidesTransferCoefficient, this->SidesFluidTemperature));
  }

  ember::InitialState initial;
  initial.kind = static_cast<ember::InitialState::Kind>(this->InitialState);
  initial.surface_temperature = this->SurfaceTemperature;
  initial.gradient = this->Gradient * 1e-3;
  initial.z_top = -std::numeric_limits<double>::infinity();
  for (const Point& p : mesh.points)
    initial.z_top = std::max(initial.z_top, p[2]);
  if (this->Internal->initial)
    initial = *this->Internal->initial;

  SimulationSettings settings;
  for (double years : this->GetOutputTimesYears())
    settings.output_times.push_back(years * kSecondsPerYear);
  settings.threads = this->Threads;
  bridge::SnapshotCache& cache = this->Internal->cache;
  cache.clear();
  cache.set_budget(static_cast<std::size_t>(std::max(0.0, this->MemoryBudget) * 1024.0 * 1024.0));
  settings.snapshot_sink = [&cache](Snapshot&& snap) {
    bridge::SnapshotCache::Frame frame;
    frame.time = snap.time;
    // Temperature stays double: it is compared with the core to round-off and contoured.
    frame.arrays.push_back({ bridge::kTemperature, false, std::move(snap.temperature) });
    frame.arrays.push_back({ bridge::kMeltFraction, true, std::move(snap.melt_fraction) });
    frame.scalars.emplace_back("BoundaryHeat_J", snap.boundary_heat);
    for (PointField& field : snap.point_fields)
    {
      // Times go out in years, the unit users read; the name says so.
      const bool is_time = field.name.find("Time") != std::string::npos;
      if (is_time)
        for (double& v : field.values)
          v /= kSecondsPerYear;
      frame.arrays.push_back({ is_time ? field.name + "_yr" : field.name, false, std::move(field.values) });
    }
    cache.add(frame);
  };

  ThermalHistorySettings history_settings;
  history_settings.thresholds = this->Thresholds;
  for (const auto& entry : map.regions)
    if (entry.organic)
    {
      InitialMaturity maturity = *entry.organic;
      maturity.surface_temperature = initial.surface_temperature;
      history_settings.organic.push_back({ entry.id, maturity });
    }
  BodySummarySettings summary;
  summary.reference_temperature = this->HeatReferenceTemperature;
  summary.recovery_factor = this->RecoveryFactor;
  summary.aureole_temperature = this->AureoleTemperature;
  summary.aureole_reflectance = this->AureoleReflectance;
  for (const auto& entry : map.regions)
    if (entry.intrusion)
      summary.bodies.push_back(entry.id);
  history_settings.summary = summary;
  ThermalHistory history(model, history_settings);

  const auto integrator = make_integrator(
    this->Integrator == RKL2 ? ember::IntegratorKind::RKL2 : ember::IntegratorKind::ForwardEuler);
  const double end = settings.output_times.back();
  const SimulationResult result = simulate(model, conditions, initial, setup.emplacements,
    settings, *integrator,
    [this, end](const StepInfo& step) {
      this->UpdateProgress(step.time / end);
      return !this->CheckAbort();
    },
    &history);
  if (result.cancelled)
  {
    cache.clear();
    throw Aborted("the simulation was aborted at the user's request");
  }
  this->Internal->ledger = result.ledger;
  this->Internal->summaries = history.summaries();
  this->Internal->region_names.clear();
  for (const auto& entry : map.regions)
    this->Internal->region_names[entry.id] = entry.name;
  this->Internal->table = this->MakeSummaryTable();
  this->StepsTaken = static_cast<vtkIdType>(result.steps);
  this->OperatorApplications = static_cast<vtkIdType>(result.operator_applications);
  ++this->SolveCount;
}

int vtkEmberCoolingSimulation::RequestData(
  vtkInformation*, vtkInformationVector** inputVector, vtkInformationVector* outputVector)
{
  vtkUnstructuredGrid* input = vtkUnstructuredGrid::GetData(inputVector[0], 0);
  vtkUnstructuredGrid* output = vtkUnstructuredGrid::GetData(outputVector, 0);
  output->Initialize();
  Internals& in = *this->Internal;
  this->LastFailure = Failure::None;
  this->LastErrorMessage.clear();
  try
  {
    if (!input || input->GetNumberOfCells() == 0)
      throw std::invalid_argument("the input holds no cells");
    const bool stale = in.cache.size() == 0 || in.solved < this->GetMTime() ||
      in.input_mtime != input->GetMTime();
    if (stale)
    {
      in.input_mtime = 0;
      this->Solve(input);
      in.input_mtime = input->GetMTime();
      in.solved.Modified();
    }

    // Serve the latest output time not after the requested one (the first before it).
    vtkInformation* info = outputVector->GetInformationObject(0);
    std::size_t k = in.cache.size() - 1;
    if (info->Has(vtkStreamingDemandDrivenPipeline::UPDATE_TIME_STEP()))
    {
      const double want = info->Get(vtkStreamingDemandDrivenPipeline::UPDATE_TIME_STEP()) *
        ember::kSecondsPerYear;
      k = 0;
      for (std::size_t j = 0; j < in.cache.size(); ++j)
        if (in.cache.time(j) <= want * (1.0 + 1e-9))
          k = j;
    }
    const ember::bridge::SnapshotCache::Frame frame = in.cache.get(k);
    output->ShallowCopy(input);
    for (const auto& array : frame.arrays)
      array.single_precision ? ember::bridge::add_point_array_float(output, array.name.c_str(), array.values)
                             : ember::bridge::add_point_array(output, array.name.c_str(), array.values);
    output->GetPointData()->SetActiveScalars(ember::bridge::kTemperature);
    const double years = frame.time / ember::kSecondsPerYear;
    vtkNew<vtkDoubleArray> time;
    time->SetName(ember::bridge::kTimeYears);
    time->InsertNextValue(years);
    output->GetFieldData()->AddArray(time);
    vtkNew<vtkDoubleArray> ledger;
    ledger->SetName(ember::bridge::kLedger);
    ledger->SetNumberOfComponents(6);
    const char* parts[] = { "Initial", "StoredChange", "Boundary", "Radiogenic", "Emplaced", "Imbalance" };
    for (int c = 0; c < 6; ++c)
      ledger->SetComponentName(c, parts[c]);
    const ember::EnergyLedger& l = in.ledger;
    const double values[] = { l.initial, l.stored_change, l.boundary, l.source, l.emplaced, l.imbalance() };
    ledger->InsertNextTuple(values);
    output->GetFieldData()->AddArray(ledger);
    output->GetInformation()->Set(vtkDataObject::DATA_TIME_STEP(), years);
    vtkTable* table = vtkTable::GetData(outputVector, 1);
    if (table && in.table)
      table->ShallowCopy(in.table);
    return 1;
  }
  catch (const ember::SimulationError& e)
  {
    return this->Fail(output, Failure::Stopped, e.what());
  }
  catch (const Aborted& e)
  {
    return this->Fail(output, Failure::Stopped, e.what());
  }
  catch (const ember::inputs::InputError& e)
  {
    return this->Fail(output, Failure::Input, e.what());
  }
  catch (const ember::MeshError& e)
  {
    return this->Fail(output, Failure::Input, e.what());
  }
  catch (const ember::PropertyError& e)
  {
    return this->Fail(output, Failure::Input, e.what());
  }
  catch (const std::invalid_argument& e)
  {
    return this->Fail(output, Failure::Input, e.what());
  }
  catch (const std::exception& e)
  {
    return this->Fail(output, Failure::Internal, e.what());
  }
}

int vtkEmberCoolingSimulation::Fail(vtkDataObject* output, Failure kind, const char* message)
{
  output->Initialize();
  this->LastFailure = kind;
  this->LastErrorMessage = message;
  vtkErrorMacro(<< message);
  return 0;
}

vtkSmartPointer<vtkTable> vtkEmberCoolingSimulation::MakeSummaryTable() const
{
  // Wide: one row per output time, columns "<region>: <quantity>", so the viewer's line chart
  // plots any quantity of any body over time directly.
  auto table = vtkSmartPointer<vtkTable>::New();
  const auto& rows = this->Internal->summaries;
  auto column = [&](const std::string& name, auto value_of) {
    vtkNew<vtkDoubleArray> array;
    array->SetName(name.c_str());
    for (const auto& row : rows)
      array->InsertNextValue(value_of(row));
    table->AddColumn(array);
  };
  column("Time_yr", [](const ember::BodySummary& r) { return r.time / ember::kSecondsPerYear; });
  if (rows.empty())
    return table;
  std::vector<int> regions;
  for (const auto& r : rows.front().regions)
    regions.push_back(r.region);
  regions.push_back(-1);
  for (int id : regions)
  {
    const std::string prefix = (id < 0 ? std::string("Whole model") : this->GetRegionName(id)) + ": ";
    auto pick = [id](const ember::BodySummary& s) -> const ember::RegionSummary& {
      if (id < 0)
        return s.model;
      for (const auto& r : s.regions)
        if (r.region == id)
          return r;
      return s.model; // unreachable: every output lists the same regions
    };
    using S = ember::BodySummary;
    column(prefix + "Volume_m3", [&](const S& s) { return pick(s).volume; });
    column(prefix + "MeltVolumeFraction", [&](const S& s) { return pick(s).melt_volume_fraction; });
    column(prefix + "HeatInPlace_J", [&](const S& s) { return pick(s).heat_in_place; });
    column(prefix + "RecoverableHeat_J", [&](const S& s) { return pick(s).recoverable_heat; });
    column(prefix + "SolidificationTime_yr",
      [&](const S& s) { return pick(s).solidification_time / ember::kSecondsPerYear; });
    column(prefix + "ContactTemperature_C", [&](const S& s) { return pick(s).contact_temperature; });
    column(prefix + "ContactDistance_m", [&](const S& s) { return pick(s).contact_distance; });
    column(prefix + "AureoleThicknessByTemperature_m",
      [&](const S& s) { return pick(s).aureole_thickness_temperature; });
    column(prefix + "AureoleThicknessByEasyRo_m",
      [&](const S& s) { return pick(s).aureole_thickness_reflectance; });
  }
  return table;
}

void vtkEmberCoolingSimulation::PrintSelf(ostream& os, vtkIndent indent)
{
  this->Superclass::PrintSelf(os, indent);
  os << indent << "InitialState: " << this->InitialState << "\n";
  os << indent << "EndTime: " << this->EndTime << " yr\n";
  os << indent << "SolveCount: " << this->SolveCount << "\n";
}
