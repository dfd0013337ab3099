// Verification of the dynamics core on the uniform-field test bench (field.kind = uniform:
// no rotation, uniform gravity along the cable) against the closed-form results of classical
// cable and bar vibration:
//   1. taut string          f_n = n/(2L) sqrt(T/mu)
//   2. hanging chain        omega_n = (j0,n / 2) sqrt(g/L)
//   3. fixed-free bar       f_n = (2n - 1)/(4L) sqrt(E/rho)
//   4. wave speeds          sqrt(T/mu) (lateral), sqrt(E/rho) (longitudinal), from pulse arrivals
//   5. Kelvin-Voigt damping zeta_n = omega_n tau / 2
//   6. mesh convergence     frequency error of the lumped-mass string ~ 1/N^2
// Each case runs the whole chain scenario text -> model -> integrator -> recorded outputs and
// measures frequencies and arrival times from the recorded time histories (helpers in
// bench_helpers.hpp). All materials are invented test values, not real materials.
// Run time of the whole file: about 2.5 s on one core (Release).
#include "catch_compat.hpp"

#include <cmath>
#include <string>
#include <vector>

#include "bench_helpers.hpp"

using namespace hawser;
using namespace hawser::testing::bench;

namespace {

constexpr int east = 1;   // component index of the lateral (y) displacement
constexpr int along = 0;  // component index of the longitudinal (x) displacement

// ---- the taut string ----------------------------------------------------------------------
// Invented test string: rho = 1000 kg/m^3, A = 1e-6 m^2 -> mu = rho A = 1e-3 kg/m; T = 10 N
// -> c = sqrt(T/mu) = 100 m/s; L = 1 m -> f_1 = 50 Hz. E = 1e9 Pa gives EA = 1000 N = 100 T.
// Lateral amplitude 1e-4 m (slope 3e-4 n): the stretch it adds raises the tension by about
// EA (n pi a / L)^2 / 4 ~ 2e-5 n^2 N, a relative 2e-6 n^2: the motion is linear.
constexpr double kStringT = 10.0, kStringMu = 1e-3, kStringL = 1.0;

BenchSpec taut_string(int elements) {
  BenchSpec s;
  s.length_m = kStringL;
  s.area_m2 = 1e-6;
  s.density_kg_m3 = 1000.0;
  s.youngs_modulus_pa = 1e9;
  s.far_end_fixed = true;
  s.pretension_n = kStringT;
  s.elements = elements;
  return s;
}

/// Frequency of mode n of the taut string [Hz] measured from a run started in the shape
/// sin(n pi x / L) (n half-sines of alternating sign), over about 6 of its periods with 50
/// outputs per period, from the zero crossings of the modal coordinate.
double measured_string_frequency_hz(int n, int elements, const std::string& method = "erk") {
  const double f_expected = n / (2.0 * kStringL) * std::sqrt(kStringT / kStringMu);
  BenchSpec s = taut_string(elements);
  s.method = method;
  s.duration_s = 6.0 / f_expected;
  s.output_interval_s = 1.0 / f_expected / 50.0;
  s.rtol = 1e-8;
  s.initial_yaml = sine_mode_displacements("east", n, 1e-4, kStringL);
  const auto r = run_bench(s);
  REQUIRE(r->summary.status == RunStatus::complete);
  std::vector<double> phi;
  for (std::size_t k = 0; k < r->nodes(); ++k) phi.push_back(std::sin(n * pi * r->x(k) / kStringL));
  return crossing_frequency_hz(r->sink.t, modal_coordinate(*r, east, phi));
}

/// Frequency of mode n of N equal beads on a string between fixed ends [Hz], the beaded
/// string: omega_n = 2 sqrt(T / (m h)) sin(n pi / (2N)), with N elements of length h and bead
/// mass m = mu h (A. P. French, Vibrations and Waves, ch. 5; recalled from memory).
double beaded_string_frequency_hz(int n, int elements) {
  const double h = kStringL / elements;
  return 2.0 * std::sqrt(kStringT / (kStringMu * h * h)) * std::sin(n * pi / (2.0 * elements)) / (2.0 * pi);
}

// ---- the bar -------------------------------------------------------------------------------
// Invented test bar, fixed at node 0, free at the far end, hanging under gravity:
// rho = 1000 kg/m^3, E = 1e8 Pa -> c = sqrt(E/rho) = 316.2 m/s; L = 1 m -> f_1 = 79.1 Hz.
// Bars carry tension only, so an unstretched bar vibrating along its length would go slack in
// compression. Gravity g = 9.81 m/s^2 hangs it in tension (strain rho g (L - x)/E, 9.8e-5 at
// the top). Gravity is a constant body force on a linear elastic bar, so the motion about the
// static equilibrium obeys the unloaded bar's equation and has its frequencies (the static
// stretch changes the stiffness-to-mass ratio by 1 + strain, below 1e-4: negligible).
// Staying taut: the mode u = a sin(k x), k = (2n - 1) pi / (2L), has strain a k cos(k x),
// which near the free end is a k^2 (L - x) at most; the static strain is rho g (L - x) / E,
// so the bar stays taut everywhere when a < rho g / (E k^2). The runs use a quarter of that.
constexpr double kBarL = 1.0, kBarRho = 1000.0, kBarE = 1e8, kBarG = 9.81;

BenchSpec hanging_bar(int elements) {
  BenchSpec s;
  s.gravity_m_s2 = kBarG;
  s.length_m = kBarL;
  s.area_m2 = 1e-6;
  s.density_kg_m3 = kBarRho;
  s.youngs_modulus_pa = kBarE;
  s.far_end_fixed = false;
  s.elements = elements;
  return s;
}

/// omega_n of the continuous fixed-free bar [rad/s].
double bar_omega(int n) { return (2 * n - 1) * pi / (2.0 * kBarL) * std::sqrt(kBarE / kBarRho); }

/// The bar run from its static equilibrium with a velocity kick of every free node in the
/// shape sin(k_n x) of mode n, amplitude a quarter of the taut limit. For the lumped-mass
/// fixed-free bar (half mass at the free end) these node values are exactly a discrete mode.
std::unique_ptr<BenchRun> run_bar_mode(int n, double damping_time_s, double periods, int elements = 50,
                                       const std::string& method = "erk") {
  const double k = (2 * n - 1) * pi / (2.0 * kBarL);
  const double amplitude = 0.25 * kBarRho * kBarG / (kBarE * k * k);  // [m]
  const double omega = bar_omega(n);
  BenchSpec s = hanging_bar(elements);
  s.method = method;
  s.damping_time_s = damping_time_s;
  s.duration_s = periods * 2.0 * pi / omega;
  s.output_interval_s = 2.0 * pi / omega / 60.0;
  s.rtol = 1e-8;
  s.atol_position_m = 1e-8 * amplitude;
  s.atol_velocity_m_s = 1e-8 * amplitude * omega;
  std::vector<double> speed;
  for (int i = 0; i <= elements; ++i) speed.push_back(amplitude * omega * std::sin(k * kBarL * i / elements));
  s.initial_yaml = kick_entries(along, speed, 1, elements);
  auto r = run_bench(s);
  REQUIRE(r->summary.status == RunStatus::complete);
  REQUIRE(r->summary.max_slack_elements == 0);  // stayed taut: the linear bar it models
  return r;
}

std::vector<double> bar_shape(const BenchRun& r, int n) {
  std::vector<double> phi;
  for (std::size_t i = 0; i < r.nodes(); ++i) phi.push_back(std::sin((2 * n - 1) * pi * r.x(i) / (2.0 * kBarL)));
  return phi;
}

}  // namespace

