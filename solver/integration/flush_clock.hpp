#pragma once
// When the run driver publishes what it has recorded (FlushPolicy): after a wall-time
// interval, and optionally every so many outputs. Each flush writes only what was recorded
// since the last, so it costs little, and a killed run loses at most one interval.
#include <chrono>

namespace hawser {

/// When the driver flushes the sink: after a wall-time interval (and optionally every so many
/// outputs).
struct FlushPolicy {
  double wall_interval_s = 10.0;   // [s] of wall time
  int every_outputs = 0;           // 0: by wall time only
};

class FlushClock {
 public:
  explicit FlushClock(const FlushPolicy& p) : policy_(p), last_(std::chrono::steady_clock::now()) {}
  /// Counts one output; true when a flush is due after it.
  bool output_recorded() {
    ++since_;
    const double wall_s =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - last_).count();
    return wall_s >= policy_.wall_interval_s ||
           (policy_.every_outputs > 0 && since_ >= policy_.every_outputs);
  }
  /// A flush happened now.
  void flushed() {
    since_ = 0;
    last_ = std::chrono::steady_clock::now();
  }

 private:
  FlushPolicy policy_;
  std::chrono::steady_clock::time_point last_;
  int since_ = 0;
};

}  // namespace hawser
