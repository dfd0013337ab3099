// Loaded static states of the as-built tether (solver/assembly/static_solver.hpp): L0 stays
// fixed and the nodes move under what is hung on the tether. Every check value names its
// source.
#include "catch_compat.hpp"
#include <chrono>
#include <cmath>
#include <functional>
#include <string>
#include <vector>

#include "bench_helpers.hpp"
#include "models/bar_elements.hpp"
#include "models/uniform_gravity.hpp"
#include "solver/input/errors.hpp"
#include "solver/integration/modal_analysis.hpp"
#include "solver/integration/simulation.hpp"
#include "solver/assembly/static_solver.hpp"

using namespace hawser;
using namespace hawser::testing::bench;

namespace {

const std::string kDemo = std::string(HAWSER_SOURCE_DIR) + "/scenarios/demo.yaml";
const std::string kStorm = std::string(HAWSER_SOURCE_DIR) + "/scenarios/storm.yaml";

/// Root of f on [a, b] by bisection (f(a) and f(b) of opposite signs).
double bisect(const std::function<double(double)>& f, double a, double b) {
  double fa = f(a);
  for (int i = 0; i < 200; ++i) {
    const double m = 0.5 * (a + b), fm = f(m);
    if ((fm < 0) == (fa < 0)) {
      a = m;
      fa = fm;
    } else {
      b = m;
    }
  }
  return 0.5 * (a + b);
}

/// A bench cable hanging from node 0 (gravity along +x), free at the bottom, optionally with a
/// climber of mass `tip_kg` parked at its bottom end (it starts long after any run).
std::string hanging_bar(double tip_kg) {
  std::ostringstream y;
  y.precision(17);
  y << "name: hanging bar\n"
    << "material: {density: 1000, youngs_modulus: 1e10, ultimate_strength: 1e15, damping_time: 0, "
       "kind: invented}\n"
    << "field: {kind: uniform, gravity: 9.81, cable_length: 100 m, cable_area: 1e-4, far_end: "
       "free}\n"
    << "mesh: {elements: 100}\n"
    << "simulation: {duration: 1, output_interval: 1, method: bdf, rtol: 1e-8, atol_position: "
       "1e-9, "
    << "atol_velocity: 1e-9}\n";
  if (tip_kg > 0)
    y << "climbers:\n  - {name: tip, mass: " << tip_kg
      << ", from: 100 m, to: 50 m, direction: down, "
      << "cruise_speed: 1 m/s, acceleration: 0.1 m/s^2, deceleration: 0.1 m/s^2, start_time: "
         "1e9}\n";
  return y.str();
}

double sum(const std::vector<double>& v) {
  double s = 0.0;
  for (double x : v) s += x;
  return s;
}

}  // namespace

TEST_CASE("an elastic bar hanging under its own weight, then with a tip mass hung on it",
          "[statics]") {
  // Timoshenko & Gere, Mechanics of Materials (the prismatic bar hanging under its own weight
  // and an end load): stretch = rho g L^2 / (2 E) + P L / (E A), with rho the mass per unit
  // (unstretched) volume and L the unstretched length. The lumped-mass bar gives the first
  // term exactly (the element tensions are the midpoint rule of the linear tension) for a
  // bar of uniform mass per unstretched metre. The bench's bar has its mass uniform per
  // stretched metre instead (solver/assembly/mesh.hpp): with rho = total mass / (A L0) the two differ
  // by about strain / 6 in relative terms (a second-order effect: 2e-5 at this bar's largest
  // strain of 1e-4), hence the 1e-4 tolerance on the self-weight stretch below.
  const double g = 9.81, e = 1e10, a = 1e-4, tip = 50.0;
  const TetherModel bare = build_model(load_scenario_text(hanging_bar(0.0), "bar.yaml", {}));
  const TetherModel loaded = build_model(load_scenario_text(hanging_bar(tip), "bar.yaml", {}));
  const double l0 = sum(bare.equilibrium.l0_m);
  const double mass = bare.mesh.node_mass.sum();
  const double rho = mass / (a * l0);
  const std::size_t last = bare.nodes() - 1;
  const double stretch_bare = bare.mesh.position(0, last) - l0;
  CHECK(stretch_bare == Approx(rho * g * l0 * l0 / (2 * e)).epsilon(1e-4));
  // L0 is the as-built tether's: hanging the mass on it changes none of them.
  for (std::size_t k = 0; k < bare.elements(); ++k)
    CHECK(loaded.equilibrium.l0_m[k] == bare.equilibrium.l0_m[k]);
  // The tip mass adds m g L / (E A) to the stretch (same source), the whole bar moving down.
  const double extra = loaded.mesh.position(0, last) - bare.mesh.position(0, last);
  CHECK(extra == Approx(tip * g * l0 / (e * a)).epsilon(1e-9));
  const double stretch_loaded = loaded.mesh.position(0, last) - l0;
  CHECK(stretch_loaded ==
        Approx(rho * g * l0 * l0 / (2 * e) + tip * g * l0 / (e * a)).epsilon(1e-4));
  // Every element carries the tip's weight more (statics of the free body below it).
  for (std::size_t k = 0; k < bare.elements(); ++k)
    CHECK(loaded.equilibrium.tension_n[k] - bare.equilibrium.tension_n[k] ==
          Approx(tip * g).epsilon(1e-8));
  CHECK(loaded.equilibrium.load_steps >= 1);
  CHECK(loaded.equilibrium.load_case.find("tip") != std::string::npos);
}

