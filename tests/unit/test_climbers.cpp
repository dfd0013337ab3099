// Climbers (physics.md section 5): the prescribed profiles, the consistent-inertia load on the
// tether, and the runs that carry them. Checks against closed forms (kinematics, the Coriolis
// force), against an independent formulation (a climber parked on a node is that node made
// heavier; finite differences of the right-hand side for the Newton solver) and against
// invariants (angular momentum and the anchor's torque; the drive's work and the energy).
#include "catch_compat.hpp"

#include <Eigen/Geometry>
#include <algorithm>
#include <chrono>
#include <cmath>
#include <iomanip>
#include <map>
#include <memory>
#include <random>
#include <sstream>

#include "memory_sink.hpp"
#include "models/climber_profile.hpp"
#include "solver/assembly/equilibrium.hpp"
#include "solver/integration/initial_state.hpp"
#include "solver/integration/modal_analysis.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"
#include "solver/assembly/static_solver.hpp"

using namespace hawser;

namespace {

const std::string kDemo = std::string(HAWSER_SOURCE_DIR) + "/scenarios/demo.yaml";
constexpr double kOmega = 7.292115e-5;  // rad/s, WGS 84 (NIMA TR8350.2 Table 3.1), as config/planets.yaml
constexpr double kKmh = 1.0 / 3.6;      // m/s per km/h (definition)

std::string number(double v) {
  std::ostringstream os;
  os << std::setprecision(17) << v;
  return os.str();
}

/// One climber entry of the `climbers:` list, in flow YAML (SI numbers unless a unit is given).
struct CaseClimber {
  std::string name = "c";
  std::string mass = "20000";
  std::string from = "0", to = "1000 km", direction = "up";
  std::string cruise = "200 km/h", accel = "0.5", decel = "0.5";
  std::string start_time = "0";
  std::string extra;  // more keys, e.g. ", dwells: [...]"
  std::string yaml() const {
    return "{name: " + name + ", mass: " + mass + ", from: " + from + ", to: " + to + ", direction: " + direction +
           ", cruise_speed: " + cruise + ", acceleration: " + accel + ", deceleration: " + decel +
           ", start_time: " + start_time + extra + "}";
  }
};

std::string climbers_override(const std::vector<CaseClimber>& cs) {
  std::string s = "climbers=[";
  for (std::size_t i = 0; i < cs.size(); ++i) s += (i ? ", " : "") + cs[i].yaml();
  return s + "]";
}

/// A small planet tether: the demo's design on `elements` elements graded from `first`, at
/// rest (no initial displacement), with the given climbers and simulation settings.
std::vector<std::string> small_tether(int elements, const std::string& first, const std::vector<CaseClimber>& cs,
                                      std::vector<std::string> more) {
  std::vector<std::string> o{"mesh.elements=" + std::to_string(elements), "mesh.grading=geometric",
                             "mesh.first_element_length=" + first, "initial.displacements=[]",
                             climbers_override(cs)};
  o.insert(o.end(), more.begin(), more.end());
  return o;
}

struct Run {
  Scenario scenario;
  TetherModel model;
  testing::MemorySink sink;
  RunSummary summary;
  double wall_s = 0.0;
};

std::unique_ptr<Run> run(const Scenario& sc) {
  auto r = std::make_unique<Run>();
  r->scenario = sc;
  r->model = build_model(sc);
  TetherSystem sys(r->model);
  const std::vector<double> y0 = initial_state(sys, sc.initial);
  const RunOptions opt = run_options(sc.simulation, sys.layout());
  const auto t0 = std::chrono::steady_clock::now();
  r->summary = run_simulation(sys, y0, opt, r->sink);
  r->wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return r;
}

/// One climber's outputs (ClimberLoad::output_fields order) at one recorded state.
struct ClimberSample {
  double s_m, altitude_m, on_tether;
  Eigen::Vector3d r, v;
  double drive_n;
  Eigen::Vector3d coriolis_n;
  Eigen::Vector2d offset_m;
  double tension_below_n, tension_above_n;
};

ClimberSample sample(const TetherModel& m, std::size_t climber, double t, const Matrix3X& x, const Matrix3X& v,
                     const Matrix3X* a) {
  const std::size_t nc = m.climbers->climbers().size();
  std::vector<std::vector<double>> rows(10 * nc);
  const TetherState s{t, x, v, m.mesh.node_mass, a};
  m.climbers->sample_outputs(s, {}, rows);
  const std::vector<double>* r = &rows[10 * climber];
  REQUIRE(r[3].size() == 3);
  return {r[0][0],
          r[1][0],
          r[2][0],
          {r[3][0], r[3][1], r[3][2]},
          {r[4][0], r[4][1], r[4][2]},
          r[5][0],
          {r[6][0], r[6][1], r[6][2]},
          {r[7][0], r[7][1]},
          r[8][0],
          r[9][0]};
}

ClimberSample sample(const Run& r, std::size_t climber, std::size_t output) {
  return sample(r.model, climber, r.sink.t[output], r.sink.x[output], r.sink.v[output],
                &r.sink.d[output].acceleration);
}

std::size_t output_at(const Run& r, double t) {
  for (std::size_t i = 0; i < r.sink.t.size(); ++i)
    if (std::abs(r.sink.t[i] - t) < 1e-6) return i;
  FAIL("no output at t = " << t);
  return 0;
}

/// First time the (monotone) profile reaches `pos`, by bisection on s(t): the direct search.
double first_reach(const ClimberProfile& p, double pos) {
  double lo = p.start_time(), hi = p.end_time();
  const int dir = p.direction();
  for (int i = 0; i < 200; ++i) {
    const double mid = 0.5 * (lo + hi);
    if (dir * (p.at(mid).s_m - pos) >= 0.0)
      hi = mid;
    else
      lo = mid;
  }
  return hi;
}

/// The reachable speed quoted in a ProfileError message ("... is 41.57 km/h") [m/s].
double quoted_speed(const std::string& message) {
  const auto end = message.rfind(" km/h");
  REQUIRE(end != std::string::npos);
  const auto begin = message.rfind(' ', end - 1) + 1;
  return std::stod(message.substr(begin, end - begin)) * kKmh;
}

}  // namespace

// ---- profiles ---------------------------------------------------------------------------------

