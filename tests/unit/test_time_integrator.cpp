// Checks of the SUNDIALS glue (solver/integration/time_integrator.hpp) on linear systems with
// closed-form solutions:
//  - a fixed-fixed chain of equal masses joined by springs and dashpots, with the
//    interleaved state (x_1, v_1, x_2, v_2, ...) and band Jacobian of the tether model;
//  - a single damped oscillator, for stop times, roots, failures and restarts.
#include "catch_compat.hpp"

#include <algorithm>
#include <cmath>
#include <complex>
#include <limits>
#include <stdexcept>
#include <string>
#include <vector>

#include "solver/input/errors.hpp"
#include "solver/integration/time_integrator.hpp"

using namespace hawser;

namespace {

constexpr double pi = 3.14159265358979323846;
const double no_stop = std::numeric_limits<double>::infinity();
const Method all_methods[] = {Method::bdf, Method::adams, Method::erk, Method::esdirk};

/// Free response of x'' + b x' + K x = 0 with x(0) = x0, x'(0) = v0: a sum of exp(s t)
/// over the two roots s of s^2 + b s + K = 0 (the characteristic-equation solution of
/// any vibrations text, e.g. Thomson, Theory of Vibration with Applications, ch. 2;
/// recalled from memory). Not valid at critical damping b^2 = 4K; no test uses it.
struct Motion {
  double x, v;
};
Motion free_response(double b, double K, double x0, double v0, double t) {
  using C = std::complex<double>;
  const C root = std::sqrt(C(b * b - 4 * K, 0.0));
  const C s1 = (-b + root) / 2.0, s2 = (-b - root) / 2.0;
  const C e1 = std::exp(s1 * t), e2 = std::exp(s2 * t);
  const C x = x0 * (s2 * e1 - s1 * e2) / (s2 - s1) + v0 * (e1 - e2) / (s1 - s2);
  const C v = x0 * s1 * s2 * (e1 - e2) / (s2 - s1) + v0 * (s1 * e1 - s2 * e2) / (s1 - s2);
  return {x.real(), v.real()};
}

/// Records what the integrator asked of a system, and can be told to misbehave.
struct Probe {
  long rhs_calls = 0, jac_calls = 0;
  double t_max_seen = -std::numeric_limits<double>::infinity();
  double throw_after_s = std::numeric_limits<double>::infinity();  // rhs throws for t > this
  double nan_after_s = std::numeric_limits<double>::infinity();    // rhs returns NaN for t > this
  bool jacobian_throws = false, roots_throw = false;
  bool jacobian_without_dashpots = false;  // deliberately wrong Jacobian

  void on_rhs(double t) {
    ++rhs_calls;
    t_max_seen = std::max(t_max_seen, t);
    if (t > throw_after_s) throw std::domain_error("test system refuses t > throw_after_s");
  }
  bool nan_at(double t) const { return t > nan_after_s; }
};

/// N equal masses m (kg) between two fixed walls, neighbours joined by a spring kappa (N/m)
/// and a dashpot c (N s/m) in parallel:
///   m x_i'' = kappa (x_{i-1} - 2 x_i + x_{i+1}) + c (v_{i-1} - 2 v_i + v_{i+1}),
///   x_0 = x_{N+1} = 0. State (x_1, v_1, ..., x_N, v_N): Jacobian band mu = 2, ml = 3.
class Chain : public OdeSystem {
 public:
  Chain(int masses, double kappa_N_per_m, double c_Ns_per_m, double mass_kg)
      : n_(masses), k_(kappa_N_per_m / mass_kg), c_(c_Ns_per_m / mass_kg) {}
  Probe probe;

  std::size_t size() const override { return 2 * static_cast<std::size_t>(n_); }
  long half_bandwidth() const override { return 3; }

  void rhs(double t, const double* y, double* ydot) override {
    probe.on_rhs(t);
    auto x = [&](int i) { return (i < 0 || i >= n_) ? 0.0 : y[2 * i]; };
    auto v = [&](int i) { return (i < 0 || i >= n_) ? 0.0 : y[2 * i + 1]; };
    for (int i = 0; i < n_; ++i) {
      ydot[2 * i] = v(i);
      ydot[2 * i + 1] = k_ * (x(i - 1) - 2 * x(i) + x(i + 1)) + c_ * (v(i - 1) - 2 * v(i) + v(i + 1));
    }
  }

