// Benchmark: one climber's full transit from the anchor to the geostationary radius.
//
// Problem: the demo tether (scenarios/demo.yaml: Earth, WGS 84; the invented fibre grade
// kestrel_k100; constant-stress taper to 100,000 km altitude, safety factor 2, base design
// load 196.1 kN; counterweight from the design), N equal elements, at rest at first. A 20 t
// climber leaves the anchor at t = 0, accelerates at 0.5 m/s^2 to 200 km/h along the
// unstretched ribbon, cruises and stops at 35,786 km altitude (the geostationary radius,
// 42,164 km from the centre): 644,204 s of climbing, run for 179 h (7.46 days).
// Equations: the tether's nodes in the rotating frame with the climber's consistent inertia
// (physics.md section 5), (M + m w w^T) a = F + w (F_c - m a_rel), w the climber load's
// weights (models/load_spread.hpp): smooth by default (window half width 1 shortest
// element; stop times only at the ramp ends, 4), or point (--load point: the integrator also
// stops at every node crossing, N + 4 stop times).
// Solver: CVODE BDF (order <= 2) with the structured block-tridiagonal Newton solver, rtol
// 1e-6, atol 1e-3 m and, by default, 1e-4 m/s (the climber rings the ribbon's shortest modes
// near it; at the default 1e-6 m/s the integrator follows those tiny oscillations: measured
// 243,706 steps for the first 12 h at N = 1000, against 68,446 at 1e-4 m/s).
//
//   bench_climber [N ...] [--atol-velocity V] [--hours H] [--load L] [--width W] [--method M]
//     N             element counts (default: 250 500 1000 2000 4000)
//     V             absolute velocity tolerance [m/s] (default 1e-4)
//     H             simulated hours (default 179: the whole transit)
//     L             climber load, smooth or point (default smooth)
//     W             smooth window's half width in shortest elements (default 1)
//     M             simulation.method (default bdf)
// Prints, per N: status, solver statistics, wall and processor time, and what the climber
// did (where it ended, its peak drive force, its largest offsets east and west of the line at
// rest, the top's displacement at the end).
// A measurement, not a test: run it on an idle machine.
#include <chrono>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <string>
#include <vector>

#include "solver/integration/initial_state.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"

using namespace hawser;

namespace {

/// Keeps what the printout needs: the climber's peaks and the last state of the top node.
struct TransitSink : OutputSink {
  const TetherModel* model = nullptr;
  double peak_drive_n = 0.0, east_m = 0.0, west_m = 0.0, last_altitude_m = 0.0;
  Eigen::Vector3d top_u = Eigen::Vector3d::Zero();
  void record(double t, const Matrix3X& x, const Matrix3X& v, const TetherDiagnostics& d) override {
    std::vector<std::vector<double>> rows(10 * model->climbers->climbers().size());
    const TetherState s{t, x, v, model->mesh.node_mass, d.acceleration.cols() ? &d.acceleration : nullptr};
    model->climbers->sample_outputs(s, {}, rows);
    // Rows in ClimberLoad::output_fields order: s, altitude, on_tether, position, velocity,
    // drive_force, coriolis_force, lateral_offset, ...
    last_altitude_m = rows[1][0];
    peak_drive_n = std::max(peak_drive_n, std::abs(rows[5][0]));
    east_m = std::max(east_m, rows[7][0]);
    west_m = std::max(west_m, -rows[7][0]);
    const Eigen::Index top = x.cols() - 1;
    top_u = x.col(top) - model->mesh.position.col(top);
  }
};

std::string scenario_text(int n, const std::string& atol_velocity, const std::string& hours,
                          const std::string& load, const std::string& width, const std::string& method) {
  return "name: climber transit benchmark\n"
         "planet: earth\n"
         "material: kestrel_k100\n"
         "tether: {profile: constant_stress, safety_factor: 2, base_design_load: 196.1 kN, top_altitude: 100000 km,\n"
         "         section: {shape: ribbon, width_to_thickness: 1000}}\n"
         "counterweight: {mass: computed}\n"
         "anchor: {latitude: 0 deg, longitude: -125 deg}\n"
         "mesh: {elements: " +
         std::to_string(n) + ", climber_load: " + load + ", climber_load_width: " + width +
         "}\n"
         "simulation: {duration: " +
         hours + " h, output_interval: 1 h, method: " + method + ", rtol: 1.0e-6, atol_position: 1.0e-3, atol_velocity: " +
         atol_velocity +
         "}\n"
         "climbers:\n"
         "  - {name: transit, mass: 20 t, from: 0 km, to: 35786 km, direction: up, cruise_speed: 200 km/h,\n"
         "     acceleration: 0.5 m/s^2, deceleration: 0.5 m/s^2}\n";
}

}  // namespace

