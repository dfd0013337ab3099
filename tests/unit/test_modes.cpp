// Modal analysis (solver/integration/modal_analysis.hpp) against closed-form frequencies of classical
// cables on the uniform-field test bench, against finite differences of the force assembly,
// against the structure theory of gyroscopic systems, and against time-domain runs of the
// nonlinear model started in a computed mode.
#include "catch_compat.hpp"

#include <chrono>
#include <cmath>
#include <string>
#include <vector>

#include "memory_sink.hpp"
#include "solver/input/errors.hpp"
#include "solver/integration/modal_analysis.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"

using namespace hawser;

namespace {

constexpr double pi = 3.14159265358979323846;
const std::string kDemo = std::string(HAWSER_SOURCE_DIR) + "/scenarios/demo.yaml";

// Steel of the materials table (config/materials.yaml, ASM Handbook values) on the bench:
// a 10 m cable of 1 mm^2; density 7850 kg/m^3, Young's modulus 205 GPa. No damping.
const double kRho = 7850.0, kE = 205e9, kL = 10.0, kArea = 1e-6;

std::string bench(const std::string& field, int elements) {
  return "name: bench\nmaterial: steel_4340\n"
         "field: {kind: uniform, cable_length: 10 m, cable_area: 1 mm^2, " + field + "}\n"
         "mesh: {elements: " + std::to_string(elements) + "}\n"
         // Tolerances scaled to the check runs' millimetre amplitudes.
         "simulation: {duration: 1 s, output_interval: 0.01 s, method: bdf, rtol: 1.0e-8,\n"
         "             atol_position: 1.0e-12, atol_velocity: 1.0e-10}\n";
}
std::string taut_string(int n) { return bench("gravity: 0, far_end: fixed, pretension: 100 N", n); }
std::string hanging_chain(int n) { return bench("gravity: 9.81 m/s^2, far_end: free", n); }

ModalResult modes_of(const std::string& text, int k, std::vector<std::string> overrides = {}) {
  const TetherModel model = build_model(load_scenario_text(text, "bench.yaml", overrides));
  ModalOptions o;
  o.modes = k;
  return modal_analysis(model, o);
}

/// Angular frequencies [rad/s] of the modes of one kind, lowest first.
std::vector<double> omegas(const ModalResult& r, ModeKind kind) {
  std::vector<double> w;
  for (const Mode& m : r.modes)
    if (m.kind == kind) w.push_back(m.eigenvalue.imag());
  return w;
}

double rel(double a, double b) { return (a - b) / b; }

/// Period [s] of u(t) from its zero crossings (linear interpolation between outputs):
/// twice the mean spacing of successive crossings.
double period_from_zero_crossings(const std::vector<double>& t, const std::vector<double>& u, int& crossings) {
  std::vector<double> tc;
  for (std::size_t i = 1; i < t.size(); ++i)
    if ((u[i - 1] < 0.0) != (u[i] < 0.0)) tc.push_back(t[i - 1] + (t[i] - t[i - 1]) * u[i - 1] / (u[i - 1] - u[i]));
  crossings = static_cast<int>(tc.size());
  if (tc.size() < 2) return 0.0;
  return 2.0 * (tc.back() - tc.front()) / (tc.size() - 1);
}

struct CheckRun {
  double modal_period_s, measured_period_s;
  int crossings;
  double final_amplitude_ratio;  // largest |u| over the last period / amplitude
  double cross_axis_m;           // largest displacement along the axis the mode does not use
};

/// Time-domain run of the nonlinear model from amplitude * (the mode's state at t = 0);
/// the motion of the mode's peak node along the mode's kind.
CheckRun check_run(const Scenario& sc, std::size_t mode_index, double amplitude_m, double periods, int modes_wanted) {
  const TetherModel model = build_model(sc);
  ModalOptions o;
  o.modes = modes_wanted;
  const ModalResult r = modal_analysis(model, o);
  const Mode& mode = r.modes.at(mode_index);
  TetherSystem sys(model);
  const std::vector<double> y0 = mode_initial_state(sys, mode, amplitude_m);
  RunOptions ro = run_options(sc.simulation, sys.layout());
  ro.duration_s = periods * mode.period_s;
  ro.output_interval_s = mode.period_s / 200.0;
  testing::MemorySink sink;
  const RunSummary s = run_simulation(sys, y0, ro, sink);
  REQUIRE(s.status == RunStatus::complete);
  const int axis = static_cast<int>(mode.kind);
  const int other = axis == 2 ? 1 : 2;  // the lateral axis not in the mode (x-y couple by Coriolis)
  std::vector<double> u;
  CheckRun c{mode.period_s, 0.0, 0, 0.0, 0.0};
  for (std::size_t i = 0; i < sink.t.size(); ++i) {
    u.push_back(sink.x[i](axis, mode.peak_node) - model.mesh.position(axis, mode.peak_node));
    c.cross_axis_m = std::max(c.cross_axis_m, (sink.x[i].row(other) - model.mesh.position.row(other)).cwiseAbs().maxCoeff());
    if (sink.t[i] >= sink.t.back() - mode.period_s) c.final_amplitude_ratio = std::max(c.final_amplitude_ratio, std::abs(u.back()));
  }
  c.final_amplitude_ratio /= amplitude_m * std::abs(mode.shape(axis, mode.peak_node));
  c.measured_period_s = period_from_zero_crossings(sink.t, u, c.crossings);
  return c;
}

}  // namespace

