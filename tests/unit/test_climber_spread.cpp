// The smooth spread of a climber's load (models/load_spread.hpp) against independent references:
// the weights against a direct quadrature of their defining integral and their derivatives
// against finite differences; the mass and Newton solves against the matrices multiplied out and
// a finite-difference Jacobian; runs against the point load (the method it replaces, on the same
// mesh) and against the invariants it must keep (the drive's work and the energy, no impulse at a
// node crossing).
#include "catch_compat.hpp"

#include <algorithm>
#include <cmath>
#include <memory>
#include <random>

#include "memory_sink.hpp"
#include "models/load_spread.hpp"
#include "solver/assembly/mesh.hpp"
#include "solver/integration/initial_state.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"

using namespace hawser;

namespace {

const std::string kDemo = std::string(HAWSER_SOURCE_DIR) + "/scenarios/demo.yaml";

/// A graded mesh in s [m]: 12 elements growing by 1.3 from 1 km.
std::vector<double> graded_nodes() {
  std::vector<double> s{0.0};
  double len = 1000.0;
  for (int e = 0; e < 12; ++e, len *= 1.3) s.push_back(s.back() + len);
  return s;
}

std::size_t element_of(const std::vector<double>& s, double x) {
  const long e = static_cast<long>(std::upper_bound(s.begin(), s.end(), x) - s.begin()) - 1;
  return static_cast<std::size_t>(std::min<long>(std::max<long>(e, 0), static_cast<long>(s.size()) - 2));
}

/// The hat function of node k, the end elements continued linearly (as load_spread.hpp says).
double hat(const std::vector<double>& s, std::size_t k, double x) {
  const std::size_t e = element_of(s, x);
  const double len = s[e + 1] - s[e];
  if (k == e) return (s[e + 1] - x) / len;
  if (k == e + 1) return (x - s[e]) / len;
  return 0.0;
}

/// The defining integral w_k(s) = int hat_k(sigma) rho(sigma - s) dsigma by composite Simpson
/// (Abramowitz and Stegun 25.4.6) on 20,000 panels: an independent route to the weights.
double weight_by_quadrature(const std::vector<double>& s, std::size_t k, double pos, double a) {
  const int n = 20000;
  const double h = 2 * a / n;
  double sum = 0.0;
  for (int i = 0; i <= n; ++i) {
    const double u = -a + i * h, t = u / a;
    const double rho = 15.0 / (16.0 * a) * (1 - t * t) * (1 - t * t);
    const double c = (i == 0 || i == n) ? 1.0 : (i % 2 ? 4.0 : 2.0);
    sum += c * hat(s, k, pos + u) * rho;
  }
  return sum * h / 3.0;
}

double weight(const SpreadWeights& w, std::size_t k) {
  return (k >= w.first && k < w.first + w.count) ? w.w[k - w.first] : 0.0;
}
double weight_d(const SpreadWeights& w, std::size_t k, int order) {
  if (k < w.first || k >= w.first + w.count) return 0.0;
  return order == 1 ? w.dw[k - w.first] : w.ddw[k - w.first];
}

struct Run {
  TetherModel model;
  testing::MemorySink sink;
  RunSummary summary;
};

std::unique_ptr<Run> run(const Scenario& sc) {
  auto r = std::make_unique<Run>();
  r->model = build_model(sc);
  TetherSystem sys(r->model);
  r->summary = run_simulation(sys, initial_state(sys, sc.initial), run_options(sc.simulation, sys.layout()), r->sink);
  return r;
}

}  // namespace

