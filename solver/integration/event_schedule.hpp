#pragma once
// The stop times of a run and the scheduled changes of its state, applied in one place.
//
// A stop time is a discontinuity of the forcing (a gust's onset, a cut, a climber arriving,
// leaving or dropping its payload, a time the caller names): no step may straddle it, so the
// driver stops there and restarts the integrator from low order. Some stop times also change
// the state itself (a strike adds m dv to a node's momentum); those are ScheduledChanges,
// which the driver applies through apply_due() and nothing else touches.
#include <cstddef>
#include <memory>
#include <vector>

#include "solver/integration/tether_system.hpp"

namespace hawser {

/// A change of the state at a given time.
class ScheduledChange {
 public:
  virtual ~ScheduledChange() = default;
  virtual double time_s() const = 0;
  /// Changes the integrator's state `y` (layout of `layout`).
  virtual void apply(const StateLayout& layout, std::vector<double>& y) const = 0;
};

/// A strike: the node's velocity jumps by dv (a free node only; a held node keeps its motion).
class VelocityJumpChange : public ScheduledChange {
 public:
  explicit VelocityJumpChange(const VelocityJump& j) : jump_(j) {}
  double time_s() const override { return jump_.time_s; }
  void apply(const StateLayout& layout, std::vector<double>& y) const override;

 private:
  VelocityJump jump_;
};

class EventSchedule {
 public:
  /// The stop times of `caller_times_s`, of every force model of `model` and of its strikes.
  EventSchedule(const TetherModel& model, std::vector<double> caller_times_s);

  /// Applies the changes due at t <= 0 to a new run's initial state and passes those times.
  void start(const StateLayout& layout, std::vector<double>& y);
  /// Passes the stop times before `t_s` of a resumed run (whose state holds their changes; a
  /// checkpoint is taken after an output and before any event at that time, so the events at
  /// t_s itself are still to come).
  void resume_at(double t_s);

  /// The next stop time not yet passed (+infinity when none is left).
  double next_time() const;
  /// At a stop time `t_s` reached by the integrator: applies the changes due then and passes
  /// every stop time <= t_s.
  void apply_due(double t_s, const StateLayout& layout, std::vector<double>& y);

 private:
  std::vector<double> times_;                             // sorted, unique
  std::vector<std::unique_ptr<ScheduledChange>> changes_;
  std::size_t next_ = 0;
};

}  // namespace hawser
