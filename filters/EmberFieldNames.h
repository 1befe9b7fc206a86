// Names of the arrays and field data the Emberlith filters exchange. Array names are the
// public face of the results (scripts and state files use them): change them with care.
#pragma once
// Plain C++ for the filters and the runner; nothing here for the wrappers to see.
#ifndef __VTK_WRAP__

namespace ember::bridge
{
// Cell data written by the rock-property assignment.
inline constexpr const char* kRegionId = "RegionId";
inline constexpr const char* kRockIndex = "RockIndex";
inline constexpr const char* kDensity = "Density_kg_per_m3";
inline constexpr const char* kConductivity = "Conductivity25C_W_per_mK";
inline constexpr const char* kHeatCapacity = "HeatCapacity20C_J_per_kgK";
inline constexpr const char* kHeatProduction = "HeatProduction_uW_per_m3";
inline constexpr const char* kLatentHeat = "LatentHeat_J_per_kg";
inline constexpr const char* kEmplacementTemperature = "EmplacementTemperature_C";
inline constexpr const char* kEmplacementTime = "EmplacementTime_yr";

// Field data written by the rock-property assignment and read by the simulation: the input
// texts themselves, so the simulation parses exactly what the user wrote.
inline constexpr const char* kRockLibraryText = "EmberRockLibrary";
inline constexpr const char* kRockLibraryOrigin = "EmberRockLibraryOrigin";
inline constexpr const char* kRegionMapText = "EmberRegionMap";
inline constexpr const char* kRegionMapOrigin = "EmberRegionMapOrigin";
inline constexpr const char* kRegionNames = "RegionNames";
inline constexpr const char* kRegionIds = "RegionIds";

// Point data and field data of the simulation output.
inline constexpr const char* kTemperature = "Temperature";
inline constexpr const char* kMeltFraction = "MeltFraction";
inline constexpr const char* kTimeYears = "TimeYears";
inline constexpr const char* kLedger = "EnergyLedger_J";
} // namespace ember::bridge
#endif
