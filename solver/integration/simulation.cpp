#include "solver/integration/simulation.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>

#include "solver/input/errors.hpp"
#include "solver/integration/progress.hpp"

namespace hawser {

RunOptions run_options(const SimulationSpec& sim, const StateLayout& layout) {
  RunOptions o;
  o.duration_s = sim.duration_s;
  o.output_interval_s = sim.output_interval_s;
  o.integrator.method = parse_method(sim.method);
  o.integrator.rtol = sim.rtol;
  o.integrator.max_step_s = sim.max_step_s;
  o.integrator.max_steps_between_outputs = sim.max_steps_per_output;
  // BDF above order 2 is not A-stable: on a tether's undamped longitudinal modes it takes
  // many times more steps (measured: 59,602 against 17,590 steps for the 300-element peer
  // case; Hairer & Wanner, Solving ODEs II, section V.2, on the stability of BDF).
  o.integrator.max_order = sim.max_order > 0 ? sim.max_order : (o.integrator.method == Method::bdf ? 2 : 0);
  o.integrator.atol.assign(layout.size(), 0.0);
  for (std::size_t k = layout.first_free(); k <= layout.last_free(); ++k)
    for (int a = 0; a < 3; ++a) {
      o.integrator.atol[layout.u(k, a)] = sim.atol_position_m;
      o.integrator.atol[layout.v(k, a)] = sim.atol_velocity_m_s;
    }
  // The quadratures only accumulate along the steps the motion needs; keep them out of the
  // error control (as CVODES does for its quadratures), or they would set the step size.
  for (std::size_t q = layout.dissipated_energy(); q < layout.size(); ++q) o.integrator.atol[q] = 1e30;
  o.stop_on_rupture = sim.stop_on_rupture;
  return o;
}

namespace {

class SummaryKeeper {
 public:
  SummaryKeeper(const TetherModel& m, RunSummary& s) : model_(m), s_(s) {}
  void observe(double t, const Matrix3X& x, const TetherDiagnostics& d) {
    for (std::size_t e = 0; e < d.tension_n.size(); ++e) {
      if (d.tension_n[e] > s_.peak_tension_n) {
        s_.peak_tension_n = d.tension_n[e];
        s_.peak_tension_element = e;
        s_.peak_tension_time_s = t;
      }
    }
    if (d.max_stress_ratio > 0.0 && 1.0 / d.max_stress_ratio < s_.min_safety_factor) {
      s_.min_safety_factor = 1.0 / d.max_stress_ratio;
      s_.min_safety_factor_element = d.max_stress_element;
      s_.min_safety_factor_time_s = t;
    }
    for (std::size_t k = 0; k < model_.nodes(); ++k) {
      const Eigen::Vector3d u = x.col(k) - model_.mesh.position.col(k);
      if (std::abs(u.y()) > s_.peak_east_west_m) {
        s_.peak_east_west_m = std::abs(u.y());
        s_.peak_east_west_node = k;
        s_.peak_east_west_time_s = t;
      }
      if (std::abs(u.z()) > s_.peak_north_south_m) {
        s_.peak_north_south_m = std::abs(u.z());
        s_.peak_north_south_node = k;
        s_.peak_north_south_time_s = t;
      }
    }
    if (d.slack_elements > 0 && s_.first_slack_time_s < 0.0) s_.first_slack_time_s = t;
    s_.max_slack_elements = std::max(s_.max_slack_elements, d.slack_elements);
    s_.energy.observe(t, d);
  }

 private:
  const TetherModel& model_;
  RunSummary& s_;
};

}  // namespace

RunSummary run_simulation(TetherSystem& sys, const std::vector<double>& y0, const RunOptions& opt, OutputSink& sink) {
  const auto wall0 = std::chrono::steady_clock::now();
  RunSummary summary;
  SummaryKeeper keeper(sys.model(), summary);
  Progress progress(opt.duration_s, opt.progress);
  std::vector<double> y = opt.resume ? opt.resume->state : y0;
  Matrix3X x, v;
  std::vector<double> ydot(y.size());
  auto emit = [&](double t) {
    TetherDiagnostics d = sys.diagnose(t, y.data());
    sys.node_state(t, y.data(), x, v);
    // Accelerations, for outputs that need them (a climber's drive force).
    sys.rhs(t, y.data(), ydot.data());
    d.acceleration = Matrix3X::Zero(3, x.cols());
    const StateLayout& lay = sys.layout();
    for (std::size_t k = lay.first_free(); k <= lay.last_free(); ++k)
      for (int a = 0; a < 3; ++a) d.acceleration(a, k) = ydot[lay.v(k, a)];
    sink.record(t, x, v, d);
    keeper.observe(t, x, d);
    ++summary.outputs;
    return d;
  };

  // Stop times: the caller's, every model's (gust onsets, cuts) and the strikes.
  std::vector<double> events = opt.event_times_s;
  for (const ForceModel* m : sys.model().forces())
    for (double te : m->event_times()) events.push_back(te);
  for (const VelocityJump& j : sys.model().jumps) events.push_back(j.time_s);
  std::sort(events.begin(), events.end());
  events.erase(std::unique(events.begin(), events.end()), events.end());
  const double t_start = opt.resume ? opt.resume->time_s : 0.0;
  long output_index = 1;
  if (opt.resume) {
    // Continue a run: its state already holds every strike up to t_start.
    summary = opt.resume->summary;
    output_index = opt.resume->next_output;
  } else {
    // Strikes at t = 0 act on the initial state.
    for (const VelocityJump& j : sys.model().jumps)
      if (j.time_s <= 0.0 && sys.layout().is_free(j.node))
        for (int a = 0; a < 3; ++a) y[sys.layout().v(j.node, a)] += j.delta_v_m_s[a];
    // A start already past the ultimate strength has no crossing for the root function to
    // find: it is a rupture at t = 0.
    const TetherDiagnostics d0 = emit(0.0);
    if (d0.max_stress_ratio >= 1.0) {
      summary.ruptures.push_back({0.0, d0.max_stress_element, d0.max_stress_ratio * sys.model().ultimate_strength_pa});
      if (opt.stop_on_rupture) {
        summary.status = "stopped";
        summary.message = "element " + std::to_string(d0.max_stress_element) +
                          " is past its ultimate strength in the starting state";
        summary.stats = SolverStats{};
        summary.wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - wall0).count();
        sink.flush();
        return summary;
      }
    }
  }
  // Events already applied: a new run has applied those at t <= 0 above; a checkpoint is taken
  // right after an output, before any event at that same time, so a resumed run still applies
  // events at t_start.
  std::size_t next_event = 0;
  while (next_event < events.size() &&
         (opt.resume ? events[next_event] < t_start : events[next_event] <= 0.0))
    ++next_event;
  auto last_flush = std::chrono::steady_clock::now();
  int since_flush = 0;
  // Publish what was recorded, with the state to continue from (an output time's).
  auto flush_at = [&](double t_out) {
    RunCheckpoint c;
    c.time_s = t_out;
    c.state = y;
    c.next_output = output_index;
    c.summary = summary;
    sink.checkpoint(c);
    sink.flush();
    since_flush = 0;
    last_flush = std::chrono::steady_clock::now();
  };
  if (!opt.resume) flush_at(0.0);