TEST_CASE("taut string: first three transverse frequencies", "[bench]") {
  // Taut string fixed at both ends: f_n = n/(2L) sqrt(T/mu) (Rao, Vibration of Continuous
  // Systems, ch. on strings; recalled from memory). 50 elements: the lumped-mass error is
  // 1 - sin(x)/x ~ x^2/6 with x = n pi / (2N), 0.15 % for n = 3.
  const int elements = 50;
  for (int n = 1; n <= 3; ++n) {
    const double expected = n / (2.0 * kStringL) * std::sqrt(kStringT / kStringMu);
    const double measured = measured_string_frequency_hz(n, elements);
    const double discrete = beaded_string_frequency_hz(n, elements);
    CAPTURE(n, measured, expected, discrete, measured / expected - 1.0, measured / discrete - 1.0);
    CHECK(measured == Approx(expected).epsilon(0.01));
    // The discrete chain's own frequency, much tighter: checks the integration itself.
    CHECK(measured == Approx(discrete).epsilon(1e-4));
  }
}

TEST_CASE("hanging chain: first three lateral frequencies", "[bench]") {
  // A uniform chain hanging from node 0 under gravity g, free end at x = L:
  //   mu y_tt = d/dx (mu g (L - x) y_x);  with z = 2 omega sqrt((L - x) / g) this is Bessel's
  //   equation of order 0, so y = J0(2 omega sqrt((L - x) / g)) (bounded at the free end) and
  //   y(0) = 0 gives omega_n = (j0,n / 2) sqrt(g / L)
  // (D. Bernoulli's hanging chain, the classical result; recalled from memory), with the
  // zeros j0,n of J0 from Abramowitz & Stegun Table 9.5.
  // Stretch: the bench's cable_length is the stretched length and its node masses are rho A
  // per stretched length, with tensions from the exact discrete equilibrium; the lateral
  // linear dynamics (geometric stiffness T/l, masses) are then exactly those of a chain of
  // length L and mu = rho A, whatever E. E = 1e9 Pa keeps the static strain at the top at
  // rho g L / E = 1e-5 anyway, so stretched and unstretched lengths agree to that.
  // Lumped-mass error (from the discrete eigenproblem, computed once with numpy): 80 elements
  // give -0.005 %, -0.06 %, -0.24 % for n = 1, 2, 3.
  const double j0[3] = {2.404825557695773, 5.520078110286311, 8.653727912911013};  // A&S Table 9.5
  const double g = 9.81, length = 1.0;
  const int elements = 80;
  for (int n = 1; n <= 3; ++n) {
    const double omega = 0.5 * j0[n - 1] * std::sqrt(g / length);
    auto shape = [&](double x) { return std::cyl_bessel_j(0.0, 2.0 * omega * std::sqrt((length - x) / g)); };
    BenchSpec s;
    s.gravity_m_s2 = g;
    s.length_m = length;
    s.area_m2 = 1e-6;
    s.density_kg_m3 = 1000.0;
    s.youngs_modulus_pa = 1e9;
    s.far_end_fixed = false;
    s.elements = elements;
    // The axial modes are stiff (highest 1.6e5 rad/s against 13.6 rad/s for n = 3) and
    // undamped: BDF at orders 1-2 (A-stable) steps over them; CVODE's default orders 3-5 are
    // unstable on part of the imaginary axis and took 3.8 million steps for n = 1 (measured);
    // explicit RK is stability-limited (7.6e4 steps measured at E = 1e7 Pa, so about 8e5 at
    // 1e9). Order 2: 1e4 steps, 0.3 s.
    s.method = "bdf";
    s.max_order = 2;
    s.duration_s = 8.0 * 2.0 * pi / omega;
    s.output_interval_s = 2.0 * pi / omega / 50.0;
    s.rtol = 1e-8;
    // A lateral kick in the analytic mode shape, amplitude 1e-4 m (end slope 1e-4 omega^2 / g
    // < 2e-3: linear).
    const double amplitude = 1e-4;
    std::vector<double> speed;
    for (int k = 0; k <= elements; ++k) speed.push_back(amplitude * omega * shape(length * k / elements));
    s.initial_yaml = kick_entries(east, speed, 1, elements);
    const auto r = run_bench(s);
    REQUIRE(r->summary.status == RunStatus::complete);
    std::vector<double> phi;
    for (std::size_t k = 0; k < r->nodes(); ++k) phi.push_back(shape(r->x(k)));
    const double measured = 2.0 * pi * crossing_frequency_hz(r->sink.t, modal_coordinate(*r, east, phi));
    CAPTURE(n, measured, omega, measured / omega - 1.0, r->summary.stats.steps);
    CHECK(measured == Approx(omega).epsilon(0.01));
  }
}

