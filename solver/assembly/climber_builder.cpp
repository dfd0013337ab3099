#include "solver/assembly/climber_builder.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

#include "solver/input/errors.hpp"
#include "solver/input/scenario_reader.hpp"

namespace hawser {
namespace {

class CoordinateMap {
 public:
  CoordinateMap(const std::vector<double>& ref, const std::vector<double>& coord) : ref_(ref), coord_(coord) {}
  double length() const { return ref_.back(); }
  /// Altitude (distance along the reference) -> material coordinate.
  double operator()(double h) const {
    auto it = std::upper_bound(ref_.begin(), ref_.end(), h);
    std::size_t e = static_cast<std::size_t>(std::max<long>(0, (it - ref_.begin()) - 1));
    e = std::min(e, ref_.size() - 2);
    const double xi = (h - ref_[e]) / (ref_[e + 1] - ref_[e]);
    return coord_[e] + xi * (coord_[e + 1] - coord_[e]);
  }

 private:
  const std::vector<double>& ref_;
  const std::vector<double>& coord_;
};

std::string km(double m) {
  std::ostringstream os;
  os.precision(6);
  os << m / 1e3 << " km";
  return os.str();
}

struct Reader {
  const ScenarioValues& v;
  const CoordinateMap& map;
  std::vector<Problem>& problems;

  bool on_tether(const std::string& key) {
    const double h = v.quantity(key);
    if (h > map.length() * (1 + 1e-12)) {
      problems.push_back({v.where(key), key, "altitude " + km(h) + " is beyond the top of the tether (" + km(map.length()) + ")"});
      return false;
    }
    return true;
  }

  bool direction_ok(const std::string& p) {
    const double from = v.quantity(p + ".from"), to = v.quantity(p + ".to");
    const bool up = v.text(p + ".direction") == "up";
    if (from == to) {
      problems.push_back({v.where(p + ".to"), p + ".to", "the climb has no length (from = to)"});
      return false;
    }
    if (up != (to > from)) {
      problems.push_back({v.where(p + ".direction"), p + ".direction",
                          std::string("direction ") + (up ? "up" : "down") + " disagrees with from " + km(from) + " and to " + km(to)});
      return false;
    }
    return true;
  }

  ClimberEnd end_action(const std::string& p, double* remaining) {
    const std::string a = v.text(p + ".at_end");
    *remaining = 0.0;
    if (a == "leave") return ClimberEnd::leave;
    if (a == "drop_payload") {
      *remaining = v.quantity(p + ".remaining_mass");
      return ClimberEnd::drop_payload;
    }
    return ClimberEnd::park;
  }

