// Benchmark of the dynamics core on the cases of the SciPy reference program the README's
// "Speed" section compares with (written for the comparison; not part of this repository).
//
//   bench_tether p1 N [method]   the reference program's case: Earth (WGS 84), fibre 1300 kg/m^3,
//                                630 GPa, 63 GPa, safety factor 2, constant-stress taper to
//                                100,000 km, base area 20000*9.80665/31.5e9 m^2, counterweight
//                                from the design, N equal elements, no damping, east-west
//                                displacement 10 km sin(pi s / L), one simulated day, rtol 1e-6,
//                                atol 1e-3 m and 1e-6 m/s.
//   bench_tether p2 N [method]   a study mesh: the same tether with N elements graded
//                                geometrically from 1 km at the ground, Kelvin-Voigt damping
//                                (retardation time 0.1 s), the same perturbation, one day.
// Prints steps, right-hand-side and Jacobian evaluations and wall time; a measurement, not a
// test. Run on an idle machine; compare side by side with the reference program.
#include <chrono>
#include <cstdio>
#include <string>

#include "solver/integration/initial_state.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"

using namespace hawser;

namespace {
struct NullSink : OutputSink {
  double last_uy_top = 0.0, max_uy = 0.0;
  const Mesh* mesh = nullptr;
  void record(double, const Matrix3X& x, const Matrix3X&, const TetherDiagnostics&) override {
    last_uy_top = x(1, x.cols() - 1) - mesh->position(1, x.cols() - 1);
    max_uy = 0.0;
    for (Eigen::Index k = 0; k < x.cols(); ++k) max_uy = std::max(max_uy, std::abs(x(1, k)));
  }
};
}  // namespace

int main(int argc, char** argv) {
  if (argc < 3) {
    std::fprintf(stderr, "usage: bench_tether p1|p2 N [bdf|adams|erk|esdirk] [rtol] [max order]\n");
    return 2;
  }
  const std::string which = argv[1];
  const int n = std::stoi(argv[2]);
  const std::string method = argc > 3 ? argv[3] : "bdf";
  const std::string rtol = argc > 4 ? argv[4] : "1e-6";
  std::string text =
      "name: peer benchmark case\n"
      "planet: earth\n"
      "material: {density: 1300, youngs_modulus: 630 GPa, ultimate_strength: 63 GPa, damping_time: " +
      std::string(which == "p2" ? "0.1" : "0") +
      "}\n"
      "tether: {profile: constant_stress, safety_factor: 2, base_design_load: 196133 N, top_altitude: 100000 km,\n"
      "         section: {shape: ribbon, width_to_thickness: 1000}}\n"
      "counterweight: {mass: computed}\n"
      "anchor: {latitude: 0, longitude: 0}\n"
      "mesh: {elements: " +
      std::to_string(n) + (which == "p2" ? ", grading: geometric, first_element_length: 1 km" : "") +
      "}\n"
      "simulation: {duration: 1 d, output_interval: 1 d, method: " +
      method + ", rtol: " + rtol +
      ", atol_position: 1e-3, atol_velocity: 1e-6}\n"
      "initial: {displacements: [{direction: east, amplitude: 10 km}]}\n";
  const Scenario sc = load_scenario_text(text, "bench.yaml", {});
  const TetherModel model = build_model(sc);
  TetherSystem sys(model);
  const std::vector<double> y0 = initial_state(sys, sc.initial);
  RunOptions opt = run_options(sc.simulation, sys.layout());
  if (argc > 5) opt.integrator.max_order = std::stoi(argv[5]);
  if (argc > 6) opt.integrator.stability_limit_detection = std::string(argv[6]) == "sld";
  NullSink sink;
  sink.mesh = &model.mesh;
  const auto t0 = std::chrono::steady_clock::now();
  const RunSummary s = run_simulation(sys, y0, opt, sink);
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  std::printf("%s N=%d %s rtol %s: %s, %ld steps, %ld rhs, %ld jac, %ld setups, %ld etf, %ld nlf, wall %.3f s, "
              "%.2f us/step, %ld nni, top u_y %.3f m\n",
              which.c_str(), n, method.c_str(), rtol.c_str(), to_string(s.status), s.stats.steps, s.stats.rhs_evals,
              s.stats.jac_evals, s.stats.linear_setups, s.stats.error_test_failures, s.stats.nonlinear_failures, wall,
              1e6 * wall / std::max(1L, s.stats.steps), s.stats.nonlinear_iterations, sink.last_uy_top);
  return s.status == RunStatus::complete ? 0 : 1;
}