TEST_CASE("a ramp profile reaches its end at L/v + v/(2a) + v/(2d)", "[climber][profile]") {
  // Constant-acceleration kinematics: accelerating from rest to v at a takes v/a and covers
  // v^2/(2a); the same for the deceleration at d; the rest is cruised at v. Total time
  // (L - v^2/(2a) - v^2/(2d))/v + v/a + v/d = L/v + v/(2a) + v/(2d) (elementary mechanics).
  const double L = 350e3, v = 200 * kKmh, a = 0.5, d = 0.2, t0 = 1234.5;
  for (int dir : {+1, -1}) {
    const double from = dir > 0 ? 20e3 : 20e3 + L, to = from + dir * L;
    const ClimberProfile p = ClimberProfile::ramps(t0, from, to, v, a, d, {});
    INFO("direction " << dir);
    CHECK(p.direction() == dir);
    CHECK(p.end_time() - t0 == Approx(L / v + v / (2 * a) + v / (2 * d)).epsilon(1e-13));
    CHECK(p.at(p.end_time()).s_m == Approx(to).epsilon(1e-14));
    CHECK(p.at(p.end_time() + 1e4).s_m == Approx(to).epsilon(1e-14));  // rests at the end
    CHECK(p.at(p.end_time() + 1e4).speed_m_s == 0.0);
    CHECK(p.at(t0 - 10.0).s_m == from);  // waits at the start
    // Half way up the acceleration ramp: speed v/2, distance (v/2)^2 / (2a).
    const ClimberProfile::Kinematics k = p.at(t0 + v / (2 * a));
    CHECK(k.speed_m_s == Approx(dir * v / 2).epsilon(1e-13));
    CHECK(k.accel_m_s2 == Approx(dir * a).epsilon(1e-13));
    CHECK(k.s_m - from == Approx(dir * v * v / (8 * a)).epsilon(1e-12));
    // Cruising: full speed, no acceleration.
    const ClimberProfile::Kinematics c = p.at(t0 + 0.5 * (p.end_time() - t0));
    CHECK(c.speed_m_s == Approx(dir * v).epsilon(1e-13));
    CHECK(c.accel_m_s2 == 0.0);
    // Decelerating, v/(2d) before the end: speed v/2, distance left (v/2)^2 / (2d).
    const ClimberProfile::Kinematics e = p.at(p.end_time() - v / (2 * d));
    CHECK(e.speed_m_s == Approx(dir * v / 2).epsilon(1e-12));
    CHECK(e.accel_m_s2 == Approx(-dir * d).epsilon(1e-13));
    CHECK(to - e.s_m == Approx(dir * v * v / (8 * d)).epsilon(1e-9));
  }
}

TEST_CASE("dwell stops: each leg is a full ramp and the climber waits at the stop", "[climber][profile]") {
  // Two legs of 100 km and 250 km with a 600 s stop between: the sum of two single-leg times
  // (elementary kinematics as above) plus the stop.
  const double v = 150 * kKmh, a = 0.3, d = 0.4, stop = 600.0;
  const ClimberProfile p = ClimberProfile::ramps(0.0, 0.0, 350e3, v, a, d, {{100e3, stop}});
  auto leg = [&](double L) { return L / v + v / (2 * a) + v / (2 * d); };
  CHECK(p.end_time() == Approx(leg(100e3) + stop + leg(250e3)).epsilon(1e-13));
  for (double t : {leg(100e3) + 1.0, leg(100e3) + stop - 1.0}) {
    CHECK(p.at(t).s_m == Approx(100e3).epsilon(1e-13));
    CHECK(p.at(t).speed_m_s == 0.0);
  }
  CHECK_THROWS_AS(ClimberProfile::ramps(0.0, 0.0, 350e3, v, a, d, {{400e3, stop}}), ProfileError);
}

TEST_CASE("crossing times agree with a direct search", "[climber][profile]") {
  // Reference: bisection on s(t), which only uses at(); positions include a dwell stop (the
  // first arrival there counts) and ones outside the path (no crossing).
  std::mt19937 rng(5);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  const ClimberProfile up = ClimberProfile::ramps(100.0, 10e3, 510e3, 180 * kKmh, 0.4, 0.25, {{200e3, 900.0}});
  const ClimberProfile down = ClimberProfile::table(50.0, 400e3, 0.0, {{400e3, 0.0}, {300e3, 40.0}, {50e3, 60.0}, {0.0, 5.0}});
  for (const ClimberProfile* p : {&up, &down}) {
    std::vector<double> pos{200e3, -5e3, 1e9, p->from(), p->to()};
    for (int i = 0; i < 30; ++i) pos.push_back(std::min(p->from(), p->to()) + u(rng) * std::abs(p->to() - p->from()));
    const std::vector<double> ct = p->crossing_times(pos);
    std::vector<double> expected;
    for (double x : pos) {
      const double lo = std::min(p->from(), p->to()), hi = std::max(p->from(), p->to());
      if (x > lo && x < hi) expected.push_back(first_reach(*p, x));  // strictly inside the path
    }
    std::sort(expected.begin(), expected.end());
    REQUIRE(ct.size() == expected.size());
    // At a stop (the dwell) s(t) meets the target tangentially, so the search's answer is
    // uncertain by sqrt(2 ulp(s) / decel), about 1e-5 s: compare to 1e-4 s. There
    // crossing_times() may give the arrival or the departure (which one depends on round-off
    // in the summed ramp lengths); both are segment boundaries, hence stop times anyway.
    for (std::size_t i = 0; i < ct.size(); ++i) {
      const double x = p->at(ct[i]).s_m;
      const bool at_dwell = p == &up && std::abs(x - 200e3) < 1e-3;
      if (at_dwell && std::abs(ct[i] - expected[i]) > 1e-4) {
        CHECK(ct[i] == Approx(expected[i] + 900.0).margin(1e-4));  // the departure
        continue;
      }
      CHECK(ct[i] == Approx(expected[i]).margin(1e-4));
      CHECK(p->direction() * (p->at(ct[i] - 1e-3).s_m - x) < 0.0);  // not there before
    }
  }
}

TEST_CASE("a speed table: speed squared linear in distance between rows", "[climber][profile]") {
  // Constant acceleration on a stretch from v0 to v1 over length l: a = (v1^2 - v0^2)/(2 l),
  // duration 2 l/(v0 + v1) (elementary kinematics). Rows: rest at 0, 50 m/s at 10 km and
  // 90 km, rest at 100 km: 400 s + 1600 s + 400 s.
  const ClimberProfile p = ClimberProfile::table(0.0, 0.0, 100e3, {{0.0, 0.0}, {10e3, 50.0}, {90e3, 50.0}, {100e3, 0.0}});
  CHECK(p.end_time() == Approx(2400.0).epsilon(1e-13));
  CHECK(p.at(200.0).speed_m_s == Approx(25.0).epsilon(1e-13));
  CHECK(p.at(200.0).s_m == Approx(0.5 * 0.125 * 200.0 * 200.0).epsilon(1e-13));
  CHECK(p.at(1000.0).accel_m_s2 == 0.0);
  CHECK(p.at(2300.0).accel_m_s2 == Approx(-0.125).epsilon(1e-13));
  // Everywhere: v^2 is the linear interpolation of the table's v^2 at the current s.
  const std::vector<SpeedRow> rows{{0.0, 0.0}, {10e3, 50.0}, {90e3, 50.0}, {100e3, 0.0}};
  for (double t = 1.0; t < 2400.0; t += 37.0) {
    const auto k = p.at(t);
    std::size_t i = 0;
    while (i + 2 < rows.size() && k.s_m > rows[i + 1].at_m) ++i;
    const double f = (k.s_m - rows[i].at_m) / (rows[i + 1].at_m - rows[i].at_m);
    const double v2 = (1 - f) * rows[i].speed_m_s * rows[i].speed_m_s + f * rows[i + 1].speed_m_s * rows[i + 1].speed_m_s;
    CHECK(k.speed_m_s * k.speed_m_s == Approx(v2).epsilon(1e-9).margin(1e-9));
  }
  CHECK_THROWS_AS(ClimberProfile::table(0.0, 0.0, 100e3, {{0.0, 0.0}, {100e3, 0.0}}), ProfileError);
  CHECK_THROWS_AS(ClimberProfile::table(0.0, 0.0, 100e3, {{0.0, 0.0}, {90e3, 10.0}}), ProfileError);
}

