#pragma once
// The run's peaks, kept from every output: tension, smallest safety factor, east-west and
// north-south offsets from the starting static state, slack elements.
#include "solver/assembly/tether_model.hpp"
#include "solver/integration/run_summary.hpp"
#include "solver/integration/tether_system.hpp"

namespace hawser {

class SummaryKeeper {
 public:
  SummaryKeeper(const TetherModel& m, RunSummary& s) : model_(m), s_(s) {}
  /// One output: positions x of all nodes [m] and the diagnostics at t [s].
  void observe(double t_s, const Matrix3X& x, const TetherDiagnostics& d);

 private:
  const TetherModel& model_;
  RunSummary& s_;
};

}  // namespace hawser