  void jacobian(double, const double*, const double*, const BandJacobian& J) override {
    ++probe.jac_calls;
    const double c = probe.jacobian_without_dashpots ? 0.0 : c_;
    for (long i = 0; i < n_; ++i) {
      const long xi = 2 * i, vi = 2 * i + 1;
      J(xi, vi) = 1.0;
      J(vi, xi) = -2 * k_;
      J(vi, vi) = -2 * c;
      if (i > 0) J(vi, xi - 2) = k_, J(vi, vi - 2) = c;
      if (i + 1 < n_) J(vi, xi + 2) = k_, J(vi, vi + 2) = c;
    }
  }

  /// State of normal mode k at time t, started at rest with unit amplitude. Mode shape
  /// sin(i k pi / (N+1)) and eigenvalue lambda_k = 4 sin^2(k pi / (2 (N+1))) of the
  /// fixed-end chain (Kittel, Introduction to Solid State Physics, ch. 4: monatomic
  /// lattice, omega^2 = (4 C / M) sin^2(K a / 2), with the standing waves K = k pi /
  /// ((N+1) a) that vanish at both walls), so undamped omega_k = 2 sqrt(kappa/m) sin(...).
  /// The dashpots have the springs' connection matrix, so each mode stays uncoupled,
  /// q'' + c lambda_k q' + kappa lambda_k q = 0 (proportional damping, Rayleigh, The Theory
  /// of Sound, vol. 1; recalled from memory).
  std::vector<double> mode(int k, double t) const {
    const double theta = k * pi / (n_ + 1);
    const double lambda = 4 * std::pow(std::sin(theta / 2), 2);
    const Motion q = free_response(c_ * lambda, k_ * lambda, 1.0, 0.0, t);
    std::vector<double> y(size());
    for (int i = 0; i < n_; ++i) {
      const double shape = std::sin((i + 1) * theta);
      y[2 * i] = shape * q.x;
      y[2 * i + 1] = shape * q.v;
    }
    return y;
  }

 private:
  int n_;
  double k_, c_;  // kappa/m (1/s^2), c/m (1/s)
};

/// x'' + 2 zeta omega x' + omega^2 x = 0, state (x, v); optional root g = x - level.
class Oscillator : public OdeSystem {
 public:
  double omega_rad_s = 1.0, zeta = 0.0;
  bool has_root = false;
  double level_m = 0.0;
  Probe probe;

  std::size_t size() const override { return 2; }
  long half_bandwidth() const override { return 1; }
  void rhs(double t, const double* y, double* ydot) override {
    probe.on_rhs(t);
    ydot[0] = y[1];
    ydot[1] = probe.nan_at(t) ? std::nan("")
                              : -2 * zeta * omega_rad_s * y[1] - omega_rad_s * omega_rad_s * y[0];
  }
  void jacobian(double, const double*, const double*, const BandJacobian& J) override {
    ++probe.jac_calls;
    if (probe.jacobian_throws) throw std::range_error("test Jacobian refuses");
    J(0, 1) = 1.0;
    J(1, 0) = -omega_rad_s * omega_rad_s;
    J(1, 1) = -2 * zeta * omega_rad_s;
  }
  int num_roots() const override { return has_root ? 1 : 0; }
  void roots(double, const double* y, double* g) override {
    if (probe.roots_throw) throw std::logic_error("test root function refuses");
    g[0] = y[0] - level_m;
  }
  Motion exact(double x0, double v0, double t) const {
    return free_response(2 * zeta * omega_rad_s, omega_rad_s * omega_rad_s, x0, v0, t);
  }
};

IntegratorOptions options(Method method, double rtol, double atol) {
  IntegratorOptions o;
  o.method = method;
  o.rtol = rtol;
  o.atol = {atol};
  return o;
}

/// Largest error in any component over outputs every 0.5 s up to 20 s (about 2.6 periods)
/// for the undamped chain of 10 masses started in mode 3.
double chain_mode_error(Method method, double rtol) {
  Chain chain(10, 1.0, 0.0, 1.0);
  const int k = 3;
  std::vector<double> y = chain.mode(k, 0.0);
  TimeIntegrator integrator(chain, 0.0, y.data(), options(method, rtol, 1e-3 * rtol));
  double worst = 0;
  for (int j = 1; j <= 40; ++j) {
    const double t = 0.5 * j;
    REQUIRE(integrator.advance(t, no_stop, y.data()) == t);
    const std::vector<double> exact = chain.mode(k, t);
    for (std::size_t i = 0; i < y.size(); ++i) worst = std::max(worst, std::abs(y[i] - exact[i]));
  }
  return worst;
}

}  // namespace