TEST_CASE("a leg too short for the cruise speed names the reachable speed", "[climber][profile]") {
  // Accelerating at a then braking at d over L without cruising peaks at v with
  // v^2/(2a) + v^2/(2d) = L, i.e. v = sqrt(2 L a d / (a + d)) (elementary kinematics).
  const double L = 1000.0, a = 0.1, d = 0.2;
  const double reachable = std::sqrt(2 * L * a * d / (a + d));
  try {
    ClimberProfile::ramps(0.0, 0.0, L, 200 * kKmh, a, d, {});
    FAIL("expected a ProfileError");
  } catch (const ProfileError& e) {
    const std::string m = e.what();
    CHECK_THAT(m, ContainsSubstring("never reached"));
    CHECK(quoted_speed(m) == Approx(reachable).epsilon(2e-4));  // printed to 4 digits
  }
  // The quoted speed is the boundary: just below it flies, just above it does not.
  CHECK_NOTHROW(ClimberProfile::ramps(0.0, 0.0, L, 0.999 * reachable, a, d, {}));
  CHECK_THROWS_AS(ClimberProfile::ramps(0.0, 0.0, L, 1.001 * reachable, a, d, {}), ProfileError);
  // With a dwell, each leg is checked on its own length.
  CHECK_THROWS_AS(ClimberProfile::ramps(0.0, 0.0, 100 * L, 0.999 * reachable, a, d, {{0.5 * L, 10.0}}), ProfileError);
}

// ---- the load on the tether --------------------------------------------------------------------

TEST_CASE("at cruise the Coriolis force is 2 m Omega v: westward going up, eastward going down",
          "[climber][coriolis]") {
  // Rotating-frame equations of motion (Goldstein, Classical Mechanics, the Coriolis force
  // -2 m Omega x v; physics.md sections 4 and 8): with Omega = Omega z and a climber moving
  // radially (+x up) at speed v, -2 m Omega z x (v x) = -2 m Omega v y, i.e. westward (-y)
  // going up and eastward going down. The climber's speed is prescribed over the stretched
  // ribbon at rest (config/scenario_keys.yaml, climber_speeds), so its speed in space is v;
  // with climber_speeds: over_unstretched_ribbon it is v (1 + strain) with the element's
  // strain l / L0 - 1 (5.5 % here). Either way plus the tether's own motion under it: the
  // ribbon below a climber carries its weight W less tension and shortens, at about
  // v W / (E A) (0.3 m/s for 2 t; 0.08 m/s for the 500 kg used here, so within 1 %).
  const double m = 500.0, v = 200 * kKmh;
  for (const char* convention : {"over_stretched_ribbon", "over_unstretched_ribbon"})
  for (const char* dir : {"up", "down"}) {
    const bool up = std::string(dir) == "up";
    const bool stretched = std::string(convention) == "over_stretched_ribbon";
    CaseClimber c;
    c.mass = number(m);
    c.direction = dir;
    c.from = up ? "500 km" : "1500 km";
    c.to = up ? "1500 km" : "500 km";
    const Scenario sc = load_scenario(kDemo, small_tether(40, "50 km", {c}, {"simulation.duration=1 h",
                                                                              "simulation.output_interval=30 min",
                                                                              "simulation.atol_velocity=1e-4",
                                                                              std::string("climber_speeds=") + convention}));
    const auto r = run(sc);
    REQUIRE(r->summary.status == RunStatus::complete);
    const std::size_t i = output_at(*r, 3600.0);
    const ClimberSample cs = sample(*r, 0, i);
    // Cruising: 1 h is past the 111 s ramp and before the 5 h arrival.
    const ClimberProfile& p = r->model.climbers->climbers()[0].profile;
    REQUIRE(std::abs(p.at(3600.0).speed_m_s) == Approx(v).epsilon(1e-12));
    // The strain of the element the climber is on, at the equilibrium.
    const std::vector<double>& s0 = r->model.equilibrium.s0_m;
    const std::size_t e = static_cast<std::size_t>(std::upper_bound(s0.begin(), s0.end(), cs.s_m) - s0.begin()) - 1;
    const double l = (r->model.mesh.position.col(e + 1) - r->model.mesh.position.col(e)).norm();
    const double strain = l / r->model.equilibrium.l0_m[e] - 1.0;
    const double sign = up ? 1.0 : -1.0;
    INFO(convention << ", " << dir << ": Coriolis force " << cs.coriolis_n.transpose() << " N, velocity "
                    << cs.v.transpose() << " m/s, element strain " << strain);
    // East-west component: 2 m Omega v (times 1 + strain over the unstretched ribbon),
    // westward going up, eastward going down.
    const double speed = stretched ? v : v * (1 + strain);
    CHECK(cs.coriolis_n.y() == Approx(-sign * 2 * m * kOmega * speed).epsilon(0.01));
    CHECK(sign * cs.coriolis_n.y() < 0.0);
    // And exactly -2 m Omega z x v_c for the climber's own velocity (round-off).
    const Eigen::Vector3d expected = -2 * m * kOmega * Eigen::Vector3d::UnitZ().cross(cs.v);
    CHECK((cs.coriolis_n - expected).norm() < 1e-12 * expected.norm());
  }
}

namespace {
/// Random displacements and velocities of the free nodes (a state away from equilibrium).
std::vector<double> perturbed_state(const TetherSystem& sys, unsigned seed, double du_m, double dv_m_s) {
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  std::vector<double> y(sys.size(), 0.0);
  for (std::size_t k = sys.layout().first_free(); k <= sys.layout().last_free(); ++k)
    for (int a = 0; a < 3; ++a) {
      y[sys.layout().u(k, a)] = du_m * u(rng);
      y[sys.layout().v(k, a)] = dv_m_s * u(rng);
    }
  return y;
}

/// Classical fourth-order Runge-Kutta with a fixed step: the same sequence of operations for
/// any system, so two identical systems give identical trajectories to round-off.
std::vector<double> rk4(TetherSystem& sys, std::vector<double> y, double dt, int steps) {
  const std::size_t n = y.size();
  std::vector<double> k1(n), k2(n), k3(n), k4(n), w(n);
  double t = 0.0;
  for (int s = 0; s < steps; ++s) {
    sys.rhs(t, y.data(), k1.data());
    for (std::size_t i = 0; i < n; ++i) w[i] = y[i] + 0.5 * dt * k1[i];
    sys.rhs(t + 0.5 * dt, w.data(), k2.data());
    for (std::size_t i = 0; i < n; ++i) w[i] = y[i] + 0.5 * dt * k2[i];
    sys.rhs(t + 0.5 * dt, w.data(), k3.data());
    for (std::size_t i = 0; i < n; ++i) w[i] = y[i] + dt * k3[i];
    sys.rhs(t + dt, w.data(), k4.data());
    for (std::size_t i = 0; i < n; ++i) y[i] += dt / 6.0 * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]);
    t += dt;
  }
  return y;
}

