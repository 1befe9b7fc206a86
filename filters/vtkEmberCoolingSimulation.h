/**
 * @class vtkEmberCoolingSimulation
 * @brief Cools the bodies of a model prepared by vtkEmberRockAssignment and serves the
 *        temperature history as a temporal data set.
 *
 * One solve per change of input or parameters (progress reported, abort honoured); all output
 * times are kept in a snapshot cache within a memory budget (spilling beyond it to a temporary
 * folder removed with the filter), so scrubbing the timeline never solves again. Output times
 * are published in years (TIME_STEPS/TIME_RANGE).
 *
 * Output 0: the input mesh with point arrays Temperature [°C] and MeltFraction [-] at the
 * requested time, the thermal-history products recorded at every step up to it
 * (PeakTemperature [°C], PeakTemperatureTime_yr, SolidificationTime_yr (NaN: never molten,
 * inf: still molten), TimeAbove<θ>C_yr per threshold, EasyRo [%Ro] in organic-bearing
 * regions, NaN elsewhere), field data TimeYears and the run's energy ledger (EnergyLedger_J).
 * Output 1: a vtkTable with one row per output time: for each region and the whole model,
 * volume, melt volume fraction, heat in place and recoverable heat (volumetric method,
 * Muffler & Cataldi 1978), solidification time, contact temperature and aureole thicknesses.
 *
 * Units of the parameters: °C, K/km, mW/m² (heat flow into the model), W/(m²·K), years.
 */
#pragma once

#include "EmberlithFiltersModule.h"

#include <vtkSmartPointer.h>
#include <vtkUnstructuredGridAlgorithm.h>

class vtkTable;

#include <memory>
#include <string>
#include <vector>

#ifndef __VTK_WRAP__
namespace ember
{
struct BoundaryCondition;
struct InitialState;
struct EnergyLedger;
struct BodySummary;
namespace bridge
{
class SnapshotCache;
}
}
#endif

class EMBERLITHFILTERS_EXPORT vtkEmberCoolingSimulation : public vtkUnstructuredGridAlgorithm
{
public:
  static vtkEmberCoolingSimulation* New();
  vtkTypeMacro(vtkEmberCoolingSimulation, vtkUnstructuredGridAlgorithm);
  void PrintSelf(ostream& os, vtkIndent indent) override;

  enum InitialStates
  {
    UNIFORM = 0,
    GEOTHERM = 1,
    STEADY_STATE = 2
  };
  enum BoundaryKinds
  {
    INSULATED = 0,
    FIXED_TEMPERATURE = 1,
    HEAT_FLOW = 2,
    RADIATION = 3,
    CONVECTION = 4,
    RADIATION_AND_CONVECTION = 5
  };
  enum OutputSchedules
  {
    LOG_SPACED = 0,
    EXPLICIT_LIST = 1
  };
  enum Integrators
  {
    RKL2 = 0,
    FORWARD_EULER = 1
  };

  // Initial state.
  vtkSetClampMacro(InitialState, int, UNIFORM, STEADY_STATE);
  vtkGetMacro(InitialState, int);
  vtkSetMacro(SurfaceTemperature, double); ///< [°C]
  vtkGetMacro(SurfaceTemperature, double);
  vtkSetMacro(Gradient, double); ///< [K/km], warmer downward
  vtkGetMacro(Gradient, double);

  // Boundary conditions of the top, bottom and side surfaces (faces by outward normal).
  vtkSetClampMacro(TopCondition, int, INSULATED, RADIATION_AND_CONVECTION);
  vtkGetMacro(TopCondition, int);
  vtkSetMacro(TopTemperature, double);
  vtkSetMacro(TopHeatFlow, double);
  vtkSetMacro(TopEmissivity, double);
  vtkSetMacro(TopSkyTemperature, double);
  vtkSetMacro(TopTransferCoefficient, double);
  vtkSetMacro(TopFluidTemperature, double);
  vtkSetClampMacro(BottomCondition, int, INSULATED, RADIATION_AND_CONVECTION);
  vtkGetMacro(BottomCondition, int);
  vtkSetMacro(BottomTemperature, double);
  vtkSetMacro(BottomHeatFlow, double);
  vtkSetMacro(BottomEmissivity, double);
  vtkSetMacro(BottomSkyTemperature, double);
  vtkSetMacro(BottomTransferCoefficient, double);
  vtkSetMacro(BottomFluidTemperature, double);
  vtkSetClampMacro(SidesCondition, int, INSULATED, RADIATION_AND_CONVECTION);
  vtkGetMacro(SidesCondition, int);
  vtkSetMacro(SidesTemperature, double);
  vtkSetMacro(SidesHeatFlow, double);
  vtkSetMacro(SidesEmissivity, double);
  vtkSetMacro(SidesSkyTemperature, double);
  vtkSetMacro(SidesTransferCoefficient, double);
  vtkSetMacro(SidesFluidTemperature, double);

  // Time.
  vtkSetMacro(EndTime, double); ///< [yr]
  vtkGetMacro(EndTime, double);
  vtkSetClampMacro(OutputSchedule, int, LOG_SPACED, EXPLICIT_LIST);
  vtkSetMacro(NumberOfOutputs, int);
  vtkSetMacro(FirstOutputTime, double); ///< [yr]
  void AddOutputTime(double years);
  void ClearOutputTimes();

