#include "progress_line.h"

#include <unistd.h>

#include <algorithm>
#include <cmath>

namespace emberlith
{
ProgressLine::ProgressLine(std::string label, bool enabled, std::FILE* stream)
  : label_(std::move(label))
  , enabled_(enabled)
  , tty_(isatty(fileno(stream)) != 0)
  , stream_(stream)
  , start_(std::chrono::steady_clock::now())
  , last_draw_(start_)
{
}

void ProgressLine::update(double fraction, const std::string& detail)
{
  if (!enabled_)
    return;
  fraction = std::clamp(fraction, 0.0, 1.0);
  const auto now = std::chrono::steady_clock::now();
  const double elapsed = std::chrono::duration<double>(now - start_).count();
  if (tty_)
  {
    // Redraw at most ten times a second: terminals are slow and the solver is not.
    if (now - last_draw_ < std::chrono::milliseconds(100) && fraction < 1.0)
      return;
    last_draw_ = now;
    constexpr int width = 30;
    const int filled = static_cast<int>(std::lround(fraction * width));
    std::fprintf(stream_, "\r%s [%s%s] %3.0f%%  %s  %.1f s\x1b[K", label_.c_str(),
      std::string(filled, '#').c_str(), std::string(width - filled, '.').c_str(), 100 * fraction,
      detail.c_str(), elapsed);
  }
  else
  {
    const int tenth = static_cast<int>(fraction * 10);
    if (tenth == last_tenth_)
      return;
    last_tenth_ = tenth;
    std::fprintf(stream_, "%s %3d%%  %s  %.1f s\n", label_.c_str(), tenth * 10, detail.c_str(), elapsed);
  }
  std::fflush(stream_);
}

void ProgressLine::done(const std::string& detail)
{
  if (!enabled_)
    return;
  last_draw_ = {};
  update(1.0, detail);
  if (tty_)
    std::fputc('\n', stream_);
}
} // namespace emberlith
