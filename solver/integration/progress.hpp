#pragma once
// A one-line progress report on a terminal: simulated time, percent done, steps, and the
// estimated wall time left. Silent when standard error is not a terminal.
#include <chrono>

namespace hawser {

class Progress {
 public:
  Progress(double t_end_s, bool enabled);
  void update(double t_s, long steps);
  void finish();

 private:
  double t_end_;
  bool enabled_;
  bool printed_ = false;
  std::chrono::steady_clock::time_point start_, last_;
};

/// True if standard error is a terminal.
bool stderr_is_terminal();

}  // namespace hawser
