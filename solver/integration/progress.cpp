#include "solver/integration/progress.hpp"

#include <unistd.h>

#include <cstdio>

namespace hawser {

bool stderr_is_terminal() { return isatty(fileno(stderr)) != 0; }

Progress::Progress(double t_end_s, bool enabled)
    : t_end_(t_end_s), enabled_(enabled), start_(std::chrono::steady_clock::now()), last_(start_) {}

namespace {
void hms(double s, char* buf, std::size_t n) {
  const long t = static_cast<long>(s + 0.5);
  std::snprintf(buf, n, "%ld:%02ld:%02ld", t / 3600, (t / 60) % 60, t % 60);
}
}  // namespace

void Progress::update(double t, long steps) {
  if (!enabled_) return;
  const auto now = std::chrono::steady_clock::now();
  if (printed_ && now - last_ < std::chrono::milliseconds(500)) return;
  last_ = now;
  printed_ = true;
  const double wall = std::chrono::duration<double>(now - start_).count();
  const double frac = t_end_ > 0 ? t / t_end_ : 1.0;
  char eta[32] = "?";
  if (frac > 1e-6) hms(wall * (1.0 - frac) / frac, eta, sizeof eta);
  std::fprintf(stderr, "\r  t = %.4g h of %.4g h (%5.1f%%), %ld steps, ETA %s   ", t / 3600.0, t_end_ / 3600.0,
               100.0 * frac, steps, eta);
  std::fflush(stderr);
}

void Progress::finish() {
  if (enabled_ && printed_) std::fprintf(stderr, "\n");
}

}  // namespace hawser