TEST_CASE("modes: taut string, beaded-string and continuous frequencies, second-order convergence", "[modes]") {
  // Continuous string fixed at both ends: omega_n = n pi / L sqrt(T / mu) (physics.md section 8;
  // e.g. Kinsler, Frey, Coppens & Sanders, Fundamentals of Acoustics, ch. 2, recalled from memory).
  // N equal lumped masses m = mu h on a string of tension T (Lagrange's beaded string, e.g.
  // French, Vibrations and Waves, ch. 5, recalled from memory):
  //   omega_n = 2 sqrt(T / (m h)) sin(n pi / (2 N)),
  // which the discrete model must reproduce to round-off. T = 100 N (the pretension).
  const double T = 100.0, mu = kRho * kArea;
  double previous_error[3] = {0, 0, 0};
  for (int n_el : {20, 40, 80}) {
    const ModalResult r = modes_of(taut_string(n_el), 6);
    const std::vector<double> ew = omegas(r, ModeKind::east_west), ns = omegas(r, ModeKind::north_south);
    REQUIRE(ew.size() == 3);
    REQUIRE(ns.size() == 3);
    const double h = kL / n_el;
    for (int n = 1; n <= 3; ++n) {
      INFO("N = " << n_el << ", mode " << n);
      const double beaded = 2.0 * std::sqrt(T / (mu * h * h)) * std::sin(n * pi / (2.0 * n_el));
      const double continuous = n * pi / kL * std::sqrt(T / mu);
      CHECK(rel(ew[n - 1], beaded) == Approx(0.0).margin(1e-9));
      CHECK(rel(ns[n - 1], ew[n - 1]) == Approx(0.0).margin(1e-12));  // the two lateral planes are alike
      const double error = std::abs(rel(ew[n - 1], continuous));
      if (n_el >= 40) CHECK(error < 0.005);
      if (previous_error[n - 1] > 0) {
        const double order = std::log2(previous_error[n - 1] / error);
        INFO("observed order " << order);
        CHECK(order > 1.9);
        CHECK(order < 2.1);
      }
      previous_error[n - 1] = error;
    }
    CHECK(r.max_backward_error < 1e-10);
    CHECK(r.stiffness_negative_directions == 0);
  }
}