TEST_CASE("undamped chain in a normal mode follows the analytic mode", "[integrator]") {
  for (Method method : all_methods) {
    DYNAMIC_SECTION(method_name(method)) {
      const double loose = chain_mode_error(method, 1e-5);
      const double tight = chain_mode_error(method, 1e-8);
      INFO(method_name(method) << " loose " << loose << " tight " << tight);
      // Global error of a few periods stays within a small multiple of rtol (common
      // practice for error-per-step control); bound set at 1e3 rtol.
      CHECK(tight < 1e3 * 1e-8);
      // Three decades tighter rtol must buy at least one decade of accuracy (common practice).
      CHECK(tight < loose / 10);
    }
  }
}

TEST_CASE("damped oscillator with BDF matches its analytic solution", "[integrator]") {
  Oscillator osc;
  osc.omega_rad_s = 2.0;
  osc.zeta = 0.1;
  double y[2] = {1.0, 0.5};
  TimeIntegrator integrator(osc, 0.0, y, options(Method::bdf, 1e-8, 1e-11));
  double worst = 0;
  for (int j = 1; j <= 30; ++j) {
    const double t = 0.5 * j;
    integrator.advance(t, no_stop, y);
    const Motion exact = osc.exact(1.0, 0.5, t);  // Thomson ch. 2 solution (see free_response)
    worst = std::max({worst, std::abs(y[0] - exact.x), std::abs(y[1] - exact.v)});
  }
  INFO("damped worst " << worst);
  CHECK(worst < 1e3 * 1e-8);  // as above: within 1e3 rtol (common practice)
}

TEST_CASE("bdf uses the analytic band Jacobian and its statistics are consistent", "[integrator]") {
  // A stiff chain: 20 masses, stiff dashpots (c = 100 N s/m, kappa = 1 N/m, m = 1 kg).
  // Mode k (overdamped here) decays with rates of about c lambda_k / m and kappa / c:
  // about 400 1/s for the fastest, 0.01 1/s for the slowest, a stiffness ratio of 4e4.
  const int masses = 20, k = 1;
  const double t_end = 50.0;
  auto run = [&](Method method, bool wrong_jacobian, Chain& chain) {
    chain.probe.jacobian_without_dashpots = wrong_jacobian;
    std::vector<double> y = chain.mode(k, 0.0);
    IntegratorOptions o = options(method, 1e-6, 1e-9);
    TimeIntegrator integrator(chain, 0.0, y.data(), o);
    integrator.advance(t_end, no_stop, y.data());
    const std::vector<double> exact = chain.mode(k, t_end);
    double worst = 0;
    for (std::size_t i = 0; i < y.size(); ++i) worst = std::max(worst, std::abs(y[i] - exact[i]));
    return std::make_pair(integrator.stats(), worst);
  };

  Chain bdf_chain(masses, 1.0, 100.0, 1.0);
  const auto [bdf, bdf_error] = run(Method::bdf, false, bdf_chain);
  INFO("bdf " << bdf.to_string() << " err " << bdf_error);
  CHECK(bdf.steps > 0);
  CHECK(bdf.jac_evals > 0);
  CHECK(bdf.jac_evals == bdf_chain.probe.jac_calls);
  CHECK(bdf.rhs_evals >= bdf.steps);
  CHECK(bdf.rhs_evals == bdf_chain.probe.rhs_calls);
  CHECK(bdf.linear_setups >= bdf.jac_evals);
  // The problem is linear: with the true Jacobian in the Newton matrix, the corrector
  // converges in one or two iterations a step (common practice).
  CHECK(bdf.nonlinear_iterations < 2 * bdf.steps);
  CHECK(bdf.current_time_s >= t_end);
  // Against Chain::mode (Kittel ch. 4 with proportional damping), within 100 rtol
  // (common practice for error-per-step control).
  CHECK(bdf_error < 1e-4);

  SECTION("the explicit method pays for the stiffness, and neither other method asks for J") {
    Chain erk_chain(masses, 1.0, 100.0, 1.0);
    const auto [erk, erk_error] = run(Method::erk, false, erk_chain);
    INFO("erk " << erk.to_string() << " err " << erk_error);
    CHECK(erk.jac_evals == 0);
    CHECK(erk_chain.probe.jac_calls == 0);
    CHECK(erk.rhs_evals == erk_chain.probe.rhs_calls);
    // Explicit stability needs h |lambda_max| = O(1) with lambda_max ~ 400 1/s: thousands of
    // steps over 50 s, where BDF is limited by accuracy only (common practice).
    CHECK(erk.steps > 10 * bdf.steps);
    Chain adams_chain(2, 1.0, 0.0, 1.0);  // non-stiff: fixed-point Adams is fine here
    std::vector<double> y = adams_chain.mode(1, 0.0);
    TimeIntegrator adams(adams_chain, 0.0, y.data(), options(Method::adams, 1e-6, 1e-9));
    adams.advance(5.0, no_stop, y.data());
    CHECK(adams.stats().jac_evals == 0);
    CHECK(adams_chain.probe.jac_calls == 0);
    CHECK(adams.stats().rhs_evals == adams_chain.probe.rhs_calls);
  }

  SECTION("a Jacobian without the stiff dashpot terms wrecks the Newton iteration") {
    Chain wrong_chain(masses, 1.0, 100.0, 1.0);
    SolverStats wrong{};
    bool failed = false;
    try {
      wrong = run(Method::bdf, true, wrong_chain).first;
    } catch (const IntegratorFailure&) {
      failed = true;
    }
    INFO("wrong " << wrong.to_string() << " failed " << failed);
    // Without the dashpot terms the Newton matrix misses the eigenvalues near -400 1/s,
    // so the corrector diverges unless h |lambda| < 1: the step collapses to the explicit
    // stability limit or the run fails outright. What the system writes into the band
    // view is therefore what CVODE solves with.
    CHECK((failed || wrong.steps > 10 * bdf.steps));
  }
}

