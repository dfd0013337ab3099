#include "solver/integration/simulation.hpp"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>

#include "solver/input/errors.hpp"
#include "solver/integration/event_schedule.hpp"
#include "solver/integration/progress.hpp"
#include "solver/integration/rupture_monitor.hpp"
#include "solver/integration/summary_keeper.hpp"

namespace hawser {

RunOptions run_options(const SimulationSpec& sim, const StateLayout& layout) {
  RunOptions o;
  o.duration_s = sim.duration_s;
  o.output_interval_s = sim.output_interval_s;
  o.integrator.method = sim.method;
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
  o.integrator.atol[layout.dissipated_energy()] = 1e30;
  o.integrator.atol[layout.anchor_angular_impulse()] = 1e30;
  o.integrator.atol[layout.drive_work()] = 1e30;
  o.stop_on_rupture = sim.stop_on_rupture;
  return o;
}

namespace {

/// Writes one output: positions, velocities, diagnostics and accelerations at t.
class OutputWriter {
 public:
  OutputWriter(TetherSystem& sys, OutputSink& sink, SummaryKeeper& keeper, RunSummary& summary)
      : sys_(sys), sink_(sink), keeper_(keeper), summary_(summary) {}
  TetherDiagnostics write(double t, const std::vector<double>& y) {
    TetherDiagnostics d = sys_.diagnose(t, y.data());
    sys_.node_state(t, y.data(), x_, v_);
    // Accelerations, for outputs that need them (a climber's drive force).
    ydot_.resize(y.size());
    sys_.rhs(t, y.data(), ydot_.data());
    d.acceleration = Matrix3X::Zero(3, x_.cols());
    const StateLayout& lay = sys_.layout();
    for (std::size_t k = lay.first_free(); k <= lay.last_free(); ++k)
      for (int a = 0; a < 3; ++a) d.acceleration(a, k) = ydot_[lay.v(k, a)];
    sink_.record(t, x_, v_, d);
    keeper_.observe(t, x_, d);
    ++summary_.outputs;
    return d;
  }

 private:
  TetherSystem& sys_;
  OutputSink& sink_;
  SummaryKeeper& keeper_;
  RunSummary& summary_;
  Matrix3X x_, v_;
  std::vector<double> ydot_;
};

/// The integrator's failure into the summary, with the node of the largest local error.
void record_failure(const IntegratorFailure& e, const StateLayout& lay, RunSummary& summary) {
  summary.status = RunStatus::failed;
  summary.message = e.what();
  const long c = e.component();
  if (c >= 0 && static_cast<std::size_t>(c) < lay.dissipated_energy()) {
    const std::size_t local = static_cast<std::size_t>(c) % StateLayout::kPerNode;
    summary.failure_node =
        static_cast<long>(lay.first_free() + static_cast<std::size_t>(c) / StateLayout::kPerNode);
    static const char* axis[] = {"x (up)", "y (east)", "z (north)"};
    summary.message += "; largest local error at node " + std::to_string(summary.failure_node) +
                       ", " + (local < 3 ? "displacement " : "velocity ") + axis[local % 3];
  }
}

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

}  // namespace

RunSummary run_simulation(TetherSystem& sys, const std::vector<double>& y0, const RunOptions& opt,
                          OutputSink& sink) {
  const auto wall0 = std::chrono::steady_clock::now();
  const StateLayout& lay = sys.layout();
  RunSummary summary;
  SummaryKeeper keeper(sys.model(), summary);
  OutputWriter out(sys, sink, keeper, summary);
  RuptureMonitor ruptures(sys.model().ultimate_strength_pa, opt.stop_on_rupture, summary);
  EventSchedule events(sys.model(), opt.event_times_s);
  FlushClock clock(opt.flush);
  Progress progress(opt.duration_s, opt.progress);
  std::vector<double> y = opt.resume ? opt.resume->state : y0;
  const double t_start = opt.resume ? opt.resume->time_s : 0.0;
  long output_index = 1;
  // Publish what was recorded, with the state to continue from (an output time's).
  auto flush_at = [&](double t_out) {
    RunCheckpoint c;
    c.time_s = t_out;
    c.state = y;
    c.next_output = output_index;
    c.summary = summary;
    sink.checkpoint(c);
    sink.flush();
    clock.flushed();
  };
  if (opt.resume) {
    summary = opt.resume->summary;
    output_index = opt.resume->next_output;
    events.resume_at(t_start);
  } else {
    events.start(lay, y);  // strikes at t = 0 act on the initial state
    if (ruptures.at_start(out.write(0.0, y))) {
      summary.stats = SolverStats{};
      summary.wall_s = seconds_since(wall0);
      sink.flush();
      return summary;
    }
    flush_at(0.0);
  }

  TimeIntegrator integ(sys, t_start, y.data(), opt.integrator);
  double t = t_start;
  summary.status = RunStatus::complete;
  try {
    while (t < opt.duration_s) {
      const double t_out = std::min(opt.duration_s, output_index * opt.output_interval_s);
      const double t_stop = std::min(events.next_time(), opt.duration_s);
      t = integ.advance(t_out, t_stop, y.data());
      const bool rupture = !integ.root_info().empty() && integ.root_info()[0] > 0 && t < t_out;
      if (rupture) {
        if (ruptures.crossed(t, sys.diagnose(t, y.data()))) {
          out.write(t, y);
          break;
        }
        continue;
      }
      if (t >= t_out) {
        out.write(t_out, y);
        ++output_index;
        if (clock.output_recorded()) flush_at(t_out);
      } else if (t >= events.next_time()) {
        // A discontinuity of the forcing: apply what is due, restart from low order.
        events.apply_due(t, lay, y);
        integ.restart(t, y.data());
      }
      progress.update(t, integ.stats().steps);
    }
  } catch (const IntegratorFailure& e) {
    record_failure(e, lay, summary);
    t = e.time_s();
  }
  progress.finish();
  summary.end_time_s = t;
  summary.stats = integ.stats();
  summary.wall_s = seconds_since(wall0);
  // No flush here: the caller closes the sink with the summary (the recorder then writes its
  // final file straight from memory, without a last segment).
  return summary;
}

}  // namespace hawser