TEST_CASE("smooth spread: weights are the window's average of the shape functions", "[climber][spread]") {
  const std::vector<double> s = graded_nodes();
  const LoadSpreader sp(s, LoadSpread::smooth, 1.0);
  const double a = sp.half_width_m();
  CHECK(a == Approx(1000.0));  // one shortest element
  double worst_w = 0.0, worst_sum = 0.0, worst_lin = 0.0, worst_d1 = 0.0, worst_d2 = 0.0;
  for (double pos : {0.0, 300.0, 999.0, 1000.0, 1700.0, 2300.0, 5000.0, 20000.0, s.back() - 400.0, s.back()}) {
    const SpreadWeights w = sp.at(pos, element_of(s, pos));
    REQUIRE(w.count <= SpreadWeights::kMaxNodes);
    double sum = 0.0, lin = 0.0;
    for (std::size_t k = 0; k < s.size(); ++k) {
      worst_w = std::max(worst_w, std::abs(weight(w, k) - weight_by_quadrature(s, k, pos, a)));
      sum += weight(w, k);
      lin += weight(w, k) * s[k];
      // Derivatives against central differences of the closed-form weights (step 1 m).
      const double h = 1.0;
      const SpreadWeights p = sp.at(pos + h, element_of(s, pos + h)), m = sp.at(pos - h, element_of(s, pos - h));
      const double d1 = (weight(p, k) - weight(m, k)) / (2 * h);
      const double d2 = (weight(p, k) - 2 * weight(w, k) + weight(m, k)) / (h * h);
      worst_d1 = std::max(worst_d1, std::abs(d1 - weight_d(w, k, 1)) * a);
      worst_d2 = std::max(worst_d2, std::abs(d2 - weight_d(w, k, 2)) * a * a);
    }
    // A symmetric kernel of unit mass keeps the partition of unity and reproduces linear
    // fields (the moments of the convolution).
    worst_sum = std::max(worst_sum, std::abs(sum - 1.0));
    worst_lin = std::max(worst_lin, std::abs(lin - pos) / a);
  }
  INFO("weights against quadrature " << worst_w << "; sum - 1 " << worst_sum << "; sum w s - s " << worst_lin
                                     << " a; derivatives against differences " << worst_d1 << ", " << worst_d2);
  CHECK(worst_w < 1e-9);
  CHECK(worst_sum < 1e-12);
  CHECK(worst_lin < 1e-12);
  CHECK(worst_d1 < 1e-5);
  CHECK(worst_d2 < 1e-3);
}

TEST_CASE("smooth spread: w, w' and w'' are continuous where the point load's kink", "[climber][spread]") {
  // Across node 5 the point weights' slopes jump (1/L4 to -1/L5 for node 5); the smooth ones
  // change by O(eps) only.
  const std::vector<double> s = graded_nodes();
  const LoadSpreader smooth(s, LoadSpread::smooth, 1.0), point(s, LoadSpread::point, 1.0);
  const double eps = 1e-6 * (s[6] - s[5]);
  const double below = s[5] - eps, above = s[5] + eps;
  double jump_smooth = 0.0, jump_point = 0.0;
  for (std::size_t k = 3; k <= 7; ++k)
    for (int order : {1, 2}) {
      const double scale = order == 1 ? 1000.0 : 1e6;  // a, a^2 [m]
      jump_smooth = std::max(jump_smooth, scale * std::abs(weight_d(smooth.at(above, 5), k, order) -
                                                           weight_d(smooth.at(below, 4), k, order)));
      if (order == 1)
        jump_point = std::max(jump_point, scale * std::abs(weight_d(point.at(above, 5), k, 1) -
                                                           weight_d(point.at(below, 4), k, 1)));
    }
  INFO("largest jump of a derivative across the node: smooth " << jump_smooth << ", point " << jump_point);
  CHECK(jump_point > 0.5);
  CHECK(jump_smooth < 1e-5);
}