TEST_CASE("fixed-free bar under gravity: first three longitudinal frequencies", "[bench]") {
  // f_n = (2n - 1)/(4L) sqrt(E/rho) (Rao, Vibration of Continuous Systems, longitudinal
  // vibration of bars; recalled from memory). Gravity only adds a static stretch (see
  // hanging_bar). 50 elements: lumped-mass error ~ x^2/6, x = (2n - 1) pi / (4N), 0.1 % for n = 3.
  // The lumped chain's own frequency: mirrored about its free end (whose half mass becomes a
  // whole bead) it is a beaded string of 2N elements, and its modes are that string's
  // symmetric ones, j = 2n - 1: omega_n = 2 sqrt(k / m) sin((2n - 1) pi / (4N)), k = EA / h,
  // m = rho A h (from the beaded string, French, Vibrations and Waves, ch. 5; recalled from
  // memory). The static stretch raises k / m by 1 + strain (strain <= 1e-4) -> tolerance 1e-4.
  const int elements = 50;
  const double h = kBarL / elements;
  for (int n = 1; n <= 3; ++n) {
    const auto r = run_bar_mode(n, 0.0, 6.0);
    const double measured = crossing_frequency_hz(r->sink.t, modal_coordinate(*r, along, bar_shape(*r, n)));
    const double expected = (2 * n - 1) / (4.0 * kBarL) * std::sqrt(kBarE / kBarRho);
    const double discrete = 2.0 * std::sqrt(kBarE / kBarRho) / h * std::sin((2 * n - 1) * pi / (4.0 * elements)) / (2.0 * pi);
    CAPTURE(n, measured, expected, discrete, measured / expected - 1.0, measured / discrete - 1.0, r->summary.stats.steps);
    CHECK(measured == Approx(expected).epsilon(0.01));
    CHECK(measured == Approx(discrete).epsilon(1e-4));
  }
}

