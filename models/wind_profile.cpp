#include "models/wind_profile.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace hawser {

namespace {
constexpr double kPi = 3.14159265358979323846;
constexpr double kDegToRad = kPi / 180.0;

double wrap_degrees(double d) {
  const double w = std::fmod(d, 360.0);
  return w < 0.0 ? w + 360.0 : w;
}

void check_window(double start_s, double end_s) {
  if (!(start_s < end_s)) throw std::invalid_argument("WindProfile: time window needs start < end");
}
}  // namespace

WindProfile::WindProfile(Kind kind, double start_s, double end_s) : kind_(kind), start_s_(start_s), end_s_(end_s) {
  check_window(start_s, end_s);
}

WindProfile WindProfile::power_law(const PowerLawWind& law, double top_altitude_m, double from_direction_deg,
                                   double start_s, double end_s) {
  if (!(law.reference_height_m > 0.0) || !(law.reference_speed_m_s >= 0.0) || !(law.exponent >= 0.0) ||
      !std::isfinite(law.exponent))
    throw std::invalid_argument("WindProfile: power law needs h_ref > 0, u_ref >= 0 and a finite exponent >= 0");
  if (!(top_altitude_m > 0.0)) throw std::invalid_argument("WindProfile: top altitude must be > 0");
  WindProfile w(Kind::power, start_s, end_s);
  w.power_ = law;
  w.top_m_ = top_altitude_m;
  w.direction_deg_ = wrap_degrees(from_direction_deg);
  return w;
}

WindProfile WindProfile::log_law(const LogLawWind& law, double top_altitude_m, double from_direction_deg,
                                 double start_s, double end_s) {
  if (!(law.roughness_length_m > 0.0) || !(law.friction_velocity_m_s >= 0.0) || !(law.von_karman > 0.0))
    throw std::invalid_argument("WindProfile: log law needs z0 > 0, u* >= 0 and kappa > 0");
  if (!(top_altitude_m > law.roughness_length_m))
    throw std::invalid_argument("WindProfile: top altitude must exceed the roughness length");
  WindProfile w(Kind::logarithmic, start_s, end_s);
  w.log_ = law;
  w.top_m_ = top_altitude_m;
  w.direction_deg_ = wrap_degrees(from_direction_deg);
  return w;
}

WindProfile WindProfile::table(std::vector<WindTableRow> rows, double start_s, double end_s) {
  if (rows.empty()) throw std::invalid_argument("WindProfile: empty wind table");
  for (std::size_t i = 0; i < rows.size(); ++i) {
    if (!(rows[i].speed_m_s >= 0.0)) throw std::invalid_argument("WindProfile: table speed must be >= 0");
    if (i > 0 && !(rows[i].altitude_m > rows[i - 1].altitude_m))
      throw std::invalid_argument("WindProfile: table altitudes must increase strictly");
    rows[i].from_direction_deg = wrap_degrees(rows[i].from_direction_deg);
  }
  WindProfile w(Kind::table, start_s, end_s);
  w.rows_ = std::move(rows);
  return w;
}

double WindProfile::speed(double h) const {
  switch (kind_) {
    case Kind::power: {
      if (h <= 0.0) return 0.0;
      return power_.reference_speed_m_s * std::pow(std::min(h, top_m_) / power_.reference_height_m, power_.exponent);
    }
    case Kind::logarithmic: {
      if (h <= log_.roughness_length_m) return 0.0;
      return log_.friction_velocity_m_s / log_.von_karman * std::log(std::min(h, top_m_) / log_.roughness_length_m);
    }
    case Kind::table: {
      if (h <= rows_.front().altitude_m) return rows_.front().speed_m_s;
      if (h >= rows_.back().altitude_m) return rows_.back().speed_m_s;
      const auto hi = std::upper_bound(rows_.begin(), rows_.end(), h,
                                       [](double a, const WindTableRow& r) { return a < r.altitude_m; });
      const auto lo = hi - 1;
      const double w = (h - lo->altitude_m) / (hi->altitude_m - lo->altitude_m);
      return (1.0 - w) * lo->speed_m_s + w * hi->speed_m_s;
    }
  }
  return 0.0;
}

double WindProfile::from_direction_deg(double h) const {
  if (kind_ != Kind::table) return direction_deg_;
  if (h <= rows_.front().altitude_m) return rows_.front().from_direction_deg;
  if (h >= rows_.back().altitude_m) return rows_.back().from_direction_deg;
  const auto hi = std::upper_bound(rows_.begin(), rows_.end(), h,
                                   [](double a, const WindTableRow& r) { return a < r.altitude_m; });
  const auto lo = hi - 1;
  const double w = (h - lo->altitude_m) / (hi->altitude_m - lo->altitude_m);
  // Shorter arc: the signed difference brought into [-180, 180).
  const double diff = wrap_degrees(hi->from_direction_deg - lo->from_direction_deg + 180.0) - 180.0;
  return wrap_degrees(lo->from_direction_deg + w * diff);
}

Eigen::Vector3d WindProfile::downwind_unit_enu(double from_direction_deg) {
  const double a = from_direction_deg * kDegToRad;
  return Eigen::Vector3d(-std::sin(a), -std::cos(a), 0.0);
}

Eigen::Vector3d WindProfile::velocity_enu(double h, double t) const {
  if (!active(t)) return Eigen::Vector3d::Zero();
  return speed(h) * downwind_unit_enu(from_direction_deg(h));
}

}  // namespace hawser