TEST_CASE("smooth spread: the mass solve and the Newton solver are exact", "[climber][spread][jacobian]") {
  // As the point-load test in test_climbers.cpp: M a = F with M = lumped masses + m w w^T per
  // climber multiplied out, and (I - gamma J) x = b against a dense finite-difference J.
  const std::string text =
      "name: spread check\nplanet: earth\nmaterial: kestrel_k100\n"
      "tether: {profile: constant_stress, safety_factor: 2, base_design_load: 196.1 kN, top_altitude: 100000 km,\n"
      "         section: {shape: ribbon, width_to_thickness: 1000}}\n"
      "counterweight: {mass: computed}\nanchor: {latitude: 0 deg, longitude: -160 deg}\n"
      "mesh: {elements: 12, climber_load: smooth, climber_load_width: 1.5}\n"
      "simulation: {duration: 1 h, output_interval: 1 h}\n"
      "climbers:\n"
      "  - {name: a, mass: 20 t, from: 10000 km, to: 30000 km, direction: up, cruise_speed: 200 km/h,"
      " acceleration: 0.5, deceleration: 0.5}\n"
      "  - {name: b, mass: 7 t, from: 60000 km, to: 40000 km, direction: down, cruise_speed: 300 km/h,"
      " acceleration: 0.5, deceleration: 0.5}\n";
  const Scenario sc = load_scenario_text(text, "spread.yaml", {"material.damping_time=0.3"});
  const TetherModel model = build_model(sc);
  TetherSystem sys(model);
  const double t = 3600.0;
  const std::vector<Attachment> at = model.climbers->attachments(t);
  REQUIRE(at.size() == 2);
  for (const Attachment& a : at) CHECK(a.spread.count >= 4);  // beyond the band
  const std::size_t n = sys.size(), n_dyn = sys.layout().dynamic();  // the quadratures (and work channels) follow
  std::mt19937 rng(5);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  std::vector<double> y(n, 0.0);
  for (std::size_t k = sys.layout().first_free(); k <= sys.layout().last_free(); ++k)
    for (int c = 0; c < 3; ++c) {
      y[sys.layout().u(k, c)] = 500.0 * u(rng);
      y[sys.layout().v(k, c)] = 2.0 * u(rng);
    }
  std::vector<double> f(n);
  sys.rhs(t, y.data(), f.data());
  Matrix3X x, v;
  sys.node_state(t, y.data(), x, v);
  Matrix3X force = Matrix3X::Zero(3, model.nodes());
  const TetherState s{t, x, v, model.mesh.node_mass};
  for (const ForceModel* m : model.forces()) m->add_forces(s, force);
  Eigen::MatrixXd mass = model.mesh.node_mass.asDiagonal();
  for (const Attachment& a : at)
    for (std::size_t i = 0; i < a.spread.count; ++i)
      for (std::size_t j = 0; j < a.spread.count; ++j)
        mass(a.spread.first + i, a.spread.first + j) += a.mass_kg * a.spread.w[i] * a.spread.w[j];
  Matrix3X acc = Matrix3X::Zero(3, model.nodes());
  for (std::size_t k = sys.layout().first_free(); k <= sys.layout().last_free(); ++k)
    for (int c = 0; c < 3; ++c) acc(c, k) = f[sys.layout().v(k, c)];
  const Matrix3X ma = acc * mass;
  double worst = 0.0, scale = 0.0;
  for (std::size_t k = sys.layout().first_free(); k <= sys.layout().last_free(); ++k) {
    worst = std::max(worst, (ma.col(k) - force.col(k)).cwiseAbs().maxCoeff());
    scale = std::max(scale, force.col(k).cwiseAbs().maxCoeff());
  }
  INFO("M a - F: " << worst << " N of " << scale << " N");
  CHECK(worst < 1e-10 * scale);

  std::vector<double> jac(n_dyn * n_dyn), fp(n), fm(n);
  for (std::size_t c = 0; c < n_dyn; ++c) {
    const double h = (c % StateLayout::kPerNode < 3) ? 1.0 : 1e-3;
    std::vector<double> yp = y, ym = y;
    yp[c] += h;
    ym[c] -= h;
    sys.rhs(t, yp.data(), fp.data());
    sys.rhs(t, ym.data(), fm.data());
    for (std::size_t r = 0; r < n_dyn; ++r) jac[r * n_dyn + c] = (fp[r] - fm[r]) / (2 * h);
  }
  for (double gamma : {1e-3, 0.5, 30.0}) {
    sys.newton_jacobian(t, y.data());
    sys.newton_factor(gamma);
    std::vector<double> b(n), sol(n, 0.0);
    for (auto& e : b) e = u(rng);
    sys.newton_solve(b.data(), sol.data());
    double err = 0.0, bscale = 0.0;
    for (std::size_t r = 0; r < n_dyn; ++r) {
      double lhs = sol[r];
      for (std::size_t c = 0; c < n_dyn; ++c) lhs -= gamma * jac[r * n_dyn + c] * sol[c];
      err = std::max(err, std::abs(lhs - b[r]));
      bscale = std::max(bscale, std::abs(b[r]));
    }
    INFO("gamma " << gamma << ": residual " << err << " of " << bscale);
    CHECK(err < 1e-6 * bscale);
  }
}

