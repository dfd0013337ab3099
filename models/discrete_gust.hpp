#pragma once
// Discrete "1-cosine" gusts, and a set of them acting together.
//
// Shape: the discrete gust of the airworthiness gust-load rules (14 CFR 25.341(a); EASA CS-25.341):
//   U(s) = (U_ds / 2) (1 - cos(pi s / H))   for 0 <= s <= 2H,   0 otherwise,
// with s the distance penetrated into the gust and H the gradient distance (peak at s = H).
// Here the gust is applied in TIME at a fixed structure:  s / H = (t - t_onset) / t_H, with t_H
// the gradient time (onset to peak; the gust lasts 2 t_H). For a gust given, as in the rules,
// by a gradient distance H met at a speed V, t_H = H / V (gradient_time()).
// The whole altitude band sees the same time history (the gust front is taken as reaching the
// band at once, which is the case for a horizontal front passing a vertical tether).
//
// Direction: a vector in local (east, north, up), normalised here; a horizontal gust from a
// meteorological direction uses WindProfile::downwind_unit_enu(from_deg).
// Altitude band [h_low, h_high] with edge width w [m]:
//   band(h) = 0 outside [h_low, h_high];
//   w = 0: 1 inside (sharp edges, the force jumps as a node crosses an edge);
//   w > 0: 1 on [h_low + w, h_high - w] with cosine ramps 0.5 (1 - cos(pi d / w)) over the
//          distance d < w from each edge (smooth to first derivative); needs 2 w <= h_high - h_low.
// Velocity:  u(h, t) = U(t) band(h) e   [m/s] in (east, north, up).
// U(t) is continuous with its first derivative; its second derivative jumps at onset and end.
// A GustSet sums any number of gusts; its event times (every onset and end) are where an
// integrator should stop so no step straddles those jumps.
#include <Eigen/Core>
#include <vector>

namespace hawser {

struct DiscreteGustSpec {
  double amplitude_m_s;           // U_ds, peak speed [m/s]
  double gradient_time_s;         // t_H, onset to peak [s], > 0 (duration 2 t_H)
  Eigen::Vector3d direction_enu;  // direction the gust blows toward (east, north, up), any length > 0
  double altitude_low_m;          // h_low [m]
  double altitude_high_m;         // h_high [m], > h_low
  double edge_width_m;            // w [m], 0 for sharp edges
  double onset_s;                 // t_onset [s]
};

class DiscreteGust {
 public:
  explicit DiscreteGust(const DiscreteGustSpec& spec);
  /// Gust speed U(t) [m/s] (the 1-cosine time history, before the band).
  double speed(double t_s) const;
  /// Altitude weight band(h) in [0, 1].
  double band(double altitude_m) const;
  /// Gust velocity (east, north, up) [m/s] at altitude h [m] and time t [s].
  Eigen::Vector3d velocity_enu(double altitude_m, double t_s) const;
  double onset_s() const { return spec_.onset_s; }
  double peak_s() const { return spec_.onset_s + spec_.gradient_time_s; }
  double end_s() const { return spec_.onset_s + 2.0 * spec_.gradient_time_s; }
  const DiscreteGustSpec& spec() const { return spec_; }

  /// t_H = H / V for a gradient distance H [m] met at a speed V [m/s].
  static double gradient_time(double gradient_distance_m, double speed_m_s);

 private:
  DiscreteGustSpec spec_;  // direction normalised
};

class GustSet {
 public:
  void add(const DiscreteGust& gust) { gusts_.push_back(gust); }
  std::size_t size() const { return gusts_.size(); }
  const DiscreteGust& operator[](std::size_t i) const { return gusts_[i]; }
  /// Sum of all gust velocities (east, north, up) [m/s].
  Eigen::Vector3d velocity_enu(double altitude_m, double t_s) const;
  /// Onset and end of every gust [s], sorted, duplicates removed.
  std::vector<double> event_times() const;

 private:
  std::vector<DiscreteGust> gusts_;
};

}  // namespace hawser