TEST_CASE("stop times are hit exactly and never stepped past", "[integrator]") {
  for (Method method : all_methods) {
    DYNAMIC_SECTION(method_name(method)) {
      Oscillator osc;  // x = cos t (omega = 1 rad/s, undamped)
      double y[2] = {1.0, 0.0};
      TimeIntegrator integrator(osc, 0.0, y, options(method, 1e-9, 1e-12));
      const double tstop = 3.7;
      // Output before the stop time: rhs may look ahead, but not beyond tstop.
      CHECK(integrator.advance(2.0, tstop, y) == 2.0);
      CHECK(osc.probe.t_max_seen <= tstop);
      // Output time beyond the stop time: returns tstop itself, bit for bit.
      CHECK(integrator.advance(5.0, tstop, y) == tstop);
      CHECK(osc.probe.t_max_seen <= tstop);
      CHECK(y[0] == Approx(std::cos(tstop)).margin(1e-7));  // x = cos t
      CHECK(y[1] == Approx(-std::sin(tstop)).margin(1e-7));
      // Asking again for the same stop time returns at once with the same state.
      const double x_at_stop = y[0];
      CHECK(integrator.advance(5.0, tstop, y) == tstop);
      CHECK(y[0] == x_at_stop);
      // Without a stop time the run goes on to the output time.
      CHECK(integrator.advance(5.0, no_stop, y) == 5.0);
      CHECK(y[0] == Approx(std::cos(5.0)).margin(1e-7));
      // Going backwards is a caller error.
      CHECK_THROWS_AS(integrator.advance(4.0, no_stop, y), std::invalid_argument);
    }
    DYNAMIC_SECTION(method_name(method) << ", stop time on the very first call") {
      // The first call also estimates the initial step by trial evaluations of f.
      Oscillator osc;
      double y[2] = {1.0, 0.0};
      TimeIntegrator integrator(osc, 0.0, y, options(method, 1e-9, 1e-12));
      CHECK(integrator.advance(100.0, 0.3, y) == 0.3);
      CHECK(osc.probe.t_max_seen <= 0.3);
      CHECK(y[0] == Approx(std::cos(0.3)).margin(1e-7));  // x = cos t
    }
  }
}

