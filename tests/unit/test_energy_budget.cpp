// The energy budget (solver/integration/energy_budget.hpp) against closed forms on the
// uniform-field test bench:
//   1. the work of a constant force booked through the ForceModel hook (work_channels) is
//      F . (x(t) - x(0)), the work of a constant force along any path (Goldstein, Classical
//      Mechanics, 3rd ed., section 1.2: a constant force derives from the potential -F . x);
//   2. the energy dissipated by a Kelvin-Voigt bar holding one mass is that of the linear
//      damped oscillator m u'' + c u' + k u = 0 started with velocity v0 at u = 0,
//        u = (v0 / wd) e^(-zeta wn t) sin(wd t),  D(t) = m v0^2 / 2 - k u^2 / 2 - m u'^2 / 2
//      (Den Hartog, Mechanical Vibrations, 4th ed., section 2.6, damped free vibration;
//      recalled from memory, the solution is checked by substitution in the test comment);
//   3. a strike on a node at rest gives it the kinetic energy m dv^2 / 2, booked as "strikes".
// Each checks the budget's residual too. The cables are invented test values.
#include "catch_compat.hpp"

#include <cmath>
#include <memory>

#include "bench_helpers.hpp"
#include "solver/integration/energy_budget.hpp"

using namespace hawser;
using namespace hawser::testing::bench;

namespace {

/// A constant force on one node, its work booked under "push" by the default work_power.
class ConstantPush : public ForceModel {
 public:
  ConstantPush(std::size_t node, const Eigen::Vector3d& f_n) : node_(node), f_(f_n) {}
  std::string name() const override { return "constant push"; }
  void add_forces(const TetherState&, Matrix3X& f) const override {
    f.col(static_cast<Eigen::Index>(node_)) += f_;
  }
  void add_jacobian(const TetherState&, NodeJacobian&) const override {}
  std::vector<std::string> work_channels() const override { return {"push"}; }

 private:
  std::size_t node_;
  Eigen::Vector3d f_;
};

/// The same force, its work left unbooked (a model that forgot the hook).
class UnbookedPush : public ConstantPush {
 public:
  using ConstantPush::ConstantPush;
  std::vector<std::string> work_channels() const override { return {}; }
};

struct Run {
  Scenario scenario;
  TetherModel model;
  testing::MemorySink sink;
  RunSummary summary;
  std::vector<std::string> channels;
};

std::unique_ptr<Run> run_with(const BenchSpec& spec, std::shared_ptr<ForceModel> extra) {
  auto r = std::make_unique<Run>();
  r->scenario = load_scenario_text(scenario_text(spec), "bench.yaml", {});
  r->model = build_model(r->scenario);
  if (extra) r->model.body.push_back(std::move(extra));
  TetherSystem sys(r->model);
  r->channels = sys.work_channels();
  const std::vector<double> y0 = initial_state(sys, r->scenario.initial);
  RunOptions opt = run_options(r->scenario.simulation, sys.layout());
  r->summary = run_simulation(sys, y0, opt, r->sink);
  return r;
}

}  // namespace

TEST_CASE("a constant force's booked work is F . displacement, and the budget closes", "[energy]") {
  // Taut string (T = 10 N, mu = 1e-3 kg/m, L = 1 m: f1 = 50 Hz), 20 elements, pushed east at
  // its middle node by 1 mN from rest: it swings about the shifted static shape (about 25 um).
  BenchSpec s;
  s.length_m = 1.0;
  s.far_end_fixed = true;
  s.pretension_n = 10.0;
  s.elements = 20;
  s.duration_s = 0.1;  // five periods of the fundamental
  s.output_interval_s = 2e-4;
  s.rtol = 1e-9;
  const Eigen::Vector3d f(0.0, 1e-3, 0.0);
  const auto r = run_with(s, std::make_shared<ConstantPush>(10, f));
  REQUIRE(r->summary.status == RunStatus::complete);
  REQUIRE(r->channels == std::vector<std::string>{"push"});
  double worst = 0.0, largest = 0.0;
  for (std::size_t i = 0; i < r->sink.t.size(); ++i) {
    const double exact = f.dot(r->sink.x[i].col(10) - r->sink.x[0].col(10));
    worst = std::max(worst, std::abs(r->sink.d[i].work_j[0] - exact));
    largest = std::max(largest, std::abs(exact));
  }
  INFO("largest work " << largest << " J; largest |booked - F . dx| " << worst << " J");
  CHECK(largest > 1e-8);  // about F times 50 um: the push did work
  CHECK(worst <= 1e-6 * largest);
  INFO("residual " << r->summary.energy.residual_j << " J of " << r->summary.energy.exchanged_j
                    << " J");
  CHECK(r->summary.energy.exchanged_j >= largest);
  CHECK(r->summary.energy.residual_fraction() < 1e-6);
}

