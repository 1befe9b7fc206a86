// Reading the rock library and region map: values reach the core in SI, and every kind of bad
// input names file, line and key. (Input-handling tests: no published source is involved.)
#include "ember/inputs/region_map.h"
#include "sample_rocks.h"

#include <gtest/gtest.h>

using namespace ember;
using namespace ember::inputs;

namespace
{
const std::string kLibrary = "format: 1\nrocks:\n" + ember::testing::kSampleRockList;

RockLibrary library()
{
  return parse_rock_library(load_yaml_text(kLibrary, "rocks.yaml"), { "rocks.yaml", "" });
}

std::string error_of(const std::string& text)
{
  try
  {
    parse_rock_library(load_yaml_text(text, "rocks.yaml"), { "rocks.yaml", "" });
  }
  catch (const InputError& e)
  {
    return e.what();
  }
  return "no error";
}

std::string map_error_of(const std::string& text)
{
  try
  {
    parse_region_map(load_yaml_text(text, "regions.yaml"), library(), { "regions.yaml", "" });
  }
  catch (const InputError& e)
  {
    return e.what();
  }
  return "no error";
}
} // namespace

TEST(RockLibrary, ReadsLawsAndConvertsUnits)
{
  const RockLibrary lib = library();
  ASSERT_EQ(lib.rocks.size(), 2u);
  const Rock& shale = lib.rocks[0];
  EXPECT_EQ(shale.conductivity.law, Conductivity::Law::VosteenSchellschmidt);
  EXPECT_FALSE(shale.conductivity.crystalline);
  EXPECT_DOUBLE_EQ(shale.heat_production, 1.5e-6); // µW/m³ → W/m³
  EXPECT_EQ(lib.sources[0], "test value");
  const Rock& dolerite = lib.rocks[1];
  EXPECT_EQ(dolerite.conductivity.law, Conductivity::Law::ZothHaenel);
  EXPECT_DOUBLE_EQ(dolerite.conductivity.b, 474.0);
  EXPECT_DOUBLE_EQ(dolerite.latent_heat, 4e5);
  EXPECT_EQ(*lib.find("dolerite"), 1);
}

TEST(RockLibrary, TypoInKeyNamesLineAndAllowedKeys)
{
  std::string text = kLibrary;
  text.replace(text.find("density: 2900"), 7, "densty");
  const std::string e = error_of(text);
  EXPECT_NE(e.find("rocks.yaml:10:"), std::string::npos) << e;
  EXPECT_NE(e.find("rocks[1].densty: unknown key"), std::string::npos) << e;
  EXPECT_NE(e.find("density"), std::string::npos) << e;
}

TEST(RockLibrary, BadValuesAreRejectedWithPosition)
{
  std::string text = kLibrary;
  text.replace(text.find("2450"), 4, "-5");
  // The core validates the rock as a whole: the message points at the rock and names the property.
  EXPECT_NE(error_of(text).find("rocks.yaml:3:5: rocks[0]: rock type 'shale'"), std::string::npos) << error_of(text);
  EXPECT_NE(error_of(text).find("density"), std::string::npos);
  text = kLibrary;
  text.replace(text.find("2450"), 4, "lots");
  EXPECT_NE(error_of(text).find("expected a finite number, found 'lots'"), std::string::npos);
  text = kLibrary;
  text.replace(text.find("zoth-haenel"), 11, "zoth");
  EXPECT_NE(error_of(text).find("not a conductivity law"), std::string::npos);
  text = kLibrary;
  text.replace(text.find("name: dolerite"), 14, "name: shale");
  EXPECT_NE(error_of(text).find("defined twice"), std::string::npos);
  EXPECT_NE(error_of("format: 2\nrocks: []\n").find("format 2 is not supported"), std::string::npos);
  EXPECT_NE(error_of("format: 1\nrocks: [\n").find("not valid YAML"), std::string::npos);
}

TEST(RockLibrary, UnreadableFileIsNamed)
{
  try
  {
    load_rock_library("/nonexistent/rocks.yaml");
    FAIL() << "no error";
  }
  catch (const InputError& e)
  {
    EXPECT_NE(std::string(e.what()).find("/nonexistent/rocks.yaml: cannot open"), std::string::npos);
  }
}

TEST(RegionMap, BuildsCellRocksAndEmplacements)
{
  const char* text = R"(format: 1
regions:
  - {id: 0, name: Host, rock: shale}
  - id: 7
    name: Sill
    rock: dolerite
    emplacement: {temperature: 1150, time: 2.5, replaces: shale}
)";
  const RockLibrary lib = library();
  const RegionMap map = parse_region_map(load_yaml_text(text, "r"), lib, { "r", "" });
  const std::vector<int> regions = { 0, 7, 7, 0 };
  const ModelSetup setup = make_model_setup(lib, map, regions);
  EXPECT_EQ(setup.cell_rock, (std::vector<int>{ 0, 0, 0, 0 })); // sill cells hold shale until 2.5 yr
  ASSERT_EQ(setup.emplacements.size(), 1u);
  EXPECT_EQ(setup.emplacements[0].region, 7);
  EXPECT_EQ(setup.emplacements[0].rock, 1);
  EXPECT_DOUBLE_EQ(setup.emplacements[0].time, 2.5 * kSecondsPerYear);
  EXPECT_DOUBLE_EQ(setup.emplacements[0].temperature, 1150.0);
}

TEST(RegionMap, ErrorsNameRegionRockAndCell)
{
  EXPECT_NE(map_error_of("format: 1\nregions:\n  - {id: 0, rock: granite}\n")
              .find("regions.yaml:3:"), std::string::npos);
  EXPECT_NE(map_error_of("format: 1\nregions:\n  - {id: 0, rock: granite}\n")
              .find("'granite' is not in the rock library (it has: 'shale', 'dolerite')"),
    std::string::npos);
  EXPECT_NE(map_error_of("format: 1\nregions:\n  - {id: 0, rock: shale}\n  - {id: 0, rock: shale}\n")
              .find("listed twice"), std::string::npos);
  EXPECT_NE(map_error_of("format: 1\nregions:\n  - id: 1\n    rock: dolerite\n"
                         "    emplacement: {temperature: 1100, time: 3}\n")
              .find("needs 'replaces'"), std::string::npos);
  const RockLibrary lib = library();
  const RegionMap map = parse_region_map(
    load_yaml_text("format: 1\nregions:\n  - {id: 0, rock: shale}\n", "r"), lib, { "r", "" });
  const std::vector<int> regions = { 0, 0, 4, 9, 4 };
  try
  {
    make_model_setup(lib, map, regions);
    FAIL() << "no error";
  }
  catch (const InputError& e)
  {
    EXPECT_NE(std::string(e.what()).find("4 (first at cell 2) 9 (first at cell 3)"), std::string::npos)
      << e.what();
  }
}