TEST_CASE("a root function stops the run where the solution crosses a level", "[integrator]") {
  for (Method method : all_methods) {
    DYNAMIC_SECTION(method_name(method)) {
      Oscillator osc;  // x = cos(omega t), omega = 1.5 rad/s
      osc.omega_rad_s = 1.5;
      osc.has_root = true;
      osc.level_m = 0.5;
      double y[2] = {1.0, 0.0};
      TimeIntegrator integrator(osc, 0.0, y, options(method, 1e-10, 1e-13));
      // cos(omega t) = 1/2 first at t = (pi/3)/omega, falling; next at (5 pi/3)/omega, rising.
      const double first = (pi / 3) / osc.omega_rad_s, second = (5 * pi / 3) / osc.omega_rad_s;
      double t = integrator.advance(10.0, no_stop, y);
      CHECK(t == Approx(first).margin(1e-7));
      REQUIRE(integrator.root_info().size() == 1);
      CHECK(integrator.root_info()[0] == -1);
      CHECK(y[0] == Approx(0.5).margin(1e-7));
      t = integrator.advance(10.0, no_stop, y);
      CHECK(t == Approx(second).margin(1e-7));
      CHECK(integrator.root_info()[0] == 1);
      // No crossing between there and the next output: plain return, root_info cleared.
      CHECK(integrator.advance(second + 0.5, no_stop, y) == second + 0.5);
      CHECK(integrator.root_info()[0] == 0);
      CHECK(integrator.stats().root_evals > 0);
    }
  }
}

TEST_CASE("exceptions in callbacks propagate and impossible runs throw IntegratorFailure",
          "[integrator]") {
  for (Method method : all_methods) {
    DYNAMIC_SECTION(method_name(method)) {
      Oscillator osc;
      double y[2] = {1.0, 0.0};

      SECTION("an exception thrown by rhs comes out unchanged, and a restart recovers") {
        osc.probe.throw_after_s = 1.0;
        TimeIntegrator integrator(osc, 0.0, y, options(method, 1e-8, 1e-11));
        CHECK(integrator.advance(0.5, no_stop, y) == 0.5);
        const double y_half[2] = {y[0], y[1]};
        CHECK_THROWS_AS(integrator.advance(3.0, no_stop, y), std::domain_error);
        osc.probe.throw_after_s = no_stop;
        integrator.restart(0.5, y_half);
        CHECK(integrator.advance(3.0, no_stop, y) == 3.0);
        CHECK(y[0] == Approx(std::cos(3.0)).margin(1e-6));  // x = cos t
      }
      SECTION("an exception thrown by the root function comes out unchanged") {
        osc.has_root = true;
        osc.level_m = -2.0;  // never crossed
        osc.probe.roots_throw = true;
        TimeIntegrator integrator(osc, 0.0, y, options(method, 1e-8, 1e-11));
        CHECK_THROWS_AS(integrator.advance(3.0, no_stop, y), std::logic_error);
      }
      SECTION("too many steps between outputs") {
        IntegratorOptions o = options(method, 1e-8, 1e-11);
        o.max_steps_between_outputs = 10;
        TimeIntegrator integrator(osc, 0.0, y, o);
        try {
          integrator.advance(1000.0, no_stop, y);
          FAIL("no IntegratorFailure");
        } catch (const IntegratorFailure& e) {
          INFO(e.what());
          CHECK(e.time_s() > 0.0);
          CHECK(e.time_s() < 1000.0);
          CHECK(std::string(e.what()).find("TOO_MUCH_WORK") != std::string::npos);
          CHECK(std::string(e.what()).find("at t = ") != std::string::npos);
          // y_out holds the last state reached: x = cos t there.
          CHECK(y[0] == Approx(std::cos(e.time_s())).margin(1e-6));
        }
      }
      SECTION("a right-hand side that turns into NaN") {
        osc.probe.nan_after_s = 1.0;
        TimeIntegrator integrator(osc, 0.0, y, options(method, 1e-8, 1e-11));
        try {
          integrator.advance(5.0, no_stop, y);
          FAIL("no IntegratorFailure");
        } catch (const IntegratorFailure& e) {
          INFO(e.what());
          // It integrated the good part and gave up within a step of where f turns NaN.
          CHECK(e.time_s() == Approx(1.0).margin(0.05));
          CHECK(std::string(e.what()).find("not finite in component 1") != std::string::npos);
        }
      }
      SECTION("a step below round-off (t + h == t) ends the run at once") {
        // At t = 1e20 s the spacing of doubles is 16384 s, so a 1 ms step cannot move t.
        // SUNDIALS only warns and steps on; the glue must fail the run right there rather
        // than spend max_steps_between_outputs standing still. 6.x reported the stall in a
        // warning to the error handler, 7.x only in its log: this checks both.
        const double t0 = 1e20;
        IntegratorOptions o = options(method, 1e-8, 1e-11);
        o.initial_step_s = 1e-3;
        TimeIntegrator integrator(osc, t0, y, o);
        try {
          integrator.advance(t0 + 1e6, no_stop, y);
          FAIL("no IntegratorFailure");
        } catch (const IntegratorFailure& e) {
          INFO(e.what());
          CHECK(e.time_s() == t0);
          CHECK(std::string(e.what()).find("below round-off") != std::string::npos);
          CHECK(osc.probe.rhs_calls < 20);  // stopped within the first step
        }
      }
    }
  }
  SECTION("an exception thrown by the Jacobian comes out unchanged (bdf)") {
    Oscillator osc;
    osc.probe.jacobian_throws = true;
    double y[2] = {1.0, 0.0};
    TimeIntegrator integrator(osc, 0.0, y, options(Method::bdf, 1e-8, 1e-11));
    CHECK_THROWS_AS(integrator.advance(3.0, no_stop, y), std::range_error);
  }
}