TEST_CASE("wave speeds from pulse arrival times", "[bench]") {
  // Pulse: every node near x0 = 0.6 m is kicked with the velocity V exp(-(x - x0)^2 / (2 s^2)),
  // s = 0.1 m (cut at 5 s), from the equilibrium. By d'Alembert's solution of the wave
  // equation (recalled from memory) the velocity field splits into two halves of height V/2
  // running both ways at the wave speed c. The right-running half passes the stations
  // x1 = 1.6 m and x2 = 3.4 m; the left-running half reflects (inverted) at node 0 and trails
  // it by 2 x0 = 1.2 m; the far end's inverted echo passes x2 1.2 m behind the pulse.
  // Arrival = time of the peak of the station's velocity (parabola through the three samples
  // around the largest): a non-dispersive pulse keeps its shape, so its peak moves at exactly
  // c, while a threshold on the leading edge measures how the mesh smears the front. The
  // speed is the distance between the stations over the difference of their arrivals (no
  // assumption about when the pulse started); each arrival is also checked against
  // (x - x0) / c. Dispersion of the lumped chain, omega = (2c/h) sin(k h / 2), delays the
  // peak of a Gaussian by about c t h^2 / (8 s^2), 0.125 % of the distance for h = 0.01 m.
  // Why smooth: a half-sine displacement has slope kinks at its ends, and on the lumped chain
  // each kink sheds a dispersive wake that rides on the pulse; with the bench's half-sine of
  // width 0.2 m the peak arrivals moved by about 1 % and the peak grew 6 % by x = 3.2 m (the
  // run matched the exact modal solution of the lattice to 2e-5, so that is the chain's
  // physics, not an integration error).
  const double length = 4.0, x0 = 0.6, sigma = 0.1, x1 = 1.6, x2 = 3.4;
  const int elements = 400;
  const std::size_t node1 = 160, node2 = 340;  // at x1, x2 (h = 0.01 m)
  auto gaussian_kicks = [&](int axis, double speed_m_s) {
    std::vector<double> v;
    int first = elements, last = 0;
    for (int k = 0; k <= elements; ++k) {
      const double x = length * k / elements;
      v.push_back(speed_m_s * std::exp(-0.5 * (x - x0) * (x - x0) / (sigma * sigma)));
      if (std::abs(x - x0) <= 5.0 * sigma) first = std::min(first, k), last = std::max(last, k);
    }
    return kick_entries(axis, v, first, last);
  };
  struct Arrivals {
    Peak p1, p2;
  };
  auto arrivals = [&](const BenchSpec& s, int axis) {
    const auto r = run_bench(s);
    REQUIRE(r->summary.status == RunStatus::complete);
    REQUIRE(r->summary.max_slack_elements == 0);
    REQUIRE(r->x(node1) == Approx(x1));
    REQUIRE(r->x(node2) == Approx(x2));
    return Arrivals{highest_peak(r->sink.t, node_velocity(*r, node1, axis)),
                    highest_peak(r->sink.t, node_velocity(*r, node2, axis))};
  };

  SECTION("lateral: c = sqrt(T / mu)") {
    // The invented string above, 4 m long: c = sqrt(10 N / 1e-3 kg/m) = 100 m/s. V = 0.1 m/s:
    // slopes up to V / (2c) = 5e-4, linear.
    const double c = std::sqrt(kStringT / kStringMu), speed = 0.1;
    BenchSpec s = taut_string(elements);
    s.length_m = length;
    s.duration_s = (x2 - x0 + 3.0 * sigma) / c;
    s.output_interval_s = sigma / c / 20.0;
    s.rtol = 1e-8;
    s.atol_velocity_m_s = 1e-9;
    s.initial_yaml = gaussian_kicks(east, speed);
    const Arrivals a = arrivals(s, east);
    const double measured = (x2 - x1) / (a.p2.t_s - a.p1.t_s);
    CAPTURE(measured, c, measured / c - 1.0, a.p1.t_s, (x1 - x0) / c, a.p2.t_s, (x2 - x0) / c, a.p2.value);
    CHECK(measured == Approx(c).epsilon(0.01));
    CHECK(a.p1.t_s == Approx((x1 - x0) / c).epsilon(0.01));
    CHECK(a.p2.t_s == Approx((x2 - x0) / c).epsilon(0.01));
    CHECK(a.p2.value == Approx(0.5 * speed).epsilon(0.01));  // d'Alembert: half the kick
  }

  SECTION("longitudinal: c = sqrt(E / rho)") {
    // Invented cable: rho = 1000 kg/m^3, E = 1e9 Pa -> c = 1000 m/s, held at both ends with a
    // pretension of 1 N on A = 1e-6 m^2 (strain T / EA = 1e-3). The bench's masses are rho A
    // per stretched length and its stiffness EA per unstretched length, so the discrete wave
    // speed is sqrt(E (1 + T / EA) / rho): 0.05 % above sqrt(E / rho), negligible here.
    // V = 0.1 m/s: the pulse's strain V / (2c) = 5e-5 stays far below the pretension strain,
    // so no element goes slack.
    const double c = std::sqrt(1e9 / 1000.0), speed = 0.1;
    BenchSpec s;
    s.length_m = length;
    s.area_m2 = 1e-6;
    s.density_kg_m3 = 1000.0;
    s.youngs_modulus_pa = 1e9;
    s.far_end_fixed = true;
    s.pretension_n = 1.0;
    s.elements = elements;
    s.duration_s = (x2 - x0 + 3.0 * sigma) / c;
    s.output_interval_s = sigma / c / 20.0;
    s.rtol = 1e-8;
    s.atol_position_m = 1e-12;
    s.atol_velocity_m_s = 1e-9;
    s.initial_yaml = gaussian_kicks(along, speed);
    const Arrivals a = arrivals(s, along);
    const double measured = (x2 - x1) / (a.p2.t_s - a.p1.t_s);
    CAPTURE(measured, c, measured / c - 1.0, a.p1.t_s, (x1 - x0) / c, a.p2.t_s, (x2 - x0) / c, a.p2.value);
    CHECK(measured == Approx(c).epsilon(0.01));
    CHECK(a.p1.t_s == Approx((x1 - x0) / c).epsilon(0.01));
    CHECK(a.p2.t_s == Approx((x2 - x0) / c).epsilon(0.01));
    CHECK(a.p2.value == Approx(0.5 * speed).epsilon(0.01));
  }
}

