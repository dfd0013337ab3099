// The environment in time-domain runs: drag of the wind, tides of the Moon
// and the Sun, J2, cuts and strikes, and the keys that set them up. Every check value names
// its source.
#include "catch_compat.hpp"

#include <Eigen/Geometry>
#include <cmath>
#include <complex>
#include <memory>
#include <random>
#include <sstream>

#include "memory_sink.hpp"
#include "models/aerodynamic_drag.hpp"
#include "models/planet.hpp"
#include "models/planet_gravity.hpp"
#include "models/tidal_force.hpp"
#include "models/wind_field.hpp"
#include "solver/input/errors.hpp"
#include "solver/integration/initial_state.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"
#include "solver/assembly/tether_model.hpp"

using namespace hawser;

namespace {

constexpr double kPi = 3.14159265358979323846;
const std::string kDemo = std::string(HAWSER_SOURCE_DIR) + "/scenarios/demo.yaml";
const std::string kStorm = std::string(HAWSER_SOURCE_DIR) + "/scenarios/storm.yaml";
const std::string kCut = std::string(HAWSER_SOURCE_DIR) + "/scenarios/cut.yaml";

RunSummary run(const Scenario& sc, testing::MemorySink& sink, TetherModel& model_out) {
  model_out = build_model(sc);
  TetherSystem sys(model_out);
  const std::vector<double> y0 = initial_state(sys, sc.initial);
  const RunOptions opt = run_options(sc.simulation, sys.layout());
  return run_simulation(sys, y0, opt, sink);
}

template <class T>
const T* find_model(const TetherModel& m) {
  for (const auto& b : m.body)
    if (const T* p = dynamic_cast<const T*>(b.get())) return p;
  return nullptr;
}

/// Linear momentum of nodes [first, last] in the inertial frame [kg m/s]: the rotating-frame
/// velocity plus Omega x r, turned by Omega t (the frames coincide at t = 0).
Eigen::Vector3d inertial_momentum(const TetherModel& m, double omega, double t, const Matrix3X& x, const Matrix3X& v,
                                  std::size_t first, std::size_t last) {
  Eigen::Vector3d p = Eigen::Vector3d::Zero();
  for (std::size_t k = first; k <= last; ++k) {
    const auto c = static_cast<Eigen::Index>(k);
    const Eigen::Vector3d vi = v.col(c) + Eigen::Vector3d(0.0, 0.0, omega).cross(Eigen::Vector3d(x.col(c)));
    p += m.mesh.node_mass[c] * vi;
  }
  return Eigen::AngleAxisd(omega * t, Eigen::Vector3d::UnitZ()) * p;
}

/// Index of the output at time t (outputs at a fixed interval).
std::size_t output_at(const testing::MemorySink& s, double t) {
  std::size_t best = 0;
  for (std::size_t i = 0; i < s.t.size(); ++i)
    if (std::abs(s.t[i] - t) < std::abs(s.t[best] - t)) best = i;
  return best;
}

// Central finite differences of a model's forces against its analytic Jacobian blocks; the
// largest difference relative to the largest finite-difference entry.
double fd_error(const ForceModel& model, double t, Matrix3X x, Matrix3X v, const Eigen::VectorXd& m, bool wrt_velocity,
                double h) {
  const Eigen::Index n = x.cols();
  NodeJacobian jac(static_cast<std::size_t>(n));
  model.add_jacobian(TetherState{t, x, v, m}, jac);
  double max_diff = 0.0, max_ref = 0.0;
  for (Eigen::Index j = 0; j < n; ++j)
    for (int b = 0; b < 3; ++b) {
      Matrix3X fp = Matrix3X::Zero(3, n), fm = Matrix3X::Zero(3, n);
      Matrix3X& q = wrt_velocity ? v : x;
      const double q0 = q(b, j);
      q(b, j) = q0 + h;
      model.add_forces(TetherState{t, x, v, m}, fp);
      q(b, j) = q0 - h;
      model.add_forces(TetherState{t, x, v, m}, fm);
      q(b, j) = q0;
      for (Eigen::Index i = 0; i < n; ++i) {
        const Eigen::Vector3d fd = (fp.col(i) - fm.col(i)) / (2.0 * h);
        const bool neighbour = std::abs(long(i) - long(j)) <= 1;
        for (int a = 0; a < 3; ++a) {
          const auto iu = static_cast<std::size_t>(i), ju = static_cast<std::size_t>(j);
          const double an = neighbour ? (wrt_velocity ? jac.dv(iu, ju)(a, b) : jac.dx(iu, ju)(a, b)) : 0.0;
          max_diff = std::max(max_diff, std::abs(an - fd[a]));
          max_ref = std::max(max_ref, std::abs(fd[a]));
        }
      }
    }
  return max_diff / max_ref;
}

std::string expect_input_error(const std::string& text) {
  try {
    load_scenario_text(text, "env.yaml", {});
  } catch (const InputError& e) {
    return e.what();
  }
  return "(no error)";
}

const char* kBenchBase =
    "material: {density: 1000, youngs_modulus: 1e9, ultimate_strength: 1e12, kind: invented}\n"
    "field: {kind: uniform, gravity: 9.81, cable_length: 10 m, cable_area: 1 mm^2, far_end: free}\n"
    "mesh: {elements: 10}\n";

}  // namespace

// ---- wind and drag -----------------------------------------------------------------------

TEST_CASE("local east, north, up in the rotating frame", "[environment]") {
  // physics.md section 1: at the anchor (R, 0, 0) up = +x, east = +y, north = +z; at longitude
  // +90 deg, (0, R, 0), the planet turning about +z carries the ground toward -x: east = -x.
  const double r = 6378137.0;
  const AltitudeFrame f = AltitudeFrame::planet(r);
  const Eigen::Matrix3d a = f.enu_axes(Eigen::Vector3d(r + 1000.0, 0.0, 0.0));
  CHECK((a.col(0) - Eigen::Vector3d::UnitY()).norm() < 1e-15);
  CHECK((a.col(1) - Eigen::Vector3d::UnitZ()).norm() < 1e-15);
  CHECK((a.col(2) - Eigen::Vector3d::UnitX()).norm() < 1e-15);
  CHECK(f.altitude(Eigen::Vector3d(r + 1000.0, 0.0, 0.0)) == Approx(1000.0));
  const Eigen::Matrix3d b = f.enu_axes(Eigen::Vector3d(0.0, r, 0.0));
  CHECK((b.col(0) + Eigen::Vector3d::UnitX()).norm() < 1e-15);
  CHECK((b.col(1) - Eigen::Vector3d::UnitZ()).norm() < 1e-15);
  // A westerly (from 270 deg) of 10 m/s at the anchor blows toward +y (meteorological
  // convention, common practice).
  std::vector<WindProfile> w{WindProfile::table({{0.0, 10.0, 270.0}}, 0.0, WindProfile::kForever)};
  const WindField field(f, w, GustSet(), nullptr, 0.0);
  const Eigen::Vector3d u = field.velocity(Eigen::Vector3d(r + 500.0, 0.0, 0.0), 1.0);
  CHECK(u.y() == Approx(10.0));
  CHECK(std::abs(u.x()) < 1e-12);
  CHECK(std::abs(u.z()) < 1e-12);
}