TEST_CASE("modes: hanging chain, zeros of J0, second-order convergence", "[modes]") {
  // Inextensible chain hanging under gravity g from a fixed point, free at the bottom:
  // omega_n = (j_0,n / 2) sqrt(g / L) (physics.md section 8), with the zeros of J0 from
  // Abramowitz & Stegun, Handbook of Mathematical Functions, Table 9.5:
  const double j0[3] = {2.404825558, 5.520078110, 8.653727913};
  const double g = 9.81;
  double previous_error[3] = {0, 0, 0};
  for (int n_el : {40, 80, 160}) {
    const ModalResult r = modes_of(hanging_chain(n_el), 6);
    const std::vector<double> ew = omegas(r, ModeKind::east_west), ns = omegas(r, ModeKind::north_south);
    REQUIRE(ew.size() == 3);
    REQUIRE(ns.size() == 3);
    for (int n = 1; n <= 3; ++n) {
      INFO("N = " << n_el << ", mode " << n << ": omega " << ew[n - 1]);
      const double exact = 0.5 * j0[n - 1] * std::sqrt(g / kL);
      const double error = std::abs(rel(ew[n - 1], exact));
      CHECK(rel(ns[n - 1], ew[n - 1]) == Approx(0.0).margin(1e-12));
      if (n_el >= 80) CHECK(error < 0.005);
      if (previous_error[n - 1] > 0) {
        const double order = std::log2(previous_error[n - 1] / error);
        INFO("observed order " << order);
        CHECK(order > 1.9);
        CHECK(order < 2.1);
      }
      previous_error[n - 1] = error;
    }
    CHECK(r.max_backward_error < 1e-10);
  }
}

TEST_CASE("modes: fixed-free bar, axial frequencies, second-order convergence", "[modes]") {
  // Prismatic bar fixed at one end, free at the other: omega_n = (2n - 1) pi / (2 L) sqrt(E / rho)
  // (physics.md section 8; e.g. Timoshenko, Vibration Problems in Engineering, longitudinal
  // vibration of prismatic bars, recalled from memory). A bar with no load would be slack in
  // the tension-only model, so it hangs under gravity; its static strain rho g L / E = 3.8e-6
  // changes nothing at the 0.5% level. Its 2N lateral (chain) modes all lie below the first
  // axial one, so 2N + 3 modes are asked for.
  const double c = std::sqrt(kE / kRho);
  double previous_error[3] = {0, 0, 0};
  for (int n_el : {20, 40, 80}) {
    const ModalResult r = modes_of(hanging_chain(n_el), 2 * n_el + 3);
    const std::vector<double> along = omegas(r, ModeKind::along);
    REQUIRE(along.size() == 3);
    for (int n = 1; n <= 3; ++n) {
      INFO("N = " << n_el << ", mode " << n << ": omega " << along[n - 1]);
      const double exact = (2 * n - 1) * pi / (2 * kL) * c;
      const double error = std::abs(rel(along[n - 1], exact));
      if (n_el >= 40) CHECK(error < 0.005);
      if (previous_error[n - 1] > 0) {
        const double order = std::log2(previous_error[n - 1] / error);
        INFO("observed order " << order);
        CHECK(order > 1.9);
        CHECK(order < 2.3);  // mode 1 at N = 80 feels the static strain, 4e-6
      }
      previous_error[n - 1] = error;
    }
    for (const Mode& m : r.modes)
      if (m.kind == ModeKind::along) CHECK(m.kinetic_fraction[0] == Approx(1.0).margin(1e-12));
  }
}

namespace {
// Forces of all models on all nodes at positions x, velocities v.
Matrix3X total_force(const TetherModel& model, const Matrix3X& x, const Matrix3X& v) {
  Matrix3X f = Matrix3X::Zero(3, model.nodes());
  const TetherState s{0.0, x, v, model.mesh.node_mass};
  for (const ForceModel* m : model.forces()) m->add_forces(s, f);
  return f;
}

// Largest difference between K (or G + D) and central differences of -F, relative to the
// largest entry of the finite-difference matrix.
double fd_mismatch(const TetherModel& model, const LinearisedTether& lin, bool wrt_velocity, double h) {
  const Eigen::Index n = static_cast<Eigen::Index>(lin.dofs());
  const Eigen::MatrixXd analytic =
      wrt_velocity ? Eigen::MatrixXd(lin.gyroscopic + lin.damping) : Eigen::MatrixXd(lin.stiffness);
  double diff = 0.0, ref = 0.0;
  for (Eigen::Index j = 0; j < n; ++j) {
    const std::size_t node = lin.first_free + j / 3;
    const int axis = static_cast<int>(j % 3);
    Matrix3X x = model.mesh.position, v = Matrix3X::Zero(3, model.nodes());
    Matrix3X& q = wrt_velocity ? v : x;
    q(axis, node) += h;
    const Matrix3X fp = total_force(model, x, v);
    q(axis, node) -= 2 * h;
    const Matrix3X fm = total_force(model, x, v);
    for (Eigen::Index i = 0; i < n; ++i) {
      const double fd = -(fp(i % 3, lin.first_free + i / 3) - fm(i % 3, lin.first_free + i / 3)) / (2 * h);
      diff = std::max(diff, std::abs(fd - analytic(i, j)));
      ref = std::max(ref, std::abs(fd));
    }
  }
  return diff / ref;
}
}  // namespace