TEST_CASE("a hanging chain with a point mass at midspan is the catenary with a point load",
          "[statics]") {
  // Inextensible limit (strain below 2e-5). Chain of length L between supports at the same
  // level a span S apart, weight w per unit length, point weight P at midspan. By symmetry,
  // each half is a catenary of horizontal tension H whose slope jumps at the load by P / H
  // (Irvine, Cable Structures, 1981, chapter 1, the cable with a concentrated load):
  //   y(x) = (H / w) (cosh(w x / H + a) - cosh a),  sinh a = P / (2 H),
  //   L / 2 = (H / w) (sinh(w S / (2 H) + a) - sinh a),  sag = (H / w) (cosh(w S/(2H) + a) - cosh
  //   a).
  // Gravity pulls along -y (UniformGravity), across the span along +x: this uses the bench's
  // models directly, since the bench scenario's gravity is along its cable.
  const int n = 200;
  const double span = 80.0, length = 100.0, mu = 2.0, g = 9.81, p_kg = 60.0, ea = 1e8;
  const double w = mu * g, p = p_kg * g;
  const double h0 = length / n;
  // Node masses: half of each link to each end; the point mass at the middle node.
  Eigen::VectorXd built = Eigen::VectorXd::Constant(n + 1, mu * h0);
  built[0] = built[n] = 0.5 * mu * h0;
  Eigen::VectorXd loaded = built;
  loaded[n / 2] += p_kg;
  BarElements bars(std::vector<double>(n, ea), std::vector<double>(n, h0),
                   std::vector<double>(n, 0.0));
  UniformGravity gravity(g, -Eigen::Vector3d::UnitY());
  // The discrete chain's exact equilibrium (a funicular polygon, statics of each node): the
  // link tensions (H, V_k) with V_{k+1} = V_k + W_{k+1} from V_0 = -(sum of the free node
  // weights) / 2 (symmetry), link k of length L0 (1 + T_k / EA) along (H, V_k), H found so
  // that the links span S. Without the point mass it is the as-built state; with it, an
  // independent solution of the same discrete problem the solver meets.
  auto polygon = [&](const Eigen::VectorXd& mass, double& h_out) {
    auto shape = [&](double h) {
      Matrix3X x = Matrix3X::Zero(3, n + 1);
      double v = -0.5 * g * (mass.sum() - mass[0] - mass[n]);
      for (int k = 0; k < n; ++k) {
        const double t = std::hypot(h, v);
        x.col(k + 1) = x.col(k) + h0 * (1 + t / ea) * Eigen::Vector3d(h, v, 0.0) / t;
        v += g * mass[k + 1];
      }
      return x;
    };
    h_out = bisect([&](double h) { return shape(h)(0, n) - span; }, 1.0, 1e6);
    return shape(h_out);
  };
  double h_built = 0.0, h_loaded = 0.0;
  const Matrix3X x = polygon(built, h_built);
  const Matrix3X x_loaded = polygon(loaded, h_loaded);
  StaticLoadSet loads;
  loads.description = "the point mass";
  loads.bars = &bars;
  loads.common = {&bars, &gravity};
  loads.built_mass_kg = built;
  loads.loaded_mass_kg = loaded;
  loads.first_free = 1;
  loads.last_free = n - 1;
  const StaticState st = solve_static(loads, x);
  // Closed form (same source).
  auto half_length = [&](double h) {
    const double a = std::asinh(p / (2 * h));
    return (h / w) * (std::sinh(w * span / (2 * h) + a) - std::sinh(a)) - length / 2;
  };
  const double h = bisect(half_length, 1.0, 1e6);
  const double a = std::asinh(p / (2 * h));
  const double sag = (h / w) * (std::cosh(w * span / (2 * h) + a) - std::cosh(a));
  // The model's horizontal tension: the x component of the tension in the first link.
  const Eigen::Vector3d d0 = st.position_m.col(1) - st.position_m.col(0);
  const double h_model = st.tension_n[0] * d0.x() / d0.norm();
  INFO("H " << h_model << " N against " << h << " N; sag " << -st.position_m(1, n / 2)
            << " m against " << sag);
  // The lumped chain differs from the continuous one by O((L / n)^2): 1e-4 is ample at n = 200.
  CHECK(h_model == Approx(h).epsilon(1e-4));
  CHECK(-st.position_m(1, n / 2) == Approx(sag).epsilon(1e-4));
  CHECK(st.position_m(0, n / 2) == Approx(span / 2).epsilon(1e-9));  // symmetric
  // Against the independent discrete solution: the same H and nodes to round-off.
  CHECK(h_model == Approx(h_loaded).epsilon(1e-9));
  CHECK((st.position_m - x_loaded).cwiseAbs().maxCoeff() < 1e-9 * length);
  // A support carries half of everything hung: (w L + P) / 2 vertically (statics).
  const Eigen::Vector3d dn = st.position_m.col(n) - st.position_m.col(n - 1);
  // (less the half link at each support, which rests on the support itself).
  CHECK(st.tension_n[n - 1] * dn.y() / dn.norm() ==
        Approx((w * length + p) / 2 - 0.5 * mu * h0 * g).epsilon(1e-9));
}

