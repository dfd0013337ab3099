// Benchmark: what the loaded static state (solver/assembly/static_solver.hpp) costs, against mesh size.
//
// Problems, each at N elements:
//   climber: scenarios/demo.yaml with a 10 t climber parked at 20,000 km (the case);
//   storm:   scenarios/storm.yaml, the mean wind's static state (a lean of tens of km);
// each built twice, with its load and without (climbers=[] / no winds), the best of K wall
// times kept; the difference is the static solve. Prints Newton iterations, load steps, where
// the continuation's branch folded (if it did) and the relaxation steps past the fold.
//
//   bench_statics N [K]     (N elements, default 1000; K repeats, default 3)
// A measurement, not a test: the machine's other work stretches wall times, hence the best of K.
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <limits>
#include <string>
#include <vector>

#include "solver/input/scenario.hpp"
#include "solver/assembly/tether_model.hpp"

using namespace hawser;

namespace {

struct Timed {
  double wall_s = std::numeric_limits<double>::infinity();
  int iterations = 0, steps = 0, relax = 0;
  double fold = 1.0;
};

Timed best_build(const std::string& file, const std::vector<std::string>& set, int repeat) {
  const Scenario sc = load_scenario(file, set);
  Timed t;
  for (int i = 0; i < repeat; ++i) {
    const auto t0 = std::chrono::steady_clock::now();
    const TetherModel m = build_model(sc);
    t.wall_s = std::min(
        t.wall_s, std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count());
    t.iterations = m.equilibrium.newton_iterations;
    t.steps = m.equilibrium.load_steps;
    t.relax = m.equilibrium.relax_iterations;
    t.fold = m.equilibrium.fold_load_factor;
  }
  return t;
}

/// Source tree's scenarios/ folder, from this file's path (tests/bench/bench_statics.cpp).
std::string scenarios_dir() {
  const std::string here = __FILE__;
  const auto cut = here.rfind("tests/bench/");
  return cut == std::string::npos ? "scenarios/" : here.substr(0, cut) + "scenarios/";
}

}  // namespace

int main(int argc, char** argv) {
  const int n = argc > 1 ? std::atoi(argv[1]) : 1000;
  const int repeat = argc > 2 ? std::atoi(argv[2]) : 3;
  const std::string dir = scenarios_dir();
  const std::string mesh = "mesh.elements=" + std::to_string(n);
  const std::string climber =
      "climbers=[{name: c10, mass: 10 t, from: 20000 km, to: 21000 km, direction: up, "
      "cruise_speed: 200 km/h, "
      "acceleration: 0.1 m/s^2, deceleration: 0.1 m/s^2, start_time: 100 d}]";
  struct Case {
    const char* name;
    std::string file;
    std::vector<std::string> loaded, bare;
  };
  const std::vector<Case> cases{
      {"climber", dir + "demo.yaml", {mesh, climber}, {mesh, "climbers=[]"}},
      {"storm", dir + "storm.yaml", {mesh}, {mesh, "environment.winds=[]"}},
  };
  std::printf("N = %d elements, best of %d\n", n, repeat);
  for (const Case& c : cases) {
    const Timed loaded = best_build(c.file, c.loaded, repeat),
                bare = best_build(c.file, c.bare, repeat);
    std::printf(
        "  %-8s static solve %8.4f s (build %.4f s with it, %.4f s without); %d Newton iterations, "
        "%d load steps, fold at %.4g of the load, %d relaxation steps\n",
        c.name, loaded.wall_s - bare.wall_s, loaded.wall_s, bare.wall_s, loaded.iterations,
        loaded.steps, loaded.fold, loaded.relax);
  }
  return 0;
}
