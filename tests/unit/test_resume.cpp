// Resuming a run from a checkpoint (solver/integration/simulation.hpp, RunCheckpoint): the resumed run
// continues the outputs and applies every event not yet applied, also one that falls at the
// checkpoint's own time.
#include "catch_compat.hpp"

#include <cmath>

#include "solver/integration/initial_state.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"
#include "tests/unit/memory_sink.hpp"

using namespace hawser;

namespace {

// Keeps every checkpoint the driver hands over, as the result recorder would store them.
struct CheckpointSink : testing::MemorySink {
  std::vector<RunCheckpoint> checkpoints;
  void checkpoint(const RunCheckpoint& c) override { checkpoints.push_back(c); }
};

// Total momentum of the free nodes at output i [kg m/s].
Eigen::Vector3d momentum(const TetherModel& model, const testing::MemorySink& s, std::size_t i) {
  Eigen::Vector3d p = Eigen::Vector3d::Zero();
  for (std::size_t k = 1; k + 1 < model.nodes(); ++k)
    p += model.mesh.node_mass[static_cast<Eigen::Index>(k)] * s.v[i].col(static_cast<Eigen::Index>(k));
  return p;
}

}  // namespace

TEST_CASE("a run resumed at the time of a strike still takes the strike", "[resume]") {
  // The taut-string strike of test_environment_runs.cpp: a strike on the middle node at 5 ms,
  // an output time (every 0.25 ms). Until the disturbance reaches a held end, the free nodes'
  // momentum is exactly m dv (Newton's third law, as there).
  const std::string text =
      "material: {density: 1000, youngs_modulus: 1e9, ultimate_strength: 1e15, kind: invented}\n"
      "field: {kind: uniform, gravity: 0, cable_length: 40 m, cable_area: 1 mm^2, far_end: fixed, "
      "pretension: 10}\n"
      "mesh: {elements: 40}\n"
      "simulation: {duration: 0.007, output_interval: 0.00025, method: bdf, rtol: 1e-10, "
      "atol_position: 1e-14, atol_velocity: 1e-12}\n"
      "events:\n  strikes:\n    - {node: 20, time: 0.005, delta_v: [0.3, 0.4, -0.2]}\n";
  const Scenario sc = load_scenario_text(text, "strike.yaml", {});
  const TetherModel model = build_model(sc);
  TetherSystem sys(model);
  RunOptions opt = run_options(sc.simulation, sys.layout());
  opt.flush.every_outputs = 1;  // a checkpoint at every output
  CheckpointSink whole;
  REQUIRE(run_simulation(sys, initial_state(sys, sc.initial), opt, whole).status == RunStatus::complete);
  const Eigen::Vector3d expect = model.mesh.node_mass[20] * Eigen::Vector3d(0.3, 0.4, -0.2);
  REQUIRE((momentum(model, whole, whole.t.size() - 1) - expect).norm() < 1e-9 * expect.norm());

  for (const double t_resume : {0.003, 0.005}) {
    INFO("resumed at t = " << t_resume << " s");
    const auto c = std::find_if(whole.checkpoints.begin(), whole.checkpoints.end(),
                                [&](const RunCheckpoint& k) { return std::abs(k.time_s - t_resume) < 1e-12; });
    REQUIRE(c != whole.checkpoints.end());
    CHECK(c->summary.outputs == static_cast<std::size_t>(std::lround(t_resume / 0.00025)) + 1);
    RunOptions again = opt;
    again.resume = &*c;
    CheckpointSink rest;
    const RunSummary s = run_simulation(sys, {}, again, rest);
    REQUIRE(s.status == RunStatus::complete);
    // The outputs continue where the checkpoint left them, and the summary counts them all.
    REQUIRE(!rest.t.empty());
    CHECK(rest.t.front() == Approx(t_resume + 0.00025).epsilon(1e-12));
    CHECK(rest.t.size() + c->summary.outputs == whole.t.size());
    CHECK(s.outputs == whole.t.size());
    // The strike is in the resumed run: its momentum afterwards is m dv.
    const Eigen::Vector3d p = momentum(model, rest, rest.t.size() - 1);
    CHECK((p - expect).norm() < 1e-9 * expect.norm());
    // And its state agrees with the uninterrupted run's to the tolerances' scale.
    const std::size_t last = rest.t.size() - 1;
    CHECK((rest.x[last] - whole.x[whole.t.size() - 1]).cwiseAbs().maxCoeff() < 1e-9);
  }
}