TEST_CASE("a steady cross wind leans a hanging cable to the straight-line angle", "[environment]") {
  // A uniform cable (mass per length mu) hangs from node 0 in uniform gravity g (+x) with a
  // free lower end, in a uniform cross wind W (+y). Try a straight cable at angle theta from
  // +x: tangent t = (cos, sin, 0), normal m = (-sin, cos, 0). Its normal relative wind is
  // a = W e_y - (W e_y . t) t = W cos(theta) m, so the cross-flow drag per length is
  // q cos^2(theta) m with q = rho Cd d W^2 / 2; weight per length mu g (cos t - sin m). A
  // straight cable has no curvature, so the normal loads must cancel:
  //   q cos^2(theta) = mu g sin(theta)    =>   sin(theta) = c (1 - sin^2(theta)), c = q / (mu g),
  //   sin(theta) = (sqrt(1 + 4 c^2) - 1) / (2 c),
  // and the tangential loads give T(s) = mu g cos(theta) (L - s) > 0, so the line is taut and
  // exact (the lumped discrete chain too: every node carries the same load direction). With a
  // load q of fixed direction instead, the same balance reads tan(theta) = q / (mu g); the
  // cross-flow principle (Hoerner, Fluid-Dynamic Drag, on inclined cylinders; recalled from
  // memory) turns q into q cos^2(theta) normal to the cable.
  const double rho_air = 1.2, cd = 1.2, d = 0.01, wind = 10.0, g = 9.81, rho = 1000.0;
  const double area = kPi * d * d / 4.0, mu = rho * area;
  const double q = 0.5 * rho_air * cd * d * wind * wind;
  const double c = q / (mu * g);
  const double theta = std::asin((std::sqrt(1.0 + 4.0 * c * c) - 1.0) / (2.0 * c));
  std::ostringstream y;
  y.precision(17);
  y << "material: {density: " << rho << ", youngs_modulus: 1e11, ultimate_strength: 1e15, damping_time: 1e-3, "
    << "kind: invented}\n"
    << "field: {kind: uniform, gravity: " << g << ", cable_length: 100 m, cable_area: " << area
    << ", far_end: free}\n"
    << "mesh: {elements: 20}\n"
    << "simulation: {duration: 300, output_interval: 10, method: bdf, rtol: 1e-9, atol_position: 1e-9, "
    << "atol_velocity: 1e-9}\n"
    << "environment:\n  atmosphere: uniform\n  air_density: " << rho_air << "\n  drag: {cd: " << cd << "}\n"
    << "  winds:\n    - kind: table\n      table: [{altitude: 0, speed: " << wind << ", from_direction: 270 deg}]\n";
  const Scenario sc = load_scenario_text(y.str(), "crosswind.yaml", {});
  testing::MemorySink sink;
  TetherModel model;
  const RunSummary s = run(sc, sink, model);
  REQUIRE(s.status == RunStatus::complete);
  const Matrix3X& x = sink.x.back();
  const std::size_t n = model.nodes() - 1;
  double worst_element = 0.0;
  for (std::size_t e = 0; e < n; ++e) {
    const Eigen::Vector3d de = x.col(static_cast<Eigen::Index>(e + 1)) - x.col(static_cast<Eigen::Index>(e));
    worst_element = std::max(worst_element, std::abs(std::atan2(de.y(), de.x()) - theta));
  }
  const double chord = std::atan2(x(1, static_cast<Eigen::Index>(n)), x(0, static_cast<Eigen::Index>(n)));
  INFO("analytic " << theta * 180 / kPi << " deg (tan-law value " << std::atan(c) * 180 / kPi << " deg), chord "
                   << chord * 180 / kPi << " deg, worst element " << worst_element << " rad, steps "
                   << s.stats.steps);
  CHECK(std::abs(chord - theta) < 1e-4);
  CHECK(worst_element < 1e-4);  // a straight line
  CHECK(sink.v.back().cwiseAbs().maxCoeff() < 1e-6);  // steady
  CHECK(std::abs(x.col(static_cast<Eigen::Index>(n)).z()) < 1e-9);  // no north-south force
}

TEST_CASE("drag Jacobian matches finite differences (altitude terms switched off)", "[environment][jacobian]") {
  // Bench axes (fixed east, north, up), uniform air and a uniform wind: the terms the analytic
  // Jacobian leaves out (altitude dependence of density and wind, turning of the local east)
  // are then zero, and the rest must match central differences (style.md habit 11).
  std::vector<WindProfile> w{WindProfile::table({{0.0, 20.0, 250.0}}, 0.0, WindProfile::kForever)};
  auto wind = std::make_shared<const WindField>(AltitudeFrame::bench(), w, GustSet(), nullptr, 0.0);
  // Round, ribbon and a flat ribbon-ish section, on a bent chain.
  const std::vector<DragSection> sec{{0.02, 0.02}, {0.1, 0.002}, {0.05, 0.01}, {0.1, 0.0001}, {0.03, 0.03}};
  const AerodynamicDrag drag(sec, 1.3, AirDensity::uniform(1.1), wind);
  std::mt19937 rng(5);
  std::uniform_real_distribution<double> u(-1.0, 1.0);
  const int n = 6;
  Matrix3X x(3, n), v(3, n);
  Eigen::VectorXd m = Eigen::VectorXd::Ones(n);
  for (int i = 0; i < n; ++i) {
    x.col(i) << 10.0 * i, 2.0 * u(rng), 3.0 * u(rng);
    v.col(i) << 3.0 * u(rng), 5.0 * u(rng), 4.0 * u(rng);
  }
  const double ex = fd_error(drag, 1.0, x, v, m, false, 1e-5);
  const double ev = fd_error(drag, 1.0, x, v, m, true, 1e-5);
  INFO("relative error: positions " << ex << ", velocities " << ev);
  CHECK(ex < 1e-7);
  CHECK(ev < 1e-7);
}