TEST_CASE("a taut string with a mass at midspan: its first period", "[statics][modes]") {
  // String of length L, tension T, mass per length mu, with a point mass M at midspan. The
  // symmetric modes y = A sin(k x) on each half with the mass's equation
  // M omega^2 y(L/2) = 2 T y'(L/2) give (k L / 2) tan(k L / 2) = mu L / M, omega = k sqrt(T/mu)
  // (the string with a central mass, e.g. Rao, Mechanical Vibrations, the string with a
  // concentrated mass; recalled from memory). The mass is a climber parked at midspan.
  const double length = 10.0, area = 1e-6, density = 1000.0, tension = 100.0, m_c = 0.05;
  BenchSpec s;
  s.length_m = length;
  s.area_m2 = area;
  s.density_kg_m3 = density;
  s.youngs_modulus_pa = 1e11;
  s.pretension_n = tension;
  s.elements = 200;
  std::string text = scenario_text(s);
  text += "climbers:\n  - {name: bead, mass: " + number(m_c) +
          ", from: 5 m, to: 9 m, direction: up, cruise_speed: 0.1 m/s, acceleration: 1 m/s^2, "
          "deceleration: 1 m/s^2, start_time: 1e9}\n";
  const TetherModel model = build_model(load_scenario_text(text, "string.yaml", {}));
  ModalOptions mo;
  mo.modes = 1;
  const ModalResult r = modal_analysis(model, mo);
  REQUIRE(r.modes.size() == 1);
  // mu: the model's string mass over its unstretched length (the bench carries rho A per
  // stretched metre); T: the tension of the model's elements (all equal, no gravity).
  const double mu = (model.mesh.node_mass.sum() - 0.0) / length;
  const double t = model.equilibrium.tension_n[0];
  const double ratio = mu * length / m_c;
  const double z =
      bisect([&](double q) { return q * std::tan(q) - ratio; }, 1e-9, M_PI / 2 - 1e-12);
  const double k = 2 * z / length;
  const double period = 2 * M_PI / (k * std::sqrt(t / mu));
  INFO("model " << r.modes[0].period_s << " s, closed form " << period << " s");
  CHECK(r.modes[0].period_s == Approx(period).epsilon(2e-4));
  CHECK(t == Approx(tension).epsilon(1e-12));
}

