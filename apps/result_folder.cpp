#include "result_folder.h"

#include <nlohmann/json.hpp>

#include <cmath>
#include <cstdio>
#include <fstream>
#include <unistd.h>

namespace fs = std::filesystem;

namespace emberlith
{
namespace
{
bool is_emberlith_result(const fs::path& folder)
{
  std::ifstream in(folder / kProvenanceFile);
  if (!in)
    return false;
  const auto json = nlohmann::json::parse(in, nullptr, false);
  return !json.is_discarded() && json.value("program", "") == "emberlith";
}
} // namespace

ResultFolder::ResultFolder(fs::path target, bool force) : target_(std::move(target))
{
  if (fs::exists(target_))
  {
    if (!force)
      throw OutputExists("output folder " + target_.string() +
        " exists; choose another folder, or pass --force to replace an earlier result");
    if (!is_emberlith_result(target_))
      throw OutputExists("output folder " + target_.string() +
        " exists and is not an Emberlith result (no " + kProvenanceFile +
        " from this program); refusing to replace it even with --force");
    replace_ = true;
  }
  const fs::path parent = fs::absolute(target_).parent_path();
  fs::create_directories(parent);
  staging_ = parent / ("." + target_.filename().string() + ".incomplete-" + std::to_string(getpid()));
  fs::remove_all(staging_);
  fs::create_directories(staging_);
}

ResultFolder::~ResultFolder()
{
  if (!committed_)
  {
    std::error_code ignored; // nothing useful to report from a destructor
    fs::remove_all(staging_, ignored);
  }
}

void ResultFolder::commit()
{
  if (replace_)
  {
    // Re-check: the folder may have changed while we ran.
    if (fs::exists(target_) && !is_emberlith_result(target_))
      throw OutputExists("output folder " + target_.string() + " changed during the run; not replaced");
    fs::remove_all(target_);
  }
  else if (fs::exists(target_))
    throw OutputExists("output folder " + target_.string() + " appeared during the run; result left in " +
      staging_.string());
  fs::rename(staging_, target_);
  committed_ = true;
}

std::string natural_time(double seconds)
{
  constexpr double day = 86400.0, year = 365.25 * day;
  char text[64];
  const double years = seconds / year;
  if (seconds < 60 * day)
    std::snprintf(text, sizeof text, "%.3g days", seconds / day);
  else if (years < 1e3)
    std::snprintf(text, sizeof text, "%.3g yr", years);
  else if (years < 1e6)
    std::snprintf(text, sizeof text, "%.3g kyr", years / 1e3);
  else
    std::snprintf(text, sizeof text, "%.3g Myr", years / 1e6);
  return text;
}
} // namespace emberlith