  bool profile(const std::string& p, double start, ClimberProfile* out) {
    const double from = map(v.quantity(p + ".from")), to = map(v.quantity(p + ".to"));
    try {
      if (v.has(p + ".speed_table")) {
        if (v.has(p + ".cruise_speed") || v.has(p + ".dwells")) {
          problems.push_back({v.where(p + ".speed_table"), p + ".speed_table", "give either speed_table or ramps (cruise_speed, acceleration, deceleration, dwells), not both"});
          return false;
        }
        std::vector<SpeedRow> rows;
        for (long long i = 0; i < v.integer(p + ".speed_table"); ++i) {
          const std::string r = p + ".speed_table[" + std::to_string(i) + "]";
          if (!on_tether(r + ".at")) return false;
          rows.push_back({map(v.quantity(r + ".at")), v.quantity(r + ".speed")});
        }
        *out = ClimberProfile::table(start, from, to, rows);
        return true;
      }
      for (const char* k : {".cruise_speed", ".acceleration", ".deceleration"})
        if (!v.has(p + k)) {
          problems.push_back({v.where(p), p + k, "missing: a ramp profile needs cruise_speed, acceleration and deceleration (or give a speed_table)"});
          return false;
        }
      std::vector<Dwell> dwells;
      const long long nd = v.has(p + ".dwells") ? v.integer(p + ".dwells") : 0;
      for (long long i = 0; i < nd; ++i) {
        const std::string d = p + ".dwells[" + std::to_string(i) + "]";
        if (!on_tether(d + ".at")) return false;
        dwells.push_back({map(v.quantity(d + ".at")), v.quantity(d + ".duration")});
      }
      *out = ClimberProfile::ramps(start, from, to, v.quantity(p + ".cruise_speed"), v.quantity(p + ".acceleration"),
                                   v.quantity(p + ".deceleration"), dwells);
      return true;
    } catch (const ProfileError& e) {
      problems.push_back({v.where(p), p, e.what()});
      return false;
    }
  }
};

/// Two climbers on one path must not pass through each other while both are on the tether.
void check_overlaps(const std::vector<Climber>& cs, const std::vector<std::string>& keys, const ScenarioValues& v,
                    std::vector<Problem>& problems) {
  const double kMinimumGap_m = 1.0;
  for (std::size_t i = 0; i < cs.size(); ++i)
    for (std::size_t j = i + 1; j < cs.size(); ++j) {
      const Climber &a = cs[i], &b = cs[j];
      // Both are on the tether from their start (parked before, unless sudden) until they leave.
      auto on = [](const Climber& c, double t) {
        if (c.sudden && t < c.profile.start_time()) return false;
        return !(c.at_end == ClimberEnd::leave && t >= c.profile.end_time());
      };
      std::vector<double> ts = a.profile.segment_times();
      ts.insert(ts.end(), b.profile.segment_times().begin(), b.profile.segment_times().end());
      const double t_end = std::max(a.profile.end_time(), b.profile.end_time());
      for (int k = 0; k <= 400; ++k) ts.push_back(t_end * k / 400.0);
      std::sort(ts.begin(), ts.end());
      double last_sign = 0.0;
      for (double t : ts) {
        if (!on(a, t) || !on(b, t)) {
          last_sign = 0.0;
          continue;
        }
        const double gap = a.profile.at(t).s_m - b.profile.at(t).s_m;
        const double sign = gap > 0 ? 1.0 : -1.0;
        if (std::abs(gap) < kMinimumGap_m || (last_sign != 0.0 && sign != last_sign)) {
          std::ostringstream os;
          os << "climbers " << a.name << " and " << b.name << " would be on the same stretch of tether at the same time "
             << "(at about t = " << t / 3600.0 << " h, " << km(a.profile.at(t).s_m) << " along the tether)";
          problems.push_back({v.where(keys[j]), keys[j], os.str()});
          return;
        }
        last_sign = sign;
      }
    }
}

/// Cd A [m^2] of the climber or schedule at `p` (0 without drag); drag needs air.
double drag_area(const Scenario& sc, const std::string& p, std::vector<Problem>& problems) {
  const ScenarioValues& v = sc.values;
  if (!v.has(p + ".drag")) return 0.0;
  if (!sc.environment.any_air()) {
    problems.push_back({v.where(p + ".drag"), p + ".drag",
                        "drag on a climber needs air: give environment.atmosphere (and winds if any)"});
    return 0.0;
  }
  return v.quantity(p + ".drag.area") * v.quantity(p + ".drag.cd");
}

}  // namespace

std::vector<Climber> read_climbers(const Scenario& sc, const std::vector<double>& reference,
                                   const std::vector<double>& coordinate) {
  const ScenarioValues& v = sc.values;
  std::vector<Problem> problems;
  const CoordinateMap map(reference, coordinate);
  Reader r{v, map, problems};
  std::vector<Climber> out;
  std::vector<std::string> keys;
  const long long n = v.has("climbers") ? v.integer("climbers") : 0;
  for (long long i = 0; i < n; ++i) {
    const std::string p = "climbers[" + std::to_string(i) + "]";
    if (!r.on_tether(p + ".from") || !r.on_tether(p + ".to") || !r.direction_ok(p)) continue;
    Climber c;
    c.name = v.text(p + ".name");
    c.mass_kg = v.quantity(p + ".mass");
    c.sudden = v.boolean(p + ".sudden_load");
    c.at_end = r.end_action(p, &c.end_mass_kg);
    c.drag_area_m2 = drag_area(sc, p, problems);
    if (!r.profile(p, v.quantity(p + ".start_time"), &c.profile)) continue;
    for (const auto& other : out)
      if (other.name == c.name) problems.push_back({v.where(p + ".name"), p + ".name", "name '" + c.name + "' used twice"});
    out.push_back(c);
    keys.push_back(p);
  }
  const long long ns = v.has("schedules") ? v.integer("schedules") : 0;
  for (long long i = 0; i < ns; ++i) {
    const std::string p = "schedules[" + std::to_string(i) + "]";
    if (!r.on_tether(p + ".from") || !r.on_tether(p + ".to") || !r.direction_ok(p)) continue;
    const auto& masses = v.at(p + ".masses").vector;
    double schedule_drag = 0.0;
    for (double m : masses)
      if (m <= 0.0) problems.push_back({v.where(p + ".masses"), p + ".masses", "masses must be greater than 0 kg"});
    for (long long k = 0; k < v.integer(p + ".count"); ++k) {
      Climber c;
      c.name = v.text(p + ".name") + "_" + std::to_string(k + 1);
      c.mass_kg = masses[static_cast<std::size_t>(k) % masses.size()];
      c.at_end = r.end_action(p, &c.end_mass_kg);
      if (k == 0) schedule_drag = drag_area(sc, p, problems);
      c.drag_area_m2 = schedule_drag;
      c.sudden = true;  // departures join a running tether: each arrives with its weight at its start
      const double start = v.quantity(p + ".first_departure") + k * v.quantity(p + ".every");
      if (!r.profile(p, start, &c.profile)) break;
      out.push_back(c);
      keys.push_back(p);
    }
  }
  if (problems.empty()) check_overlaps(out, keys, v, problems);
  if (!problems.empty()) throw InputError(format_problems(problems));
  return out;
}

}  // namespace hawser