TEST_CASE("drag on a planet node: density of the 1976 standard and the wind's ENU rotation", "[environment]") {
  // A table wind from 280 deg at 12 m/s at the anchor: (east, north) = -12 (sin 280, cos 280)
  // (meteorological convention); at the anchor east = +y, north = +z (physics.md section 1).
  // Density at 0 m: 1.2250 kg/m^3 (U.S. Standard Atmosphere 1976, sea level; recalled from
  // memory, as in test_atmosphere.cpp).
  const Scenario sc = load_scenario(
      kDemo, {"mesh.elements=40", "environment.atmosphere=us1976",
              "environment.winds=[{kind: table, table: [{altitude: 0, speed: 12, from_direction: 280 deg}]}]"});
  const TetherModel model = build_model(sc);
  const AerodynamicDrag* drag = find_model<AerodynamicDrag>(model);
  REQUIRE(drag);
  CHECK(drag->drag_coefficient() == 2.0);  // ribbon: flat plate broadside (Hoerner, recalled from memory)
  const Matrix3X rest = Matrix3X::Zero(3, model.nodes());
  // Evaluated on the upright as-built line (the static state leans in this wind).
  const TetherState s{10.0, model.mesh.as_built_position, rest, model.mesh.node_mass};
  const std::vector<std::size_t> nodes{0, 1, 40};
  const auto fields = drag->output_fields(nodes);
  REQUIRE(fields.size() == 4);
  CHECK(fields[0].path == "/environment/wind");
  CHECK(fields[3].summary_peak == "peak_aerodynamic_load_n_per_m");
  std::vector<std::vector<double>> rows(fields.size());
  drag->sample_outputs(s, nodes, rows);
  REQUIRE(rows[0].size() == 9);
  REQUIRE(rows[2].size() == 3 * model.elements());
  const double a = 280.0 * kPi / 180.0;
  CHECK(rows[0][0] == Approx(0.0).margin(1e-12));
  CHECK(rows[0][1] == Approx(-12.0 * std::sin(a)));
  CHECK(rows[0][2] == Approx(-12.0 * std::cos(a)));
  CHECK(rows[1][0] == Approx(1.2250).epsilon(1e-4));
  CHECK(rows[1][2] == 0.0);  // the top node at 100,000 km: vacuum
  // A mesh with a 1 km first element puts element 0's midpoint at 500 m. A westerly meets the
  // ribbon broadside (its wide face looks east-west): F_y = rho(500 m) Cd W |a| a_y l / 2.
  const Scenario fine = load_scenario(
      kDemo, {"mesh.elements=200", "mesh.first_element_length=1 km", "environment.atmosphere=us1976",
              "environment.winds=[{kind: table, table: [{altitude: 0, speed: 12, from_direction: 270 deg}]}]"});
  const TetherModel fm = build_model(fine);
  const AerodynamicDrag* fd = find_model<AerodynamicDrag>(fm);
  const Matrix3X frest = Matrix3X::Zero(3, fm.nodes());
  const TetherState fs{10.0, fm.mesh.as_built_position, frest, fm.mesh.node_mass};
  const Eigen::Vector3d f0 = fd->element_force(fs, 0);
  const double l = fm.mesh.as_built_position(0, 1) - fm.mesh.as_built_position(0, 0);
  const double rho500 = StandardAtmosphere1976().at(0.5 * l).density_kg_m3;
  const double width = fd->section(0).width_m;
  CHECK(width == Approx(std::sqrt(fm.mesh.element_area[0] * 1000.0)));  // w t = A, w / t = 1000
  CHECK(f0.y() == Approx(0.5 * rho500 * 2.0 * width * 12.0 * 12.0 * l));
  CHECK(std::abs(f0.x()) < 1e-12 * std::abs(f0.y()));
  // The same wind from the north meets the ribbon's edge: the thickness, W/t = 1000 times less.
  const Scenario north = load_scenario(
      kDemo, {"mesh.elements=200", "mesh.first_element_length=1 km", "environment.atmosphere=us1976",
              "environment.winds=[{kind: table, table: [{altitude: 0, speed: 12, from_direction: 0 deg}]}]"});
  const TetherModel nm = build_model(north);
  const Eigen::Vector3d fn = find_model<AerodynamicDrag>(nm)->element_force(fs, 0);
  CHECK(-fn.z() == Approx(f0.y() / 1000.0));
}

TEST_CASE("gust onsets and ends and wind windows are stop times of the run", "[environment]") {
  // models/discrete_gust.hpp: a gust's second derivative jumps at onset and end (onset + 2 t_H);
  // a wind window switches on and off. The turbulence, continuous, adds none.
  const std::string env =
      "environment:\n  atmosphere: uniform\n  air_density: 1.2\n"
      "  winds: [{kind: table, table: [{altitude: 0, speed: 5, from_direction: 90 deg}], start: 2, end: 7}]\n"
      "  gusts: [{amplitude: 3, gradient_distance: 30, front_speed: 10, from_direction: 0 deg, altitude_low: 0, "
      "altitude_high: 5, onset: 1.5}]\n"
      "  turbulence: {from_direction: 90 deg, stations: [{altitude: 0, mean_speed: 5, sigma: [1, 1, 1], "
      "scale: [50, 50, 50]}]}\n";
  const Scenario sc = load_scenario_text(std::string(kBenchBase) + "simulation: {duration: 10, output_interval: 1}\n" + env,
                                         "gusts.yaml", {});
  const TetherModel m = build_model(sc);
  const AerodynamicDrag* drag = find_model<AerodynamicDrag>(m);
  REQUIRE(drag);
  const std::vector<double> ev = drag->event_times();
  // Gust: t_H = H / V = 30 / 10 = 3 s; onset 1.5, end 7.5. Wind window 2 and 7.
  REQUIRE(ev.size() == 4);
  CHECK(ev[0] == 1.5);
  CHECK(ev[1] == 2.0);
  CHECK(ev[2] == 7.0);
  CHECK(ev[3] == 7.5);
}

// ---- tides -------------------------------------------------------------------------------