double max_abs(const std::vector<double>& a, std::size_t n) {
  double m = 0.0;
  for (std::size_t i = 0; i < n; ++i) m = std::max(m, std::abs(a[i]));
  return m;
}
}  // namespace

TEST_CASE("a climber parked on a node is that node with the climber's mass added", "[climber][parked]") {
  // An independent formulation: with xi = 0 (or 1) the consistent mass m w w^T is m on that
  // node alone and the climber's forces (gravity, centrifugal, Coriolis at the node's own
  // position and velocity) are those of a point mass there, so the system is the plain
  // tether with node k's lumped mass increased by m (physics.md section 5). Model B is built
  // by hand that way: the plain (as-built) model, node mass changed, its loaded static state
  // solved with L0 fixed (the tether is built without the climber).
  const int n_el = 24, k = 7;
  const double m = 15000.0;
  const std::vector<std::string> base{"mesh.elements=" + std::to_string(n_el), "mesh.grading=geometric",
                                      "mesh.first_element_length=50 km", "simulation.duration=2 h",
                                      "simulation.output_interval=20 min", "simulation.rtol=1e-8",
                                      "simulation.atol_position=1e-6", "simulation.atol_velocity=1e-9"};
  auto with = [&](std::vector<std::string> o) {
    o.insert(o.begin(), base.begin(), base.end());
    return o;
  };
  // Model B: the plain tether with node k heavier.
  const Scenario plain = load_scenario(kDemo, with({"climbers=[]"}));
  TetherModel b = build_model(plain);
  const double altitude_k = reference_distance(b.mesh)[k];
  {
    StaticLoadSet loads;
    loads.description = "node k heavier";
    loads.bars = b.bars.get();
    loads.common = b.forces();  // bars, gravity, frame
    loads.built_mass_kg = b.mesh.node_mass;
    b.mesh.node_mass[k] += m;
    loads.loaded_mass_kg = b.mesh.node_mass;
    loads.first_free = 1;
    loads.last_free = b.nodes() - 1;
    const StaticState st = solve_static(loads, b.mesh.as_built_position);
    b.mesh.position = st.position_m;
    b.equilibrium.tension_n = st.tension_n;
  }
  TetherSystem sys_b(b);
  for (const char* dir : {"up", "down"}) {
    // Model A: a climber parked exactly at node k's altitude until long after the run, facing
    // up (it sits on element k at xi = 0) or down (element k-1 at xi = 1).
    CaseClimber c;
    c.mass = number(m);
    c.from = number(altitude_k);
    c.direction = dir;
    c.to = number(altitude_k + (std::string(dir) == "up" ? 1e5 : -1e5));
    c.start_time = "10 d";
    // The point load (the smooth one spreads a climber on a node over its neighbours too).
    const Scenario sc = load_scenario(kDemo, with({climbers_override({c}), "mesh.climber_load=point"}));
    const TetherModel a = build_model(sc);
    REQUIRE(a.climbers);
    const std::vector<Attachment> at = a.climbers->attachments(0.0);
    REQUIRE(at.size() == 1);
    INFO(dir << ": element " << at[0].element << ", xi " << at[0].xi);
    CHECK(at[0].element == (std::string(dir) == "up" ? k : k - 1));
    // Static states: the same unstretched lengths (the as-built tether's), and the same
    // tensions and positions to the convergence of two Newton solves (1e-10 relative).
    for (std::size_t e = 0; e < a.elements(); ++e) {
      CHECK(a.equilibrium.tension_n[e] == Approx(b.equilibrium.tension_n[e]).epsilon(1e-10));
      CHECK(a.equilibrium.l0_m[e] == Approx(b.equilibrium.l0_m[e]).epsilon(1e-15));
    }
    CHECK((a.mesh.position - b.mesh.position).cwiseAbs().maxCoeff() <
          1e-10 * b.mesh.position.cwiseAbs().maxCoeff());
    // Modes: the climber's consistent mass in M makes them those of the heavier node.
    ModalOptions mo;
    mo.modes = 6;
    const ModalResult ma = modal_analysis(a, mo), mb = modal_analysis(b, mo);
    REQUIRE(ma.modes.size() == mb.modes.size());
    for (std::size_t j = 0; j < ma.modes.size(); ++j) {
      INFO("mode " << j + 1 << ": " << ma.modes[j].period_s << " s against " << mb.modes[j].period_s << " s");
      CHECK(ma.modes[j].period_s == Approx(mb.modes[j].period_s).epsilon(1e-8));
    }
    // Right-hand sides and Newton solves at perturbed states.
    TetherSystem sys_a(a);
    // The same motion; the climber adds its energy budget's channels (quadratures) only.
    REQUIRE(sys_a.layout().dynamic() == sys_b.layout().dynamic());
    REQUIRE(sys_a.size() >= sys_b.size());
    const std::size_t n = sys_a.size(), n_dyn = sys_a.layout().dynamic();
    for (unsigned seed : {1u, 2u, 3u}) {
      const std::vector<double> y = perturbed_state(sys_a, seed, 2000.0, 3.0);
      std::vector<double> fa(n), fb(n), diff(n);
      sys_a.rhs(1000.0, y.data(), fa.data());
      sys_b.rhs(1000.0, y.data(), fb.data());
      for (std::size_t i = 0; i < n; ++i) diff[i] = fa[i] - fb[i];
      INFO("seed " << seed << ": largest |f| " << max_abs(fa, n_dyn) << ", largest difference " << max_abs(diff, n_dyn));
      CHECK(max_abs(diff, n_dyn) <= 1e-13 * max_abs(fa, n_dyn));
      sys_a.newton_jacobian(1000.0, y.data());
      sys_b.newton_jacobian(1000.0, y.data());
      sys_a.newton_factor(0.7);
      sys_b.newton_factor(0.7);
      std::vector<double> xa(n), rhs(n), xb(n, 0.0);
      for (std::size_t i = 0; i < n; ++i) xa[i] = rhs[i] = std::sin(1.0 + i);
      sys_a.newton_solve(xa.data(), xa.data());  // in place
      sys_b.newton_solve(rhs.data(), xb.data());
      for (std::size_t i = 0; i < n; ++i) diff[i] = xa[i] - xb[i];
      CHECK(max_abs(diff, n_dyn) <= 1e-12 * max_abs(xa, n_dyn));
    }
    // A short run of both from the demo's east-west displacement, first with one fixed-step
    // integrator (classical Runge-Kutta, the same operations on both): the same response to
    // round-off.
    const std::vector<double> y0 = initial_state(sys_a, sc.initial);
    const std::vector<double> ya = rk4(sys_a, y0, 0.25, 4 * 1800), yb = rk4(sys_b, y0, 0.25, 4 * 1800);
    std::vector<double> dy(n);
    for (std::size_t i = 0; i < n; ++i) dy[i] = ya[i] - yb[i];
    INFO("after 30 min: largest displacement or velocity " << max_abs(yb, n_dyn) << ", difference " << max_abs(dy, n_dyn));
    CHECK(max_abs(dy, n_dyn) < 1e-11 * max_abs(yb, n_dyn));
    // Then with the adaptive integrator the runs use: round-off differences can change its
    // step choices (61,720 against 63,031 steps measured), so the two agree to the
    // integration error only, here rtol = 1e-8 of the motion (plus what accumulates).
    auto run_of = [&](TetherSystem& sys, testing::MemorySink& sink) {
      return run_simulation(sys, y0, run_options(sc.simulation, sys.layout()), sink);
    };
    testing::MemorySink sa, sb;
    const RunSummary ra = run_of(sys_a, sa), rb = run_of(sys_b, sb);
    REQUIRE(ra.status == RunStatus::complete);
    REQUIRE(rb.status == RunStatus::complete);
    REQUIRE(sa.x.size() == sb.x.size());
    double worst = 0.0, largest = 0.0;
    for (std::size_t i = 0; i < sa.x.size(); ++i) {
      worst = std::max(worst, (sa.x[i] - sb.x[i]).cwiseAbs().maxCoeff());
      largest = std::max(largest, (sb.x[i] - b.mesh.position).cwiseAbs().maxCoeff());
    }
    INFO("largest displacement " << largest << " m, largest difference " << worst << " m; steps " << ra.stats.steps
                                 << " and " << rb.stats.steps);
    CHECK(largest > 1e3);  // it moved
    CHECK(worst < 1e-6 * largest);
  }
}

