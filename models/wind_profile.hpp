#pragma once
// Mean (steady) wind against altitude, switched on over a time window.
//
// Frame: local east, north, up (ENU) at the point below the node [m/s]; converting to the
// planet's rotating frame is the caller's job (at the equatorial anchor (R, 0, 0) of
// physics.md: east = +y, north = +z, up = +x). The mean wind is horizontal (up = 0).
//
// Direction: meteorological convention, the direction the wind blows FROM, in degrees
// clockwise from north (common practice; a "westerly" of 270 deg blows toward the east). The
// velocity is  u = -speed (sin(dir), cos(dir), 0)  in (east, north, up).
//
// Kinds of profile (one per object; several objects add up at the caller):
//  - power law (Hellmann's law, as in ASCE 7 and common engineering practice):
//      speed(h) = u_ref (h / h_ref)^alpha   for 0 < h <= h_top,  0 at h <= 0;
//    alpha about 1/7 over open flat land is common practice.
//  - logarithmic law of the atmospheric surface layer (Prandtl's log law; e.g. Stull, An
//    Introduction to Boundary Layer Meteorology, 1988; Eurocode 1, EN 1991-1-4, builds its
//    mean wind on it with a roughness length z0):
//      speed(h) = (u* / kappa) ln(h / z0)   for z0 < h <= h_top,  0 at h <= z0,
//    with the von Karman constant kappa given explicitly (0.40 or 0.41 depending on the source;
//    recalled from memory).
//    Both laws are capped: above h_top (for example the gradient height, the top of the
//    boundary layer, where the gradient wind takes over) the speed stays at speed(h_top)
//    (common practice).
//    The direction is constant with height.
//  - table of (altitude, speed, from-direction) rows with strictly increasing altitude, for
//    measured profiles and jet streams: speed is interpolated linearly in altitude, direction
//    linearly along the shorter arc between the two rows (350 -> 10 deg passes through north);
//    outside the table the nearest row is held (so the profile stays continuous; end with a
//    zero-speed row to stop the wind).
// Time window: the wind acts for start_s <= t < end_s and is zero outside (a step in time: the
// integrator should stop at start_s and end_s; they are exposed for that).
#include <Eigen/Core>
#include <limits>
#include <vector>

namespace hawser {

struct PowerLawWind {
  double reference_speed_m_s;   // u_ref [m/s]
  double reference_height_m;    // h_ref [m], > 0
  double exponent;              // alpha [-], >= 0
};

struct LogLawWind {
  double friction_velocity_m_s;  // u* [m/s]
  double roughness_length_m;     // z0 [m], > 0
  double von_karman;             // kappa [-]
};

struct WindTableRow {
  double altitude_m;           // [m]
  double speed_m_s;            // [m/s], >= 0
  double from_direction_deg;   // meteorological: blowing from, clockwise from north [deg]
};

class WindProfile {
 public:
  static constexpr double kForever = std::numeric_limits<double>::infinity();

  static WindProfile power_law(const PowerLawWind& law, double top_altitude_m, double from_direction_deg,
                               double start_s, double end_s);
  static WindProfile log_law(const LogLawWind& law, double top_altitude_m, double from_direction_deg,
                             double start_s, double end_s);
  static WindProfile table(std::vector<WindTableRow> rows, double start_s, double end_s);

  /// Wind velocity (east, north, up) [m/s] at altitude h [m] and time t [s]; zero outside the window.
  Eigen::Vector3d velocity_enu(double altitude_m, double t_s) const;
  /// Horizontal speed [m/s] and from-direction [deg, 0..360) at altitude h, ignoring the window.
  double speed(double altitude_m) const;
  double from_direction_deg(double altitude_m) const;
  bool active(double t_s) const { return t_s >= start_s_ && t_s < end_s_; }
  double start_s() const { return start_s_; }
  double end_s() const { return end_s_; }

  /// Unit vector (east, north, 0) toward which a wind from `from_direction_deg` blows.
  static Eigen::Vector3d downwind_unit_enu(double from_direction_deg);

 private:
  enum class Kind { power, logarithmic, table };
  WindProfile(Kind kind, double start_s, double end_s);
  Kind kind_;
  double start_s_, end_s_;
  PowerLawWind power_{};
  LogLawWind log_{};
  double top_m_ = 0.0, direction_deg_ = 0.0;  // laws only
  std::vector<WindTableRow> rows_;            // table only
};

}  // namespace hawser
