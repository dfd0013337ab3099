#include "models/third_body_tide.hpp"

#include <cmath>
#include <stdexcept>

namespace hawser {

namespace {
constexpr double kPi = 3.14159265358979323846;
constexpr double kDay = 86400.0;  // [s]
// Obliquity of the ecliptic at J2000, 84381.406 arcsec (IAU 2006 precession; recalled from memory).
constexpr double kObliquityRad = 84381.406 / 3600.0 * kPi / 180.0;

Eigen::Matrix3d rot_z(double a) {
  const double c = std::cos(a), s = std::sin(a);
  Eigen::Matrix3d m;
  m << c, -s, 0.0, s, c, 0.0, 0.0, 0.0, 1.0;
  return m;
}
Eigen::Matrix3d rot_x(double a) {
  const double c = std::cos(a), s = std::sin(a);
  Eigen::Matrix3d m;
  m << 1.0, 0.0, 0.0, 0.0, c, -s, 0.0, s, c;
  return m;
}
}  // namespace

ThirdBody earth_moon_mean_orbit() {
  ThirdBody b;
  b.name = "moon";
  b.gm_m3_s2 = 4.9028e12;              // JPL ephemeris DE430, 4902.800 km^3/s^2 (recalled from memory)
  b.orbit_radius_m = 3.844e8;          // mean Earth-Moon distance 384,400 km (recalled from memory)
  b.sidereal_period_s = 27.321661 * kDay;  // sidereal month 27.321661 d (recalled from memory)
  b.inclination_rad = kObliquityRad;   // the Moon's orbit is within 5.145 deg of the ecliptic (recalled)
  b.ascending_node_rad = 0.0;          // epoch geometry: the scenario's
  b.initial_phase_rad = 0.0;
  return b;
}

ThirdBody earth_sun_mean_orbit() {
  ThirdBody b;
  b.name = "sun";
  b.gm_m3_s2 = 1.32712440018e20;       // IERS Conventions 2010, TDB-compatible (recalled from memory)
  b.orbit_radius_m = 149597870700.0;   // 1 au, exact by definition (IAU 2012 Resolution B2)
  b.sidereal_period_s = 365.256363 * kDay;  // sidereal year 365.256363 d (recalled from memory)
  b.inclination_rad = kObliquityRad;   // the ecliptic's inclination to the equator
  b.ascending_node_rad = 0.0;          // the vernal equinox along inertial +x
  b.initial_phase_rad = 0.0;
  return b;
}

ThirdBodyTide::ThirdBodyTide(std::vector<ThirdBody> bodies, double spin_rate_rad_s)
    : bodies_(std::move(bodies)), omega_(spin_rate_rad_s) {
  for (const auto& b : bodies_) {
    if (!(b.gm_m3_s2 > 0.0) || !(b.orbit_radius_m > 0.0) || !(b.sidereal_period_s > 0.0) ||
        !std::isfinite(b.inclination_rad) || !std::isfinite(b.ascending_node_rad) ||
        !std::isfinite(b.initial_phase_rad))
      throw std::invalid_argument("ThirdBodyTide: body '" + b.name +
                                  "' needs GM > 0, orbit radius > 0, period > 0 and finite angles");
  }
  if (!std::isfinite(spin_rate_rad_s)) throw std::invalid_argument("ThirdBodyTide: spin rate must be finite");
}

Eigen::Vector3d ThirdBodyTide::body_position(std::size_t i, double t) const {
  const ThirdBody& b = bodies_.at(i);
  const double u = b.initial_phase_rad + 2.0 * kPi / b.sidereal_period_s * t;
  const Eigen::Vector3d in_plane(b.orbit_radius_m * std::cos(u), b.orbit_radius_m * std::sin(u), 0.0);
  return rot_z(-omega_ * t) * (rot_z(b.ascending_node_rad) * (rot_x(b.inclination_rad) * in_plane));
}

double ThirdBodyTide::synodic_day_s(std::size_t i) const {
  return 2.0 * kPi / (omega_ - 2.0 * kPi / bodies_.at(i).sidereal_period_s);
}

Eigen::Vector3d ThirdBodyTide::tidal_acceleration(double gm, const Eigen::Vector3d& d, const Eigen::Vector3d& r) {
  const double d2 = d.squaredNorm(), dn = std::sqrt(d2);
  const double q = (r.dot(r) - 2.0 * r.dot(d)) / d2;
  const double s = std::pow(1.0 + q, 1.5);
  return gm / (d2 * dn) * (-r / s - (q * (3.0 + 3.0 * q + q * q) / (s * (1.0 + s))) * d);
}

Eigen::Matrix3d ThirdBodyTide::tidal_gradient(double gm, const Eigen::Vector3d& d, const Eigen::Vector3d& r) {
  const Eigen::Vector3d p = d - r;
  const double p2 = p.squaredNorm(), p3 = p2 * std::sqrt(p2);
  return gm * (-Eigen::Matrix3d::Identity() / p3 + 3.0 * p * p.transpose() / (p3 * p2));
}

double ThirdBodyTide::tidal_potential(double gm, const Eigen::Vector3d& d, const Eigen::Vector3d& r) {
  const double d2 = d.squaredNorm(), dn = std::sqrt(d2);
  const double q = (r.dot(r) - 2.0 * r.dot(d)) / d2;
  const double s1 = std::sqrt(1.0 + q);
  const double inv_diff = -q / (dn * s1 * (1.0 + s1));  // 1/|d - r| - 1/|d|
  return -gm * (inv_diff - r.dot(d) / (d2 * dn));
}

Eigen::Vector3d ThirdBodyTide::acceleration(const Eigen::Vector3d& r, double t) const {
  Eigen::Vector3d a = Eigen::Vector3d::Zero();
  for (std::size_t i = 0; i < bodies_.size(); ++i) a += tidal_acceleration(bodies_[i].gm_m3_s2, body_position(i, t), r);
  return a;
}

Eigen::Matrix3d ThirdBodyTide::gradient(const Eigen::Vector3d& r, double t) const {
  Eigen::Matrix3d g = Eigen::Matrix3d::Zero();
  for (std::size_t i = 0; i < bodies_.size(); ++i) g += tidal_gradient(bodies_[i].gm_m3_s2, body_position(i, t), r);
  return g;
}

double ThirdBodyTide::potential(const Eigen::Vector3d& r, double t) const {
  double u = 0.0;
  for (std::size_t i = 0; i < bodies_.size(); ++i) u += tidal_potential(bodies_[i].gm_m3_s2, body_position(i, t), r);
  return u;
}

}  // namespace hawser
