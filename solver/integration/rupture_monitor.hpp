#pragma once
// Elements reaching their ultimate strength: the integrator's root function finds the crossing
// time; this records each rupture in the summary and says whether the run stops
// (simulation.stop_on_rupture).
#include <string>

#include "solver/integration/run_summary.hpp"
#include "solver/integration/tether_system.hpp"

namespace hawser {

class RuptureMonitor {
 public:
  RuptureMonitor(double ultimate_strength_pa, bool stop_on_rupture, RunSummary& summary)
      : strength_pa_(ultimate_strength_pa), stop_(stop_on_rupture), s_(summary) {}

  /// The starting state: one already past the strength has no crossing for the root function
  /// to find, so it is a rupture at t = 0. True when the run stops.
  bool at_start(const TetherDiagnostics& d0) {
    if (d0.max_stress_ratio < 1.0) return false;
    return record(0.0, d0, "element " + std::to_string(d0.max_stress_element) +
                               " is past its ultimate strength in the starting state");
  }
  /// A crossing found at t [s]; d: the diagnostics there. True when the run stops.
  bool crossed(double t_s, const TetherDiagnostics& d) {
    return record(t_s, d, "element " + std::to_string(d.max_stress_element) +
                              " reached its ultimate strength at t = " + std::to_string(t_s) +
                              " s");
  }

 private:
  bool record(double t_s, const TetherDiagnostics& d, const std::string& message) {
    s_.ruptures.push_back({t_s, d.max_stress_element, d.max_stress_ratio * strength_pa_});
    if (!stop_) return false;
    s_.status = RunStatus::stopped;
    s_.message = message;
    return true;
  }

  double strength_pa_;
  bool stop_;
  RunSummary& s_;
};

}  // namespace hawser