TEST_CASE("modes: tangent stiffness and velocity matrices match finite differences of the forces", "[modes]") {
  // The finite-difference derivative of the force assembly is the independent reference
  // (style.md habit 11). Planet: gravity with J2, centrifugal, Coriolis, Kelvin-Voigt bars.
  const TetherModel planet = build_model(load_scenario(kDemo, {"climbers=[]", "mesh.elements=12", "model.j2=true"}));
  const LinearisedTether lin = linearise(planet);
  CHECK(lin.dofs() == 3 * 12);
  CHECK(fd_mismatch(planet, lin, false, 1.0) < 1e-6);   // 1 m on 1e7 m
  CHECK(fd_mismatch(planet, lin, true, 1e-3) < 1e-6);   // 1 mm/s
  // G is skew, D symmetric, and G is the Coriolis matrix 2 m Omega [e_z]x: the force
  // -2 m Omega x v (Goldstein, Classical Mechanics, rotating frames) gives
  // G(x_i, y_i) = -2 m_i Omega, G(y_i, x_i) = +2 m_i Omega, nothing else.
  const Eigen::MatrixXd G(lin.gyroscopic), D(lin.damping);
  CHECK((G + G.transpose()).cwiseAbs().maxCoeff() == 0.0);
  CHECK((D - D.transpose()).cwiseAbs().maxCoeff() == 0.0);
  CHECK(D.cwiseAbs().maxCoeff() > 0.0);  // the demo material has a retardation time
  const double omega = 7.292115e-5;      // WGS 84 (NIMA TR8350.2 Table 3.1)
  Eigen::MatrixXd coriolis = Eigen::MatrixXd::Zero(G.rows(), G.cols());
  for (std::size_t k = lin.first_free; k <= lin.last_free; ++k) {
    const Eigen::Index i = 3 * static_cast<Eigen::Index>(k - lin.first_free);
    coriolis(i, i + 1) = -2 * planet.mesh.node_mass[k] * omega;
    coriolis(i + 1, i) = 2 * planet.mesh.node_mass[k] * omega;
  }
  CHECK((G - coriolis).cwiseAbs().maxCoeff() < 1e-12 * coriolis.cwiseAbs().maxCoeff());

  // Bench: hanging chain with a fixed far end (first and last node prescribed).
  const TetherModel chain = build_model(load_scenario_text(
      bench("gravity: 9.81 m/s^2, far_end: fixed, pretension: 5 N", 10), "bench.yaml", {}));
  const LinearisedTether lc = linearise(chain);
  CHECK(lc.dofs() == 3 * 9);
  CHECK(fd_mismatch(chain, lc, false, 1e-7) < 1e-6);
}

