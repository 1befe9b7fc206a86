// A scenario's rocks and regions written back in the rock-library and region-map schemas, so
// the runner can hand them to the same property-assignment step the viewer uses.
#include "ember/inputs/scenario.h"

namespace ember::inputs
{
namespace
{

/// Emitter that writes doubles with round-trip precision.
struct Document
{
  YAML::Emitter out;
  Document()
  {
    out.SetDoublePrecision(17);
    out << YAML::BeginMap << YAML::Key << "format" << YAML::Value << 1;
  }
  std::string finish()
  {
    out << YAML::EndMap;
    return std::string(out.c_str()) + "\n";
  }
};

void emit_conductivity(YAML::Emitter& out, const Conductivity& k)
{
  out << YAML::Flow << YAML::BeginMap;
  switch (k.law)
  {
  case Conductivity::Law::Constant:
    out << YAML::Key << "law" << YAML::Value << "constant" << YAML::Key << "at_25C" << YAML::Value << k.k_ref;
    break;
  case Conductivity::Law::VosteenSchellschmidt:
    out << YAML::Key << "law" << YAML::Value << "vosteen-schellschmidt" << YAML::Key << "at_25C"
        << YAML::Value << k.k_ref << YAML::Key << "class" << YAML::Value
        << (k.crystalline ? "crystalline" : "sedimentary");
    break;
  case Conductivity::Law::ZothHaenel:
    out << YAML::Key << "law" << YAML::Value << "zoth-haenel" << YAML::Key << "A" << YAML::Value << k.a
        << YAML::Key << "B" << YAML::Value << k.b;
    break;
  }
  out << YAML::Key << "minimum" << YAML::Value << k.k_min << YAML::EndMap;
}

void emit_rock(YAML::Emitter& out, const Rock& rock, const std::string& source)
{
  out << YAML::BeginMap;
  out << YAML::Key << "name" << YAML::Value << rock.name;
  out << YAML::Key << "density" << YAML::Value << rock.density;
  out << YAML::Key << "conductivity" << YAML::Value;
  emit_conductivity(out, rock.conductivity);
  out << YAML::Key << "heat_capacity" << YAML::Value << YAML::Flow << YAML::BeginMap << YAML::Key
      << "law" << YAML::Value
      << (rock.heat_capacity.law == HeatCapacity::Law::Constant ? "constant" : "waples-waples")
      << YAML::Key << "at_20C" << YAML::Value << rock.heat_capacity.c_ref << YAML::EndMap;
  if (rock.latent_heat > 0.0)
    out << YAML::Key << "latent_heat" << YAML::Value << rock.latent_heat << YAML::Key << "solidus"
        << YAML::Value << rock.solidus << YAML::Key << "liquidus" << YAML::Value << rock.liquidus;
  out << YAML::Key << "heat_production" << YAML::Value << rock.heat_production * 1e6; // W/m³ → µW/m³
  out << YAML::Key << "emissivity" << YAML::Value << rock.emissivity;
  if (!source.empty())
    out << YAML::Key << "source" << YAML::Value << source;
  out << YAML::EndMap;
}

} // namespace

std::string rock_library_yaml(const Scenario& scenario)
{
  Document doc;
  doc.out << YAML::Key << "rocks" << YAML::Value << YAML::BeginSeq;
  const RockLibrary& lib = scenario.library;
  for (std::size_t i = 0; i < lib.rocks.size(); ++i)
    emit_rock(doc.out, lib.rocks[i], i < lib.sources.size() ? lib.sources[i] : "");
  doc.out << YAML::EndSeq;
  return doc.finish();
}

std::string region_map_yaml(const Scenario& scenario)
{
  Document doc;
  const auto& rocks = scenario.library.rocks;
  doc.out << YAML::Key << "regions" << YAML::Value << YAML::BeginSeq;
  for (const RegionEntry& r : scenario.regions.regions)
  {
    YAML::Emitter& out = doc.out;
    out << YAML::BeginMap << YAML::Key << "id" << YAML::Value << r.id << YAML::Key << "name"
        << YAML::Value << r.name << YAML::Key << "rock" << YAML::Value << rocks[r.rock].name;
    if (r.intrusion)
      out << YAML::Key << "emplacement" << YAML::Value << YAML::Flow << YAML::BeginMap << YAML::Key
          << "temperature" << YAML::Value << r.intrusion->temperature << YAML::Key << "time"
          << YAML::Value << r.intrusion->time / kSecondsPerYear << YAML::Key << "replaces"
          << YAML::Value << rocks[r.intrusion->replaces].name << YAML::EndMap;
    if (r.organic)
      emit_organic(out, *r.organic);
    out << YAML::EndMap;
  }
  doc.out << YAML::EndSeq;
  return doc.finish();
}

} // namespace ember::inputs