namespace {
/// The Kelvin-Voigt check below, run with one integration method.
void check_kelvin_voigt_decay(const std::string& method) {
  // Stress E (eps + tau eps_t) gives rho u_tt = E u_xx + E tau u_xxt; each mode obeys
  // q'' + tau omega_n^2 q' + omega_n^2 q = 0, so zeta_n = omega_n tau / 2 (stiffness-
  // proportional Rayleigh damping; Meirovitch, Elements of Vibration Analysis; recalled from
  // memory). The lumped model's damping matrix is exactly tau times its axial stiffness
  // matrix, so the same holds for its discrete modes; zeta is predicted from the measured
  // undamped frequency omega_n = sqrt(omega_d^2 + sigma^2) of the run itself (omega_d the
  // damped frequency, sigma the decay rate), which differs from the continuous bar's by 1e-5.
  // tau is set for zeta_1 = 0.02 on the continuous bar. Measured by the logarithmic decrement
  // over m cycles, delta = ln(p_0 / p_m) / m, zeta = delta / sqrt(4 pi^2 + delta^2) (Thomson,
  // Theory of Vibration with Applications, ch. 2; recalled from memory).
  const double tau = 2.0 * 0.02 / bar_omega(1);
  const auto r = run_bar_mode(1, tau, 8.5, 50, method);
  const std::vector<double> q = modal_coordinate(*r, along, bar_shape(*r, 1));
  const std::vector<Peak> p = maxima(r->sink.t, q);
  REQUIRE(p.size() >= 8);
  const double m = static_cast<double>(p.size() - 1);
  const double delta = std::log(p.front().value / p.back().value) / m;
  const double zeta = delta / std::sqrt(4.0 * pi * pi + delta * delta);
  const double omega_d = 2.0 * pi * crossing_frequency_hz(r->sink.t, q);
  const double sigma = delta * omega_d / (2.0 * pi);
  const double omega_n = std::sqrt(omega_d * omega_d + sigma * sigma);
  const double expected = omega_n * tau / 2.0;
  CAPTURE(method, zeta, expected, zeta / expected - 1.0, omega_n, bar_omega(1), p.size(), r->summary.stats.steps);
  CHECK(zeta == Approx(expected).epsilon(0.02));
}
}  // namespace

