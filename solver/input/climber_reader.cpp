#include "solver/input/climber_reader.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

namespace hawser {
namespace {

std::string km(double m) {
  std::ostringstream os;
  os.precision(6);
  os << m / 1e3 << " km";
  return os.str();
}

double identity(double h) { return h; }

class Reader {
 public:
  Reader(const ScenarioValues& v, double length_m, bool air, std::vector<Problem>& problems)
      : v_(v), length_m_(length_m), air_(air), problems_(problems) {}

  void error(const std::string& key, const std::string& msg) {
    problems_.push_back({v_.where(key), key, msg});
  }

  bool on_tether(const std::string& key) {
    const double h = v_.quantity(key);
    if (h > length_m_ * (1 + 1e-12)) {
      error(key, "altitude " + km(h) + " is beyond the top of the tether (" + km(length_m_) + ")");
      return false;
    }
    return true;
  }

  bool direction_ok(const std::string& p) {
    const double from = v_.quantity(p + ".from"), to = v_.quantity(p + ".to");
    const bool up = v_.text(p + ".direction") == "up";
    if (from == to) {
      error(p + ".to", "the climb has no length (from = to)");
      return false;
    }
    if (up != (to > from)) {
      error(p + ".direction", std::string("direction ") + (up ? "up" : "down") +
                                  " disagrees with from " + km(from) + " and to " + km(to));
      return false;
    }
    return true;
  }

  void end_action(const std::string& p, ClimberSpec& c) {
    const std::string a = v_.text(p + ".at_end");
    c.end_mass_kg = 0.0;
    c.at_end = ClimberEnd::park;
    if (a == "leave") c.at_end = ClimberEnd::leave;
    if (a == "drop_payload") {
      c.at_end = ClimberEnd::drop_payload;
      c.end_mass_kg = v_.quantity(p + ".remaining_mass");
    }
  }

  /// Cd A [m^2] of the climber or schedule at `p` (0 without drag); drag needs air.
  double drag_area(const std::string& p) {
    if (!v_.has(p + ".drag")) return 0.0;
    if (!air_) {
      error(p + ".drag", "drag on a climber needs air: give environment.atmosphere (and winds if any)");
      return 0.0;
    }
    return v_.quantity(p + ".drag.area") * v_.quantity(p + ".drag.cd");
  }

  /// The climb's path and profile keys of the entry at `p` into `c`; false on a problem.
  bool climb(const std::string& p, ClimberSpec& c) {
    if (!on_tether(p + ".from") || !on_tether(p + ".to") || !direction_ok(p)) return false;
    c.from_m = v_.quantity(p + ".from");
    c.to_m = v_.quantity(p + ".to");
    if (v_.has(p + ".speed_table")) {
      if (v_.has(p + ".cruise_speed") || v_.has(p + ".dwells")) {
        error(p + ".speed_table", "give either speed_table or ramps (cruise_speed, acceleration, deceleration, dwells), not both");
        return false;
      }
      c.profile = ClimbProfileKind::speed_table;
      for (long long i = 0; i < v_.integer(p + ".speed_table"); ++i) {
        const std::string r = p + ".speed_table[" + std::to_string(i) + "]";
        if (!on_tether(r + ".at")) return false;
        c.table.push_back({v_.quantity(r + ".at"), v_.quantity(r + ".speed")});
      }
      return true;
    }
    for (const char* k : {".cruise_speed", ".acceleration", ".deceleration"})
      if (!v_.has(p + k)) {
        problems_.push_back({v_.where(p), p + k, "missing: a ramp profile needs cruise_speed, acceleration and deceleration (or give a speed_table)"});
        return false;
      }
    c.profile = ClimbProfileKind::ramps;
    c.cruise_m_s = v_.quantity(p + ".cruise_speed");
    c.accel_m_s2 = v_.quantity(p + ".acceleration");
    c.decel_m_s2 = v_.quantity(p + ".deceleration");
    const long long nd = v_.has(p + ".dwells") ? v_.integer(p + ".dwells") : 0;
    for (long long i = 0; i < nd; ++i) {
      const std::string d = p + ".dwells[" + std::to_string(i) + "]";
      if (!on_tether(d + ".at")) return false;
      c.dwells.push_back({v_.quantity(d + ".at"), v_.quantity(d + ".duration")});
    }
    return true;
  }

  /// The profile on the reference line, or a located problem when it cannot be flown.
  bool flyable(const std::string& p, const ClimberSpec& c, ClimberProfile* out) {
    try {
      *out = climb_profile(c, identity);
      return true;
    } catch (const ProfileError& e) {
      problems_.push_back({v_.where(p), p, e.what()});
      return false;
    }
  }