  TimeIntegrator integ(sys, t_start, y.data(), opt.integrator);
  const double inf = std::numeric_limits<double>::infinity();
  double t = t_start;
  summary.status = "complete";
  try {
    while (t < opt.duration_s) {
      const double t_out = std::min(opt.duration_s, output_index * opt.output_interval_s);
      const double t_stop = next_event < events.size() ? std::min(events[next_event], opt.duration_s) : inf;
      const double reached = integ.advance(t_out, t_stop, y.data());
      t = reached;
      const bool rupture = !integ.root_info().empty() && integ.root_info()[0] > 0 && reached < t_out;
      if (rupture) {
        const TetherDiagnostics d = sys.diagnose(t, y.data());
        summary.ruptures.push_back(
            {t, d.max_stress_element, d.max_stress_ratio * sys.model().ultimate_strength_pa});
        if (opt.stop_on_rupture) {
          emit(t);
          summary.status = "stopped";
          summary.message = "element " + std::to_string(d.max_stress_element) + " reached its ultimate strength at t = " +
                            std::to_string(t) + " s";
          break;
        }
        continue;
      }
      if (reached >= t_out) {
        if (next_event < events.size() && events[next_event] == t_out) {
          // The output sees the climbers as they are after the event at its time: it gets
          // their energy jump too, which the event that follows books in the state.
          const std::vector<double> before_event = y;
          sys.add_event_work(t_out, y.data(), 0.0, true);
          emit(t_out);
          y = before_event;
        } else {
          emit(t_out);
        }
        ++output_index;
        const double since_s =
            std::chrono::duration<double>(std::chrono::steady_clock::now() - last_flush).count();
        ++since_flush;
        if (since_s >= opt.flush.wall_interval_s ||
            (opt.flush.every_outputs > 0 && since_flush >= opt.flush.every_outputs))
          flush_at(t_out);
      } else if (next_event < events.size() && reached >= events[next_event]) {
        // A discontinuity of the forcing: apply any strike, restart from low order. The
        // energy budget books what jumps here (a strike's kinetic energy, climbers arriving
        // or leaving).
        const auto motion_j = [&] {
          const TetherDiagnostics d = sys.diagnose(reached, y.data());
          return d.kinetic_j + d.climber_j;
        };
        double strike_j = 0.0;
        bool struck = false;
        for (const VelocityJump& j : sys.model().jumps)
          if (j.time_s == events[next_event] && sys.layout().is_free(j.node)) {
            if (!struck) strike_j = -motion_j();
            struck = true;
            for (int a = 0; a < 3; ++a) y[sys.layout().v(j.node, a)] += j.delta_v_m_s[a];
          }
        if (struck) strike_j += motion_j();
        sys.add_event_work(reached, y.data(), strike_j, true);
        integ.restart(reached, y.data());
        while (next_event < events.size() && events[next_event] <= reached) ++next_event;
      }
      progress.update(t, integ.stats().steps);
    }
  } catch (const IntegratorFailure& e) {
    summary.status = "failed";
    summary.message = e.what();
    t = e.time_s();
    const StateLayout& lay = sys.layout();
    const long c = e.component();
    if (c >= 0 && static_cast<std::size_t>(c) < lay.dissipated_energy()) {
      const std::size_t local = static_cast<std::size_t>(c) % StateLayout::kPerNode;
      summary.failure_node = static_cast<long>(lay.first_free() + static_cast<std::size_t>(c) / StateLayout::kPerNode);
      static const char* axis[] = {"x (up)", "y (east)", "z (north)"};
      summary.message += "; largest local error at node " + std::to_string(summary.failure_node) + ", " +
                         (local < 3 ? "displacement " : "velocity ") + axis[local % 3];
    }
  }
  progress.finish();
  summary.end_time_s = t;
  summary.stats = integ.stats();
  summary.wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - wall0).count();
  // No flush here: the caller closes the sink with the summary (the recorder then writes its
  // final file straight from memory, without a last segment).
  return summary;
}

}  // namespace hawser