TEST_CASE("Kelvin-Voigt damping of the bar's fundamental", "[bench]") { check_kelvin_voigt_decay("erk"); }

TEST_CASE("the implicit methods keep the string's frequency and the bar's physical damping", "[bench]") {
  // bdf and esdirk damp unresolved modes numerically (both are L-stable); at rtol 1e-8 that
  // must not show in a resolved mode: the string's fundamental within 1e-4 of the beaded
  // string's (French, above) and the bar's Kelvin-Voigt damping ratio within 2 % of tau
  // omega / 2 (Meirovitch, above).
  for (const std::string method : {"bdf", "esdirk"}) {
    const double measured = measured_string_frequency_hz(1, 50, method);
    const double discrete = beaded_string_frequency_hz(1, 50);
    CAPTURE(method, measured, discrete, measured / discrete - 1.0);
    CHECK(measured == Approx(discrete).epsilon(1e-4));
    check_kelvin_voigt_decay(method);
  }
}

TEST_CASE("taut string: frequency error falls as 1/N^2 with the mesh", "[bench]") {
  // Lumped masses on a string: the error of mode n is 1 - sin(x)/x ~ x^2/6, x = n pi / (2N)
  // (from the beaded-string frequency above), second order in the element length. Mode 3
  // on 10, 20, 40 elements: predicted errors 3.6 %, 0.92 %, 0.23 %.
  const int n = 3;
  const double exact = n / (2.0 * kStringL) * std::sqrt(kStringT / kStringMu);
  double previous = 0.0;
  for (int elements : {10, 20, 40}) {
    const double error = std::abs(measured_string_frequency_hz(n, elements) / exact - 1.0);
    const double predicted = 1.0 - beaded_string_frequency_hz(n, elements) / exact;
    CAPTURE(elements, error, predicted, previous / error);
    CHECK(error == Approx(predicted).epsilon(0.01));
    if (previous > 0.0) {
      // Halving h divides a second-order error by 4 (3.5..4.5 allows the x^4 term at N = 10).
      CHECK(previous / error > 3.5);
      CHECK(previous / error < 4.5);
    }
    previous = error;
  }
}
