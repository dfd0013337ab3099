#pragma once
// The prescribed motion of a climber along the tether: its material coordinate s(t) (the
// unstretched arc length from the anchor, so the climber stays on the same piece of ribbon
// whatever the stretch), as a chain of constant-acceleration segments:
//   s(t) = s_i + dir (v_i (t - t_i) + a_i (t - t_i)^2 / 2),  t_i <= t < t_{i+1},
// with dir = +1 going up, -1 coming down, and v, a the speed and acceleration along the path.
// Built from acceleration/cruise/deceleration ramps with dwell stops, or from a table of
// speed against position with speed^2 linear in distance between rows (constant acceleration
// on each stretch). Before its start the climber waits at its start point; after its end
// it rests at its end point.
#include <stdexcept>
#include <string>
#include <vector>

namespace hawser {

/// A profile that cannot be flown as given; the message says why and what is possible.
class ProfileError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

struct Dwell {
  double at_m;        // material coordinate of the stop [m]
  double duration_s;  // [s]
};

struct SpeedRow {
  double at_m;        // material coordinate [m]
  double speed_m_s;   // speed along the path there [m/s]
};

class ClimberProfile {
 public:
  struct Kinematics {
    double s_m, speed_m_s, accel_m_s2;  // s, ds/dt, d2s/dt2 (signed: + is up)
  };

  /// Ramps: accelerate at accel to cruise, cruise, decelerate at decel to rest at each dwell
  /// stop and at the end. Throws ProfileError if a leg is too short to reach cruise speed
  /// (and gives the reachable speed sqrt(2 L a d / (a + d))).
  static ClimberProfile ramps(double start_time_s, double from_m, double to_m, double cruise_m_s, double accel_m_s2,
                              double decel_m_s2, std::vector<Dwell> dwells);
  /// A table of speeds at positions along the path (first row at `from`, last at `to`).
  static ClimberProfile table(double start_time_s, double from_m, double to_m, std::vector<SpeedRow> rows);

  /// A climber waiting at `from` for ever (profiles come from ramps() or table()).
  ClimberProfile() : times_{0.0} {}
  /// A climber parked at s [m] for ever (static load cases).
  static ClimberProfile parked(double s_m) { return ClimberProfile(0.0, s_m, s_m); }
  Kinematics at(double t_s) const;
  double start_time() const { return start_; }
  double end_time() const { return times_.back(); }
  double from() const { return from_; }
  double to() const { return to_; }
  int direction() const { return dir_; }
  /// Boundaries of the constant-acceleration segments (where the acceleration jumps) [s].
  const std::vector<double>& segment_times() const { return times_; }
  /// Times at which s(t) passes each of the given positions strictly inside the path [s].
  std::vector<double> crossing_times(const std::vector<double>& positions_m) const;

 private:
  ClimberProfile(double start_time_s, double from_m, double to_m);
  struct Segment {
    double t0, d0, v0, a;  // start time, distance travelled, speed, acceleration (along the path)
  };
  double start_ = 0.0, from_ = 0.0, to_ = 0.0;
  int dir_ = 1;
  std::vector<Segment> segs_;
  std::vector<double> times_;  // segment start times, then the end time
  void push(double duration_s, double v0, double a);
  double distance_at(double t_s, double* speed, double* accel) const;
};

}  // namespace hawser