namespace {
/// Angular momentum of the climbers about the spin axis at output i [kg m^2/s].
double climber_lz(const Run& r, std::size_t i) {
  const TetherState s{r.sink.t[i], r.sink.x[i], r.sink.v[i], r.model.mesh.node_mass};
  return r.model.climbers->climber_angular_momentum(s, r.model.spin_rate_rad_s);
}
/// The climber's distance from the spin axis at output i [m].
double climber_rho(const Run& r, std::size_t climber, std::size_t i) {
  const ClimberSample c = sample(r, climber, i);
  return std::hypot(c.r.x(), c.r.y());
}
}  // namespace

TEST_CASE("a climber raised slowly gains m Omega (r2^2 - r1^2), paid by the anchor and the tether",
          "[climber][conservation]") {
  // Newton's second law for rotation (physics.md section 8): gravity has no moment about the
  // spin axis, so the angular momentum of tether plus climbers changes only by the anchor's
  // torque. A climber at rest in the rotating frame at distance rho from the axis has
  // L = m Omega rho^2, so raised from rho1 to rho2 and parked it gains m Omega (rho2^2 - rho1^2);
  // the anchor's angular impulse less the tether's own change must account for it. The
  // climber stays above element 0 (the anchor-torque quadrature sees element 0's pull only).
  // Material damping (retardation time 1 s) lets the tether settle after the climb.
  const double m = 5000.0;
  CaseClimber c;
  c.mass = number(m);
  c.from = "300 km";
  c.to = "2300 km";
  c.cruise = "400 km/h";
  c.accel = "0.05";
  c.decel = "0.05";
  const Scenario sc = load_scenario(kDemo, small_tether(30, "100 km", {c},
                                                        {"simulation.duration=12 h", "simulation.output_interval=1 h",
                                                         "material.damping_time=1 s", "simulation.rtol=1e-8",
                                                         "simulation.atol_position=1e-4", "simulation.atol_velocity=1e-6"}));
  const auto r = run(sc);
  REQUIRE(r->summary.status == RunStatus::complete);
  const std::size_t last = r->sink.t.size() - 1;
  REQUIRE(r->model.climbers->climbers()[0].profile.end_time() < r->sink.t[last] - 3600.0);  // parked for the last hour
  const double rho1 = climber_rho(*r, 0, 0), rho2 = climber_rho(*r, 0, last);
  const double gain = m * kOmega * (rho2 * rho2 - rho1 * rho1);
  const TetherDiagnostics &d0 = r->sink.d.front(), &d1 = r->sink.d.back();
  const double total_change = d1.angular_momentum_z - d0.angular_momentum_z;
  const double tether_change = total_change - (climber_lz(*r, last) - climber_lz(*r, 0));
  const double impulse = d1.anchor_angular_impulse;
  INFO("climber from " << rho1 << " m to " << rho2 << " m from the axis: m Omega (r2^2 - r1^2) = " << gain
                       << " kg m^2/s; anchor angular impulse " << impulse << ", tether's own change " << tether_change
                       << ", total change " << total_change << "; " << r->summary.stats.steps << " steps, "
                       << r->wall_s << " s");
  CHECK(rho2 - rho1 == Approx(2000e3).epsilon(0.1));  // it did climb (stretch and the tether's drop aside)
  CHECK(impulse - tether_change == Approx(gain).epsilon(0.01));
  CHECK(total_change == Approx(impulse).epsilon(0.01));
}

TEST_CASE("the drive's work is the change of the climber's and the tether's energy", "[climber][conservation]") {
  // Work-energy theorem in the rotating frame (Goldstein, Classical Mechanics: the Jacobi
  // integral; physics.md section 8): without damping the only non-conservative force is the
  // drive's, whose power R . (xi' d) is integrated along the run (drive_work_j); so
  // W(t) = E(t) - E(0), with E the tether's kinetic + potential + strain energy plus the
  // climbers' kinetic + potential energy.
  CaseClimber c;
  c.mass = "5000";
  c.from = "300 km";
  c.to = "1500 km";
  const Scenario sc = load_scenario(kDemo, small_tether(30, "100 km", {c},
                                                        {"simulation.duration=8 h", "simulation.output_interval=20 min",
                                                         "material.damping_time=0", "simulation.rtol=1e-8",
                                                         "simulation.atol_position=1e-4", "simulation.atol_velocity=1e-6"}));
  const auto r = run(sc);
  REQUIRE(r->summary.status == RunStatus::complete);
  auto energy = [](const TetherDiagnostics& d) { return d.kinetic_j + d.potential_j + d.strain_j + d.climber_j; };
  const double e0 = energy(r->sink.d.front());
  double largest = 0.0, worst = 0.0;
  for (const TetherDiagnostics& d : r->sink.d) {
    largest = std::max(largest, std::abs(energy(d) - e0));
    worst = std::max(worst, std::abs(d.drive_work_j - (energy(d) - e0)));
  }
  INFO("largest energy change " << largest << " J, largest mismatch with the drive's work " << worst << " J; "
                                << r->summary.stats.steps << " steps, " << r->wall_s << " s");
  REQUIRE(largest > 0.0);
  CHECK(worst < 0.01 * largest);
  CHECK(r->sink.d.back().drive_work_j > 0.0);  // lifting takes work
}

