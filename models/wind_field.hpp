#pragma once
// The air's velocity in the planet's rotating frame at a point and time: mean wind profiles
// plus discrete gusts plus Dryden turbulence, each given in local (east, north, up).
//
// Wind is the motion of the air relative to the ground; the atmosphere at rest turns with the
// planet, so calm air is at rest in the rotating frame and the wind needs no frame term.
//
// Local axes at a point r (AltitudeFrame):
//  - planet: altitude h = |r| - R (R the equatorial radius; a spherical planet for the air),
//    up = r / |r|, east = e_z x up normalised, north = up x east. On the equatorial tether line
//    this is up = +x, east = +y, north = +z (physics.md section 1).
//  - bench (the uniform-field test mode): fixed axes, up along the cable axis (+x, away from
//    node 0), east = +y, north = +z, altitude h = distance from node 0 along the axis. (The
//    bench's gravity pulls along +x too: the bench cable stands like the part of a tether
//    above the synchronous radius, pulled outward.)
// Composition, in (east, north, up) at altitude h and time t:
//   u = sum_k wind_k(h, t) + gusts(h, t) + to_enu(turbulence_uvw(h, t), downwind(turbulence direction))
// and in the rotating frame u_rot = east * u_e + north * u_n + up * u_u.
// Turbulence: a series pre-generated over the run (models/dryden_turbulence.hpp), exact at its
// sample times and a C2 cubic spline in time between them, held at its last value past its
// end. (A spline, not linear interpolation: a kink in the air's velocity at every sample is a
// kink in the acceleration of the light lower nodes, and the integrator's error test cut its
// step at each one; measured on scenarios/storm.yaml: 102,111 steps and 5,317 error-test
// failures with linear interpolation, 72,609 and 8 with a C1 Catmull-Rom cubic, 68,708 and 4
// with the spline.) The turbulence is
// continuous, so it adds no event times; wind windows and gust onsets/ends are events.
#include <Eigen/Core>
#include <memory>
#include <vector>

#include "models/discrete_gust.hpp"
#include "models/dryden_turbulence.hpp"
#include "models/wind_profile.hpp"

namespace hawser {

class AltitudeFrame {
 public:
  static AltitudeFrame planet(double equatorial_radius_m);
  static AltitudeFrame bench();
  /// Altitude h [m] of a point r [m].
  double altitude(const Eigen::Vector3d& r) const;
  /// A level h [m] to test many points against cheaply (no square root): reaches(r) is
  /// altitude(r) >= h.
  struct Level {
    bool bench;
    double bound;  // bench: h; planet: (R + h)^2 [m^2], +infinity for h = +infinity
    bool reaches(const Eigen::Vector3d& r) const { return bench ? r.x() >= bound : r.squaredNorm() >= bound; }
  };
  Level level(double altitude_m) const {
    const double top = radius_m_ + altitude_m;
    return {bench_, bench_ ? altitude_m : (top > 0.0 ? top * top : 0.0)};
  }
  /// Columns east, north, up (unit vectors, rotating frame) at r.
  Eigen::Matrix3d enu_axes(const Eigen::Vector3d& r) const;
  bool is_bench() const { return bench_; }

 private:
  AltitudeFrame(bool bench, double radius_m) : bench_(bench), radius_m_(radius_m) {}
  bool bench_;
  double radius_m_;
};

class WindField {
 public:
  /// `turbulence` may be null; its u axis points downwind of `turbulence_from_deg`.
  WindField(AltitudeFrame frame, std::vector<WindProfile> winds, GustSet gusts,
            std::shared_ptr<const DrydenTurbulence> turbulence, double turbulence_from_deg);

  /// Wind (east, north, up) [m/s] at altitude h [m] and time t [s].
  Eigen::Vector3d velocity_enu(double altitude_m, double t_s) const;
  /// Wind in the rotating frame [m/s] at r [m] and time t [s].
  Eigen::Vector3d velocity(const Eigen::Vector3d& r_m, double t_s) const;
  /// Starts (after t = 0) and ends of the wind windows, gust onsets and ends [s], sorted, unique.
  std::vector<double> event_times() const;
  const AltitudeFrame& frame() const { return frame_; }
  bool calm() const { return winds_.empty() && gusts_.size() == 0 && !turbulence_; }

 private:
  Eigen::Vector3d turbulence_uvw(double altitude_m, double t_s) const;
  AltitudeFrame frame_;
  std::vector<WindProfile> winds_;
  GustSet gusts_;
  std::shared_ptr<const DrydenTurbulence> turbulence_;
  Eigen::Vector3d turbulence_downwind_enu_;
};

}  // namespace hawser
