// Time-domain checks of the planet tether: equilibrium, conservation laws.
#include <catch2/catch.hpp>

#include <cmath>

#include "memory_sink.hpp"
#include "solver/initial_state.hpp"
#include "solver/scenario.hpp"
#include "solver/simulation.hpp"

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
  const Scenario sc = load_scenario(kDemo, {"simulation.duration=1 d", "simulation.output_interval=1 h",
                                            "mesh.elements=100", "initial.displacements=[]"});
  testing::MemorySink sink;
  TetherModel model;
  const RunSummary s = run(sc, sink, model);
  REQUIRE(s.status == "complete");
  const double length = (model.mesh.position.col(model.nodes() - 1) - model.mesh.position.col(0)).norm();
  double worst = 0.0;
  for (const auto& x : sink.x) worst = std::max(worst, (x - model.mesh.position).cwiseAbs().maxCoeff());
  INFO("largest displacement " << worst << " m, steps " << s.stats.steps);
  CHECK(worst < 1e-6 * length);
  CHECK(sink.t.back() == Approx(86400.0));
}