TEST_CASE("between node crossings the drive's work is the energy change, on a vibrating string",
          "[climber][conservation]") {
  // A sharper form of the work-energy check above, where the climber's relative-motion terms
  // matter: on a taut string vibrating in its third mode (laboratory bench, no gravity, no
  // rotation) a bead runs at 19 m/s, so the ribbon under it moves fast relative to it. The
  // balance W = E - E(0) holds exactly for the continuous motion between node crossings. At a
  // crossing the bead's velocity in space, w^T v + xi' d, jumps with the ribbon's kink at the
  // node (d / L0 changes from element to element) and the model applies no impulse, so the
  // energy jumps there without work (measured: up to 0.03 J of 1.1 J per output interval
  // holding a crossing, the totals off by 9 % at 40 elements, 5 % at 80 and 160); intervals
  // without a crossing are compared only.
  const std::string text =
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
      "climbers: [{name: bead, mass: 0.002, from: 0.6, to: 9.4, direction: up, cruise_speed: 19, acceleration: 2000, "
      "deceleration: 2000}]\n";
  const auto r = run(load_scenario_text(text, "string.yaml", {}));
  REQUIRE(r->summary.status == RunStatus::complete);
  auto balance = [](const TetherDiagnostics& d) {
    return d.drive_work_j - (d.kinetic_j + d.potential_j + d.strain_j + d.climber_j);
  };
  const std::vector<double> events = r->model.climbers->event_times();
  double work = 0.0, worst = 0.0;
  int intervals = 0;
  for (std::size_t i = 1; i < r->sink.d.size(); ++i) {
    work = std::max(work, std::abs(r->sink.d[i].drive_work_j));
    const bool crossing = std::any_of(events.begin(), events.end(),
                                      [&](double te) { return te > r->sink.t[i - 1] && te <= r->sink.t[i]; });
    if (crossing) continue;
    ++intervals;
    worst = std::max(worst, std::abs(balance(r->sink.d[i]) - balance(r->sink.d[i - 1])));
  }
  INFO("largest drive work " << work << " J; largest change of W - (E - E0) over " << intervals
                             << " intervals without a crossing " << worst << " J; " << r->summary.stats.steps << " steps");
  REQUIRE(intervals >= 10);
  REQUIRE(work > 0.1);
  CHECK(worst < 1e-5 * work);
}

namespace {
/// Dense finite-difference Jacobian of the right-hand side over the dynamic components
/// (central differences; steps 1 m and 1 mm/s), row-major n_dyn x n_dyn.
std::vector<double> fd_jacobian(TetherSystem& sys, double t, const std::vector<double>& y) {
  const std::size_t n = sys.size(), n_dyn = sys.layout().dynamic();
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
  return jac;
}
}  // namespace

TEST_CASE("with climbers the mass solve and the structured Newton solver are exact", "[climber][jacobian]") {
  // Independent references: the mass matrix multiplied out (lumped masses plus m w w^T per
  // climber, physics.md section 5) against the accelerations of rhs(); and a dense finite-
  // difference Jacobian J of rhs() for (I - gamma J) x = b. The band jacobian() leaves out
  // the climbers' coupling through M^-1 (tether_system.cpp says so), hence the differences.
  // Two climbers share element 1 (a cluster: the tridiagonal path of the mass solve), a
  // third rides element 5 alone, all moving at t = 1 h; damping exercises dF/dv.
  std::vector<CaseClimber> cs(3);
  cs[0].name = "a", cs[0].from = "12000 km", cs[0].to = "20000 km", cs[0].mass = "20000";
  cs[1].name = "b", cs[1].from = "14000 km", cs[1].to = "22000 km", cs[1].mass = "7000";
  cs[2].name = "c", cs[2].from = "65000 km", cs[2].to = "58000 km", cs[2].direction = "down", cs[2].mass = "12000";
  // The point load (two nodes per climber), whose Newton matrix is exact; the smooth load's
  // mass solve is checked in test_climber_spread.cpp.
  const Scenario sc = load_scenario(kDemo, {"mesh.elements=9", "mesh.grading=uniform", "initial.displacements=[]",
                                            "material.damping_time=0.3", "mesh.climber_load=point",
                                            climbers_override(cs)});
  const TetherModel model = build_model(sc);
  TetherSystem sys(model);
  const double t = 3600.0;
  const std::vector<Attachment> at = model.climbers->attachments(t);
  REQUIRE(at.size() == 3);
  CHECK(at[0].element == 1);
  CHECK(at[1].element == 1);
  CHECK(at[2].element == 5);
  for (const Attachment& a : at) CHECK(a.xi_dot != 0.0);
  const std::size_t n = sys.size(), n_dyn = sys.layout().dynamic();
  const std::vector<double> y = perturbed_state(sys, 11, 500.0, 2.0);
  std::vector<double> f(n);
  sys.rhs(t, y.data(), f.data());

  // M a = F, F the sum of the models' forces at that state.
  Matrix3X x, v;
  sys.node_state(t, y.data(), x, v);
  Matrix3X force = Matrix3X::Zero(3, model.nodes());
  const TetherState s{t, x, v, model.mesh.node_mass};
  for (const ForceModel* m : model.forces()) m->add_forces(s, force);
  Matrix3X acc = Matrix3X::Zero(3, model.nodes());
  for (std::size_t k = sys.layout().first_free(); k <= sys.layout().last_free(); ++k)
    for (int a = 0; a < 3; ++a) acc(a, k) = f[sys.layout().v(k, a)];
  Eigen::MatrixXd mass = model.mesh.node_mass.asDiagonal();
  for (const Attachment& a : at) {
    const double w[2] = {1 - a.xi, a.xi};
    for (int i = 0; i < 2; ++i)
      for (int j = 0; j < 2; ++j) mass(a.element + i, a.element + j) += a.mass_kg * w[i] * w[j];
  }
  const Matrix3X ma = acc * mass;  // rows of M times accelerations (M symmetric)
  double worst = 0.0, scale = 0.0;
  for (std::size_t k = sys.layout().first_free(); k <= sys.layout().last_free(); ++k) {
    worst = std::max(worst, (ma.col(k) - force.col(k)).cwiseAbs().maxCoeff());
    scale = std::max(scale, force.col(k).cwiseAbs().maxCoeff());
  }
  INFO("M a - F: " << worst << " N of " << scale << " N");
  CHECK(worst < 1e-10 * scale);

  // (I - gamma J) x = b with J from finite differences.
  const std::vector<double> jac = fd_jacobian(sys, t, y);
  std::mt19937 rng(3);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  for (double gamma : {1e-3, 0.5, 30.0}) {
    sys.newton_jacobian(t, y.data());
    sys.newton_factor(gamma);
    std::vector<double> b(n);
    for (auto& e : b) e = u(rng);
    std::vector<double> sol(n, 0.0);
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
    for (std::size_t r = n_dyn; r < n; ++r) CHECK(sol[r] == b[r]);  // the quadratures: identity
  }
  // The check can tell: the band jacobian() (diagonal of M only) misses the climbers'
  // coupling by far more than the finite-difference error.
  const long bw = sys.half_bandwidth(), smu = 2 * bw, ldim = smu + bw + 1;
  std::vector<double> band(static_cast<std::size_t>(ldim) * n, 0.0);
  const BandJacobian bj{band.data(), ldim, smu, bw, bw, long(n)};
  sys.jacobian(t, y.data(), f.data(), bj);
  double band_err = 0.0, jscale = 0.0;
  for (std::size_t r = 0; r < n_dyn; ++r)
    for (std::size_t c = 0; c < n_dyn; ++c) {
      if (r % StateLayout::kPerNode < 3) continue;  // the velocity rows: dv/dt = M^-1 F
      const long d = long(r) - long(c);
      const double an = (d >= -bw && d <= bw) ? bj(r, c) : 0.0;
      band_err = std::max(band_err, std::abs(an - jac[r * n_dyn + c]));
      jscale = std::max(jscale, std::abs(jac[r * n_dyn + c]));
    }
  INFO("band Jacobian against finite differences: " << band_err << " of " << jscale);
  CHECK(band_err > 1e-3 * jscale);  // measured 1.8e-2; the finite differences agree to ~1e-9
}

