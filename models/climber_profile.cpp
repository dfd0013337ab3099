#include "models/climber_profile.hpp"

#include <algorithm>
#include <cmath>
#include <sstream>

namespace hawser {
namespace {
std::string kmh(double v) {
  std::ostringstream os;
  os.precision(4);
  os << v * 3.6 << " km/h";
  return os.str();
}
}  // namespace

void ClimberProfile::push(double duration, double v0, double a) {
  if (duration <= 0.0) return;
  const double t0 = times_.back();
  double d0 = 0.0;
  if (!segs_.empty()) {
    const Segment& p = segs_.back();
    const double dt = t0 - p.t0;
    d0 = p.d0 + p.v0 * dt + 0.5 * p.a * dt * dt;
  }
  segs_.push_back({t0, d0, v0, a});
  times_.push_back(t0 + duration);
}

ClimberProfile::ClimberProfile(double start, double from, double to)
    : start_(start), from_(from), to_(to), dir_(to >= from ? 1 : -1), times_{start} {}

ClimberProfile ClimberProfile::ramps(double start, double from, double to, double cruise, double accel, double decel,
                                     std::vector<Dwell> dwells) {
  ClimberProfile p(start, from, to);
  if (cruise <= 0 || accel <= 0 || decel <= 0) throw ProfileError("cruise speed, acceleration and deceleration must be positive");
  // Stops along the path, as distances from the start, in travel order.
  std::sort(dwells.begin(), dwells.end(), [&](const Dwell& a, const Dwell& b) { return p.dir_ * a.at_m < p.dir_ * b.at_m; });
  const double total = std::abs(to - from);
  double at = 0.0;
  std::vector<std::pair<double, double>> stops;  // (distance, dwell duration)
  for (const Dwell& d : dwells) {
    const double dist = p.dir_ * (d.at_m - from);
    if (dist <= 0.0 || dist >= total) {
      std::ostringstream os;
      os << "a dwell stop at " << d.at_m / 1e3 << " km is not between the start and the end of the climb";
      throw ProfileError(os.str());
    }
    stops.push_back({dist, d.duration_s});
  }
  stops.push_back({total, 0.0});
  for (const auto& stop : stops) {
    const double leg = stop.first - at;
    const double ramp_up = cruise * cruise / (2 * accel), ramp_down = cruise * cruise / (2 * decel);
    if (ramp_up + ramp_down > leg * (1 + 1e-12)) {
      const double reachable = std::sqrt(2 * leg * accel * decel / (accel + decel));
      std::ostringstream os;
      os.precision(6);
      os << "cruise speed " << kmh(cruise) << " is never reached on a leg of " << leg / 1e3 << " km with these ramps; "
         << "the fastest reachable speed there is " << kmh(reachable);
      throw ProfileError(os.str());
    }
    p.push(cruise / accel, 0.0, accel);
    p.push((leg - ramp_up - ramp_down) / cruise, cruise, 0.0);
    p.push(cruise / decel, cruise, -decel);
    p.push(stop.second, 0.0, 0.0);
    at = stop.first;
  }
  return p;
}

ClimberProfile ClimberProfile::table(double start, double from, double to, std::vector<SpeedRow> rows) {
  ClimberProfile p(start, from, to);
  if (rows.size() < 2) throw ProfileError("a speed table needs at least two rows");
  std::sort(rows.begin(), rows.end(), [&](const SpeedRow& a, const SpeedRow& b) { return p.dir_ * a.at_m < p.dir_ * b.at_m; });
  if (std::abs(rows.front().at_m - from) > 1e-6 * std::max(1.0, std::abs(to - from)) ||
      std::abs(rows.back().at_m - to) > 1e-6 * std::max(1.0, std::abs(to - from)))
    throw ProfileError("the speed table must start at the climb's start and end at its end");
  for (std::size_t i = 0; i + 1 < rows.size(); ++i) {
    const double len = p.dir_ * (rows[i + 1].at_m - rows[i].at_m);
    const double v0 = rows[i].speed_m_s, v1 = rows[i + 1].speed_m_s;
    if (len <= 0.0) throw ProfileError("speed table rows must be at distinct positions");
    if (v0 < 0 || v1 < 0 || v0 + v1 <= 0.0)
      throw ProfileError("speeds in the table must be >= 0 and not zero at both ends of a stretch");
    // speed^2 linear in distance: constant acceleration (v1^2 - v0^2) / (2 len).
    p.push(2 * len / (v0 + v1), v0, (v1 * v1 - v0 * v0) / (2 * len));
  }
  return p;
}

double ClimberProfile::distance_at(double t, double* speed, double* accel) const {
  *speed = 0.0;
  *accel = 0.0;
  if (segs_.empty() || t <= start_) return 0.0;
  if (t >= times_.back()) return std::abs(to_ - from_);
  // The segment with t0 <= t (the last such one).
  auto it = std::upper_bound(times_.begin(), times_.end() - 1, t);
  const Segment& s = segs_[static_cast<std::size_t>(it - times_.begin()) - 1];
  const double dt = t - s.t0;
  *speed = s.v0 + s.a * dt;
  *accel = s.a;
  return std::min(std::abs(to_ - from_), s.d0 + s.v0 * dt + 0.5 * s.a * dt * dt);
}

ClimberProfile::Kinematics ClimberProfile::at(double t) const {
  double v = 0.0, a = 0.0;
  const double d = distance_at(t, &v, &a);
  return {from_ + dir_ * d, dir_ * v, dir_ * a};
}

std::vector<double> ClimberProfile::crossing_times(const std::vector<double>& positions) const {
  std::vector<double> out;
  const double total = std::abs(to_ - from_);
  for (double pos : positions) {
    const double target = dir_ * (pos - from_);
    if (target <= 0.0 || target >= total) continue;
    for (std::size_t i = 0; i < segs_.size(); ++i) {
      const Segment& s = segs_[i];
      const double t1 = times_[i + 1], dt_seg = t1 - s.t0;
      const double d1 = s.d0 + s.v0 * dt_seg + 0.5 * s.a * dt_seg * dt_seg;
      if (target < s.d0 || target > d1 || d1 == s.d0) continue;
      // Solve d0 + v0 tau + a tau^2 / 2 = target for the first tau in [0, dt_seg].
      const double rem = target - s.d0;
      double tau;
      if (std::abs(s.a) < 1e-300) {
        tau = rem / s.v0;
      } else {
        const double disc = std::max(0.0, s.v0 * s.v0 + 2 * s.a * rem);
        tau = 2 * rem / (s.v0 + std::sqrt(disc));  // stable form of (-v0 + sqrt(disc)) / a
      }
      out.push_back(s.t0 + std::min(std::max(tau, 0.0), dt_seg));
      break;
    }
  }
  std::sort(out.begin(), out.end());
  return out;
}

}  // namespace hawser