TEST_CASE("a parked climber pulls the planet tether down with L0 fixed", "[statics]") {
  // The case: a 10 t climber parked at 20,000 km on the 100,000 km demonstration
  // tether. The as-built L0 do not change; the nodes move down (the climber's weight at
  // 20,000 km points down, and nothing holds the top but the counterweight); the tension
  // below the climber no longer drops by exactly its net weight.
  const std::vector<std::string> base{"mesh.elements=400"};
  auto with = [&](std::vector<std::string> o) {
    o.insert(o.begin(), base.begin(), base.end());
    return o;
  };
  const TetherModel bare = build_model(load_scenario(kDemo, with({"climbers=[]"})));
  const std::string climber =
      "climbers=[{name: c10, mass: 10 t, from: 20000 km, to: 21000 km, direction: up, "
      "cruise_speed: 200 km/h, "
      "acceleration: 0.1 m/s^2, deceleration: 0.1 m/s^2, start_time: 100 d}]";
  const TetherModel loaded = build_model(load_scenario(kDemo, with({climber})));
  for (std::size_t k = 0; k < bare.elements(); ++k)
    REQUIRE(loaded.equilibrium.l0_m[k] == bare.equilibrium.l0_m[k]);
  const std::size_t top = bare.nodes() - 1;
  const double drop = bare.mesh.position(0, top) - loaded.mesh.position(0, top);
  INFO("top drops " << drop / 1e3 << " km");
  // (The issue: "the top must drop by kilometres".)
  CHECK(drop > 1e3);
  // Nothing leaves the equatorial line without a lateral load.
  CHECK(loaded.mesh.position.row(1).cwiseAbs().maxCoeff() < 1e-6);
  CHECK(loaded.mesh.position.row(2).cwiseAbs().maxCoeff() < 1e-6);
  // Static balance of the loaded state, checked independently of the solver's own test: the
  // forces of the model (with the parked climber's) on every free node at rest.
  Matrix3X f = Matrix3X::Zero(3, loaded.nodes());
  const Matrix3X rest = Matrix3X::Zero(3, loaded.nodes());
  // The run's climber model is not parked until its start: attachments at t = 0 are its
  // start point, so its forces at rest are those of the parked climber.
  const TetherState s{0.0, loaded.mesh.position, rest, loaded.mesh.node_mass};
  for (const ForceModel* m : loaded.mean_forces()) m->add_forces(s, f);
  const double t_max =
      *std::max_element(loaded.equilibrium.tension_n.begin(), loaded.equilibrium.tension_n.end());
  CHECK(f.rightCols(loaded.nodes() - 1).cwiseAbs().maxCoeff() < 1e-8 * t_max);
}

TEST_CASE("a run started in the loaded static state stays there", "[statics][dynamics]") {
  // physics.md section 3: a run that starts at the static state must stay there; here the
  // state of a parked climber (10 t at 20,000 km, leaving after 100 days) and a counterweight
  // 2 % heavier than the design's, for a simulated day. Acceptance as for the unloaded
  // tether (test_dynamics_planet.cpp): no node moves by more than 1e-6 of the tether length.
  const double cw = build_model(load_scenario(kDemo, {"mesh.elements=100", "climbers=[]"}))
                        .mesh.counterweight_mass;
  const Scenario sc = load_scenario(
      kDemo, {"mesh.elements=100", "simulation.duration=1 d", "simulation.output_interval=1 h",
              "initial.displacements=[]", "counterweight.mass=" + number(1.02 * cw) + " kg",
              "climbers=[{name: c10, mass: 10 t, from: 20000 km, to: 21000 km, direction: up, "
              "cruise_speed: 200 km/h, acceleration: 0.1 m/s^2, deceleration: 0.1 m/s^2, "
              "start_time: 100 d}]"});
  testing::MemorySink sink;
  TetherModel model = build_model(sc);
  TetherSystem sys(model);
  const RunSummary s = run_simulation(sys, initial_state(sys, sc.initial),
                                      run_options(sc.simulation, sys.layout()), sink);
  REQUIRE(s.status == RunStatus::complete);
  REQUIRE(model.equilibrium.newton_iterations > 0);  // it was a loaded state
  const double length =
      (model.mesh.position.col(model.nodes() - 1) - model.mesh.position.col(0)).norm();
  double worst = 0.0;
  for (const auto& x : sink.x)
    worst = std::max(worst, (x - model.mesh.position).cwiseAbs().maxCoeff());
  const double moved = (model.mesh.position - model.mesh.as_built_position).cwiseAbs().maxCoeff();
  INFO("largest displacement in the run " << worst << " m; the static state is " << moved
                                          << " m from the as-built one");
  CHECK(worst < 1e-6 * length);
  CHECK(moved > 1e3);  // and the loads did move it (so the check above can fail)
}