TEST_CASE("restart after a parameter change continues correctly", "[integrator]") {
  for (Method method : all_methods) {
    DYNAMIC_SECTION(method_name(method)) {
      Oscillator osc;  // omega 1 rad/s up to t1, then 3 rad/s, zeta 0.05 throughout
      osc.zeta = 0.05;
      osc.has_root = true;
      osc.level_m = -0.3;
      double y[2] = {1.0, 0.0};
      TimeIntegrator integrator(osc, 0.0, y, options(method, 1e-9, 1e-12));
      const double t1 = 1.0;  // before the first crossing of -0.3 (near t = 1.9 s)
      REQUIRE(integrator.advance(10.0, t1, y) == t1);
      const Motion at_t1 = osc.exact(1.0, 0.0, t1);  // Thomson ch. 2 solution
      CHECK(y[0] == Approx(at_t1.x).margin(1e-7));
      const long steps_before = integrator.stats().steps;

      osc.omega_rad_s = 3.0;
      integrator.restart(t1, y);
      integrator.restart(t1, y);  // two events at one time: restarting twice is harmless
      // The root function is still armed: the first crossing of x = -0.3 with the new
      // frequency, found by bisecting the analytic solution (free_response) for reference.
      double lo = t1, hi = t1 + 1.0;  // x(t1) > -0.3 > x(t1 + 1) for omega = 3 rad/s
      for (int i = 0; i < 200; ++i) {
        const double mid = (lo + hi) / 2;
        (osc.exact(at_t1.x, at_t1.v, mid - t1).x > osc.level_m ? lo : hi) = mid;
      }
      const double t_root = integrator.advance(10.0, no_stop, y);
      CHECK(t_root == Approx(lo).margin(1e-6));
      CHECK(integrator.root_info()[0] == -1);

      const double t2 = 4.0;  // later crossings return early: go on until t2
      double t = t_root;
      for (int calls = 0; t < t2 && calls < 20; ++calls) t = integrator.advance(t2, no_stop, y);
      REQUIRE(t == t2);
      const Motion at_t2 = osc.exact(at_t1.x, at_t1.v, t2 - t1);
      CHECK(y[0] == Approx(at_t2.x).margin(1e-6));
      CHECK(y[1] == Approx(at_t2.v).margin(1e-6));
      // Counters add up over segments: the system counted every call of both.
      const SolverStats s = integrator.stats();
      CHECK(s.steps > steps_before);
      CHECK(s.rhs_evals == osc.probe.rhs_calls);
      CHECK(s.jac_evals == osc.probe.jac_calls);
    }
  }
}