TEST_CASE("tidal force on each node is the difference of two gravity terms", "[environment]") {
  // physics.md section 4: a third body b at d pulls a node at r with GM_b (d - r)/|d - r|^3 and
  // the planet's centre with GM_b d/|d|^3; the frame feels the difference. Compared here with
  // the direct difference in long double (no cancellation at these ratios).
  const Scenario sc = load_scenario(kDemo, {"climbers=[]", "mesh.elements=40", "environment.tides.moon=true",
                                            "environment.tides.sun=true", "environment.tides.moon_phase=40 deg"});
  const TetherModel model = build_model(sc);
  const TidalForce* tide = find_model<TidalForce>(model);
  REQUIRE(tide);
  REQUIRE(tide->tide().bodies().size() == 2);
  const double t = 3.7 * 3600.0;
  const Matrix3X rest = Matrix3X::Zero(3, model.nodes());
  Matrix3X f = Matrix3X::Zero(3, model.nodes());
  tide->add_forces(TetherState{t, model.mesh.position, rest, model.mesh.node_mass}, f);
  double worst = 0.0;
  for (Eigen::Index i = 0; i < f.cols(); ++i) {
    Eigen::Matrix<long double, 3, 1> a = Eigen::Matrix<long double, 3, 1>::Zero();
    const Eigen::Matrix<long double, 3, 1> r = model.mesh.position.col(i).cast<long double>();
    for (std::size_t b = 0; b < 2; ++b) {
      const Eigen::Matrix<long double, 3, 1> d = tide->tide().body_position(b, t).cast<long double>();
      const long double gm = tide->tide().bodies()[b].gm_m3_s2;
      a += gm * ((d - r) / std::pow((d - r).norm(), 3.0L) - d / std::pow(d.norm(), 3.0L));
    }
    const Eigen::Vector3d direct = (static_cast<long double>(model.mesh.node_mass[i]) * a).cast<double>();
    worst = std::max(worst, (f.col(i) - direct).norm() / direct.norm());
  }
  INFO("largest relative difference " << worst);
  CHECK(worst < 1e-12);
}

TEST_CASE("the anchor longitude orients the tide bodies in the rotating frame", "[environment]") {
  // The rotating frame's +x points at the anchor's longitude: a Moon whose ascending node lies at
  // the anchor's longitude, at phase 0 on an equatorial orbit, is straight overhead (+x) at t = 0;
  // 90 deg further east along the equator it is at +y (east). Orbit radius 384,400 km (the
  // data's, models/third_body_tide.cpp).
  const double anchor_deg = load_scenario(kDemo, {}).anchor.longitude_rad * 180.0 / M_PI;
  for (double extra_deg : {0.0, 90.0}) {
    const std::string lon = std::to_string(anchor_deg + extra_deg) + " deg";
    const Scenario sc = load_scenario(kDemo, {"climbers=[]", "mesh.elements=10", "environment.tides.moon=true",
                                              "environment.tides.moon_inclination=0 deg",
                                              "environment.tides.moon_node_longitude=" + lon});
    const TetherModel model = build_model(sc);
    const Eigen::Vector3d d = find_model<TidalForce>(model)->tide().body_position(0, 0.0);
    const Eigen::Vector3d expect = extra_deg == 0.0 ? Eigen::Vector3d(3.844e8, 0, 0) : Eigen::Vector3d(0, 3.844e8, 0);
    CHECK((d - expect).norm() < 1e-6 * 3.844e8);
  }
}

TEST_CASE("tide Jacobian matches finite differences", "[environment][jacobian]") {
  // da/dr of models/third_body_tide.hpp, times each node's mass (style.md habit 11).
  ThirdBody moon = earth_moon_mean_orbit(), sun = earth_sun_mean_orbit();
  moon.initial_phase_rad = 0.4;
  const TidalForce tide(ThirdBodyTide({moon, sun}, 7.292115e-5));
  const int n = 5;
  Matrix3X x(3, n), v = Matrix3X::Zero(3, n);
  Eigen::VectorXd m(n);
  for (int i = 0; i < n; ++i) {
    x.col(i) << 7e6 + 2e7 * i, 3e5 * i, -2e5 * i;
    m[i] = 1e4 * (1 + i);
  }
  const double ex = fd_error(tide, 5000.0, x, v, m, false, 1e3);
  INFO("relative error " << ex);
  CHECK(ex < 1e-7);
}

TEST_CASE("a tether's longitudinal response to the Moon peaks at the semi-diurnal period", "[environment]") {
  // The Moon on its orbit comes back over the same meridian every 2 pi / (Omega - n_moon),
  // 24.84 h, and the tide's quadrupole shape repeats twice in that: 12.42 h, the M2 period of
  // the semi-diurnal lunar tide (Doodson's tidal constituents; recalled from memory).
  // Coarse mesh; the material damping raised so that the transients of switching the tide on
  // (lowest longitudinal mode: 5.7 h, `hawser modes`) die out in the first two days. The top
  // node's radial motion over days 2-10 is windowed (Hann) and its Fourier amplitude scanned
  // from 8 to 20 h.
  const Scenario sc = load_scenario(
      kDemo, {"mesh.elements=30", "mesh.grading=uniform", "material.damping_time=400", "initial.displacements=[]",
              "simulation.duration=10 d", "simulation.output_interval=20 min", "simulation.rtol=1e-7",
              "simulation.atol_position=1e-4", "environment.tides.moon=true"});
  testing::MemorySink sink;
  TetherModel model;
  const RunSummary s = run(sc, sink, model);
  REQUIRE(s.status == RunStatus::complete);
  const std::size_t top = model.nodes() - 1;
  std::vector<double> t, u;
  for (std::size_t i = 0; i < sink.t.size(); ++i)
    if (sink.t[i] >= 2 * 86400.0) {
      t.push_back(sink.t[i]);
      u.push_back(sink.x[i](0, static_cast<Eigen::Index>(top)) - model.mesh.position(0, static_cast<Eigen::Index>(top)));
    }
  double mean = 0.0;
  for (double x : u) mean += x / static_cast<double>(u.size());
  const double span = t.back() - t.front();
  double best_period = 0.0, best_amp = 0.0;
  for (double period_h = 8.0; period_h <= 20.0; period_h += 0.01) {
    const double w = 2.0 * kPi / (period_h * 3600.0);
    std::complex<double> sum = 0.0;
    for (std::size_t i = 0; i < t.size(); ++i) {
      const double hann = 0.5 * (1.0 - std::cos(2.0 * kPi * (t[i] - t.front()) / span));
      sum += hann * (u[i] - mean) * std::exp(std::complex<double>(0.0, -w * t[i]));
    }
    if (std::abs(sum) > best_amp) {
      best_amp = std::abs(sum);
      best_period = period_h;
    }
  }
  const double m2_h = find_model<TidalForce>(model)->tide().synodic_day_s(0) / 2.0 / 3600.0;
  INFO("peak at " << best_period << " h; half the lunar day " << m2_h << " h; steps " << s.stats.steps);
  CHECK(m2_h == Approx(12.42).margin(0.005));  // M2, 12.4206 h (recalled from memory)
  CHECK(std::abs(best_period - m2_h) < 0.1);
  CHECK(std::abs(best_period - 12.0) > 0.3);  // not the solar day's half
}

// ---- J2 ------------------------------------------------------------------------------------

