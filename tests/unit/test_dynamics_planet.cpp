// Time-domain checks of the planet tether: equilibrium, conservation laws.
#include "catch_compat.hpp"

#include <cmath>

#include "memory_sink.hpp"
#include "solver/integration/initial_state.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"

using namespace hawser;

namespace {
const std::string kDemo = std::string(HAWSER_SOURCE_DIR) + "/scenarios/demo.yaml";

RunSummary run(const Scenario& sc, testing::MemorySink& sink, TetherModel& model_out) {
  model_out = build_model(sc);
  TetherSystem sys(model_out);
  const std::vector<double> y0 = initial_state(sys, sc.initial);
  const RunOptions opt = run_options(sc.simulation, sys.layout());
  return run_simulation(sys, y0, opt, sink);
}
}  // namespace

TEST_CASE("equilibrium holds for a simulated day", "[dynamics]") {
  // physics.md section 3: started at the exact discrete equilibrium, no node moves more than
  // 1e-6 of the tether length in one day (issue acceptance figure).
  const Scenario sc = load_scenario(kDemo, {"climbers=[]", "simulation.duration=1 d", "simulation.output_interval=1 h",
                                            "mesh.elements=100", "initial.displacements=[]"});
  testing::MemorySink sink;
  TetherModel model;
  const RunSummary s = run(sc, sink, model);
  REQUIRE(s.status == RunStatus::complete);
  const double length = (model.mesh.position.col(model.nodes() - 1) - model.mesh.position.col(0)).norm();
  double worst = 0.0;
  for (const auto& x : sink.x) worst = std::max(worst, (x - model.mesh.position).cwiseAbs().maxCoeff());
  INFO("largest displacement " << worst << " m, steps " << s.stats.steps);
  CHECK(worst < 1e-6 * length);
  CHECK(sink.t.back() == Approx(86400.0));
}

namespace {
// Jacobi integral of a run: rotating-frame kinetic + effective potential + strain energy.
double jacobi(const TetherDiagnostics& d) { return d.kinetic_j + d.potential_j + d.strain_j; }

struct EnergyDrift {
  double drift;        // largest |H(t) - H(0)| over the run [J]
  double perturbation; // H(0) - H(equilibrium) [J]
  long steps;
};

EnergyDrift energy_drift(const std::string& rtol, const std::string& method) {
  const Scenario sc = load_scenario(kDemo, {"climbers=[]", "simulation.duration=1 d", "simulation.output_interval=30 min",
                                            "mesh.elements=40", "mesh.grading=uniform", "material.damping_time=0",
                                            "simulation.rtol=" + rtol, "simulation.atol_position=1e-6",
                                            "simulation.atol_velocity=1e-9", "simulation.method=" + method});
  testing::MemorySink sink;
  sink.keep_states = false;
  TetherModel model;
  const RunSummary s = run(sc, sink, model);
  REQUIRE(s.status == RunStatus::complete);
  TetherSystem sys(model);
  const std::vector<double> at_rest(sys.size(), 0.0);
  const double h_eq = jacobi(sys.diagnose(0.0, at_rest.data()));
  EnergyDrift e{0.0, jacobi(sink.d.front()) - h_eq, s.stats.steps};
  for (const auto& d : sink.d) e.drift = std::max(e.drift, std::abs(jacobi(d) - jacobi(sink.d.front())));
  return e;
}
}  // namespace

TEST_CASE("the Jacobi integral is conserved without damping", "[dynamics][conservation]") {
  // physics.md section 8: with no damping and no time-dependent forcing, kinetic energy in the
  // rotating frame + effective potential + strain energy is constant (the Jacobi integral of
  // the restricted problem; Goldstein, Classical Mechanics, on the energy integral in a rotating
  // frame). Issue acceptance: drift below 1% of the perturbation's energy at rtol 1e-8, and
  // shrinking as the tolerance tightens.
  const EnergyDrift loose = energy_drift("1e-6", "bdf");
  const EnergyDrift tight = energy_drift("1e-8", "bdf");
  INFO("perturbation energy " << tight.perturbation << " J; drift " << loose.drift << " J at rtol 1e-6 ("
                              << loose.steps << " steps), " << tight.drift << " J at rtol 1e-8 (" << tight.steps
                              << " steps)");
  REQUIRE(tight.perturbation > 0.0);
  CHECK(tight.drift < 0.01 * tight.perturbation);
  CHECK(tight.drift < loose.drift);
}

TEST_CASE("angular momentum about the spin axis changes only by the anchor's torque", "[dynamics][conservation]") {
  // Newton's second law for rotation in the inertial frame: gravity (point mass, and J2, which
  // is axisymmetric) has no moment about the spin axis, so dL_z/dt is the anchor's torque on the
  // tether (physics.md section 8). With a lateral swing the anchor torque is large; compare the
  // change of L_z with the integrated torque.
  const Scenario sc = load_scenario(kDemo, {"climbers=[]", "simulation.duration=12 h", "simulation.output_interval=30 min",
                                            "mesh.elements=40", "mesh.grading=uniform", "model.j2=true",
                                            "simulation.rtol=1e-8", "simulation.atol_position=1e-6",
                                            "simulation.atol_velocity=1e-9"});
  testing::MemorySink sink;
  sink.keep_states = false;
  TetherModel model;
  const RunSummary s = run(sc, sink, model);
  REQUIRE(s.status == RunStatus::complete);
  double largest_change = 0.0, worst_mismatch = 0.0;
  for (const auto& d : sink.d) {
    const double change = d.angular_momentum_z - sink.d.front().angular_momentum_z;
    largest_change = std::max(largest_change, std::abs(change));
    worst_mismatch = std::max(worst_mismatch, std::abs(change - d.anchor_angular_impulse));
  }
  INFO("largest change of L_z " << largest_change << " kg m^2/s, largest mismatch " << worst_mismatch);
  REQUIRE(largest_change > 0.0);
  CHECK(worst_mismatch < 0.01 * largest_change);
}
