#pragma once
// What a run reports when it ends (and keeps in every checkpoint): how it ended, its peaks,
// the integrator's counters.
#include <string>
#include <vector>

#include "solver/integration/run_status.hpp"
#include "solver/integration/time_integrator.hpp"

namespace hawser {

struct RuptureEvent {
  double time_s;
  std::size_t element;
  double stress_pa;
};

struct RunSummary {
  RunStatus status = RunStatus::running;
  std::string message;
  double end_time_s = 0.0;
  SolverStats stats;
  double wall_s = 0.0;
  std::size_t outputs = 0;
  double peak_tension_n = 0.0, peak_tension_time_s = 0.0;
  std::size_t peak_tension_element = 0;
  double min_tension_n = 1e300, min_tension_time_s = 0.0;  // smallest tension: slack margin
  std::size_t min_tension_element = 0;
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
};

}  // namespace hawser