TEST_CASE("stops on nodes, many crossings and a cluster of climbers run without integrator failures",
          "[climber][robust]") {
  // With the point load node crossings are stop times of the integrator (physics.md section
  // 5); with the smooth load (the default, run here) they are not. A climber at rest
  // exactly on a node, one ending on a node, one crossing dozens of nodes, and two climbers
  // sharing an element (the tridiagonal path of the mass solve) must all integrate cleanly.
  const std::vector<std::string> mesh{"mesh.elements=40", "mesh.grading=geometric", "mesh.first_element_length=20 km",
                                      "initial.displacements=[]", "simulation.output_interval=10 min",
                                      "simulation.atol_velocity=1e-4"};
  const Scenario plain = load_scenario(kDemo, [&] {
    auto o = mesh;
    o.push_back("climbers=[]");
    return o;
  }());
  const std::vector<double> alt = reference_distance(build_model(plain).mesh);  // node altitudes [m]
  SECTION("a dwell exactly on a node, the end exactly on another") {
    CaseClimber c;
    c.mass = "10000";
    c.from = "30 km";
    c.to = number(alt[12]);
    c.extra = ", dwells: [{at: " + number(alt[6]) + ", duration: 20 min}]";
    auto o = mesh;
    // The point load: a climber resting on a node is at that node exactly (the smooth load
    // averages the ribbon over its window; test_climber_spread.cpp).
    o.push_back("mesh.climber_load=point");
    o.push_back(climbers_override({c}));
    o.push_back("simulation.duration=1 s");
    const Scenario probe = load_scenario(kDemo, o);
    const TetherModel m = build_model(probe);
    const ClimberProfile& p = m.climbers->climbers()[0].profile;
    o.back() = "simulation.duration=" + number(p.end_time() + 1800.0);
    const auto r = run(load_scenario(kDemo, o));
    INFO(r->summary.message << "; " << r->summary.stats.steps << " steps, " << r->wall_s << " s");
    CHECK(r->summary.status == RunStatus::complete);
    // Resting on node 6 during the dwell and on node 12 at the end.
    const std::vector<double>& s0 = r->model.equilibrium.s0_m;
    double arrival = -1.0;  // the start of the dwell: the segment boundary after which it rests mid-way
    for (double ts : p.segment_times())
      if (ts > p.start_time() && ts < p.end_time() && p.at(ts + 1.0).speed_m_s == 0.0) arrival = ts;
    REQUIRE(arrival > 0.0);
    std::size_t mid = 0;
    while (mid < r->sink.t.size() && r->sink.t[mid] < arrival + 1.0) ++mid;
    REQUIRE(r->sink.t.at(mid) < arrival + 1199.0);  // an output inside the 20 min dwell
    CHECK(sample(*r, 0, mid).s_m == Approx(s0[6]).epsilon(1e-13));
    CHECK((sample(*r, 0, mid).r - r->sink.x[mid].col(6)).norm() < 1e-6);
    const std::size_t last = r->sink.t.size() - 1;
    CHECK(sample(*r, 0, last).s_m == Approx(s0[12]).epsilon(1e-12));
    CHECK((sample(*r, 0, last).r - r->sink.x[last].col(12)).norm() < 1e-6);
  }
  SECTION("dozens of node crossings") {
    CaseClimber c;
    c.mass = "10000";
    c.from = "5 km";
    c.to = "2500 km";
    c.cruise = "500 km/h";
    auto o = mesh;
    o.push_back("mesh.elements=60");
    o.push_back("mesh.first_element_length=5 km");
    o.push_back(climbers_override({c}));
    o.push_back("simulation.duration=6 h");
    const auto r = run(load_scenario(kDemo, o));
    const std::size_t crossings = r->model.climbers->climbers()[0].profile.crossing_times(r->model.equilibrium.s0_m).size();
    INFO(crossings << " crossings; " << r->summary.message << "; " << r->summary.stats.steps << " steps, " << r->wall_s
                   << " s");
    CHECK(crossings >= 20);
    CHECK(r->summary.status == RunStatus::complete);
    // The profile's end is along the stretched ribbon; the sample is the material coordinate.
    const ClimberLoad& load = *r->model.climbers;
    CHECK(sample(*r, 0, r->sink.t.size() - 1).s_m ==
          Approx(load.material_coordinate(load.climbers()[0].profile.to())));
  }
  SECTION("two climbers on one element") {
    std::vector<CaseClimber> cs(2);
    cs[0].name = "lead", cs[0].from = "160 km", cs[0].to = "900 km", cs[0].mass = "8000";
    cs[1].name = "tail", cs[1].from = "150 km", cs[1].to = "890 km", cs[1].mass = "12000";
    auto o = mesh;
    o.push_back(climbers_override(cs));
    o.push_back("simulation.duration=5 h");
    const auto r = run(load_scenario(kDemo, o));
    // They share an element most of the way (10 km apart on elements of 20 km and more).
    int shared = 0;
    for (double t = 0.0; t < 4 * 3600.0; t += 60.0) {
      const auto at = r->model.climbers->attachments(t);
      shared += at[0].element == at[1].element;
    }
    INFO(shared << " of 240 minutes on one element; " << r->summary.message << "; " << r->summary.stats.steps
                << " steps, " << r->wall_s << " s");
    CHECK(shared > 120);
    CHECK(r->summary.status == RunStatus::complete);
  }
}

