// Benchmark: what the environment (drag, winds, gusts, turbulence) costs a run, against calm air.
//
// Problem: scenarios/demo.yaml (the demonstration tether: 200 geometrically graded elements,
// the first 20 km long; the lower half displaced 10 km east at the start; a 20 t climber) run
// for a shortened time (default 2 h), twice:
//   calm:  the scenario as it is (no air);
//   storm: the same scenario with the `environment:` section of scenarios/storm.yaml added
//          (U.S. Standard Atmosphere 1976, a jet-stream wind table, two 1-cosine gusts and
//          Dryden turbulence at five altitude stations), with demo.yaml's tolerances.
// Solver: CVODE BDF (order <= 2), the structured Newton solver, rtol 1e-6, atol_velocity
// 1e-4 m/s (demo.yaml's). Goal (issue text): the storm run at most twice as slow as the calm one.
//
//   bench_environment [--scenarios DIR] [--hours H] [--repeat K] [--set KEY=VALUE]... [--storm-set KEY=VALUE]...
//     DIR   folder holding demo.yaml and storm.yaml (default: the source tree's scenarios/)
//     H     simulated hours (default 2)
//     K     runs of each case, alternated, the best wall time kept (default 3)
//     --set applies to both cases, --storm-set to the storm case only (same syntax as hawser run)
// Prints each run's solver statistics and wall time, then the best of each case and the
// ratios storm / calm of wall time, steps and wall time per step.
// A measurement, not a test: the machine's other work stretches wall times, hence the best of K.
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <fstream>
#include <limits>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "solver/integration/initial_state.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"

using namespace hawser;

namespace {

/// Records nothing: the benchmark times the integration, not the writing of results.
struct NullSink : OutputSink {
  void record(double, const Matrix3X&, const Matrix3X&, const TetherDiagnostics&) override {}
};

std::string read_text(const std::string& path) {
  std::ifstream in(path);
  if (!in) throw std::runtime_error("cannot read " + path);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

/// The top-level `environment:` block of a scenario's text: its key line and every line after
/// it up to the next top-level key (a line starting with neither a space nor '#').
std::string environment_block(const std::string& text) {
  std::istringstream in(text);
  std::string line, out;
  bool inside = false;
  while (std::getline(in, line)) {
    const bool top_level = !line.empty() && line[0] != ' ' && line[0] != '#';
    if (top_level) inside = line.rfind("environment:", 0) == 0;
    if (inside) out += line + "\n";
  }
  if (out.empty()) throw std::runtime_error("storm.yaml has no environment: section");
  return out;
}

/// Source tree's scenarios/ folder, from this file's path (tests/bench/bench_environment.cpp).
std::string default_scenarios_dir() {
  const std::string here = __FILE__;
  const auto cut = here.rfind("tests/bench/");
  return cut == std::string::npos ? "scenarios" : here.substr(0, cut) + "scenarios";
}

struct Timing {
  RunSummary summary;
  double wall_s = 0.0;
};

Timing run_case(const std::string& text, const std::string& name, const std::vector<std::string>& overrides) {
  const Scenario sc = load_scenario_text(text, name, overrides);
  const TetherModel model = build_model(sc);
  TetherSystem sys(model);
  const std::vector<double> y0 = initial_state(sys, sc.initial);
  const RunOptions opt = run_options(sc.simulation, sys.layout());
  NullSink sink;
  const auto t0 = std::chrono::steady_clock::now();
  Timing t;
  t.summary = run_simulation(sys, y0, opt, sink);
  t.wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return t;
}

void print_run(const char* label, int k, const Timing& t) {
  const SolverStats& s = t.summary.stats;
  std::printf("%-5s run %d: %s at %.4g h; %ld steps, %ld rhs, %ld jac, %ld setups, %ld etf, %ld nlf; wall %.3f s, "
              "%.2f us/step\n",
              label, k, to_string(t.summary.status), t.summary.end_time_s / 3600.0, s.steps, s.rhs_evals, s.jac_evals,
              s.linear_setups, s.error_test_failures, s.nonlinear_failures, t.wall_s,
              1e6 * t.wall_s / static_cast<double>(std::max(1L, s.steps)));
  std::fflush(stdout);
}

}  // namespace

int main(int argc, char** argv) {
  std::string dir = default_scenarios_dir(), hours = "2";
  int repeat = 3;
  std::vector<std::string> both, storm_only;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    const bool has_value = i + 1 < argc;
    if (a == "--scenarios" && has_value) {
      dir = argv[++i];
    } else if (a == "--hours" && has_value) {
      hours = argv[++i];
    } else if (a == "--repeat" && has_value) {
      repeat = std::max(1, std::stoi(argv[++i]));
    } else if (a == "--set" && has_value) {
      both.push_back(argv[++i]);
    } else if (a == "--storm-set" && has_value) {
      storm_only.push_back(argv[++i]);
    } else {
      std::fprintf(stderr,
                   "usage: bench_environment [--scenarios DIR] [--hours H] [--repeat K] [--set KEY=VALUE]... "
                   "[--storm-set KEY=VALUE]...\n");
      return 2;
    }
  }
  const std::string calm_text = read_text(dir + "/demo.yaml");
  const std::string storm_text = calm_text + "\n" + environment_block(read_text(dir + "/storm.yaml"));
  std::vector<std::string> calm_set = {"simulation.duration=" + hours + "h"};
  calm_set.insert(calm_set.end(), both.begin(), both.end());
  std::vector<std::string> storm_set = calm_set;
  storm_set.insert(storm_set.end(), storm_only.begin(), storm_only.end());

  std::printf("demo.yaml for %s h, calm and with storm.yaml's environment; best of %d runs each\n", hours.c_str(),
              repeat);
  Timing best_calm, best_storm;
  best_calm.wall_s = best_storm.wall_s = std::numeric_limits<double>::infinity();
  int failures = 0;
  for (int k = 1; k <= repeat; ++k) {  // alternated, so that a busy spell hits both cases alike
    const Timing c = run_case(calm_text, "demo.yaml", calm_set);
    print_run("calm", k, c);
    const Timing s = run_case(storm_text, "demo+storm.yaml", storm_set);
    print_run("storm", k, s);
    failures += (c.summary.status != RunStatus::complete) + (s.summary.status != RunStatus::complete);
    if (c.wall_s < best_calm.wall_s) best_calm = c;
    if (s.wall_s < best_storm.wall_s) best_storm = s;
  }
  const double steps_ratio =
      static_cast<double>(best_storm.summary.stats.steps) / static_cast<double>(std::max(1L, best_calm.summary.stats.steps));
  const double wall_ratio = best_storm.wall_s / best_calm.wall_s;
  std::printf("best: calm %ld steps %.3f s; storm %ld steps %.3f s\n", best_calm.summary.stats.steps, best_calm.wall_s,
              best_storm.summary.stats.steps, best_storm.wall_s);
  std::printf("storm / calm: wall %.2f (goal <= 2), steps %.2f, wall per step %.2f\n", wall_ratio, steps_ratio,
              wall_ratio / steps_ratio);
  return failures == 0 ? 0 : 1;
}