  const ScenarioValues& values() const { return v_; }

 private:
  const ScenarioValues& v_;
  double length_m_;
  bool air_;
  std::vector<Problem>& problems_;
};

/// Two climbers on one path must not pass through each other while both are on the tether.
void check_overlaps(const std::vector<ClimberSpec>& cs, const std::vector<ClimberProfile>& ps,
                    const ScenarioValues& v, std::vector<Problem>& problems) {
  const double kMinimumGap_m = 1.0;
  for (std::size_t i = 0; i < cs.size(); ++i)
    for (std::size_t j = i + 1; j < cs.size(); ++j) {
      // Both are on the tether from their start (parked before, unless sudden) until they leave.
      auto on = [](const ClimberSpec& c, const ClimberProfile& p, double t) {
        if (c.sudden && t < p.start_time()) return false;
        return !(c.at_end == ClimberEnd::leave && t >= p.end_time());
      };
      const ClimberProfile &a = ps[i], &b = ps[j];
      std::vector<double> ts = a.segment_times();
      ts.insert(ts.end(), b.segment_times().begin(), b.segment_times().end());
      const double t_end = std::max(a.end_time(), b.end_time());
      for (int k = 0; k <= 400; ++k) ts.push_back(t_end * k / 400.0);
      std::sort(ts.begin(), ts.end());
      double last_sign = 0.0;
      for (double t : ts) {
        if (!on(cs[i], a, t) || !on(cs[j], b, t)) {
          last_sign = 0.0;
          continue;
        }
        const double gap = a.at(t).s_m - b.at(t).s_m;
        const double sign = gap > 0 ? 1.0 : -1.0;
        if (std::abs(gap) < kMinimumGap_m || (last_sign != 0.0 && sign != last_sign)) {
          std::ostringstream os;
          os << "climbers " << cs[i].name << " and " << cs[j].name
             << " would be on the same stretch of tether at the same time "
             << "(at about t = " << t / 3600.0 << " h, " << km(a.at(t).s_m) << " along the tether)";
          problems.push_back({v.where(cs[j].key), cs[j].key, os.str()});
          return;
        }
        last_sign = sign;
      }
    }
}

}  // namespace

std::vector<ClimberSpec> read_climbers(const ScenarioValues& v, double length_m, bool air,
                                       std::vector<Problem>& problems) {
  const std::size_t before = problems.size();
  Reader r(v, length_m, air, problems);
  std::vector<ClimberSpec> out;
  std::vector<ClimberProfile> profiles;
  const long long n = v.has("climbers") ? v.integer("climbers") : 0;
  for (long long i = 0; i < n; ++i) {
    const std::string p = "climbers[" + std::to_string(i) + "]";
    ClimberSpec c;
    c.key = p;
    c.where = v.where(p);
    if (!r.climb(p, c)) continue;
    c.name = v.text(p + ".name");
    c.mass_kg = v.quantity(p + ".mass");
    c.sudden = v.boolean(p + ".sudden_load");
    r.end_action(p, c);
    c.drag_area_m2 = r.drag_area(p);
    c.start_s = v.quantity(p + ".start_time");
    ClimberProfile profile;
    if (!r.flyable(p, c, &profile)) continue;
    for (const auto& other : out)
      if (other.name == c.name) r.error(p + ".name", "name '" + c.name + "' used twice");
    out.push_back(c);
    profiles.push_back(profile);
  }
  const long long ns = v.has("schedules") ? v.integer("schedules") : 0;
  for (long long i = 0; i < ns; ++i) {
    const std::string p = "schedules[" + std::to_string(i) + "]";
    ClimberSpec base;
    base.key = p;
    base.where = v.where(p);
    if (!r.climb(p, base)) continue;
    const auto& masses = v.at(p + ".masses").vector;
    for (double m : masses)
      if (m <= 0.0) r.error(p + ".masses", "masses must be greater than 0 kg");
    r.end_action(p, base);
    base.drag_area_m2 = r.drag_area(p);
    base.sudden = true;  // departures join a running tether: each arrives with its weight at its start
    for (long long k = 0; k < v.integer(p + ".count"); ++k) {
      ClimberSpec c = base;
      c.name = v.text(p + ".name") + "_" + std::to_string(k + 1);
      c.mass_kg = masses[static_cast<std::size_t>(k) % masses.size()];
      c.start_s = v.quantity(p + ".first_departure") + k * v.quantity(p + ".every");
      ClimberProfile profile;
      if (!r.flyable(p, c, &profile)) break;
      out.push_back(c);
      profiles.push_back(profile);
    }
  }
  if (problems.size() == before) check_overlaps(out, profiles, v, problems);
  return out;
}

}  // namespace hawser
