#include "solver/input/environment_reader.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <sstream>
#include <utility>

#include "solver/input/scenario.hpp"

namespace hawser {
namespace {


constexpr double kPi = 3.14159265358979323846;
constexpr double kRadToDeg = 180.0 / kPi;
// Drag coefficients by section (Hoerner, Fluid-Dynamic Drag, 1965; recalled from memory):
constexpr double kCdCylinder = 1.2;    // circular cylinder, subcritical cross-flow
constexpr double kCdFlatPlate = 2.0;   // flat plate broadside (two-dimensional)
// The Moon and Sun data are the Earth's: tides are refused on a planet whose GM differs more.
constexpr double kEarthGm = 3.986004418e14;  // m^3/s^2, WGS 84 (NIMA TR8350.2, Table 3.1)
// Largest turbulence series accepted (samples times stations; 3 doubles each).
constexpr double kMaxTurbulenceSamples = 5e7;

std::string fmt(double x) {
  std::ostringstream os;
  os.precision(6);
  os << x;
  return os.str();
}

/// Reading helpers: each problem names the key and where it was written.
class Keys {
 public:
  Keys(const ScenarioValues& v, std::vector<Problem>& p) : v_(v), p_(p) {}
  bool has(const std::string& k) const { return v_.has(k) && !v_.at(k).invalid; }
  double q(const std::string& k) const { return v_.quantity(k); }
  void error(const std::string& k, const std::string& msg) { p_.push_back({v_.where(k), k, msg}); }
  /// Exactly one of a and b (keys below `item`); returns 0 for a, 1 for b, -1 if wrong.
  int one_of(const std::string& item, const std::string& a, const std::string& b, const std::string& what) {
    const bool ha = v_.has(item + "." + a), hb = v_.has(item + "." + b);
    if (ha && hb) error(item + "." + b, "give either " + a + " or " + b + ", not both");
    if (!ha && !hb) error(item, "missing: give " + a + " or " + b + " (" + what + ")");
    return ha == hb ? -1 : (ha ? 0 : 1);
  }
  void not_for(const std::string& item, const std::vector<std::string>& keys, const std::string& why) {
    for (const auto& k : keys)
      if (v_.has(item + "." + k)) error(item + "." + k, "not used " + why);
  }
  const ScenarioValues& v() const { return v_; }