TEST_CASE("a tether built under a design load case", "[statics]") {
  // tether.built_under: the L0 put the straight design line in equilibrium with the case's
  // climber (20 t at 20,000 km). With that climber parked there, the run starts on the design
  // line itself (statics: the same loads as the build); without it, the tether rises (the
  // climber's weight below the synchronous altitude pulled it down).
  const std::string cases =
      "load_cases=[{name: built, climbers: [{mass: 20 t, altitude: 20000 km}]}]";
  const std::string parked =
      "climbers=[{name: c20, mass: 20 t, from: 20000 km, to: 21000 km, direction: up, "
      "cruise_speed: 200 km/h, acceleration: 0.1 m/s^2, deceleration: 0.1 m/s^2, "
      "start_time: 100 d}]";
  const TetherModel unloaded =
      build_model(load_scenario(kDemo, {"mesh.elements=100", "climbers=[]"}));
  const TetherModel with_it = build_model(load_scenario(
      kDemo, {"mesh.elements=100", cases, "tether.built_under=built", parked}));
  const TetherModel without = build_model(load_scenario(
      kDemo, {"mesh.elements=100", cases, "tether.built_under=built", "climbers=[]"}));
  CHECK(with_it.built_under_case == "built");
  CHECK((with_it.mesh.position - unloaded.mesh.as_built_position).cwiseAbs().maxCoeff() == 0.0);
  CHECK(with_it.equilibrium.l0_m == without.equilibrium.l0_m);
  CHECK(with_it.equilibrium.l0_m != unloaded.equilibrium.l0_m);
  const std::size_t top = unloaded.nodes() - 1;
  const double rise = without.mesh.position(0, top) - unloaded.mesh.as_built_position(0, top);
  INFO("without the climber it was built under, the top rises " << rise << " m");
  CHECK(rise > 1e3);
  CHECK(without.equilibrium.load_case.find("built under load case 'built'") != std::string::npos);
}

TEST_CASE("a climber at the anchor changes nothing", "[statics]") {
  // Its weight goes to the held anchor node alone (xi = 0 on element 0): statics.
  const TetherModel bare = build_model(load_scenario(kDemo, {"mesh.elements=100", "climbers=[]"}));
  const TetherModel at_anchor = build_model(load_scenario(
      kDemo, {"mesh.elements=100",
              "climbers=[{name: a, mass: 20 t, from: 0 km, to: 100 km, direction: up, "
              "cruise_speed: 200 km/h, acceleration: 0.1 m/s^2, deceleration: 0.1 m/s^2, "
              "start_time: 100 d}]"}));
  CHECK((at_anchor.mesh.position - bare.mesh.position).cwiseAbs().maxCoeff() == 0.0);
  for (std::size_t k = 0; k < bare.elements(); ++k)
    CHECK(at_anchor.equilibrium.tension_n[k] == bare.equilibrium.tension_n[k]);
}

TEST_CASE("a counterweight other than the design's is a load on the as-built tether", "[statics]") {
  // 5 % heavier: the top moves out (beyond the synchronous radius the counterweight's net
  // force points outward), the as-built L0 stay. 30 % lighter than the design on a tether
  // hanging from it: the continuation must end in a clear error naming the load.
  const TetherModel bare = build_model(load_scenario(kDemo, {"mesh.elements=100", "climbers=[]"}));
  const double cw = bare.mesh.counterweight_mass;
  const TetherModel heavy =
      build_model(load_scenario(kDemo, {"mesh.elements=100", "climbers=[]",
                                        "counterweight.mass=" + number(1.05 * cw) + " kg"}));
  for (std::size_t k = 0; k < bare.elements(); ++k)
    REQUIRE(heavy.equilibrium.l0_m[k] == bare.equilibrium.l0_m[k]);
  const std::size_t top = bare.nodes() - 1;
  CHECK(heavy.mesh.position(0, top) > bare.mesh.position(0, top) + 100.0);
  // The base tension grows by the extra counterweight's net outward force, up to the
  // change of the tether's own net force as it stretches (small: a bounds check, statics).
  CHECK(heavy.equilibrium.tension_n[0] > bare.equilibrium.tension_n[0]);
  CHECK(heavy.equilibrium.load_case.find("counterweight") != std::string::npos);
}

