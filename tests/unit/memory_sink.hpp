#pragma once
// Keeps a run's outputs in memory for the tests.
#include <vector>

#include "solver/integration/simulation.hpp"

namespace hawser::testing {

struct MemorySink : OutputSink {
  std::vector<double> t;
  std::vector<Matrix3X> x, v;
  std::vector<TetherDiagnostics> d;
  bool keep_states = true;
  void record(double ts, const Matrix3X& xs, const Matrix3X& vs, const TetherDiagnostics& ds) override {
    t.push_back(ts);
    if (keep_states) {
      x.push_back(xs);
      v.push_back(vs);
    }
    d.push_back(ds);
  }
};

}  // namespace hawser::testing
