// The runner's output folder: written under a staging name and moved into place only when
// complete, never over anything that is not an earlier Emberlith result.
#pragma once

#include <filesystem>
#include <stdexcept>
#include <string>

namespace emberlith
{
/// The output folder exists and may not be replaced (exit code 3).
class OutputExists : public std::runtime_error
{
public:
  using std::runtime_error::runtime_error;
};

/// Name of the file that marks a folder as an Emberlith result (and records how it was made).
inline constexpr const char* kProvenanceFile = "provenance.json";

class ResultFolder
{
public:
  /**
   * Prepare to write `target`. If it exists: without `force` throws OutputExists; with `force`
   * it is replaced only if it holds a provenance file written by this program (else
   * OutputExists, so a folder of the user's is never deleted).
   */
  ResultFolder(std::filesystem::path target, bool force);
  ~ResultFolder(); ///< removes the staging folder unless commit() ran
  ResultFolder(const ResultFolder&) = delete;
  ResultFolder& operator=(const ResultFolder&) = delete;

  /// Where to write now.
  const std::filesystem::path& staging() const { return staging_; }
  const std::filesystem::path& target() const { return target_; }
  /// Move the finished result into place (replacing an old result when forced).
  void commit();

private:
  std::filesystem::path target_, staging_;
  bool replace_ = false, committed_ = false;
};

/// Elapsed model time in natural units: "3.2 days", "41 yr", "12.5 kyr", "1.2 Myr".
std::string natural_time(double seconds);
} // namespace emberlith