namespace {

/// The peaks of a short transit: lateral offsets (east-west and north-south together, from
/// the starting state) of the nodes nearest 1,000 km, 10,000 km and the top, and of the
/// climber's Coriolis force.
struct TransitPeaks {
  double offset_m[3] = {0, 0, 0};
  double coriolis_n = 0;       // its peak [N]
  double mean_coriolis_n = 0;  // its mean over the outputs from 10 min to 8 h [N]
  long steps = 0;
};

TransitPeaks short_transit(const std::string& load, int elements, const std::string& width = "1") {
  // The demo tether (scenarios/demo.yaml) on uniform elements; a 20 t climber from the
  // anchor to 3,000 km at 200 km/h, 8 h.
  const auto r = run(load_scenario(
      kDemo, {"mesh.elements=" + std::to_string(elements), "mesh.grading=uniform", "mesh.climber_load=" + load, "mesh.climber_load_width=" + width, "initial.displacements=[]",
              "simulation.duration=8 h", "simulation.output_interval=5 min", "simulation.atol_velocity=1e-4",
              "climbers=[{name: c, mass: 20 t, from: 0 km, to: 3000 km, direction: up, cruise_speed: 200 km/h, "
              "acceleration: 0.5, deceleration: 0.5}]"}));
  REQUIRE(r->summary.status == RunStatus::complete);
  const std::vector<double> alt = reference_distance(r->model.mesh);
  std::size_t nodes[3];
  const double targets[2] = {1000e3, 10000e3};
  for (int i = 0; i < 2; ++i)
    nodes[i] = static_cast<std::size_t>(std::min_element(alt.begin(), alt.end(), [&](double a, double b) {
                                          return std::abs(a - targets[i]) < std::abs(b - targets[i]);
                                        }) -
                                        alt.begin());
  nodes[2] = r->model.nodes() - 1;
  TransitPeaks p;
  p.steps = r->summary.stats.steps;
  int cruise = 0;
  for (std::size_t o = 0; o < r->sink.t.size(); ++o) {
    for (int i = 0; i < 3; ++i) {
      const Eigen::Vector3d u = r->sink.x[o].col(nodes[i]) - r->model.mesh.position.col(nodes[i]);
      p.offset_m[i] = std::max(p.offset_m[i], std::hypot(u.y(), u.z()));
    }
    std::vector<std::vector<double>> rows(10);
    const TetherState s{r->sink.t[o], r->sink.x[o], r->sink.v[o], r->model.mesh.node_mass,
                        &r->sink.d[o].acceleration};
    r->model.climbers->sample_outputs(s, {}, rows);
    const double cor = std::sqrt(rows[6][0] * rows[6][0] + rows[6][1] * rows[6][1] + rows[6][2] * rows[6][2]);
    p.coriolis_n = std::max(p.coriolis_n, cor);
    if (r->sink.t[o] >= 600.0) {
      p.mean_coriolis_n += cor;
      ++cruise;
    }
  }
  p.mean_coriolis_n /= cruise;
  return p;
}

}  // namespace

