#pragma once
// Drives one time-domain run: integrates the tether system from its initial state to the
// end time and hands every output (at fixed intervals, by the integrator's interpolation) to a
// sink. Its parts, each in a file of its own: the stop times and scheduled changes
// (event_schedule.hpp), when to publish (flush_clock.hpp), elements reaching their ultimate
// strength (rupture_monitor.hpp), the peaks (summary_keeper.hpp). An integrator failure ends
// the run with status failed and everything recorded so far kept.
#include <string>
#include <vector>

#include "solver/input/scenario.hpp"
#include "solver/integration/flush_clock.hpp"
#include "solver/integration/run_summary.hpp"
#include "solver/integration/tether_system.hpp"
#include "solver/integration/time_integrator.hpp"

namespace hawser {

/// Where a run can be continued from: the state at the last output, what comes next and
/// the summary so far. Nothing else is needed: forcing (winds, turbulence series drawn from
/// their seed at set-up, gusts, climbers' profiles, cuts) is a function of time, and strikes
/// before `time_s` are in the state already.
struct RunCheckpoint {
  double time_s = 0.0;             // an output time
  std::vector<double> state;       // y(time_s), the integrator's layout
  long next_output = 1;            // index k of the next output time k * output_interval
  RunSummary summary;              // peaks and counts up to and including time_s
};

/// Receives the outputs of a run (the HDF5 recorder; tests keep them in memory).
class OutputSink {
 public:
  virtual ~OutputSink() = default;
  /// x, v: all nodes [m, m/s]; u = x - equilibrium.
  virtual void record(double t_s, const Matrix3X& x, const Matrix3X& v, const TetherDiagnostics& d) = 0;
  /// Keep `c` with the next flush (called just before flush(), after an output).
  virtual void checkpoint(const RunCheckpoint& /*c*/) {}
  /// Make what was recorded durable.
  virtual void flush() {}
};

struct RunOptions {
  double duration_s = 0.0;
  double output_interval_s = 0.0;
  IntegratorOptions integrator;
  bool stop_on_rupture = true;
  FlushPolicy flush;
  std::vector<double> event_times_s;  // stop times (discontinuities of the forcing)
  bool progress = false;              // one-line progress on the terminal
  const RunCheckpoint* resume = nullptr;  // continue from here instead of t = 0
};

/// Integrator options from a scenario's simulation block (tolerances per state component).
RunOptions run_options(const SimulationSpec& sim, const StateLayout& layout);

/// Runs from y0 at t = 0, or from options.resume (then y0 is not used).
RunSummary run_simulation(TetherSystem& system, const std::vector<double>& y0, const RunOptions& options,
                          OutputSink& sink);

}  // namespace hawser