  // Thermal history: time above thresholds, heat in place, aureoles.
  void AddThreshold(double celsius);
  void ClearThresholds();
  vtkSetMacro(HeatReferenceTemperature, double); ///< T_ref of the heat in place [°C]
  vtkSetClampMacro(RecoveryFactor, double, 0.0, 1.0);
  vtkSetMacro(AureoleTemperature, double); ///< aureole limit on the peak temperature [°C]
  vtkSetMacro(AureoleReflectance, double); ///< aureole limit on EASY%Ro [%Ro]

  // Performance.
  vtkSetClampMacro(Integrator, int, RKL2, FORWARD_EULER);
  vtkGetMacro(Integrator, int);
  vtkSetMacro(Threads, int); ///< 0 = all cores
  vtkSetMacro(MemoryBudget, double); ///< snapshot memory before spilling to disk [MB]

  /// How many times the model was solved (scrubbing through time must not add to it).
  vtkGetMacro(SolveCount, int);
  /// Output times in years (also published as TIME_STEPS).
  std::vector<double> GetOutputTimesYears() const;

  /// Steps and operator applications of the last solve (for provenance and benchmarks).
  vtkGetMacro(StepsTaken, vtkIdType);
  vtkGetMacro(OperatorApplications, vtkIdType);

#ifndef __VTK_WRAP__
  /// Replace the three surface groups by explicit conditions (the runner's per-region ones).
  void SetBoundaryConditions(const std::vector<ember::BoundaryCondition>& conditions);
  /// Use this initial state instead of the panel's (e.g. a geotherm referred to the ground
  /// surface when a lava flow stands above it).
  void SetInitialStateOverride(const ember::InitialState& state);
  /// The energy ledger of the last solve [J].
  ember::EnergyLedger GetEnergyLedger() const;

  /// Per-region table at each output time (port 1 shows it as a vtkTable).
  const std::vector<ember::BodySummary>& GetBodySummaries() const;
  /// Region names by region id, as the region map gives them.
  std::string GetRegionName(int region) const;

  /// What went wrong in the last RequestData, for callers that need more than the message.
  enum class Failure
  {
    None,
    Input,   ///< the model or parameters are invalid (message names what and where)
    Stopped, ///< the solve left the physical range or was aborted
    Internal
  };
  Failure GetLastFailure() const { return this->LastFailure; }
  const std::string& GetLastErrorMessage() const { return this->LastErrorMessage; }
#endif

protected:
  vtkEmberCoolingSimulation();
  ~vtkEmberCoolingSimulation() override;
  int FillOutputPortInformation(int port, vtkInformation* info) override;
  int RequestInformation(vtkInformation*, vtkInformationVector**, vtkInformationVector*) override;
  int RequestData(vtkInformation*, vtkInformationVector**, vtkInformationVector*) override;

private:
  vtkEmberCoolingSimulation(const vtkEmberCoolingSimulation&) = delete;
  void operator=(const vtkEmberCoolingSimulation&) = delete;

  void Solve(vtkUnstructuredGrid* input);
  vtkSmartPointer<vtkTable> MakeSummaryTable() const;
#ifndef __VTK_WRAP__
  int Fail(vtkDataObject* output, Failure kind, const char* message);
#endif

  int InitialState = GEOTHERM;
  double SurfaceTemperature = 10.0;
  double Gradient = 30.0;
  int TopCondition = FIXED_TEMPERATURE;
  double TopTemperature = 10.0, TopHeatFlow = 0.0, TopEmissivity = -1.0, TopSkyTemperature = 0.0,
         TopTransferCoefficient = 10.0, TopFluidTemperature = 10.0;
  int BottomCondition = HEAT_FLOW;
  double BottomTemperature = 100.0, BottomHeatFlow = 60.0, BottomEmissivity = -1.0,
         BottomSkyTemperature = 0.0, BottomTransferCoefficient = 10.0, BottomFluidTemperature = 10.0;
  int SidesCondition = INSULATED;
  double SidesTemperature = 10.0, SidesHeatFlow = 0.0, SidesEmissivity = -1.0,
         SidesSkyTemperature = 0.0, SidesTransferCoefficient = 10.0, SidesFluidTemperature = 10.0;
  double EndTime = 1000.0;
  int OutputSchedule = LOG_SPACED;
  int NumberOfOutputs = 20;
  double FirstOutputTime = 1.0;
  std::vector<double> OutputTimes;
  int Integrator = RKL2;
  int Threads = 0;
  double MemoryBudget = 1024.0;
  std::vector<double> Thresholds;
  double HeatReferenceTemperature = 10.0;
  double RecoveryFactor = 0.1;
  double AureoleTemperature = 300.0;
  double AureoleReflectance = 1.0;
  int SolveCount = 0;
  vtkIdType StepsTaken = 0;
  vtkIdType OperatorApplications = 0;

  struct Internals;
  std::unique_ptr<Internals> Internal;
#ifndef __VTK_WRAP__
  Failure LastFailure = Failure::None;
#endif
  std::string LastErrorMessage;
};