namespace {
/// The standard transit of the demo (scenarios/demo.yaml): 20 t leaving the anchor at
/// 200 km/h (ramps 0.5 m/s^2) for 1000 km, 6 h, the tether at rest at first, on `n` elements
/// graded geometrically as the demo's mesh (200 elements from 20 km), i.e. from 4000 km / n.
/// Velocity tolerance 0.1 mm/s: the runs resolve the ribbon's oscillations under the climber
/// (measured: the peak offset moves by 3e-5 against the default 1e-6 m/s at n = 200).
/// Runs are kept, as several checks read the same ones.
const Run& standard_transit(int n) {
  static std::map<int, std::unique_ptr<Run>> cache;
  auto& r = cache[n];
  if (!r) {
    CaseClimber c;
    c.name = "kite";
    c.mass = "20 t";
    c.from = "0 km";
    c.to = "1000 km";
    r = run(load_scenario(kDemo, {"mesh.elements=" + std::to_string(n), "mesh.grading=geometric",
                                  "mesh.first_element_length=" + number(4000e3 / n), "initial.displacements=[]",
                                  "simulation.duration=6 h", "simulation.output_interval=5 min",
                                  "simulation.atol_velocity=1e-4", climbers_override({c})}));
  }
  return *r;
}

/// The largest |east-west offset| of climber 0 from the tether's line at rest over a run [m].
double peak_offset(const Run& r) {
  double peak = 0.0;
  for (std::size_t i = 0; i < r.sink.t.size(); ++i) peak = std::max(peak, std::abs(sample(r, 0, i).offset_m.x()));
  return peak;
}
}  // namespace

TEST_CASE("a climber leaving the anchor: the tether drops and swings", "[climber][anchor]") {
  // The issue: "its weight passes onto the tether as it leaves the ground, and the drop of
  // the whole tether and the eastward swing that follows through Coriolis coupling are real
  // effects the results must show".
  const Run& r = standard_transit(50);
  REQUIRE(r.summary.status == RunStatus::complete);
  // At t = 0 the climber sits on the anchor (node 0, prescribed): its weight is the anchor's,
  // and the starting equilibrium is that of the unloaded tether, exactly.
  auto opts = std::vector<std::string>{"mesh.elements=50", "mesh.grading=geometric", "mesh.first_element_length=80 km",
                                       "climbers=[]"};
  const TetherModel unloaded = build_model(load_scenario(kDemo, opts));
  for (std::size_t e = 0; e < unloaded.elements(); ++e) CHECK(r.model.equilibrium.tension_n[e] == unloaded.equilibrium.tension_n[e]);
  CHECK(sample(r, 0, 0).drive_n != 0.0);
  // The ribbon below the climber loses the climber's weight from its tension, shortens and the
  // whole tether above follows it down: the top drops (radially inward). Moving toward the
  // spin axis each piece keeps its angular momentum, so it runs ahead of the rotation: in the
  // rotating frame the Coriolis force -2 m Omega x v with v = -x points east (+y), and the
  // upper tether swings east. Near the climber the climber's own Coriolis force (westward,
  // going up) pulls the ribbon west first, so its offset starts westward.
  const std::size_t top = r.model.nodes() - 1, last = r.sink.t.size() - 1;
  const double drop = r.sink.x[last](0, top) - r.model.mesh.position(0, top);
  const double swing = r.sink.x[last](1, top) - r.model.mesh.position(1, top);
  const double early_offset = sample(r, 0, output_at(r, 1800.0)).offset_m.x();
  INFO("after 6 h the top moved " << drop << " m radially and " << swing << " m east; after 30 min the climber is "
                                  << early_offset << " m east of the line at rest");
  CHECK(drop < -1e3);
  CHECK(swing > 1e3);
  CHECK(early_offset < 0.0);
  // The anchor feels the weight leave it: element 0's tension falls by the climber's weight
  // less its centrifugal force where it is, m (GM / r^2 - Omega^2 r) (Newton's gravitation in
  // the rotating frame; physics.md section 1), within 3 % for the ribbon's own motion. At 1 h,
  // once the smooth load's window (one shortest element, 80 km, either side of the climber)
  // has left element 0: while it reaches into element 0 part of the weight goes straight to
  // the anchor (measured at 30 min, 97 km up: 6 % of it).
  const std::size_t i30 = output_at(r, 3600.0);
  const double rc = sample(r, 0, i30).r.norm(), gm = r.scenario.planet.gm_m3_s2;
  const double weight = 20000.0 * (gm / (rc * rc) - kOmega * kOmega * rc);
  const double t0_start = r.sink.d.front().tension_n[0], t0_later = r.sink.d[i30].tension_n[0];
  INFO("element 0 tension " << t0_start << " N at t = 0, " << t0_later << " N at 1 h; climber's weight there "
                            << weight << " N");
  CHECK(t0_start - t0_later == Approx(weight).epsilon(0.03));
}

TEST_CASE("the peak east-west offset of the standard transit converges with the mesh", "[climber][convergence]") {
  // Convergence as the mesh is refined (style.md habit 11): the issue asks for less than 2 %
  // between N and 2N at the demo's mesh (N = 200, see [long]); here N = 50 and 100, which
  // meet it too (measured: 3704 m, 3670 m; 3702 m at 200, 3706 m at 400).
  const double p50 = peak_offset(standard_transit(50)), p100 = peak_offset(standard_transit(100));
  INFO("peak east-west offset " << p50 << " m at N = 50, " << p100 << " m at N = 100");
  CHECK(p100 > 100.0);
  CHECK(std::abs(p100 - p50) < 0.02 * p100);
}

TEST_CASE("the peak east-west offset converges at the demo's mesh, N = 200 and 400", "[climber][convergence][long]") {
  const Run &a = standard_transit(200), &b = standard_transit(400);
  REQUIRE(a.summary.status == RunStatus::complete);
  REQUIRE(b.summary.status == RunStatus::complete);
  const double p200 = peak_offset(a), p400 = peak_offset(b);
  INFO("peak east-west offset " << p200 << " m at N = 200 (" << a.wall_s << " s), " << p400 << " m at N = 400 ("
                                << b.wall_s << " s)");
  CHECK(std::abs(p400 - p200) < 0.02 * p400);
}

TEST_CASE("scenarios/traffic.yaml: its schedule expands and a shortened run completes", "[climber][scenario]") {
  // The shipped examples double as smoke tests (style.md habit 10): the first 2 h of the
  // traffic day on a coarser mesh. The schedule gives freight_1..6, leaving every 4 h with
  // the masses 5, 4, 6 t in turn (the scenario's own values).
  const std::string path = std::string(HAWSER_SOURCE_DIR) + "/scenarios/traffic.yaml";
  const auto r = run(load_scenario(path, {"simulation.duration=2 h", "mesh.elements=30"}));
  INFO(r->summary.message);
  CHECK(r->summary.status == RunStatus::complete);
  const std::vector<Climber>& cs = r->model.climbers->climbers();
  REQUIRE(cs.size() == 6);
  const double masses[] = {5000.0, 4000.0, 6000.0};
  for (std::size_t k = 0; k < cs.size(); ++k) {
    CHECK(cs[k].name == "freight_" + std::to_string(k + 1));
    CHECK(cs[k].mass_kg == masses[k % 3]);
    CHECK(cs[k].profile.start_time() == 4 * 3600.0 * k);
    CHECK(cs[k].sudden);
    CHECK(cs[k].at_end == ClimberEnd::leave);
  }
  // Only freight_1 is on the tether in the first 2 h.
  CHECK(r->model.climbers->attachments(3600.0).size() == 1);
}