TEST_CASE("smooth spread: a short transit's peaks agree with the point load's on the same mesh",
          "[climber][spread]") {
  // The point load, stopping at every node crossing, is the method the smooth spread replaces
  // (issue 14: within 0.5 %).
  const TransitPeaks point = short_transit("point", 800), smooth = short_transit("smooth", 800);
  const char* where[3] = {"1,000 km", "10,000 km", "the top"};
  for (int i = 0; i < 3; ++i) {
    INFO("peak lateral offset at " << where[i] << ": point " << point.offset_m[i] << " m, smooth "
                                   << smooth.offset_m[i] << " m");
    CHECK(point.offset_m[i] > 10.0);
    CHECK(smooth.offset_m[i] == Approx(point.offset_m[i]).epsilon(0.005));
  }
  // The Coriolis force -2 m Omega x v_c: with the point load v_c has a sawtooth at the element
  // passing period (measured here: from 175 N just after a crossing down to 156 N before the
  // next, the ribbon's kink under the climber), which the smooth load follows at its mean; so
  // its mean over the run agrees, and its peak lies within the point load's.
  INFO("Coriolis force: point mean " << point.mean_coriolis_n << " N, peak " << point.coriolis_n
                                     << " N; smooth mean " << smooth.mean_coriolis_n << " N, peak "
                                     << smooth.coriolis_n << " N; steps " << point.steps << " and " << smooth.steps);
  CHECK(smooth.mean_coriolis_n == Approx(point.mean_coriolis_n).epsilon(0.005));
  CHECK(smooth.coriolis_n <= point.coriolis_n);
  CHECK(smooth.steps < point.steps);
}

namespace {
const std::string kString =
    "name: a bead on a string\n"
    "material: {density: 1000, youngs_modulus: 1e9, ultimate_strength: 1e12, damping_time: 0, kind: invented}\n"
    "field: {kind: uniform, gravity: 0, cable_length: 10, cable_area: 1e-6, far_end: fixed, pretension: 100}\n"
    "mesh: {elements: 40}\n"
    "simulation: {duration: 0.2, output_interval: 0.0047, method: bdf, rtol: 1e-9, atol_position: 1e-10, "
    "atol_velocity: 1e-8}\n"
    "initial:\n  displacements:\n"
    "    - {direction: east, amplitude: 0.05, from: 0, to: 3.3333333333333333}\n"
    "    - {direction: east, amplitude: -0.05, from: 3.3333333333333333, to: 6.6666666666666667}\n"
    "    - {direction: east, amplitude: 0.05, from: 6.6666666666666667, to: 10}\n"
    "climber_speeds: over_unstretched_ribbon\n"
    "climbers: [{name: bead, mass: 0.002, from: 0.6, to: 9.4, direction: up, cruise_speed: 19, acceleration: 2000, "
    "deceleration: 2000}]\n";

/// Largest |W - (E - E0)| over the run, relative to the largest drive work W.
double energy_mismatch(const std::string& load) {
  const auto r = run(load_scenario_text(kString, "string.yaml", {"mesh.climber_load=" + load}));
  REQUIRE(r->summary.status == RunStatus::complete);
  auto energy = [](const TetherDiagnostics& d) { return d.kinetic_j + d.potential_j + d.strain_j + d.climber_j; };
  const double e0 = energy(r->sink.d.front());
  double work = 0.0, worst = 0.0;
  for (const TetherDiagnostics& d : r->sink.d) {
    work = std::max(work, std::abs(d.drive_work_j));
    worst = std::max(worst, std::abs(d.drive_work_j - (energy(d) - e0)));
  }
  REQUIRE(work > 0.1);
  return worst / work;
}
}  // namespace

