#pragma once
// Tidal acceleration of third bodies (the Moon, the Sun) on points of the planet's rotating frame.
//
// Each body is a point mass on a circular orbit about the planet's centre (its eccentricity, the
// motion of its node and of the planet's axis are left out). Inertial frame: the planet-centred
// frame that coincides with the rotating frame at t = 0 (z along the spin axis). Body position
//   d_I(t) = D R_z(node) R_x(i) (cos u, sin u, 0),   u = u_0 + n t,   n = 2 pi / P_sidereal,
// with D the orbit radius, i the inclination to the planet's equator, node the longitude of the
// ascending node and u_0 the argument of latitude at t = 0. In the frame rotating at Omega:
//   d(t) = R_z(-Omega t) d_I(t).
// For an equatorial orbit (i = 0) d(t) repeats every 2 pi / (Omega - n): for the Moon and the
// Earth 24.84 h, the lunar day, whose half (12.42 h) is the period of the semi-diurnal tide.
//
// Tidal (differential) acceleration at r, the body's pull on the point minus its pull on the
// planet's centre, which is what a planet-centred frame feels (physics.md section 4):
//   a(r) = GM_b [ (d - r) / |d - r|^3 - d / |d|^3 ]
// evaluated without cancellation (the two terms nearly cancel for r << d) by writing
// |d - r|^2 = |d|^2 (1 + q), q = (r.r - 2 r.d) / |d|^2, and
//   (1 + q)^(-3/2) - 1 = -q (3 + 3q + q^2) / (s (1 + s)),  s = (1 + q)^(3/2)
// (the device of Battin, An Introduction to the Mathematics and Methods of Astrodynamics,
// for the same difference; recalled from memory):
//   a(r) = GM_b / |d|^3 [ -r / s - d q (3 + 3q + q^2) / (s (1 + s)) ].
// Gradient (symmetric), for the Jacobian:  da/dr = GM_b [ -I / |d-r|^3 + 3 (d-r)(d-r)^T / |d-r|^5 ].
// Potential per unit mass with a = -grad U, zero at the planet's centre:
//   U(r) = -GM_b [ 1/|d - r| - 1/|d| - r.d / |d|^3 ],
//   1/|d - r| - 1/|d| = -q / (|d| s1 (1 + s1)),  s1 = (1 + q)^(1/2).
// To leading order in |r|/|d| (the quadrupole tide, e.g. Murray & Dermott, Solar System
// Dynamics, ch. 4; recalled from memory): a = GM_b / |d|^3 [3 (r.e) e - r], e = d/|d|, i.e.
// 2 GM_b |r| / |d|^3 outward along the line to the body and GM_b |r| / |d|^3 inward across it.
// The tide is time dependent, so it is not part of a conserved energy.
#include <Eigen/Core>
#include <string>
#include <vector>

namespace hawser {

struct ThirdBody {
  std::string name;
  double gm_m3_s2;                 // gravitational parameter GM_b [m^3/s^2]
  double orbit_radius_m;           // D [m]
  double sidereal_period_s;        // P [s], > 0 (prograde orbit)
  double inclination_rad;          // i, to the planet's equator [rad]
  double ascending_node_rad;       // longitude of the ascending node at t = 0 [rad]
  double initial_phase_rad;        // u_0, argument of latitude at t = 0 [rad]
};

/// The Moon and the Sun about the Earth, mean circular orbits; sources in the .cpp. The
/// geometry of the epoch (node, phase) is the scenario's: these leave both at 0, and set the
/// inclination to the obliquity of the ecliptic (the Moon's orbit lies within 5.145 deg of it).
ThirdBody earth_moon_mean_orbit();
ThirdBody earth_sun_mean_orbit();

class ThirdBodyTide {
 public:
  /// Bodies, and the planet's sidereal spin rate Omega [rad/s] (the rotating frame's).
  ThirdBodyTide(std::vector<ThirdBody> bodies, double spin_rate_rad_s);

  /// Position of body b in the rotating frame at time t [m].
  Eigen::Vector3d body_position(std::size_t b, double t_s) const;
  /// Sum over the bodies of the tidal acceleration [m/s^2] at r [m] (rotating frame).
  Eigen::Vector3d acceleration(const Eigen::Vector3d& r_m, double t_s) const;
  /// Its gradient d a / d r [1/s^2].
  Eigen::Matrix3d gradient(const Eigen::Vector3d& r_m, double t_s) const;
  /// Sum of the tidal potentials [J/kg], zero at the planet's centre.
  double potential(const Eigen::Vector3d& r_m, double t_s) const;

  /// One body of parameter gm [m^3/s^2] at d [m]: acceleration, gradient and potential at r [m].
  static Eigen::Vector3d tidal_acceleration(double gm, const Eigen::Vector3d& d, const Eigen::Vector3d& r);
  static Eigen::Matrix3d tidal_gradient(double gm, const Eigen::Vector3d& d, const Eigen::Vector3d& r);
  static double tidal_potential(double gm, const Eigen::Vector3d& d, const Eigen::Vector3d& r);

  /// Period after which an equatorial body returns to the same place in the rotating frame [s]:
  /// 2 pi / (Omega - n_b).
  double synodic_day_s(std::size_t b) const;
  const std::vector<ThirdBody>& bodies() const { return bodies_; }

 private:
  std::vector<ThirdBody> bodies_;
  double omega_;
};

}  // namespace hawser
