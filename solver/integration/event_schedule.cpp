#include "solver/integration/event_schedule.hpp"

#include <algorithm>
#include <limits>

namespace hawser {

void VelocityJumpChange::apply(const StateLayout& layout, std::vector<double>& y) const {
  if (!layout.is_free(jump_.node)) return;
  for (int a = 0; a < 3; ++a) y[layout.v(jump_.node, a)] += jump_.delta_v_m_s[a];
}

EventSchedule::EventSchedule(const TetherModel& model, std::vector<double> caller_times_s)
    : times_(std::move(caller_times_s)) {
  for (const ForceModel* m : model.forces())
    for (double t : m->event_times()) times_.push_back(t);
  for (const VelocityJump& j : model.jumps) {
    changes_.push_back(std::make_unique<VelocityJumpChange>(j));
    times_.push_back(j.time_s);
  }
  std::sort(times_.begin(), times_.end());
  times_.erase(std::unique(times_.begin(), times_.end()), times_.end());
}

void EventSchedule::start(const StateLayout& layout, std::vector<double>& y) {
  for (const auto& c : changes_)
    if (c->time_s() <= 0.0) c->apply(layout, y);
  while (next_ < times_.size() && times_[next_] <= 0.0) ++next_;
}

void EventSchedule::resume_at(double t_s) {
  while (next_ < times_.size() && times_[next_] < t_s) ++next_;
}

double EventSchedule::next_time() const {
  return next_ < times_.size() ? times_[next_] : std::numeric_limits<double>::infinity();
}

void EventSchedule::apply_due(double t_s, const StateLayout& layout, std::vector<double>& y) {
  for (const auto& c : changes_)
    if (c->time_s() == next_time()) c->apply(layout, y);
  while (next_ < times_.size() && times_[next_] <= t_s) ++next_;
}

}  // namespace hawser