TEST_CASE("smooth spread: the drive's work closes the energy through every node crossing",
          "[climber][spread][conservation]") {
  // The vibrating string of test_climbers.cpp (a bead at 19 m/s on a string in its third
  // mode): the work-energy theorem W = E - E0 (Goldstein, Classical Mechanics, the Jacobi
  // integral) over the whole run, crossings included. The point load loses energy without
  // work at each crossing (test_climbers.cpp: 5 to 9 % over the run); the smooth one must not.
  const double smooth = energy_mismatch("smooth"), point = energy_mismatch("point");
  INFO("largest |W - (E - E0)| / W: smooth " << smooth << ", point " << point);
  CHECK(smooth < 1e-4);
  CHECK(point > 1e-2);  // the check can tell
}

TEST_CASE("smooth spread: crossing a node exerts no impulse", "[climber][spread]") {
  // On the string bent in its third mode, the bead's momentum m v_c on either side of a node
  // crossing, the tether's state held: with the point load it jumps by
  // m s' (d_k / L_k - d_{k-1} / L_{k-1}) (d the elements' chords; physics.md section 5, v_c =
  // w^T v + xi' d), which the tether does not feel: an impulse the model never applies.
  for (const char* load : {"point", "smooth"}) {
    const Scenario sc = load_scenario_text(kString, "string.yaml", {std::string("mesh.climber_load=") + load});
    const TetherModel m = build_model(sc);
    TetherSystem sys(m);
    const std::vector<double> y = initial_state(sys, sc.initial);
    const ClimberProfile& prof = m.climbers->climbers()[0].profile;
    const std::vector<double>& s0 = m.equilibrium.s0_m;
    const std::vector<double> crossings = prof.crossing_times(s0);
    REQUIRE(crossings.size() > 10);
    const double tc = crossings[crossings.size() / 2], eps = 1e-9;
    Matrix3X x, v;
    sys.node_state(tc, y.data(), x, v);
    auto momentum = [&](double t) -> Eigen::Vector3d {
      std::vector<std::vector<double>> rows(10);
      const TetherState s{t, x, v, m.mesh.node_mass};
      m.climbers->sample_outputs(s, {}, rows);
      return Eigen::Vector3d(rows[4][0], rows[4][1], rows[4][2]) * 0.002;
    };
    const double jump = (momentum(tc + eps) - momentum(tc - eps)).norm();
    const std::size_t k = static_cast<std::size_t>(std::lower_bound(s0.begin(), s0.end(), prof.at(tc).s_m - 1e-12) - s0.begin());
    const Eigen::Vector3d kink = (x.col(k + 1) - x.col(k)) / (s0[k + 1] - s0[k]) - (x.col(k) - x.col(k - 1)) / (s0[k] - s0[k - 1]);
    const double expected = 0.002 * prof.at(tc).speed_m_s * kink.norm();
    INFO(load << ": momentum jump " << jump << " kg m/s at the crossing of node " << k << "; the point load's closed form "
              << expected);
    REQUIRE(expected > 1e-6);
    if (std::string(load) == "point")
      CHECK(jump == Approx(expected).epsilon(1e-6));
    else
      CHECK(jump < 1e-6 * expected);
  }
}

TEST_CASE("smooth spread: its departure from the point load falls as the element length squared",
          "[climber][spread][convergence]") {
  // The window's half width is one element, so the smoothed load differs from the point load
  // by O(L^2) (a symmetric kernel's second moment): halving L should divide the difference of
  // the top's peak offset by about 4 (a first-order error would give 2). Measured: 417 m at
  // N = 200, 95 m at N = 400 (ratio 4.4).
  const TransitPeaks p200 = short_transit("point", 200), s200 = short_transit("smooth", 200);
  const TransitPeaks p400 = short_transit("point", 400), s400 = short_transit("smooth", 400);
  const double d200 = std::abs(s200.offset_m[2] - p200.offset_m[2]);
  const double d400 = std::abs(s400.offset_m[2] - p400.offset_m[2]);
  INFO("top's peak offset, smooth - point: " << d200 << " m at N = 200, " << d400 << " m at N = 400");
  REQUIRE(d400 > 0.0);
  CHECK(d200 / d400 > 3.0);
  CHECK(d200 < 0.005 * p200.offset_m[2]);
}