TEST_CASE("J2 moves the synchronous radius out by about half a kilometre", "[environment][j2]") {
  // On the equator the J2 term adds (3/2) J2 (a/r)^2 GM / r^2 to the inward pull (Vallado, the
  // J2 potential with P2(0) = -1/2). Balance with Omega^2 r: GM/r^3 (1 + (3/2) J2 (a/r)^2) =
  // Omega^2, so r = r_g (1 + (1/2) J2 (a/r_g)^2) to first order: 0.52 km for WGS 84.
  Planet earth{"earth", 3.986004418e14, 7.292115e-5, 6378137.0, 1.08262982e-3};  // config/planets.yaml
  const double rg = EquatorialField(earth, false).synchronous_radius();
  const double rj = EquatorialField(earth, true).synchronous_radius();
  const double first_order = 0.5 * earth.j2 * earth.equatorial_radius_m * earth.equatorial_radius_m / rg;
  INFO("shift " << rj - rg << " m, first order " << first_order << " m");
  CHECK(rj - rg == Approx(first_order).epsilon(1e-3));
  CHECK(rj - rg == Approx(522.0).margin(5.0));
}

TEST_CASE("with J2 the J2 equilibrium stays put, and without J2 it does not", "[environment][j2]") {
  // physics.md section 3: the discrete equilibrium solved in the field the run uses is exact.
  // Checked with J2 on for a day (to 1e-6 of the length, as the [dynamics] test without J2);
  // then the same J2 equilibrium run with point-mass gravity must drift, by far more.
  const Scenario sc = load_scenario(kDemo, {"climbers=[]", "simulation.duration=1 d", "simulation.output_interval=2 h",
                                            "mesh.elements=40", "initial.displacements=[]", "model.j2=true"});
  testing::MemorySink sink;
  TetherModel model;
  REQUIRE(run(sc, sink, model).status == RunStatus::complete);
  const double length = model.mesh.position(0, static_cast<Eigen::Index>(model.nodes() - 1)) - model.mesh.position(0, 0);
  double worst = 0.0;
  for (const auto& x : sink.x) worst = std::max(worst, (x - model.mesh.position).cwiseAbs().maxCoeff());

  TetherModel wrong = build_model(sc);
  REQUIRE(dynamic_cast<PlanetGravity*>(wrong.body[0].get()));
  wrong.body[0] = std::make_unique<PlanetGravity>(sc.planet, false);
  testing::MemorySink sink2;
  TetherSystem sys(wrong);
  REQUIRE(run_simulation(sys, initial_state(sys, sc.initial), run_options(sc.simulation, sys.layout()), sink2).status ==
          RunStatus::complete);
  double drift = 0.0;
  for (const auto& x : sink2.x) drift = std::max(drift, (x - wrong.mesh.position).cwiseAbs().maxCoeff());
  INFO("with J2: " << worst << " m; J2 equilibrium without J2: " << drift << " m");
  CHECK(worst < 1e-6 * length);
  CHECK(drift > 1000.0 * worst);
  CHECK(drift > 1.0);
}

// ---- events --------------------------------------------------------------------------------

TEST_CASE("a cut changes no momentum at its instant, then the upper part rises and the lower falls",
          "[environment][events]") {
  // Newton's third law: the cut removes an internal pair of forces (the cut element's tension
  // on its two nodes), so the tether's total inertial momentum changes at the same rate just
  // after the cut as it would have without it, while the part above the cut gains T_cut dt
  // outward and the part below loses as much. Compared with an uncut twin run over 1 s after
  // the cut, long before the release reaches the anchor (19 min at sqrt(E/rho)).
  const std::vector<std::string> base{"mesh.elements=40", "mesh.grading=uniform", "initial.displacements=[]",
                                      "simulation.duration=61", "simulation.output_interval=0.25",
                                      "simulation.rtol=1e-10", "simulation.atol_position=1e-9",
                                      "simulation.atol_velocity=1e-12"};
  auto with = [&](std::vector<std::string> extra) {
    std::vector<std::string> o = base;
    o.insert(o.end(), extra.begin(), extra.end());
    return load_scenario(kDemo, o);
  };
  const Scenario cut_sc = with({"events.cuts=[{altitude: 31000 km, time: 60}]"});
  const Scenario twin_sc = with({});
  testing::MemorySink cut, twin;
  TetherModel cm, tm;
  REQUIRE(run(cut_sc, cut, cm).status == RunStatus::complete);
  REQUIRE(run(twin_sc, twin, tm).status == RunStatus::complete);
  const std::size_t e = 12;  // 31,000 km lies in element 12 (30,000-32,500 km) of 40 uniform
  REQUIRE(cm.bars->cut_time(e) == 60.0);
  const double omega = cm.spin_rate_rad_s;
  const std::size_t last = cm.nodes() - 1;
  const std::size_t i0 = output_at(cut, 60.0), i1 = output_at(cut, 61.0);
  REQUIRE(cut.t[i0] == 60.0);
  const double tension = twin.d[i0].tension_n[e];
  const double dt = cut.t[i1] - cut.t[i0];
  auto p = [&](const testing::MemorySink& s, const TetherModel& m, std::size_t i, std::size_t a, std::size_t b) {
    return inertial_momentum(m, omega, s.t[i], s.x[i], s.v[i], a, b);
  };
  // At the instant: the same state (the cut itself changes no velocity).
  CHECK((cut.v[i0] - twin.v[i0]).cwiseAbs().maxCoeff() < 1e-9);
  // One second on: the total is the twin's; the upper part has gained T dt along the element.
  const Eigen::Vector3d d_total = p(cut, cm, i1, 1, last) - p(twin, tm, i1, 1, last);
  const Eigen::Vector3d d_upper = p(cut, cm, i1, e + 1, last) - p(twin, tm, i1, e + 1, last);
  const Eigen::Vector3d d_lower = p(cut, cm, i1, 1, e) - p(twin, tm, i1, 1, e);
  const Eigen::Vector3d out = Eigen::AngleAxisd(omega * 60.5, Eigen::Vector3d::UnitZ()) * Eigen::Vector3d::UnitX();
  INFO("T_cut " << tension << " N; T dt " << tension * dt << " N s; upper " << d_upper.transpose() << "; lower "
                << d_lower.transpose() << "; total " << d_total.transpose());
  CHECK(d_total.norm() < 1e-6 * tension * dt);
  CHECK(d_upper.dot(out) == Approx(tension * dt).epsilon(1e-3));
  CHECK(d_lower.dot(out) == Approx(-tension * dt).epsilon(1e-3));

  // Afterwards (half an hour): the freed upper part moves outward, the lower part falls.
  const Scenario later = load_scenario(kDemo, {"climbers=[]", "mesh.elements=40", "mesh.grading=uniform", "initial.displacements=[]",
                                               "simulation.duration=30 min", "simulation.output_interval=5 min",
                                               "events.cuts=[{altitude: 31000 km, time: 60}]"});
  testing::MemorySink ls;
  TetherModel lm;
  REQUIRE(run(later, ls, lm).status == RunStatus::complete);
  auto radial_velocity = [&](std::size_t a, std::size_t b) {  // mass-weighted mean, rotating frame
    double mv = 0.0, mm = 0.0;
    for (std::size_t k = a; k <= b; ++k) {
      const auto c = static_cast<Eigen::Index>(k);
      const Eigen::Vector3d r = ls.x.back().col(c);
      mv += lm.mesh.node_mass[c] * ls.v.back().col(c).dot(r.normalized());
      mm += lm.mesh.node_mass[c];
    }
    return mv / mm;
  };
  const double up = radial_velocity(e + 1, last), down = radial_velocity(1, e);
  INFO("mean radial velocity after 30 min: upper part " << up << " m/s, lower part " << down << " m/s");
  CHECK(up > 0.0);
  CHECK(down < 0.0);
  const Eigen::Index a = static_cast<Eigen::Index>(e), b = static_cast<Eigen::Index>(e + 1);
  CHECK(ls.x.back().col(b).norm() > lm.mesh.position.col(b).norm() + 100e3);  // risen > 100 km
  CHECK(ls.x.back().col(a).norm() < lm.mesh.position.col(a).norm() - 100e3);  // fallen > 100 km
}

