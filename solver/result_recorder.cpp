#include "solver/result_recorder.hpp"

#include <cmath>
#include <ctime>
#include <stdexcept>

namespace hawser {

ResultRecorder::ResultRecorder(const std::string& path, const Scenario& sc, const TetherModel& model,
                               std::vector<std::size_t> nodes)
    : file_(H5Writer::create(path)), model_(model), nodes_(std::move(nodes)) {
  const std::size_t n = model.elements(), nn = model.nodes(), k = nodes_.size();
  file_.set_attribute("/", "format", "hawser-timehistory");
  file_.set_attribute("/", "format_version", 1);
  file_.set_attribute("/", "program_version", HAWSER_VERSION);
  file_.set_attribute("/", "status", "running");
  file_.set_attribute("/", "scenario_name", sc.name);
  file_.set_attribute("/", "frame",
                      sc.field.uniform ? "test bench: x along the cable from node 0, no rotation"
                                       : "planet-centred, rotating with the planet: x up at the anchor, y east, z north");
  const std::time_t now = std::time(nullptr);
  char stamp[64];
  std::strftime(stamp, sizeof stamp, "%Y-%m-%dT%H:%M:%SZ", std::gmtime(&now));
  file_.set_attribute("/", "created", stamp);
  file_.write_string("/input/scenario", sc.text_as_run);
  file_.set_attribute("/input/scenario", "units", "1");  // text: every dataset states its units
  file_.set_attribute("/input/scenario", "content", "the scenario as run (YAML), after --set");

  file_.write_array("/mesh/s0", {nn}, model.equilibrium.s0_m.data(), "m");
  file_.write_array("/mesh/node_mass", {nn}, model.mesh.node_mass.data(), "kg");
  file_.write_array("/mesh/element_area", {n}, model.mesh.element_area.data(), "m^2");
  file_.write_array("/mesh/element_L0", {n}, model.equilibrium.l0_m.data(), "m");
  file_.set_attribute("/mesh", "counterweight_mass_kg", model.mesh.counterweight_mass);
  file_.set_attribute("/mesh", "reference_radius_m", model.reference_radius_m);
  // Eigen stores (3, N+1) column-major: that is (N+1, 3) row-major, as the contract wants.
  file_.write_array("/equilibrium/position", {nn, 3}, model.mesh.position.data(), "m");
  file_.write_array("/equilibrium/tension", {n}, model.equilibrium.tension_n.data(), "N");
  // Issue 13: the static state above is the as-built tether under the load case named here;
  // /mesh keeps the as-built (unloaded) geometry and tensions the L0 were made for.
  file_.set_attribute("/equilibrium", "load_case", model.equilibrium.load_case);
  file_.set_attribute("/equilibrium", "newton_iterations", model.equilibrium.newton_iterations);
  file_.set_attribute("/equilibrium", "load_steps", model.equilibrium.load_steps);
  file_.set_attribute("/equilibrium", "residual_N", model.equilibrium.residual_n);
  file_.set_attribute("/equilibrium", "fold_load_factor", model.equilibrium.fold_load_factor);
  file_.set_attribute("/equilibrium", "relax_iterations", model.equilibrium.relax_iterations);
  file_.write_array("/mesh/as_built_position", {nn, 3}, model.mesh.as_built_position.data(), "m");
  file_.write_array("/mesh/as_built_tension", {n}, model.equilibrium.as_built_tension_n.data(),
                    "N");
  file_.set_attribute("/mesh", "as_built_counterweight_mass_kg",
                      model.mesh.as_built_counterweight_kg);
  std::vector<long long> idx(nodes_.begin(), nodes_.end());
  file_.write_array("/nodes/index", {k}, idx.data(), "1");

  time_ = file_.create_series("/time", {}, "s");
  position_ = file_.create_series("/nodes/position", {k, 3}, "m");
  velocity_ = file_.create_series("/nodes/velocity", {k, 3}, "m/s");
  tension_ = file_.create_series("/elements/tension", {n}, "N");
  kinetic_ = file_.create_series("/energy/kinetic", {}, "J");
  potential_ = file_.create_series("/energy/potential", {}, "J");
  strain_ = file_.create_series("/energy/strain", {}, "J");
  dissipated_ = file_.create_series("/energy/dissipated", {}, "J");
  angular_momentum_ = file_.create_series("/energy/angular_momentum_z", {}, "kg m^2/s");
  anchor_force_ = file_.create_series("/anchor/force", {3}, "N");
  angular_impulse_ = file_.create_series("/anchor/angular_impulse_z", {}, "N m s");
  // Time histories the force models offer (wind, drag, tides, climbers, ...).
  for (const ForceModel* m : model.forces()) {
    ModelSeries ms{m, m->output_fields(nodes_), {}, {}};
    for (const OutputField& f : ms.fields) {
      std::vector<hsize_t> dims(f.row_dims.begin(), f.row_dims.end());
      ms.ids.push_back(file_.create_series(f.path, dims, f.units));
    }
    ms.peaks.assign(ms.fields.size(), 0.0);
    if (!ms.fields.empty()) model_series_.push_back(std::move(ms));
  }
  file_.set_attribute("/energy", "meaning",
                      "rotating-frame kinetic energy, potential of gravity and centrifugal force, strain energy "
                      "of taut elements, energy dissipated by damping since t = 0; angular momentum of the free "
                      "nodes about the spin axis in the inertial frame");
  file_.set_attribute("/anchor", "meaning",
                      "force: the pull of the tether on the anchor (element 0's tension along it); "
                      "angular_impulse_z: time integral of the anchor's torque on the tether about the spin axis");
  file_.flush();
}

void ResultRecorder::record(double t, const Matrix3X& x, const Matrix3X& v, const TetherDiagnostics& d) {
  // Series are appended in creation order; /time was created first so that it is the last
  // to become visible at a flush (see h5_writer.hpp).
  file_.append(time_, &t, 1);
  row_.resize(3 * nodes_.size());
  for (std::size_t i = 0; i < nodes_.size(); ++i)
    for (int a = 0; a < 3; ++a) row_[3 * i + a] = x(a, nodes_[i]);
  file_.append(position_, row_.data(), 1);
  for (std::size_t i = 0; i < nodes_.size(); ++i)
    for (int a = 0; a < 3; ++a) row_[3 * i + a] = v(a, nodes_[i]);
  file_.append(velocity_, row_.data(), 1);
  file_.append(tension_, d.tension_n.data(), 1);
  file_.append(kinetic_, &d.kinetic_j, 1);
  file_.append(potential_, &d.potential_j, 1);
  file_.append(strain_, &d.strain_j, 1);
  file_.append(dissipated_, &d.dissipated_j, 1);
  file_.append(angular_momentum_, &d.angular_momentum_z, 1);
  file_.append(anchor_force_, d.anchor_force_n.data(), 1);
  file_.append(angular_impulse_, &d.anchor_angular_impulse, 1);
  if (model_series_.empty()) return;
  const TetherState state{t, x, v, model_.mesh.node_mass, d.acceleration.cols() ? &d.acceleration : nullptr};
  for (ModelSeries& ms : model_series_) {
    rows_.assign(ms.fields.size(), {});
    ms.model->sample_outputs(state, nodes_, rows_);
    for (std::size_t i = 0; i < ms.fields.size(); ++i) {
      std::size_t expected = 1;
      for (std::size_t dim : ms.fields[i].row_dims) expected *= dim;
      if (rows_[i].size() != expected)
        throw std::logic_error(ms.model->name() + ": output " + ms.fields[i].path + " has the wrong row size");
      for (double value : rows_[i]) ms.peaks[i] = std::max(ms.peaks[i], std::abs(value));
      file_.append(ms.ids[i], rows_[i].data(), 1);
    }
  }
}

void ResultRecorder::flush() { file_.flush(); }

void ResultRecorder::finish(const RunSummary& s) {
  const std::string g = "/summary";
  file_.set_attribute(g, "status", s.status);
  file_.set_attribute(g, "message", s.message);
  file_.set_attribute(g, "end_time_s", s.end_time_s);
  file_.set_attribute(g, "wall_time_s", s.wall_s);
  file_.set_attribute(g, "outputs", static_cast<long long>(s.outputs));
  file_.set_attribute(g, "peak_tension_N", s.peak_tension_n);
  file_.set_attribute(g, "peak_tension_element", static_cast<long long>(s.peak_tension_element));
  file_.set_attribute(g, "peak_tension_time_s", s.peak_tension_time_s);
  file_.set_attribute(g, "min_safety_factor", s.min_safety_factor);
  file_.set_attribute(g, "min_safety_factor_element", static_cast<long long>(s.min_safety_factor_element));
  file_.set_attribute(g, "min_safety_factor_time_s", s.min_safety_factor_time_s);
  file_.set_attribute(g, "peak_east_west_m", s.peak_east_west_m);
  file_.set_attribute(g, "peak_east_west_node", static_cast<long long>(s.peak_east_west_node));
  file_.set_attribute(g, "peak_east_west_time_s", s.peak_east_west_time_s);
  file_.set_attribute(g, "peak_north_south_m", s.peak_north_south_m);
  file_.set_attribute(g, "peak_north_south_node", static_cast<long long>(s.peak_north_south_node));
  file_.set_attribute(g, "peak_north_south_time_s", s.peak_north_south_time_s);
  file_.set_attribute(g, "max_slack_elements", static_cast<long long>(s.max_slack_elements));
  file_.set_attribute(g, "first_slack_time_s", s.first_slack_time_s);
  file_.set_attribute(g, "ruptures", static_cast<long long>(s.ruptures.size()));
  for (const ModelSeries& ms : model_series_)
    for (std::size_t i = 0; i < ms.fields.size(); ++i)
      if (!ms.fields[i].summary_peak.empty()) file_.set_attribute(g, ms.fields[i].summary_peak, ms.peaks[i]);
  if (!s.ruptures.empty()) {
    std::vector<double> t, st;
    std::vector<long long> el;
    for (const auto& r : s.ruptures) {
      t.push_back(r.time_s);
      el.push_back(static_cast<long long>(r.element));
      st.push_back(r.stress_pa);
    }
    file_.write_array("/summary/rupture_time", {t.size()}, t.data(), "s");
    file_.write_array("/summary/rupture_element", {el.size()}, el.data(), "1");
    file_.write_array("/summary/rupture_stress", {st.size()}, st.data(), "Pa");
  }
  file_.set_attribute(g, "steps", s.stats.steps);
  file_.set_attribute(g, "rhs_evals", s.stats.rhs_evals);
  file_.set_attribute(g, "jac_evals", s.stats.jac_evals);
  file_.set_attribute(g, "linear_setups", s.stats.linear_setups);
  file_.set_attribute(g, "error_test_failures", s.stats.error_test_failures);
  file_.set_attribute(g, "nonlinear_iterations", s.stats.nonlinear_iterations);
  file_.set_attribute(g, "nonlinear_failures", s.stats.nonlinear_failures);
  file_.set_attribute(g, "root_evals", s.stats.root_evals);
  file_.set_attribute(g, "last_step_s", s.stats.last_step_s);
  if (s.status == "failed") {
    file_.set_attribute(g, "failure_message", s.message);
    file_.set_attribute(g, "failure_time_s", s.end_time_s);
    file_.set_attribute(g, "failure_node", static_cast<long long>(s.failure_node));
  }
  file_.set_attribute("/", "status", s.status);
  file_.flush();
  file_.close();
}

}  // namespace hawser