TEST_CASE("static tides: the starting state carries the Moon's tide at t = 0",
          "[statics][environment]") {
  // Asked for by environment.tides.static: the state balances every force of the model at
  // t = 0, the tide included (statics), and the tide moved it (so that this can fail).
  const std::vector<std::string> base{"mesh.elements=100", "climbers=[]",
                                      "environment.tides.moon=true"};
  auto with = [&](const std::string& o) {
    std::vector<std::string> v = base;
    v.push_back(o);
    return v;
  };
  const TetherModel tided =
      build_model(load_scenario(kDemo, with("environment.tides.static=true")));
  const TetherModel plain =
      build_model(load_scenario(kDemo, with("environment.tides.static=false")));
  CHECK(tided.equilibrium.load_case.find("tides") != std::string::npos);
  CHECK(plain.equilibrium.load_case == "no load");
  Matrix3X f = Matrix3X::Zero(3, tided.nodes());
  const Matrix3X rest = Matrix3X::Zero(3, tided.nodes());
  const TetherState s{0.0, tided.mesh.position, rest, tided.mesh.node_mass};
  for (const ForceModel* m : tided.mean_forces()) m->add_forces(s, f);
  const double t_max =
      *std::max_element(tided.equilibrium.tension_n.begin(), tided.equilibrium.tension_n.end());
  CHECK(f.rightCols(tided.nodes() - 1).cwiseAbs().maxCoeff() < 1e-8 * t_max);
  const double moved = (tided.mesh.position - plain.mesh.position).cwiseAbs().maxCoeff();
  INFO("the tide moves the static state by up to " << moved << " m");
  CHECK(moved > 1.0);
}

TEST_CASE("the mean wind of the storm leans the ribbon and its modes are damped",
          "[statics][modes][environment]") {
  const auto t0 = std::chrono::steady_clock::now();
  const TetherModel storm = build_model(load_scenario(kStorm, {}));
  const double wall = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  INFO("storm static state: " << storm.equilibrium.newton_iterations << " Newton iterations, "
                              << storm.equilibrium.load_steps << " load steps, " << wall << " s");
  REQUIRE(storm.mean_drag);
  CHECK(storm.equilibrium.load_case.find("mean wind") != std::string::npos);
  // The wind blows from the west-north-west (280 to 295 deg): the ribbon leans east (+y) and
  // south (-z) where it blows.
  double east = 0.0;
  for (std::size_t k = 0; k < storm.nodes(); ++k) {
    const double h = storm.mesh.as_built_position.col(k).norm() - storm.reference_radius_m;
    if (h > 2e3 && h < 20e3) {
      CHECK(storm.mesh.position(1, k) > 0.0);
      CHECK(storm.mesh.position(2, k) < 0.0);
    }
    east = std::max(east, storm.mesh.position(1, k));
  }
  INFO("largest eastward lean " << east / 1e3 << " km");
  CHECK(east > 1e3);
  // At rest in the mean wind: the forces about the static state balance on every free node.
  Matrix3X f = Matrix3X::Zero(3, storm.nodes());
  const Matrix3X rest = Matrix3X::Zero(3, storm.nodes());
  const TetherState s{0.0, storm.mesh.position, rest, storm.mesh.node_mass};
  for (const ForceModel* m : storm.mean_forces()) m->add_forces(s, f);
  const double t_max =
      *std::max_element(storm.equilibrium.tension_n.begin(), storm.equilibrium.tension_n.end());
  CHECK(f.rightCols(storm.nodes() - 1).cwiseAbs().maxCoeff() < 1e-8 * t_max);
  // Modes about it: the drag of the mean wind damps; nothing grows.
  ModalOptions mo;
  mo.modes = 8;
  const ModalResult r = modal_analysis(storm, mo);
  REQUIRE(r.modes.size() == 8);
  for (const Mode& m : r.modes) CHECK(m.damping_ratio >= 0.0);
}