TEST_CASE("a strike adds exactly m dv of momentum", "[environment][events]") {
  // A bench cable with no gravity, held at both ends with a pretension, lies at rest; the
  // forces of the two ends on it cancel. A strike on the middle node at t = 5 ms: until the
  // disturbance reaches a held end only internal forces change, so the free nodes' total
  // momentum must be exactly m dv (Newton's third law; linear invariants are kept by the
  // integrator's linear multistep formulas to round-off and the Newton tolerance). The
  // disturbance travels at sqrt(E/rho) = 1000 m/s, 20 m to the ends in 20 ms; but a lumped
  // chain (spacing h, omega_max = 2 c / h = 2000/s) also leaks a precursor ahead of the front,
  // like J_n(omega_max t) at n nodes (Brillouin, Wave Propagation in Periodic Structures, the
  // lattice's Bessel-function response; recalled from memory): at 19 nodes J_19(4) ~ 4e-12 after
  // 2 ms. So the check runs for 2 ms after the strike.
  const std::string text =
      "material: {density: 1000, youngs_modulus: 1e9, ultimate_strength: 1e15, kind: invented}\n"
      "field: {kind: uniform, gravity: 0, cable_length: 40 m, cable_area: 1 mm^2, far_end: fixed, pretension: 10}\n"
      "mesh: {elements: 40}\n"
      "simulation: {duration: 0.007, output_interval: 0.00025, method: bdf, rtol: 1e-10, atol_position: 1e-14, "
      "atol_velocity: 1e-12}\n"
      "events:\n  strikes:\n    - {node: 20, time: 0.005, delta_v: [0.3, 0.4, -0.2]}\n";
  const Scenario sc = load_scenario_text(text, "strike.yaml", {});
  testing::MemorySink sink;
  TetherModel model;
  REQUIRE(run(sc, sink, model).status == RunStatus::complete);
  const double m = model.mesh.node_mass[20];
  const Eigen::Vector3d expect = m * Eigen::Vector3d(0.3, 0.4, -0.2);
  double worst = 0.0, before = 0.0;
  std::size_t after = 0;
  for (std::size_t i = 0; i < sink.t.size(); ++i) {
    Eigen::Vector3d p = Eigen::Vector3d::Zero();
    for (std::size_t k = 1; k + 1 < model.nodes(); ++k)
      p += model.mesh.node_mass[static_cast<Eigen::Index>(k)] * sink.v[i].col(static_cast<Eigen::Index>(k));
    if (sink.t[i] <= 0.005) {
      before = std::max(before, p.norm());
    } else {
      worst = std::max(worst, (p - expect).norm() / expect.norm());
      ++after;
    }
  }
  INFO("momentum before " << before << " kg m/s; largest relative error after " << worst << " over " << after
                          << " outputs; m dv = " << expect.transpose());
  CHECK(before < 1e-12 * expect.norm());
  REQUIRE(after >= 6);
  CHECK(worst < 1e-9);
  // The struck node starts at dv (its neighbours pull only as the elements stretch).
  const std::size_t first = output_at(sink, 0.00525);
  const double dv = std::sqrt(0.3 * 0.3 + 0.4 * 0.4 + 0.2 * 0.2);
  CHECK((sink.v[first].col(20) - Eigen::Vector3d(0.3, 0.4, -0.2)).norm() < 0.5 * dv);
  CHECK((sink.v[first].col(20) - Eigen::Vector3d(0.3, 0.4, -0.2)).norm() > 0.0);
}

TEST_CASE("strikes by altitude and impulse, cuts by element: the model's events", "[environment][events]") {
  // delta_v = J / m for an impulse J [N s] on a node of mass m (Newton's second law).
  const Scenario sc = load_scenario(
      kDemo, {"mesh.elements=40", "mesh.grading=uniform",
              "events.strikes=[{altitude: 5100 km, time: 30, impulse: [0, 2.5e6, 1e6]}, "
              "{node: 7, time: 0, delta_v: [1, 0, 0]}]",
              "events.cuts=[{element: 3, time: 12.5}]"});
  const TetherModel m = build_model(sc);
  REQUIRE(m.jumps.size() == 2);
  CHECK(m.jumps[0].node == 2);  // 5,100 km is nearest to node 2 at 5,000 km (2,500 km elements)
  CHECK(m.jumps[0].time_s == 30.0);
  const double mass = m.mesh.node_mass[2];
  CHECK((m.jumps[0].delta_v_m_s * mass - Eigen::Vector3d(0, 2.5e6, 1e6)).norm() < 1e-9 * 2.5e6);
  CHECK(m.jumps[1].node == 7);
  CHECK(m.bars->cut_time(3) == 12.5);
  CHECK(std::isinf(m.bars->cut_time(2)));
}

// ---- keys ------------------------------------------------------------------------------------