TEST_CASE("methods by name and option checks", "[integrator]") {
  CHECK(parse_method("bdf") == Method::bdf);
  CHECK(parse_method("adams") == Method::adams);
  CHECK(parse_method("erk") == Method::erk);
  CHECK(parse_method("esdirk") == Method::esdirk);
  CHECK(method_name(Method::esdirk) == "esdirk");
  try {
    parse_method("rk4");
    FAIL("no InputError");
  } catch (const InputError& e) {
    const std::string what = e.what();
    CHECK(what.find("bdf") != std::string::npos);
    CHECK(what.find("adams") != std::string::npos);
    CHECK(what.find("erk") != std::string::npos);
    CHECK(what.find("esdirk") != std::string::npos);
  }
  Oscillator osc;
  double y[2] = {1.0, 0.0};
  IntegratorOptions o = options(Method::bdf, 1e-6, 1e-9);
  o.atol = {1e-9, 1e-9, 1e-9};  // the system has 2 components
  CHECK_THROWS_AS(TimeIntegrator(osc, 0.0, y, o), InputError);
  o.atol = {1e-9, 1e-6};  // per component is fine
  CHECK_NOTHROW(TimeIntegrator(osc, 0.0, y, o));
  o.rtol = -1;
  CHECK_THROWS_AS(TimeIntegrator(osc, 0.0, y, o), InputError);
  o = options(Method::bdf, 1e-6, 1e-9);
  o.max_order = 6;  // BDF is stable only up to order 5
  CHECK_THROWS_AS(TimeIntegrator(osc, 0.0, y, o), InputError);
  o = options(Method::esdirk, 1e-6, 1e-9);
  o.max_order = 4;  // one table only, of order 3
  CHECK_THROWS_AS(TimeIntegrator(osc, 0.0, y, o), InputError);
  o.max_order = 3;
  CHECK_NOTHROW(TimeIntegrator(osc, 0.0, y, o));
  o.atol.clear();  // an absolute tolerance has the state's units: no default
  o.max_order = 0;
  CHECK_THROWS_AS(TimeIntegrator(osc, 0.0, y, o), InputError);
}

TEST_CASE("options reach the solver", "[integrator]") {
  Oscillator osc;  // x = cos t
  double y[2] = {1.0, 0.0};
  SECTION("bdf: per-component atol, order and step limits") {
    IntegratorOptions o = options(Method::bdf, 1e-8, 1e-11);
    o.atol = {1e-11, 1e-10};
    o.max_order = 2;
    o.max_step_s = 0.01;
    TimeIntegrator integrator(osc, 0.0, y, o);
    integrator.advance(1.0, no_stop, y);
    const SolverStats s = integrator.stats();
    INFO(s.to_string());
    CHECK(s.last_order <= 2);
    CHECK(s.last_step_s <= 0.01 * (1 + 1e-12));
    CHECK(s.steps >= 100);  // 1 s in steps of at most 0.01 s
    CHECK(y[0] == Approx(std::cos(1.0)).margin(1e-6));
  }
  SECTION("erk: the order picks ARKStep's default table of that order") {
    IntegratorOptions o = options(Method::erk, 1e-8, 1e-11);
    o.max_order = 5;  // ARKSTEP_DEFAULT_ERK_5 (Cash-Karp 6-4-5) in arkode_arkstep.h 6.4
    TimeIntegrator integrator(osc, 0.0, y, o);
    integrator.advance(1.0, no_stop, y);
    CHECK(integrator.stats().last_order == 5);
    CHECK(y[0] == Approx(std::cos(1.0)).margin(1e-6));
  }
  SECTION("esdirk: order 3, Newton iterations with the system's Jacobian") {
    // ARK3(2)4L[2]SA has order 3 (Kennedy & Carpenter, Appl. Numer. Math. 44, 2003).
    IntegratorOptions o = options(Method::esdirk, 1e-8, 1e-11);
    TimeIntegrator integrator(osc, 0.0, y, o);
    integrator.advance(1.0, no_stop, y);
    const SolverStats s = integrator.stats();
    INFO(s.to_string());
    CHECK(s.last_order == 3);
    CHECK(s.jac_evals > 0);
    CHECK(s.nonlinear_iterations >= s.steps);  // at least one per step (three implicit stages)
    CHECK(y[0] == Approx(std::cos(1.0)).margin(1e-6));
  }
  SECTION("a tiny step budget counts per advance() call, not per run") {
    IntegratorOptions o = options(Method::adams, 1e-6, 1e-9);
    o.max_steps_between_outputs = 50;
    TimeIntegrator integrator(osc, 0.0, y, o);
    for (int j = 1; j <= 20; ++j) integrator.advance(0.5 * j, no_stop, y);
    CHECK(integrator.stats().steps > 50);
    CHECK(y[0] == Approx(std::cos(10.0)).margin(1e-4));
  }
}