int main(int argc, char** argv) {
  std::vector<int> sizes;
  std::string atol_velocity = "1.0e-4", hours = "179", load = "smooth", width = "1", method = "bdf";
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    if (a == "--atol-velocity" && i + 1 < argc) {
      atol_velocity = argv[++i];
    } else if (a == "--hours" && i + 1 < argc) {
      hours = argv[++i];
    } else if (a == "--load" && i + 1 < argc) {
      load = argv[++i];
    } else if (a == "--width" && i + 1 < argc) {
      width = argv[++i];
    } else if (a == "--method" && i + 1 < argc) {
      method = argv[++i];
    } else if (!a.empty() && a[0] != '-') {
      sizes.push_back(std::stoi(a));
    } else {
      std::fprintf(stderr, "usage: bench_climber [N ...] [--atol-velocity V] [--hours H] [--load smooth|point] [--width W] [--method M]\n");
      return 2;
    }
  }
  if (sizes.empty()) sizes = {250, 500, 1000, 2000, 4000};
  std::printf("climber transit 0 -> 35786 km at 200 km/h, 20 t; %s h simulated; rtol 1e-6, atol 1e-3 m, %s m/s; "
              "climber load %s (half width %s elements); %s\n",
              hours.c_str(), atol_velocity.c_str(), load.c_str(), width.c_str(), method.c_str());
  int failures = 0;
  for (int n : sizes) {
    const Scenario sc = load_scenario_text(scenario_text(n, atol_velocity, hours, load, width, method), "bench_climber.yaml", {});
    const TetherModel model = build_model(sc);
    TetherSystem sys(model);
    const std::vector<double> y0 = initial_state(sys, sc.initial);
    const RunOptions opt = run_options(sc.simulation, sys.layout());
    TransitSink sink;
    sink.model = &model;
    const std::size_t stops = model.climbers->event_times().size();
    const std::clock_t c0 = std::clock();
    const auto t0 = std::chrono::steady_clock::now();
    const RunSummary s = run_simulation(sys, y0, opt, sink);
    const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
    const double cpu = double(std::clock() - c0) / CLOCKS_PER_SEC;
    std::printf("N=%d: %s at %.4g h; %ld steps, %ld rhs, %ld jac, %ld setups, %ld etf, %ld nni, %ld nlf, %zu stop "
                "times; wall %.1f s, cpu %.1f s, %.2f us/step\n",
                n, to_string(s.status), s.end_time_s / 3600.0, s.stats.steps, s.stats.rhs_evals, s.stats.jac_evals,
                s.stats.linear_setups, s.stats.error_test_failures, s.stats.nonlinear_iterations,
                s.stats.nonlinear_failures, stops, wall, cpu, 1e6 * cpu / std::max(1L, s.stats.steps));
    std::printf("      climber at %.1f km altitude; peak drive force %.1f kN; offset from the line at rest up to "
                "%.1f km east and %.1f km west; at the end the top node has moved %.1f km radially, %.1f km east\n",
                sink.last_altitude_m / 1e3, sink.peak_drive_n / 1e3, sink.east_m / 1e3, sink.west_m / 1e3,
                sink.top_u.x() / 1e3, sink.top_u.y() / 1e3);
    std::fflush(stdout);
    if (s.status != RunStatus::complete) ++failures;
  }
  return failures == 0 ? 0 : 1;
}