TEST_CASE("environment and event keys: bad input is refused with its location", "[environment][scenario]") {
  const std::string bench = kBenchBase;
  struct Case {
    const char* text;
    const char* key;
    const char* words;
  };
  const std::vector<Case> cases{
      {"environment: {winds: [{kind: table, table: [{altitude: 0, speed: 3, from_direction: 0}]}]}\n",
       "environment.winds", "needs air"},
      {"environment: {atmosphere: us1976}\n", "environment.atmosphere", "needs a planet"},
      {"environment: {atmosphere: uniform}\n", "environment.air_density", "missing"},
      {"environment: {atmosphere: uniform, air_density: 1.2, winds: [{kind: power_law, reference_speed: 3, "
       "reference_height: 10, exponent: 0.14}]}\n",
       "environment.winds[0]", "from_direction"},
      {"environment: {atmosphere: uniform, air_density: 1.2, winds: [{kind: table, exponent: 0.1, "
       "table: [{altitude: 0, speed: 3, from_direction: 0}]}]}\n",
       "environment.winds[0].exponent", "not used"},
      {"environment: {atmosphere: uniform, air_density: 1.2, winds: [{kind: table, table: [{altitude: 5, speed: 3, "
       "from_direction: 0}, {altitude: 5, speed: 4, from_direction: 0}]}]}\n",
       "environment.winds[0].table[1].altitude", "increase"},
      {"environment: {atmosphere: uniform, air_density: 1.2, gusts: [{amplitude: 3, from_direction: 0, "
       "altitude_low: 0, altitude_high: 5, onset: 1}]}\n",
       "environment.gusts[0]", "gradient_time or gradient_distance"},
      {"environment: {atmosphere: uniform, air_density: 1.2, gusts: [{amplitude: 3, gradient_distance: 10, "
       "from_direction: 0, altitude_low: 0, altitude_high: 5, onset: 1}]}\n",
       "environment.gusts[0]", "front_speed"},
      {"environment: {tides: {moon: true}}\n", "environment.tides.moon", "planet tether only"},
      {"events: {cuts: [{element: 10, time: 1}]}\n", "events.cuts[0].element", "does not exist"},
      {"events: {cuts: [{element: 1, altitude: 2, time: 1}]}\n", "events.cuts[0].altitude", "not both"},
      {"events: {strikes: [{node: 3, time: 1}]}\n", "events.strikes[0]", "delta_v or impulse"},
      {"events: {strikes: [{altitude: 11, time: 1, delta_v: [1, 0, 0]}]}\n", "events.strikes[0].altitude",
       "beyond the far end"},
  };
  for (const Case& c : cases) {
    const std::string msg = expect_input_error(bench + c.text);
    INFO(c.text << " -> " << msg);
    CHECK_THAT(msg, ContainsSubstring("env.yaml:") && ContainsSubstring(c.key) &&
                        ContainsSubstring(c.words));
  }
  // A turbulence series too long for memory is refused at `hawser check` already (5e7 samples).
  const std::string long_series = expect_input_error(
      bench + "simulation: {duration: 1 d, output_interval: 1 h}\n"
              "environment: {atmosphere: uniform, air_density: 1.2, turbulence: {from_direction: 0, sample_interval: "
              "0.001, stations: [{altitude: 0, mean_speed: 5, sigma: [1, 1, 1], scale: [50, 50, 50]}]}}\n");
  CHECK_THAT(long_series, ContainsSubstring("env.yaml:") &&
                              ContainsSubstring("environment.turbulence") &&
                              ContainsSubstring("too long a series"));
  // Tides need the Earth's Moon and Sun: refused on Mars.
  const std::string mars = [] {
    try {
      load_scenario(kDemo, {"climbers=[]", "planet=mars", "environment.tides.sun=true"});
    } catch (const InputError& e) {
      return std::string(e.what());
    }
    return std::string("(no error)");
  }();
  CHECK_THAT(mars, ContainsSubstring("environment.tides.sun") &&
                       ContainsSubstring("not the Earth"));
}

TEST_CASE("the storm and cut scenarios load and run, shortened", "[environment][scenario]") {
  // style.md habit 10: the shipped examples double as smoke tests.
  for (const auto& [path, duration] : {std::pair<std::string, const char*>{kStorm, "simulation.duration=3 min"},
                                       std::pair<std::string, const char*>{kCut, "simulation.duration=4 min"}}) {
    INFO(path);
    const Scenario sc = load_scenario(path, {duration});
    testing::MemorySink sink;
    sink.keep_states = false;
    TetherModel model;
    const RunSummary s = run(sc, sink, model);
    CHECK(s.status == RunStatus::complete);
  }
  const TetherModel storm = build_model(load_scenario(kStorm, {}));
  CHECK(find_model<AerodynamicDrag>(storm));
  CHECK(find_model<AerodynamicDrag>(storm)->event_times().size() == 4);  // two gusts, onset and end each
  const TetherModel cut = build_model(load_scenario(kCut, {}));
  std::size_t cuts = 0;
  for (std::size_t e = 0; e < cut.elements(); ++e) cuts += std::isfinite(cut.bars->cut_time(e)) ? 1 : 0;
  CHECK(cuts == 1);
}

// ---- drag and tides on climbers ---------------------------------------------------------

namespace {
/// A 100 m cable hanging in the uniform-field bench, free at the bottom, with a climber of
/// mass M parked at the bottom end (it starts long after the run) in a uniform horizontal wind.
/// The cable's own drag is switched off (cd 0): only the climber feels the wind.
std::string hanging_with_climber(double climber_kg, double area_m2, double cd, double wind_m_s, double rho_air,
                                 bool with_drag, const std::string& method = "bdf") {
  std::ostringstream y;
  y.precision(17);
  y << "material: {density: 1000, youngs_modulus: 1e11, ultimate_strength: 1e15, damping_time: 1e-3, "
    << "kind: invented}\n"
    << "field: {kind: uniform, gravity: 9.81, cable_length: 100 m, cable_area: 1e-4, far_end: free}\n"
    << "mesh: {elements: 20}\n"
    << "simulation: {duration: 300, output_interval: 10, method: " << method
    << ", rtol: 1e-9, atol_position: 1e-9, atol_velocity: 1e-9}\n"
    << "climbers:\n  - {name: box, mass: " << climber_kg << ", from: 100 m, to: 50 m, direction: down, "
    << "cruise_speed: 1 m/s, acceleration: 0.1 m/s^2, deceleration: 0.1 m/s^2, start_time: 1e6";
  if (with_drag) y << ", drag: {area: " << area_m2 << ", cd: " << cd << "}";
  y << "}\n"
    << "environment:\n  atmosphere: uniform\n  air_density: " << rho_air << "\n  drag: {cd: 0}\n"
    << "  winds:\n    - kind: table\n      table: [{altitude: 0, speed: " << wind_m_s
    << ", from_direction: 270 deg}]\n";
  return y.str();
}
}  // namespace