TEST_CASE("Kelvin-Voigt dissipation of a one-mass oscillator matches the damped oscillator's",
          "[energy]") {
  // One element hanging under gravity, its free end the only mass m = rho A L / 2; stiffness
  // k = EA / L0. tau = 2 zeta / wn gives the damping ratio zeta = 0.05 (c = tau k). The kick
  // v0 = 1 mm/s swings it by about 0.7 um about a static stretch of about 4.9 um: always taut,
  // so the bar's force k u + c u' is exactly linear in the motion along it.
  BenchSpec s;
  s.gravity_m_s2 = 9.81;
  s.length_m = 1.0;
  s.far_end_fixed = false;
  s.elements = 1;
  const double ea = s.youngs_modulus_pa * s.area_m2;
  const double m_guess = s.density_kg_m3 * s.area_m2 * s.length_m / 2.0;
  const double zeta = 0.05, wn_guess = std::sqrt(ea / s.length_m / m_guess);
  s.damping_time_s = 2.0 * zeta / wn_guess;
  const double v0 = 1e-3;
  s.initial_yaml = kick_entries(0, {0.0, v0}, 1, 1);
  s.duration_s = 12.0 * 2.0 * pi / wn_guess;
  s.output_interval_s = s.duration_s / 600.0;
  s.rtol = 1e-10;
  s.atol_position_m = 1e-15;
  s.atol_velocity_m_s = 1e-12;
  const auto r = run_with(s, nullptr);
  REQUIRE(r->summary.status == RunStatus::complete);
  const double m = r->model.mesh.node_mass[1];
  const double k = ea / r->model.equilibrium.l0_m[0];
  const double c = s.damping_time_s * k;
  const double wn = std::sqrt(k / m), z = c / (2.0 * m * wn), wd = wn * std::sqrt(1.0 - z * z);
  // u = A e^(-z wn t) sin(wd t), A = v0 / wd: u(0) = 0, u'(0) = A wd = v0; substituting,
  // u'' + 2 z wn u' + wn^2 u = 0 holds term by term.
  double worst = 0.0;
  for (std::size_t i = 0; i < r->sink.t.size(); ++i) {
    const double t = r->sink.t[i], e = std::exp(-z * wn * t), a = v0 / wd;
    const double u = a * e * std::sin(wd * t);
    const double ud = a * e * (wd * std::cos(wd * t) - z * wn * std::sin(wd * t));
    const double dissipated = 0.5 * m * v0 * v0 - 0.5 * k * u * u - 0.5 * m * ud * ud;
    worst = std::max(worst, std::abs(r->sink.d[i].dissipated_j - dissipated));
  }
  const double total = 0.5 * m * v0 * v0;
  INFO("kinetic energy given " << total << " J; dissipated at the end "
                               << r->sink.d.back().dissipated_j
                               << " J; largest error " << worst << " J");
  // After 12 periods e^(-2 z wn t) = e^(-0.2 * 12 pi) leaves about 5e-4 of it.
  CHECK(r->sink.d.back().dissipated_j > 0.99 * total);
  CHECK(worst <= 1e-4 * total);
  CHECK(r->summary.energy.residual_fraction() < 1e-5);
}

