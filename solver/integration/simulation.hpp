#pragma once
// Drives one time-domain run: integrates the tether system from its initial state to the
// end time, hands every output (at fixed intervals, by the integrator's interpolation) to a
// sink, stops at event times so no step straddles a discontinuity, watches for elements
// reaching their ultimate strength (a root function), and keeps the run's summary. An
// integrator failure ends the run with status "failed" and everything recorded so far kept.
#include <string>
#include <vector>

#include "solver/input/scenario.hpp"
#include "solver/integration/energy_budget.hpp"
#include "solver/integration/tether_system.hpp"
#include "solver/integration/time_integrator.hpp"

namespace hawser {

struct RuptureEvent {
  double time_s;
  std::size_t element;
  double stress_pa;
};

struct RunSummary {
  std::string status = "running";   // complete | stopped | failed
  std::string message;
  double end_time_s = 0.0;
  SolverStats stats;
  double wall_s = 0.0;
  std::size_t outputs = 0;
  double peak_tension_n = 0.0, peak_tension_time_s = 0.0;
  std::size_t peak_tension_element = 0;
  double min_safety_factor = 1e300, min_safety_factor_time_s = 0.0;
  std::size_t min_safety_factor_element = 0;
  double peak_east_west_m = 0.0, peak_east_west_time_s = 0.0;    // largest |u_y|
  std::size_t peak_east_west_node = 0;
  double peak_north_south_m = 0.0, peak_north_south_time_s = 0.0;  // largest |u_z|
  std::size_t peak_north_south_node = 0;
  std::vector<RuptureEvent> ruptures;
  long failure_node = -1;            // where the integrator's local error was largest (-1: n/a)
  std::size_t max_slack_elements = 0;
  double first_slack_time_s = -1.0;   // -1: never slack
  EnergyBalance energy;              // the energy budget over the outputs
};

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

/// When the driver flushes the sink: after a wall-time interval (and optionally every so many
/// outputs). Each flush writes what was recorded since the last one, so it costs little,
/// and a killed run loses at most one interval of wall time.
struct FlushPolicy {
  double wall_interval_s = 10.0;   // [s] of wall time
  int every_outputs = 0;           // 0: by wall time only
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