TEST_CASE("a climber in the wind: its drag leans the cable above it to the statics' angles", "[environment][climber]") {
  // The climber's drag D = (1/2) rho Cd A u^2 (the drag equation; Hoerner, Fluid-Dynamic Drag,
  // 1965, recalled from memory) pushes the bottom end downwind. In the steady state each element
  // carries everything below it (statics of the free body below a cut, common practice): the
  // horizontal D and the weight g (M + the lumped node masses below), so it leans by
  //   tan(theta_e) = D / (g (M + sum of node masses below e)).
  // The wind arrives at t = 0 as a step; the swing of the climber dies out under its own drag,
  // but the cable's lateral string modes above it have no damping (its own drag is off), so
  // the shape is the mean over the last 100 s, sampled at 20 Hz (their periods are 2.6 s and
  // shorter).
  const double M = 50.0, area = 0.5, cd = 1.1, u = 8.0, rho_air = 1.2, g = 9.81;
  const double D = 0.5 * rho_air * cd * area * u * u;
  std::string text = hanging_with_climber(M, area, cd, u, rho_air, true);
  text.replace(text.find("output_interval: 10"), std::string("output_interval: 10").size(), "output_interval: 0.05");
  const Scenario sc = load_scenario_text(text, "climber_wind.yaml", {});
  testing::MemorySink sink;
  TetherModel model;
  const RunSummary s = run(sc, sink, model);
  REQUIRE(s.status == RunStatus::complete);
  Matrix3X mean = Matrix3X::Zero(3, sink.x.back().cols());
  int count = 0;
  for (std::size_t k = 0; k < sink.t.size(); ++k)
    if (sink.t[k] >= 200.0) {
      mean += sink.x[k];
      ++count;
    }
  mean /= count;
  const std::size_t n = model.nodes() - 1;  // elements
  double worst = 0.0, mass_below = M;
  for (std::size_t e = n; e-- > 0;) {
    mass_below += model.mesh.node_mass[static_cast<Eigen::Index>(e + 1)];
    const Eigen::Vector3d de = mean.col(static_cast<Eigen::Index>(e + 1)) - mean.col(static_cast<Eigen::Index>(e));
    const double lean = std::atan2(de.y(), de.x());  // from the hanging direction (+x) toward +y (east)
    const double expected = std::atan(D / (g * mass_below));
    worst = std::max(worst, std::abs(lean / expected - 1.0));
  }
  INFO("drag " << D << " N; worst relative error of an element's lean " << worst << "; steps " << s.stats.steps);
  CHECK(worst < 2e-3);
  // Without the climber's drag the cable hangs straight down.
  const Scenario calm = load_scenario_text(hanging_with_climber(M, area, cd, u, rho_air, false), "no_drag.yaml", {});
  testing::MemorySink sink2;
  TetherModel model2;
  REQUIRE(run(calm, sink2, model2).status == RunStatus::complete);
  CHECK(sink2.x.back().row(1).cwiseAbs().maxCoeff() < 1e-9);
}

TEST_CASE("the climber's drag Jacobian matches finite differences", "[environment][climber][jacobian]") {
  // Uniform air and wind on the bench: the analytic terms must match central differences of the
  // climber model's forces (style.md habit 11), at a state with the climber moving (t = 20 s of
  // a descent starting at t = 0) and the nodes moving too.
  std::string text = hanging_with_climber(50.0, 0.5, 1.1, 8.0, 1.2, true);
  text.replace(text.find("start_time: 1e6"), std::string("start_time: 1e6").size(), "start_time: 0");
  // The point load: its Jacobian is complete (the smooth load's leaves couplings beyond a
  // node's neighbours out of the band; test_climber_spread.cpp checks it within the band).
  const Scenario sc = load_scenario_text(text, "climber_jac.yaml", {"mesh.climber_load=point"});
  const TetherModel model = build_model(sc);
  REQUIRE(model.climbers);
  const double t = 20.0;
  REQUIRE(model.climbers->attachments(t).at(0).xi_dot != 0.0);
  std::mt19937 rng(9);
  std::uniform_real_distribution<double> r(-1.0, 1.0);
  Matrix3X x = model.mesh.position, v = Matrix3X::Zero(3, model.mesh.position.cols());
  for (Eigen::Index i = 1; i < x.cols(); ++i) {
    x.col(i) += Eigen::Vector3d(0.01 * r(rng), 0.3 * r(rng), 0.2 * r(rng));
    v.col(i) << 0.5 * r(rng), 2.0 * r(rng), 1.5 * r(rng);
  }
  const double ev = fd_error(*model.climbers, t, x, v, model.mesh.node_mass, true, 1e-6);
  INFO("relative error of dF/dv " << ev);
  CHECK(ev < 1e-6);
}

TEST_CASE("tides act on climbers as on nodes", "[environment][climber][tide]") {
  // The climbers feel every model that acts on point masses (models/force_model.hpp): with
  // tides on, a parked climber's share of force on its nodes grows by w_i m a_tide(r_c), the
  // tidal acceleration at its place (models/third_body_tide.hpp, itself checked against the
  // direct difference of two gravity terms above).
  const std::vector<std::string> base{"mesh.elements=40", "initial.displacements=[]",
                                      "climbers[0].start_time=1e7"};
  std::vector<std::string> with_tides = base;
  with_tides.push_back("environment.tides.moon=true");
  with_tides.push_back("environment.tides.sun=true");
  const Scenario plain = load_scenario(kDemo, base), tidal = load_scenario(kDemo, with_tides);
  const TetherModel a = build_model(plain), b = build_model(tidal);
  const TidalForce* tide = find_model<TidalForce>(b);
  REQUIRE(tide);
  const double t = 5.0 * 3600.0;
  const Attachment at = b.climbers->attachments(t).at(0);
  const Matrix3X& x = b.mesh.position;
  const Matrix3X v = Matrix3X::Zero(3, x.cols());
  Matrix3X fa = Matrix3X::Zero(3, x.cols()), fb = Matrix3X::Zero(3, x.cols());
  a.climbers->add_forces(TetherState{t, x, v, a.mesh.node_mass}, fa);
  b.climbers->add_forces(TetherState{t, x, v, b.mesh.node_mass}, fb);
  const auto e = static_cast<Eigen::Index>(at.element);
  const Eigen::Vector3d rc = (1.0 - at.xi) * x.col(e) + at.xi * x.col(e + 1);
  Matrix3X one_x(3, 1), one_v = Matrix3X::Zero(3, 1), ft = Matrix3X::Zero(3, 1);
  one_x.col(0) = rc;
  Eigen::VectorXd one_m(1);
  one_m[0] = at.mass_kg;
  tide->add_forces(TetherState{t, one_x, one_v, one_m}, ft);
  const Eigen::Vector3d expected = ft.col(0);
  INFO("tidal force on the climber " << expected.transpose() << " N");
  REQUIRE(expected.norm() > 0.0);
  CHECK((fb.col(e) - fa.col(e) - (1.0 - at.xi) * expected).norm() < 1e-9 * expected.norm());
  CHECK((fb.col(e + 1) - fa.col(e + 1) - at.xi * expected).norm() < 1e-9 * expected.norm());
}