 private:
  const ScenarioValues& v_;
  std::vector<Problem>& p_;
};

std::size_t count(const ScenarioValues& v, const std::string& list) {
  return v.has(list) ? static_cast<std::size_t>(v.integer(list)) : 0;
}

void read_winds(Keys& k, EnvironmentSpec& env) {
  const ScenarioValues& v = k.v();
  for (std::size_t i = 0; i < count(v, "environment.winds"); ++i) {
    const std::string p = "environment.winds[" + std::to_string(i) + "]";
    if (!k.has(p + ".kind")) continue;
    const std::string kind = v.text(p + ".kind");
    const double start = k.has(p + ".start") ? k.q(p + ".start") : 0.0;
    const double end = k.has(p + ".end") ? k.q(p + ".end") : WindProfile::kForever;
    bool ok = true;
    if (!(start < end)) {
      k.error(p + ".end", "must come after start (" + fmt(start) + " s)");
      ok = false;
    }
    if (kind == "table") {
      k.not_for(p, {"from_direction", "top_altitude", "reference_speed", "reference_height", "exponent",
                    "friction_velocity", "roughness_length", "von_karman"},
                "by a table wind (its rows carry speed and direction)");
      std::vector<WindTableRow> rows;
      for (std::size_t r = 0; r < count(v, p + ".table"); ++r) {
        const std::string row = p + ".table[" + std::to_string(r) + "]";
        if (!k.has(row + ".altitude") || !k.has(row + ".speed") || !k.has(row + ".from_direction")) {
          ok = false;
          continue;
        }
        rows.push_back({k.q(row + ".altitude"), k.q(row + ".speed"), k.q(row + ".from_direction") * kRadToDeg});
        if (rows.size() > 1 && !(rows.back().altitude_m > rows[rows.size() - 2].altitude_m)) {
          k.error(row + ".altitude", "table altitudes must increase strictly from row to row");
          ok = false;
        }
      }
      if (rows.empty()) {
        if (k.has(p + ".table")) k.error(p + ".table", "a wind table needs at least one row");
        ok = false;
      }
      if (ok) env.winds.push_back({WindProfile::table(rows, start, end), v.where(p)});
      continue;
    }
    // The laws: a direction and the top of the boundary layer.
    for (const char* key : {"from_direction", "top_altitude"})
      if (!v.has(p + "." + key)) {
        k.error(p, std::string("missing: ") + key + " (required for a " + kind + " wind)");
        ok = false;
      }
    k.not_for(p, {"table"}, "by a " + kind + " wind");
    if (kind == "power_law") {
      k.not_for(p, {"friction_velocity", "roughness_length", "von_karman"}, "by a power_law wind");
      for (const char* key : {"reference_speed", "reference_height", "exponent"}) ok = ok && k.has(p + "." + key);
      if (!ok) continue;
      const PowerLawWind law{k.q(p + ".reference_speed"), k.q(p + ".reference_height"), k.q(p + ".exponent")};
      env.winds.push_back({WindProfile::power_law(law, k.q(p + ".top_altitude"), k.q(p + ".from_direction") * kRadToDeg,
                                                  start, end),
                           v.where(p)});
    } else {
      k.not_for(p, {"reference_speed", "reference_height", "exponent"}, "by a log_law wind");
      for (const char* key : {"friction_velocity", "roughness_length", "von_karman"}) ok = ok && k.has(p + "." + key);
      if (!ok) continue;
      const LogLawWind law{k.q(p + ".friction_velocity"), k.q(p + ".roughness_length"), k.q(p + ".von_karman")};
      if (!(k.q(p + ".top_altitude") > law.roughness_length_m)) {
        k.error(p + ".top_altitude", "must lie above the roughness length (" + fmt(law.roughness_length_m) + " m)");
        continue;
      }
      env.winds.push_back({WindProfile::log_law(law, k.q(p + ".top_altitude"), k.q(p + ".from_direction") * kRadToDeg,
                                                start, end),
                           v.where(p)});
    }
  }
}

void read_gusts(Keys& k, EnvironmentSpec& env) {
  const ScenarioValues& v = k.v();
  for (std::size_t i = 0; i < count(v, "environment.gusts"); ++i) {
    const std::string p = "environment.gusts[" + std::to_string(i) + "]";
    GustItemSpec g;
    g.where = v.where(p);
    bool ok = k.has(p + ".amplitude") && k.has(p + ".altitude_low") && k.has(p + ".altitude_high") &&
              k.has(p + ".onset") && k.has(p + ".edge_width");
    const int timing = k.one_of(p, "gradient_time", "gradient_distance", "how long the gust takes to peak");
    if (timing == 0) {
      k.not_for(p, {"front_speed"}, "with gradient_time (only with gradient_distance)");
      ok = ok && k.has(p + ".gradient_time");
      if (ok) g.gradient_time_s = k.q(p + ".gradient_time");
    } else if (timing == 1) {
      if (!v.has(p + ".front_speed")) {
        k.error(p, "missing: front_speed (required with gradient_distance); unit m/s");
        ok = false;
      }
      ok = ok && k.has(p + ".gradient_distance") && k.has(p + ".front_speed");
      if (ok) g.gradient_time_s = DiscreteGust::gradient_time(k.q(p + ".gradient_distance"), k.q(p + ".front_speed"));
    } else {
      ok = false;
    }
    const int dir = k.one_of(p, "from_direction", "direction", "which way the gust blows");
    if (dir == 0 && k.has(p + ".from_direction")) {
      g.direction_enu = WindProfile::downwind_unit_enu(k.q(p + ".from_direction") * kRadToDeg);
    } else if (dir == 1 && k.has(p + ".direction")) {
      const auto& d = v.at(p + ".direction").vector;
      g.direction_enu = Eigen::Vector3d(d[0], d[1], d[2]);
      if (!(g.direction_enu.norm() > 0.0)) {
        k.error(p + ".direction", "must not be the zero vector");
        ok = false;
      }
    } else {
      ok = false;
    }
    if (!ok) continue;
    g.amplitude_m_s = k.q(p + ".amplitude");
    g.altitude_low_m = k.q(p + ".altitude_low");
    g.altitude_high_m = k.q(p + ".altitude_high");
    g.edge_width_m = k.q(p + ".edge_width");
    g.onset_s = k.q(p + ".onset");
    if (!(g.altitude_high_m > g.altitude_low_m)) {
      k.error(p + ".altitude_high", "must lie above altitude_low (" + fmt(g.altitude_low_m) + " m)");
      continue;
    }
    if (2.0 * g.edge_width_m > g.altitude_high_m - g.altitude_low_m) {
      k.error(p + ".edge_width", "the two edge ramps must fit in the band: at most half of " +
                                     fmt(g.altitude_high_m - g.altitude_low_m) + " m");
      continue;
    }
    env.gusts.push_back(g);
  }
}

/// Sample interval [s] (given, or a fifth of the smallest L/V; the spline keeps 97-99% of the
/// variance there, models/dryden_turbulence.hpp) and length [s] of the series: the
/// whole run and a margin for the integrator's last step past its end.
std::pair<double, double> turbulence_sampling(const TurbulenceSpec& t, double run_s) {
  double smallest_tau = std::numeric_limits<double>::infinity();
  for (const auto& s : t.stations) smallest_tau = std::min(smallest_tau, s.scale_m.minCoeff() / s.mean_speed_m_s);
  const double dt = t.sample_interval_s > 0.0 ? t.sample_interval_s : smallest_tau / 5.0;
  return {dt, std::max(1.1 * run_s, 2.0 * dt)};
}

void read_turbulence(Keys& k, double run_s, EnvironmentSpec& env) {
  const ScenarioValues& v = k.v();
  const std::string p = "environment.turbulence";
  if (!v.has(p)) return;
  TurbulenceSpec& t = env.turbulence;
  t.given = true;
  t.where = v.where(p);
  if (k.has(p + ".seed")) t.seed = static_cast<std::uint64_t>(v.integer(p + ".seed"));
  if (k.has(p + ".from_direction")) t.from_direction_deg = k.q(p + ".from_direction") * kRadToDeg;
  if (k.has(p + ".sample_interval")) t.sample_interval_s = k.q(p + ".sample_interval");
  for (std::size_t i = 0; i < count(v, p + ".stations"); ++i) {
    const std::string s = p + ".stations[" + std::to_string(i) + "]";
    if (!k.has(s + ".altitude") || !k.has(s + ".mean_speed") || !k.has(s + ".sigma") || !k.has(s + ".scale")) continue;
    TurbulenceStationSpec st;
    st.altitude_m = k.q(s + ".altitude");
    st.mean_speed_m_s = k.q(s + ".mean_speed");
    const auto& sig = v.at(s + ".sigma").vector;
    const auto& sc = v.at(s + ".scale").vector;
    st.sigma_m_s = Eigen::Vector3d(sig[0], sig[1], sig[2]);
    st.scale_m = Eigen::Vector3d(sc[0], sc[1], sc[2]);
    if (st.sigma_m_s.minCoeff() < 0.0) k.error(s + ".sigma", "intensities must be >= 0");
    if (!(st.scale_m.minCoeff() > 0.0)) k.error(s + ".scale", "scale lengths must be > 0");
    if (!t.stations.empty() && !(st.altitude_m > t.stations.back().altitude_m))
      k.error(s + ".altitude", "station altitudes must increase strictly");
    t.stations.push_back(st);
  }
  if (k.has(p + ".stations") && count(v, p + ".stations") == 0) k.error(p + ".stations", "needs at least one station");
  if (t.stations.empty() || t.stations.size() != count(v, p + ".stations")) return;
  const auto [dt, length] = turbulence_sampling(t, run_s);
  if (length / dt * static_cast<double>(t.stations.size()) > kMaxTurbulenceSamples)
    k.error(p, fmt(length / dt) + " samples at " + fmt(dt) + " s for each of " + std::to_string(t.stations.size()) +
                   " stations is too long a series for the run; give a longer sample_interval or fewer stations");
  t.sample_interval_s = dt;
  t.series_length_s = length;
}

void read_tides(Keys& k, const Scenario& s, EnvironmentSpec& env) {
  const ScenarioValues& v = k.v();
  const std::string p = "environment.tides";
  env.tides.where = v.where(p);
  auto body = [&](const std::string& name, TideBodySpec& b) {
    b.on = k.has(p + "." + name) && v.boolean(p + "." + name);
    if (k.has(p + "." + name + "_node_longitude")) b.node_longitude_rad = k.q(p + "." + name + "_node_longitude");
    if (k.has(p + "." + name + "_phase")) b.phase_rad = k.q(p + "." + name + "_phase");
    if (k.has(p + "." + name + "_inclination")) b.inclination_rad = k.q(p + "." + name + "_inclination");
  };
  body("moon", env.tides.moon);
  body("sun", env.tides.sun);
  env.tides.in_static_state = k.has(p + ".static") && v.boolean(p + ".static");
  if (!env.tides.moon.on && !env.tides.sun.on) {
    if (env.tides.in_static_state)
      k.error(p + ".static", "no tide to load it with: set moon or sun");
    return;
  }
  const std::string key = p + (env.tides.moon.on ? ".moon" : ".sun");
  if (s.field.uniform) {
    k.error(key, "tides act on a planet tether only (field.kind is uniform)");
  } else if (std::abs(s.planet.gm_m3_s2 / kEarthGm - 1.0) > 1e-3) {
    k.error(key, "the Moon and Sun orbits are the Earth's; the planet (GM " + fmt(s.planet.gm_m3_s2) +
                     " m^3/s^2) is not the Earth");
  }
}

void read_events(Keys& k, const Scenario& s, double length_m, EnvironmentSpec& env) {
  const ScenarioValues& v = k.v();
  const int elements = s.mesh.elements;
  const int last_free = s.field.far_end_fixed ? elements - 1 : elements;
  for (std::size_t i = 0; i < count(v, "events.cuts"); ++i) {
    const std::string p = "events.cuts[" + std::to_string(i) + "]";
    CutSpec c;
    c.where = v.where(p);
    const int by = k.one_of(p, "element", "altitude", "which element to cut");
    if (!k.has(p + ".time")) continue;
    c.time_s = k.q(p + ".time");
    if (by == 0 && k.has(p + ".element")) {
      const long long e = v.integer(p + ".element");
      if (e >= elements) {
        k.error(p + ".element", "element " + std::to_string(e) + " does not exist (elements are 0.." +
                                    std::to_string(elements - 1) + ")");
        continue;
      }
      c.element = static_cast<std::size_t>(e);
    } else if (by == 1 && k.has(p + ".altitude")) {
      c.altitude_m = k.q(p + ".altitude");
      if (*c.altitude_m > length_m) {
        k.error(p + ".altitude", "beyond the far end of the tether (" + fmt(length_m / 1e3) + " km)");
        continue;
      }
    } else {
      continue;
    }
    env.cuts.push_back(c);
  }
  for (std::size_t i = 0; i < count(v, "events.strikes"); ++i) {
    const std::string p = "events.strikes[" + std::to_string(i) + "]";
    StrikeSpec st;
    st.where = v.where(p);
    const int by = k.one_of(p, "node", "altitude", "which node is struck");
    const int what = k.one_of(p, "delta_v", "impulse", "how hard");
    if (!k.has(p + ".time") || by < 0 || what < 0) continue;
    st.time_s = k.q(p + ".time");
    if (by == 0) {
      if (!k.has(p + ".node")) continue;
      const long long n = v.integer(p + ".node");
      if (n > last_free) {
        k.error(p + ".node", "node " + std::to_string(n) + " is not a free node (free nodes are 1.." +
                                 std::to_string(last_free) + ")");
        continue;
      }
      st.node = static_cast<std::size_t>(n);
    } else {
      if (!k.has(p + ".altitude")) continue;
      st.altitude_m = k.q(p + ".altitude");
      if (*st.altitude_m > length_m) {
        k.error(p + ".altitude", "beyond the far end of the tether (" + fmt(length_m / 1e3) + " km)");
        continue;
      }
    }
    const std::string vk = p + (what == 0 ? ".delta_v" : ".impulse");
    if (!k.has(vk)) continue;
    const auto& x = v.at(vk).vector;
    (what == 0 ? st.delta_v_m_s : st.impulse_n_s) = Eigen::Vector3d(x[0], x[1], x[2]);
    env.strikes.push_back(st);
  }
}

}  // namespace

EnvironmentSpec read_environment(const ScenarioValues& v, const Scenario& s, double length_m,
                                 std::vector<Problem>& problems) {
  Keys k(v, problems);
  EnvironmentSpec env;
  env.where = v.where("environment");
  const std::string atm = k.has("environment.atmosphere") ? v.text("environment.atmosphere") : "none";
  env.atmosphere = atm == "us1976" ? AtmosphereKind::us1976 : atm == "uniform" ? AtmosphereKind::uniform : AtmosphereKind::none;
  if (env.atmosphere == AtmosphereKind::us1976 && s.field.uniform)
    k.error("environment.atmosphere", "us1976 needs a planet (altitude above its radius); on the test bench use uniform");
  if (env.atmosphere == AtmosphereKind::uniform && !s.field.uniform)
    k.error("environment.atmosphere", "uniform air is for the test bench only; on a planet use us1976");
  if (env.atmosphere == AtmosphereKind::uniform && k.has("environment.air_density"))
    env.air_density_kg_m3 = k.q("environment.air_density");
  if (env.atmosphere != AtmosphereKind::uniform) k.not_for("environment", {"air_density"}, "unless atmosphere is uniform");
  const bool ribbon = !s.field.uniform && s.tether.shape == SectionShape::ribbon;
  env.drag_coefficient = k.has("environment.drag.cd") ? k.q("environment.drag.cd") : (ribbon ? kCdFlatPlate : kCdCylinder);
  if (!env.any_air())
    for (const char* key : {"environment.drag", "environment.winds", "environment.gusts", "environment.turbulence"})
      if (v.has(key) && (v.at(key).type != KeyType::list || v.integer(key) > 0))
        k.error(key, "acts through drag and needs air: set environment.atmosphere (us1976 on a planet)");
  read_winds(k, env);
  read_gusts(k, env);
  read_turbulence(k, s.simulation.duration_s, env);
  read_tides(k, s, env);
  read_events(k, s, length_m, env);
  return env;
}

}  // namespace hawser
