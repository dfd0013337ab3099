#include "models/discrete_gust.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>

namespace hawser {

namespace {
constexpr double kPi = 3.14159265358979323846;
}  // namespace

DiscreteGust::DiscreteGust(const DiscreteGustSpec& spec) : spec_(spec) {
  if (!(spec.gradient_time_s > 0.0)) throw std::invalid_argument("DiscreteGust: gradient time must be > 0");
  if (!std::isfinite(spec.amplitude_m_s)) throw std::invalid_argument("DiscreteGust: amplitude must be finite");
  const double n = spec.direction_enu.norm();
  if (!(n > 0.0) || !std::isfinite(n)) throw std::invalid_argument("DiscreteGust: direction must be a non-zero vector");
  if (!(spec.altitude_high_m > spec.altitude_low_m))
    throw std::invalid_argument("DiscreteGust: altitude band needs h_low < h_high");
  if (!(spec.edge_width_m >= 0.0) || 2.0 * spec.edge_width_m > spec.altitude_high_m - spec.altitude_low_m)
    throw std::invalid_argument("DiscreteGust: edge width must be in [0, (h_high - h_low) / 2]");
  if (!std::isfinite(spec.onset_s)) throw std::invalid_argument("DiscreteGust: onset time must be finite");
  spec_.direction_enu /= n;
}

double DiscreteGust::gradient_time(double gradient_distance_m, double speed_m_s) {
  if (!(gradient_distance_m > 0.0) || !(speed_m_s > 0.0))
    throw std::invalid_argument("DiscreteGust: gradient distance and speed must be > 0");
  return gradient_distance_m / speed_m_s;
}

double DiscreteGust::speed(double t) const {
  const double x = (t - spec_.onset_s) / spec_.gradient_time_s;  // s / H
  if (x < 0.0 || x > 2.0) return 0.0;
  return 0.5 * spec_.amplitude_m_s * (1.0 - std::cos(kPi * x));
}

double DiscreteGust::band(double h) const {
  const double lo = spec_.altitude_low_m, hi = spec_.altitude_high_m, w = spec_.edge_width_m;
  if (h < lo || h > hi) return 0.0;
  const double d = std::min(h - lo, hi - h);  // distance to the nearer edge
  if (w == 0.0 || d >= w) return 1.0;
  return 0.5 * (1.0 - std::cos(kPi * d / w));
}

Eigen::Vector3d DiscreteGust::velocity_enu(double h, double t) const {
  const double u = speed(t);
  if (u == 0.0) return Eigen::Vector3d::Zero();
  return u * band(h) * spec_.direction_enu;
}

Eigen::Vector3d GustSet::velocity_enu(double h, double t) const {
  Eigen::Vector3d v = Eigen::Vector3d::Zero();
  for (const auto& g : gusts_) v += g.velocity_enu(h, t);
  return v;
}

std::vector<double> GustSet::event_times() const {
  std::vector<double> t;
  for (const auto& g : gusts_) {
    t.push_back(g.onset_s());
    t.push_back(g.end_s());
  }
  std::sort(t.begin(), t.end());
  t.erase(std::unique(t.begin(), t.end()), t.end());
  return t;
}

}  // namespace hawser
