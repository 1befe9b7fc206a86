// One self-overwriting progress line on a terminal (a line per tenth when not a terminal).
#pragma once

#include <chrono>
#include <cstdio>
#include <string>

namespace emberlith
{
class ProgressLine
{
public:
  /// Writes to `stream` (stderr by default); `enabled` false makes it silent.
  explicit ProgressLine(std::string label, bool enabled = true, std::FILE* stream = stderr);
  /// fraction in [0, 1]; `detail` is shown after the bar (e.g. the model time).
  void update(double fraction, const std::string& detail = {});
  /// Finish the line (newline on a terminal).
  void done(const std::string& detail = {});

private:
  std::string label_;
  bool enabled_, tty_;
  std::FILE* stream_;
  int last_tenth_ = -1;
  std::chrono::steady_clock::time_point start_, last_draw_;
};
} // namespace emberlith