TEST_CASE("a strike's booked energy is the kinetic energy it gives", "[energy]") {
  // The taut string of the first case, at rest, struck at its node 5 at t = 10 ms with
  // dv = 0.1 m/s east: the node was at rest, so the energy given is m dv^2 / 2 exactly.
  BenchSpec s;
  s.far_end_fixed = true;
  s.pretension_n = 10.0;
  s.elements = 20;
  s.duration_s = 0.03;
  s.output_interval_s = 1e-3;
  s.rtol = 1e-9;
  auto r = std::make_unique<Run>();
  const std::string strike =
      "events:\n  strikes:\n    - {node: 5, time: 0.01, delta_v: [0, 0.1, 0]}\n";
  r->scenario = load_scenario_text(scenario_text(s) + strike, "bench.yaml", {});
  r->model = build_model(r->scenario);
  TetherSystem sys(r->model);
  REQUIRE(sys.work_channels() == std::vector<std::string>{"strikes"});
  const std::vector<double> y0 = initial_state(sys, r->scenario.initial);
  r->summary = run_simulation(sys, y0, run_options(r->scenario.simulation, sys.layout()), r->sink);
  REQUIRE(r->summary.status == RunStatus::complete);
  const double given = 0.5 * r->model.mesh.node_mass[5] * 0.1 * 0.1;
  CHECK(r->sink.d.front().work_j[0] == 0.0);
  CHECK(r->sink.d.back().work_j[0] == Approx(given).epsilon(1e-12));
  INFO("residual " << r->summary.energy.residual_j << " J of " << r->summary.energy.exchanged_j
                    << " J");
  CHECK(r->summary.energy.residual_fraction() < 1e-6);
}

TEST_CASE("the balance's residual, exchange and flag from given terms", "[energy]") {
  // Hand-worked: from E(0) = K 10 + P -100 + S 5 + C 0 J, a state with K 40, P -90, S 5, C 0,
  // work 30 J and dissipation 4 J: change 40 J, residual 40 - 30 + 4 = 14 J; exchanged
  // (30 + 10 + 0 + 0 + 30 + 4) / 2 = 37 J; 14 / 37 is above the 1 % limit.
  TetherDiagnostics d0, d1;
  d0.kinetic_j = 10, d0.potential_j = -100, d0.strain_j = 5, d0.work_j = {0.0};
  d1.kinetic_j = 40, d1.potential_j = -90, d1.strain_j = 5, d1.work_j = {30.0}, d1.dissipated_j = 4;
  EnergyBalance b;
  b.observe(0.0, d0);
  CHECK(b.residual_j == 0.0);
  b.observe(7.0, d1);
  CHECK(b.residual_j == Approx(14.0).epsilon(1e-15));
  CHECK(b.residual_time_s == 7.0);
  CHECK(b.exchanged_j == Approx(37.0).epsilon(1e-15));
  CHECK(b.residual_fraction() == Approx(14.0 / 37.0).epsilon(1e-15));
  CHECK(b.above_limit());
  // The same with 43.9 J of work booked: residual 0.1 J, 0.1 / 43.95 < 1 %: not flagged.
  d1.work_j = {43.9};
  EnergyBalance c;
  c.observe(0.0, d0);
  c.observe(7.0, d1);
  CHECK(c.residual_j == Approx(0.1).epsilon(1e-12));
  CHECK(c.exchanged_j == Approx(43.95).epsilon(1e-15));
  CHECK_FALSE(c.above_limit());
}

TEST_CASE("a force whose work is not booked makes the budget flag its run", "[energy]") {
  // The first case's push without its channel: the string's energy changes by F . dx with
  // nothing to explain it, so the residual is the whole exchange (fraction about 1).
  BenchSpec s;
  s.far_end_fixed = true;
  s.pretension_n = 10.0;
  s.elements = 20;
  s.duration_s = 0.02;
  s.output_interval_s = 1e-3;
  const auto r = run_with(s, std::make_shared<UnbookedPush>(10, Eigen::Vector3d(0.0, 1e-3, 0.0)));
  REQUIRE(r->summary.status == RunStatus::complete);
  REQUIRE(r->channels.empty());
  INFO("residual " << r->summary.energy.residual_j << " J of " << r->summary.energy.exchanged_j
                    << " J");
  CHECK(r->summary.energy.residual_fraction() > 0.5);
  CHECK(r->summary.energy.above_limit());
}