TEST_CASE("modes: without rotation the modes are real and mass-orthogonal", "[modes]") {
  // Undamped, non-gyroscopic M q'' + K q = 0 with M, K symmetric: the mode shapes are real
  // and q_i^T M q_j = 0 for distinct frequencies (orthogonality of normal modes, e.g.
  // Meirovitch, Fundamentals of Vibrations, ch. 7, recalled from memory).
  const TetherModel model = build_model(load_scenario_text(hanging_chain(60), "bench.yaml", {}));
  ModalOptions o;
  o.modes = 12;
  const ModalResult r = modal_analysis(model, o);
  REQUIRE(r.modes.size() == 12);
  const Eigen::VectorXd& m = model.mesh.node_mass;
  auto inner = [&](const Mode& a, const Mode& b) {
    std::complex<double> s = 0.0;
    for (Eigen::Index k = 0; k < m.size(); ++k) s += m[k] * a.shape.col(k).dot(b.shape.col(k));  // conj(a) . b
    return s;
  };
  double worst = 0.0;
  for (std::size_t i = 0; i < r.modes.size(); ++i) {
    CHECK(r.modes[i].shape.imag().cwiseAbs().maxCoeff() < 1e-9);
    CHECK(std::abs(r.modes[i].eigenvalue.real()) < 1e-12 * std::abs(r.modes[i].eigenvalue));
    for (std::size_t j = 0; j < i; ++j) {
      const double c = std::abs(inner(r.modes[i], r.modes[j])) /
                       std::sqrt(std::abs(inner(r.modes[i], r.modes[i])) * std::abs(inner(r.modes[j], r.modes[j])));
      worst = std::max(worst, c);
    }
  }
  INFO("largest normalised q_i^T M q_j " << worst);
  CHECK(worst < 1e-9);
}

TEST_CASE("modes: with rotation, eigenvalues follow the gyroscopic pattern", "[modes]") {
  // M q'' + G q' + K q = 0 with M, K symmetric positive definite and G skew: all eigenvalues
  // are purely imaginary and come as +-i omega (Thomson-Tait-Chetaev; Meirovitch, Methods
  // of Analytical Dynamics, gyroscopic systems, recalled from memory). Symmetric positive
  // semidefinite damping D added: Re lambda <= 0. (The conjugate half of each pair is
  // implied by the real matrices and not reported.)
  ModalOptions o;
  o.modes = 12;
  const TetherModel undamped = build_model(load_scenario(kDemo, {"climbers=[]", "mesh.elements=60", "material.damping_time=0"}));
  const ModalResult r = modal_analysis(undamped, o);
  REQUIRE(r.modes.size() == 12);
  CHECK(r.stiffness_negative_directions == 0);
  double coupling = 0.0;
  for (const Mode& m : r.modes) {
    INFO("lambda " << m.eigenvalue);
    CHECK(std::abs(m.eigenvalue.real()) < 1e-10 * std::abs(m.eigenvalue));
    CHECK(m.eigenvalue.imag() > 0.0);
    if (m.kind == ModeKind::east_west) coupling = std::max(coupling, m.kinetic_fraction[0]);
  }
  // The Coriolis matrix really couples east-west and along (else the check proves little).
  CHECK(coupling > 1e-4);

  const TetherModel damped = build_model(load_scenario(kDemo, {"climbers=[]", "mesh.elements=60"}));
  const ModalResult rd = modal_analysis(damped, o);
  for (const Mode& m : rd.modes) {
    INFO("lambda " << m.eigenvalue << ", along fraction " << m.kinetic_fraction[0]);
    CHECK(m.eigenvalue.real() < 1e-12 * std::abs(m.eigenvalue));
    if (m.kinetic_fraction[0] > 1e-6) CHECK(m.damping_ratio > 0.0);  // Kelvin-Voigt acts along
  }
}

TEST_CASE("modes: dense and shift-invert Arnoldi solvers agree", "[modes]") {
  const TetherModel model = build_model(load_scenario(kDemo, {"climbers=[]", "mesh.elements=60"}));
  ModalOptions dense, arnoldi;
  dense.modes = arnoldi.modes = 10;
  dense.dense_limit = 100000;
  arnoldi.dense_limit = 0;
  const ModalResult a = modal_analysis(model, dense), b = modal_analysis(model, arnoldi);
  for (const auto& m : a.block_method) CHECK(m == "dense");
  for (const auto& m : b.block_method) CHECK(m != "dense");
  REQUIRE(a.modes.size() == b.modes.size());
  for (std::size_t i = 0; i < a.modes.size(); ++i) {
    INFO("mode " << i + 1);
    CHECK(std::abs(a.modes[i].eigenvalue - b.modes[i].eigenvalue) < 1e-9 * std::abs(a.modes[i].eigenvalue));
    CHECK((a.modes[i].shape - b.modes[i].shape).cwiseAbs().maxCoeff() < 1e-6);
    CHECK(a.modes[i].kind == b.modes[i].kind);
  }
  CHECK(a.max_backward_error < 1e-10);
  CHECK(b.max_backward_error < 1e-10);
}

