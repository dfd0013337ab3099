#pragma once
// A planet as data: gravitational parameter, spin, size, oblateness.
//
// Frame: planet-centred, rotating with the planet at spin_rate about +z. On the equatorial
// line used by the static design, the effective potential per unit mass is
//   Phi(r) = -GM/r - (J2 term) - Omega^2 r^2 / 2,
// with the J2 term of the zonal expansion at latitude 0, -GM J2 a^2 / (2 r^3)
// (Vallado, Fundamentals of Astrodynamics and Applications, the J2 potential with P2(0) = -1/2),
// included only when the scenario enables J2 so that design and dynamics use one field.
#include <string>

namespace hawser {

struct Planet {
  std::string name;
  double gm_m3_s2 = 0.0;          // gravitational parameter GM [m^3/s^2]
  double spin_rate_rad_s = 0.0;   // sidereal spin rate Omega [rad/s]
  double equatorial_radius_m = 0.0;  // a [m]
  double j2 = 0.0;                // second zonal harmonic [-]
};

/// The field along the planet's equatorial plane seen by a radial tether at rest in the
/// rotating frame: gravity (point mass, optionally J2) plus the centrifugal term.
class EquatorialField {
 public:
  EquatorialField(const Planet& planet, bool include_j2);
  /// Effective potential per unit mass Phi(r) [J/kg].
  double potential(double r_m) const;
  /// Net outward specific force f(r) = -dPhi/dr [m/s^2]; negative below the synchronous radius.
  double outward_force(double r_m) const;
  /// Radius where gravity and centrifugal force balance (f = 0) [m]; the geostationary radius.
  double synchronous_radius() const;
  const Planet& planet() const { return planet_; }
  bool includes_j2() const { return j2_ != 0.0; }

 private:
  Planet planet_;
  double j2_;  // J2 in use (0 when disabled)
};

}  // namespace hawser
