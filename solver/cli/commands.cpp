#include "solver/cli/commands.hpp"

#include <cstdio>
#include <iostream>
#include <memory>

#include "solver/output/caution.hpp"
#include "solver/output/design_report.hpp"
#include "solver/assembly/load_case_table.hpp"
#include "solver/input/key_reference.hpp"
#include "solver/input/errors.hpp"
#include "solver/integration/initial_state.hpp"
#include "solver/integration/modal_analysis.hpp"
#include "solver/integration/progress.hpp"
#include "solver/output/result_recorder.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"
#include "solver/assembly/tether_model.hpp"

namespace hawser {

int cmd_check(const CommonOptions& opt) {
  // The validation stage finds every input error (climbers on the tether, flyable profiles,
  // climbers that would meet, a design that can stand) without building the model; whether
  // the loaded tether has a static state is found by design, run and modes.
  const Scenario sc = load_scenario(opt.scenario, opt.overrides);
  std::cout << opt.scenario << ": ok (" << sc.name << ", " << sc.mesh.elements << " elements)\n";
  return 0;
}

int cmd_design(const CommonOptions& opt, bool json) {
  const Scenario sc = load_scenario(opt.scenario, opt.overrides);
  if (sc.field.uniform) {
    std::cerr << "error: " << opt.scenario << ": field.kind: the static design is for a tether on a planet; this "
              << "scenario is a uniform-field test bench\n";
    return 2;
  }
  const TetherDesign design(EquatorialField(sc.planet, sc.j2), sc.material, sc.tether, sc.counterweight);
  const DesignFigures fig = evaluate_design(design, json ? 400 : 200);
  const std::vector<LoadCaseResult> cases = evaluate_load_cases(sc);
  if (json) {
    nlohmann::json j = design_json(sc, design, fig);
    if (!cases.empty()) j["load_cases"] = load_case_json(sc, cases);
    std::cout << j.dump(1) << '\n';
  } else {
    // The load cases go before the closing caution of the design table.
    std::string text = design_table(sc, design, fig);
    const auto caution = text.find("\n  hawser is a research tool");
    text.insert(caution == std::string::npos ? text.size() : caution, load_case_table(sc, cases));
    std::cout << text;
  }
  for (const LoadCaseResult& c : cases)
    if (!c.warning.empty())
      std::cerr << "warning: load case " << c.name << ": " << c.warning << "\n";
  return 0;
}

int cmd_keys() {
  std::cout << KeyReference::builtin().describe();
  return 0;
}

namespace {
std::string default_output(const std::string& scenario) {
  std::string base = scenario.substr(scenario.find_last_of('/') + 1);
  const auto dot = base.rfind('.');
  if (dot != std::string::npos && dot > 0) base.resize(dot);
  return base + ".h5";
}

void print_summary(const RunSummary& s, const std::string& file) {
  std::printf("hawser run: %s at t = %.6g s (%.4g h), %zu outputs, wall %.3g s\n", to_string(s.status), s.end_time_s,
              s.end_time_s / 3600.0, s.outputs, s.wall_s);
  if (!s.message.empty()) std::printf("  %s\n", s.message.c_str());
  std::printf("  solver: %ld steps, %ld rhs evaluations, %ld Jacobian evaluations, %ld linear setups,\n"
              "          %ld error-test failures, %ld nonlinear iterations, %ld nonlinear failures\n",
              s.stats.steps, s.stats.rhs_evals, s.stats.jac_evals, s.stats.linear_setups, s.stats.error_test_failures,
              s.stats.nonlinear_iterations, s.stats.nonlinear_failures);
  std::printf("  peak tension %.6g N in element %zu at t = %.6g s; smallest safety factor %.4g\n", s.peak_tension_n,
              s.peak_tension_element, s.peak_tension_time_s, s.min_safety_factor);
  std::printf("  peak east-west deflection %.6g m (node %zu), north-south %.6g m (node %zu)\n", s.peak_east_west_m,
              s.peak_east_west_node, s.peak_north_south_m, s.peak_north_south_node);
  if (s.max_slack_elements > 0)
    std::printf("  slack elements: up to %zu at once, first at t = %.6g s\n", s.max_slack_elements, s.first_slack_time_s);
  for (const auto& r : s.ruptures)
    std::printf("  element %zu reached its ultimate strength (%.4g Pa) at t = %.6g s\n", r.element, r.stress_pa, r.time_s);
  std::printf("  results: %s\n", file.c_str());
  std::printf("\n%s", kCautionLines);
}
}  // namespace

int cmd_run(const CommonOptions& opt, std::string output, const std::string& resume) {
  const Scenario sc = load_scenario(opt.scenario, opt.overrides);
  if (!sc.simulation.given)
    throw InputError("error: " + sc.where + ": simulation: missing: `hawser run` needs a simulation "
                     "block (duration, output_interval; see `hawser keys`)\n");
  std::unique_ptr<ResumePoint> point;
  if (!resume.empty()) {
    if (!output.empty() && output != resume)
      throw InputError("error: --resume " + resume + " continues that file; -o " + output +
                       " names another (give one of them)\n");
    output = resume;
    point = std::make_unique<ResumePoint>(read_resume_point(resume));
    if (point->scenario_text != sc.text_as_run)
      throw InputError("error: " + resume + ": cannot resume: it was started from another scenario "
                       "(or other --set values) than " + opt.scenario + "\n");
  }
  if (output.empty()) output = default_output(opt.scenario);
  const TetherModel model = build_model(sc);
  TetherSystem system(model);
  std::vector<double> y0;
  if (point) {
    if (point->checkpoint.state.size() != system.layout().size())
      throw InputError("error: " + resume + ": cannot resume: its state does not fit this model\n");
  } else {
    y0 = initial_state(system, sc.initial);
  }
  if (!point && sc.initial.mode_index > 0) {
    // Start in a mode of the linearised tether (the check run of a modal analysis).
    ModalOptions mo;
    mo.modes = sc.initial.mode_index;
    const ModalResult modes = modal_analysis(model, mo);
    if (static_cast<int>(modes.modes.size()) < sc.initial.mode_index)
      throw InputError("error: " + sc.initial.mode_where + ": initial.mode.index: only " +
                       std::to_string(modes.modes.size()) + " modes found\n");
    const Mode& m = modes.modes[static_cast<std::size_t>(sc.initial.mode_index - 1)];
    const std::vector<double> ym = mode_initial_state(system, m, sc.initial.mode_amplitude_m);
    for (std::size_t i = 0; i < y0.size(); ++i) y0[i] += ym[i];
    std::printf("starting in mode %d: period %.6g s (%.4g h), %s, amplitude %.6g m\n", sc.initial.mode_index,
                m.period_s, m.period_s / 3600.0, mode_kind_name(m.kind), sc.initial.mode_amplitude_m);
  }
  RunOptions ro = run_options(sc.simulation, system.layout());
  ro.flush.wall_interval_s = sc.output.flush_interval_s;
  ro.flush.every_outputs = sc.output.flush_every;
  ro.progress = stderr_is_terminal();
  if (point) {
    ro.resume = &point->checkpoint;
    std::printf("resuming %s at t = %.6g s (%.4g h), after %zu outputs\n", output.c_str(),
                point->checkpoint.time_s, point->checkpoint.time_s / 3600.0,
                point->checkpoint.summary.outputs);
  }
  ResultRecorder recorder(output, sc, model, output_nodes(model.nodes(), sc.output), point.get());
  const RunSummary summary = run_simulation(system, y0, ro, recorder);
  recorder.finish(summary);
  print_summary(summary, output);
  if (summary.status == RunStatus::stopped) return 3;
  if (summary.status == RunStatus::failed) return 4;
  return 0;
}

}  // namespace hawser