TEST_CASE("modes: bad requests are input errors", "[modes]") {
  const TetherModel model = build_model(load_scenario_text(hanging_chain(4), "bench.yaml", {}));
  ModalOptions o;
  o.modes = 0;
  CHECK_THROWS_AS(modal_analysis(model, o), InputError);
  o.modes = 13;  // 4 free nodes: 12 degrees of freedom
  CHECK_THROWS_AS(modal_analysis(model, o), InputError);
  o.modes = 12;  // all of them: every block goes to the dense solver
  CHECK(modal_analysis(model, o).modes.size() == 12);
}

TEST_CASE("modes: a run started in a string mode oscillates at the mode's period", "[modes]") {
  // The check run of a modal analysis: the nonlinear time-domain model started from a small
  // multiple (1e-5 of the length) of a computed shape must move at that mode's period and
  // stay in it. Linear and nonlinear models differ at second order in the amplitude.
  const Scenario sc = load_scenario_text(taut_string(40), "bench.yaml", {});
  const CheckRun c = check_run(sc, 2, 1e-4, 5.0, 6);  // a second string mode (y or z: they tie)
  INFO("modal " << c.modal_period_s << " s, measured " << c.measured_period_s << " s from " << c.crossings
                << " zero crossings");
  CHECK(c.crossings >= 9);
  CHECK(rel(c.measured_period_s, c.modal_period_s) == Approx(0.0).margin(1e-3));
  CHECK(c.final_amplitude_ratio == Approx(1.0).epsilon(0.01));  // undamped: no decay, no leak
  CHECK(c.cross_axis_m < 1e-9);
}

TEST_CASE("modes: the demo tether's lowest east-west period agrees with a time-domain run", "[modes]") {
  // Issue acceptance figure: within 1% (measured: about 1e-6; checked at 0.1%). A coarse,
  // uniform mesh keeps the run short (the geometric demo mesh's 20 km first element holds
  // every explicit or BDF step under a second); the modal period of the same mesh is the
  // reference. 10 km at the peak node is 1e-4 of the length.
  const Scenario sc = load_scenario(kDemo, {"climbers=[]", "mesh.elements=60", "mesh.grading=uniform", "simulation.method=erk"});
  const TetherModel model = build_model(sc);
  ModalOptions o;
  o.modes = 4;
  const ModalResult r = modal_analysis(model, o);
  std::size_t ew = 0;
  while (r.modes.at(ew).kind != ModeKind::east_west) ++ew;
  const auto start = std::chrono::steady_clock::now();
  const CheckRun c = check_run(sc, ew, 1e4, 2.6, 4);
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  INFO("modal " << c.modal_period_s / 3600 << " h, measured " << c.measured_period_s / 3600 << " h from "
                << c.crossings << " zero crossings; wall " << wall << " s");
  CHECK(c.crossings >= 5);
  CHECK(std::abs(rel(c.measured_period_s, c.modal_period_s)) < 0.001);
}

TEST_CASE("modes: benchmark, lowest 20 modes of a 2,000-element Earth tether", "[modes][benchmark]") {
  // Issue target: under 10 s of wall time on one core.
  const TetherModel model = build_model(load_scenario(kDemo, {"climbers=[]", "mesh.elements=2000"}));
  ModalOptions o;
  o.modes = 20;
  const auto start = std::chrono::steady_clock::now();
  const ModalResult r = modal_analysis(model, o);
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  WARN("2,000 elements, 20 modes: wall " << wall << " s, " << r.operator_applications << " operator applications");
  CHECK(wall < 10.0);
  REQUIRE(r.modes.size() == 20);
  CHECK(r.max_backward_error < 1e-10);
  // Mesh convergence of the lowest mode against a 200-element mesh (the default demo).
  const TetherModel coarse = build_model(load_scenario(kDemo, {"climbers=[]", }));
  o.modes = 1;
  const ModalResult rc = modal_analysis(coarse, o);
  CHECK(rel(r.modes[0].period_s, rc.modes[0].period_s) == Approx(0.0).margin(1e-3));
}
