#include "solver/output/result_recorder.hpp"

#include <algorithm>
#include <cmath>
#include <ctime>
#include <memory>
#include <stdexcept>

#include "solver/input/errors.hpp"
#include "solver/output/caution.hpp"
#include "solver/output/h5_reader.hpp"
#include "solver/output/xdmf_description.hpp"

namespace hawser {

namespace {

// Fields of RunSummary kept in /checkpoint, so a resumed run's summary continues this one's.
struct SummaryReal {
  const char* name;
  double RunSummary::*field;
};
struct SummaryCount {
  const char* name;
  std::size_t RunSummary::*field;
};
const SummaryReal kSummaryReals[] = {
    {"peak_tension_n", &RunSummary::peak_tension_n},
    {"peak_tension_time_s", &RunSummary::peak_tension_time_s},
    {"min_tension_n", &RunSummary::min_tension_n},
    {"min_tension_time_s", &RunSummary::min_tension_time_s},
    {"min_safety_factor", &RunSummary::min_safety_factor},
    {"min_safety_factor_time_s", &RunSummary::min_safety_factor_time_s},
    {"peak_east_west_m", &RunSummary::peak_east_west_m},
    {"peak_east_west_time_s", &RunSummary::peak_east_west_time_s},
    {"peak_north_south_m", &RunSummary::peak_north_south_m},
    {"peak_north_south_time_s", &RunSummary::peak_north_south_time_s},
    {"first_slack_time_s", &RunSummary::first_slack_time_s},
};
const SummaryCount kSummaryCounts[] = {
    {"outputs", &RunSummary::outputs},
    {"peak_tension_element", &RunSummary::peak_tension_element},
    {"min_tension_element", &RunSummary::min_tension_element},
    {"min_safety_factor_element", &RunSummary::min_safety_factor_element},
    {"peak_east_west_node", &RunSummary::peak_east_west_node},
    {"peak_north_south_node", &RunSummary::peak_north_south_node},
    {"max_slack_elements", &RunSummary::max_slack_elements},
};
const char* const kCheckpoint = "/checkpoint";

std::string xdmf_path(const std::string& h5_path) {
  const auto dot = h5_path.rfind('.');
  const auto slash = h5_path.rfind('/');
  const bool has_ext = dot != std::string::npos && (slash == std::string::npos || dot > slash);
  return (has_ext ? h5_path.substr(0, dot) : h5_path) + ".xmf";
}

H5Writer open_writer(const std::string& path, const Scenario& sc, const ResumePoint* resume) {
  H5Writer::Options o;
  o.deflate_level = sc.output.deflate_level;
  return resume ? H5Writer::resume(path, o, "/time") : H5Writer::create(path, o);
}

}  // namespace

ResumePoint read_resume_point(const std::string& path) {
  const auto refuse = [&path](const std::string& why) {
    return InputError("error: " + path + ": cannot resume: " + why + "\n");
  };
  std::unique_ptr<H5Reader> file;
  try {
    file = std::make_unique<H5Reader>(path);
  } catch (const LibraryError&) {
    throw refuse("not a readable HDF5 file");
  }
  if (!file->has(kCheckpoint))
    throw refuse("it holds no checkpoint (a finished run, or not a hawser result file)");
  if (!file->has("/input/scenario")) throw refuse("no /input/scenario");
  ResumePoint p;
  p.scenario_text = file->text("/input/scenario");
  RunCheckpoint& c = p.checkpoint;
  c.time_s = file->attribute_double(kCheckpoint, "time_s");
  c.next_output = static_cast<long>(file->attribute_integer(kCheckpoint, "next_output"));
  c.state = file->doubles(std::string(kCheckpoint) + "/state");
  p.model_peaks = file->doubles(std::string(kCheckpoint) + "/model_peaks");
  const std::string g = std::string(kCheckpoint) + "/summary";
  for (const SummaryReal& f : kSummaryReals) c.summary.*f.field = file->attribute_double(g, f.name);
  for (const SummaryCount& f : kSummaryCounts)
    c.summary.*f.field = static_cast<std::size_t>(file->attribute_integer(g, f.name));
  const std::vector<double> rt = file->doubles(g + "/rupture_time");
  const std::vector<long long> re = file->integers(g + "/rupture_element");
  const std::vector<double> rs = file->doubles(g + "/rupture_stress");
  for (std::size_t i = 0; i < rt.size() && i < re.size() && i < rs.size(); ++i)
    c.summary.ruptures.push_back({rt[i], static_cast<std::size_t>(re[i]), rs[i]});
  p.times_s = file->doubles("/time");
  if (p.times_s.size() != c.summary.outputs)
    throw refuse("its checkpoint does not match its time series");
  return p;
}

ResultRecorder::ResultRecorder(const std::string& path, const Scenario& sc, const TetherModel& model,
                               std::vector<std::size_t> nodes, const ResumePoint* resume)
    : path_(path), file_(open_writer(path, sc, resume)), model_(model), nodes_(std::move(nodes)) {
  scenario_safety_factor_ = sc.tether.safety_factor;
  write_fixed(sc, model);
  const std::size_t n = model.elements(), k = nodes_.size();
  time_ = series("/time", {});
  position_ = series("/nodes/position", {k, 3});
  velocity_ = series("/nodes/velocity", {k, 3});
  tension_ = series("/elements/tension", {n});
  kinetic_ = series("/energy/kinetic", {});
  potential_ = series("/energy/potential", {});
  strain_ = series("/energy/strain", {});
  dissipated_ = series("/energy/dissipated", {});
  angular_momentum_ = series("/energy/angular_momentum_z", {});
  anchor_force_ = series("/anchor/force", {3});
  angular_impulse_ = series("/anchor/angular_impulse_z", {});
  // Time histories the force models offer (wind, drag, tides, climbers, ...).
  std::size_t peak_index = 0;
  for (const ForceModel* m : model.forces()) {
    ModelSeries ms{m, m->output_fields(nodes_), {}, {}};
    for (const OutputField& f : ms.fields) {
      std::vector<hsize_t> dims(f.row_dims.begin(), f.row_dims.end());
      if (f.units != layout_.dataset_units(f.path))
        throw std::logic_error(m->name() + ": output " + f.path + " in " + f.units +
                               ", the result layout says " + layout_.dataset_units(f.path));
      ms.ids.push_back(series(f.path, dims));
      ms.peaks.push_back(resume && peak_index < resume->model_peaks.size()
                             ? resume->model_peaks[peak_index]
                             : 0.0);
      ++peak_index;
    }
    if (!ms.fields.empty()) model_series_.push_back(std::move(ms));
  }
  if (resume) {
    if (peak_index != resume->model_peaks.size())
      throw InputError("error: " + path + ": cannot resume: its checkpoint has other outputs "
                       "(not the same run)\n");
    times_ = resume->times_s;
    const std::time_t now = std::time(nullptr);
    char stamp[64];
    std::strftime(stamp, sizeof stamp, "%Y-%m-%dT%H:%M:%SZ", std::gmtime(&now));
    file_.set_attribute("/", "resumed", stamp);
    file_.set_attribute("/", "resumed_from_time_s", resume->checkpoint.time_s);  // s (layout)
  }
}

void ResultRecorder::write_fixed(const Scenario& sc, const TetherModel& model) {
  const std::size_t n = model.elements(), nn = model.nodes(), k = nodes_.size();
  file_.set_attribute("/", "format", layout_.format());
  file_.set_attribute("/", "format_version", layout_.format_version());
  file_.set_attribute("/", "caution", kCaution);
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

  array("/mesh/s0", {nn}, model.equilibrium.s0_m.data());
  array("/mesh/node_mass", {nn}, model.mesh.node_mass.data());
  array("/mesh/element_area", {n}, model.mesh.element_area.data());
  array("/mesh/element_L0", {n}, model.equilibrium.l0_m.data());
  value("/mesh", "counterweight_mass_kg", model.mesh.counterweight_mass);
  value("/mesh", "reference_radius_m", model.reference_radius_m);
  value("/mesh", "ultimate_strength_pa", model.ultimate_strength_pa);
  // Eigen stores (3, N+1) column-major: that is (N+1, 3) row-major, as the contract wants.
  array("/equilibrium/position", {nn, 3}, model.mesh.position.data());
  array("/equilibrium/tension", {n}, model.equilibrium.tension_n.data());
  // The static state above is the as-built tether under the load case named here;
  // /mesh keeps the as-built (unloaded) geometry and tensions the L0 were made for.
  value("/equilibrium", "load_case", model.equilibrium.load_case);
  value("/equilibrium", "newton_iterations",
        static_cast<long long>(model.equilibrium.newton_iterations));
  value("/equilibrium", "load_steps", static_cast<long long>(model.equilibrium.load_steps));
  value("/equilibrium", "residual_n", model.equilibrium.residual_n);
  value("/equilibrium", "fold_load_factor", model.equilibrium.fold_load_factor);
  value("/equilibrium", "relax_iterations",
        static_cast<long long>(model.equilibrium.relax_iterations));
  array("/mesh/as_built_position", {nn, 3}, model.mesh.as_built_position.data());
  array("/mesh/as_built_tension", {n}, model.equilibrium.as_built_tension_n.data());
  value("/mesh", "as_built_counterweight_mass_kg", model.mesh.as_built_counterweight_kg);
  std::vector<long long> idx(nodes_.begin(), nodes_.end());
  array("/nodes/index", {k}, idx.data());
  // Output nodes joined in order, for viewers (the .xmf's polyline topology).
  std::vector<long long> polyline;
  for (std::size_t i = 0; i + 1 < k; ++i) {
    polyline.push_back(static_cast<long long>(i));
    polyline.push_back(static_cast<long long>(i + 1));
  }
  array("/nodes/polyline", {k > 0 ? k - 1 : 0, 2}, polyline.data());
  file_.set_attribute("/nodes/polyline", "meaning",
                      "pairs of rows of /nodes/index joined by a straight segment (for viewers)");
  file_.set_attribute("/energy", "meaning",
                      "rotating-frame kinetic energy, potential of gravity and centrifugal force, strain energy "
                      "of taut elements, energy dissipated by damping since t = 0; angular momentum of the free "
                      "nodes about the spin axis in the inertial frame");
  file_.set_attribute("/anchor", "meaning",
                      "force: the pull of the tether on the anchor (element 0's tension along it); "
                      "angular_impulse_z: time integral of the anchor's torque on the tether about the spin axis");
  for (const ForceModel* m : model.forces())
    for (const OutputAttribute& a : m->output_attributes()) {
      if (a.text.empty())
        value(a.object_path, a.name, a.number);
      else
        value(a.object_path, a.name, a.text);
    }
  write_resolved(sc);
}

void ResultRecorder::write_resolved(const Scenario& sc) {
  // The planet and the material as resolved (SI), so that readers need no unit parser.
  if (!sc.field.uniform) {
    const Planet& p = sc.planet;
    const double r_sync_m = std::cbrt(p.gm_m3_s2 / (p.spin_rate_rad_s * p.spin_rate_rad_s));
    value("/planet", "name", p.name);
    value("/planet", "equatorial_radius_m", p.equatorial_radius_m);
    value("/planet", "gm_m3_per_s2", p.gm_m3_s2);
    value("/planet", "spin_rate_rad_per_s", p.spin_rate_rad_s);
    value("/planet", "j2", sc.j2 ? p.j2 : 0.0);
    value("/planet", "synchronous_radius_m", r_sync_m);
    value("/planet", "synchronous_altitude_m", r_sync_m - p.equatorial_radius_m);
  }
  const Material& mat = sc.material;
  value("/material", "name", mat.name);
  value("/material", "density_kg_per_m3", mat.density_kg_m3);
  value("/material", "youngs_modulus_pa", mat.youngs_modulus_pa);
  value("/material", "ultimate_strength_pa", mat.ultimate_strength_pa);
  value("/material", "damping_time_s", mat.damping_time_s);
  value("/material", "source", mat.source);
  if (sc.tether.safety_factor > 0.0) {
    value("/material", "design_safety_factor", sc.tether.safety_factor);
    value("/material", "design_stress_pa", mat.ultimate_strength_pa / sc.tether.safety_factor);
  }
  // Cuts and strikes, so that figures can mark them.
  std::vector<double> cut_t, cut_h, strike_t, strike_h;
  for (const CutSpec& c : sc.environment.cuts) {
    cut_t.push_back(c.time_s);
    cut_h.push_back(c.altitude_m ? *c.altitude_m : element_altitude_m(c.element.value_or(0)));
  }
  for (const StrikeSpec& s : sc.environment.strikes) {
    strike_t.push_back(s.time_s);
    strike_h.push_back(s.altitude_m ? *s.altitude_m : node_altitude_m(s.node.value_or(0)));
  }
  array("/events/cut_time", {cut_t.size()}, cut_t.data());
  array("/events/cut_altitude", {cut_h.size()}, cut_h.data());
  array("/events/strike_time", {strike_t.size()}, strike_t.data());
  array("/events/strike_altitude", {strike_h.size()}, strike_h.data());
}

double ResultRecorder::node_altitude_m(std::size_t node) const {
  const std::size_t k = std::min(node, model_.nodes() - 1);
  return model_.mesh.position.col(k).norm() - model_.reference_radius_m;
}

double ResultRecorder::element_altitude_m(std::size_t element) const {
  const std::size_t e = std::min(element, model_.elements() - 1);
  return 0.5 * (node_altitude_m(e) + node_altitude_m(e + 1));
}

void ResultRecorder::array(const std::string& path, const std::vector<hsize_t>& dims,
                           const double* data) {
  file_.write_array(path, dims, data, layout_.dataset_units(path));
}

void ResultRecorder::array(const std::string& path, const std::vector<hsize_t>& dims,
                           const long long* data) {
  file_.write_array(path, dims, data, layout_.dataset_units(path));
}

H5Writer::SeriesId ResultRecorder::series(const std::string& path,
                                          const std::vector<hsize_t>& dims) {
  return file_.create_series(path, dims, layout_.dataset_units(path));
}

// A value's unit goes to the attribute of the same name of the group's child `units`
// (attributes carry no attributes).
void ResultRecorder::value(const std::string& group, const std::string& name, double number) {
  file_.set_attribute(group, name, number);
  file_.set_attribute(group + "/units", name, layout_.value_units(group, name));
}

void ResultRecorder::value(const std::string& group, const std::string& name, long long number) {
  file_.set_attribute(group, name, number);
  file_.set_attribute(group + "/units", name, layout_.value_units(group, name));
}

void ResultRecorder::value(const std::string& group, const std::string& name,
                           const std::string& text) {
  file_.set_attribute(group, name, text);
  file_.set_attribute(group + "/units", name, layout_.value_units(group, name));
}

void ResultRecorder::record(double t, const Matrix3X& x, const Matrix3X& v, const TetherDiagnostics& d) {
  // Series are appended in creation order; /time was created first so that it is the last
  // to become visible at a flush (see h5_writer.hpp).
  file_.append(time_, &t, 1);
  times_.push_back(t);
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

void ResultRecorder::checkpoint(const RunCheckpoint& c) {
  const std::string g = kCheckpoint;
  file_.erase(g);
  file_.set_attribute(g, "meaning",
                      "where a killed run continues (hawser run --resume): the state at the last "
                      "output, the next output's index, the summary so far");
  value(g, "time_s", c.time_s);
  value(g, "next_output", static_cast<long long>(c.next_output));
  array(g + "/state", {c.state.size()}, c.state.data());
  file_.set_attribute(g + "/state", "meaning", "the integrator's state vector (SI units per component)");
  std::vector<double> peaks;
  for (const ModelSeries& ms : model_series_) peaks.insert(peaks.end(), ms.peaks.begin(), ms.peaks.end());
  array(g + "/model_peaks", {peaks.size()}, peaks.data());
  const std::string sg = g + "/summary";
  for (const SummaryReal& f : kSummaryReals) value(sg, f.name, c.summary.*f.field);
  for (const SummaryCount& f : kSummaryCounts)
    value(sg, f.name, static_cast<long long>(c.summary.*f.field));
  std::vector<double> rt, rs;
  std::vector<long long> re;
  for (const RuptureEvent& r : c.summary.ruptures) {
    rt.push_back(r.time_s);
    re.push_back(static_cast<long long>(r.element));
    rs.push_back(r.stress_pa);
  }
  array(sg + "/rupture_time", {rt.size()}, rt.data());
  array(sg + "/rupture_element", {re.size()}, re.data());
  array(sg + "/rupture_stress", {rs.size()}, rs.data());
}

void ResultRecorder::flush() {
  file_.flush();
  publish_xdmf();
}

void ResultRecorder::publish_xdmf() const {
  const std::size_t slash = path_.find_last_of('/');
  XdmfContent c;
  c.h5_name = slash == std::string::npos ? path_ : path_.substr(slash + 1);
  c.rows = times_.size();
  c.points = nodes_.size();
  c.elements = model_.elements();
  c.ultimate_strength_pa = model_.ultimate_strength_pa;
  c.times_s = times_.data();
  hawser::write_xdmf(xdmf_path(path_), c);
}

void ResultRecorder::finish(const RunSummary& s) {
  const std::string g = "/summary";
  using ll = long long;
  value(g, "status", std::string(to_string(s.status)));
  value(g, "message", s.message);
  value(g, "end_time_s", s.end_time_s);
  value(g, "wall_time_s", s.wall_s);
  value(g, "outputs", static_cast<ll>(s.outputs));
  if (scenario_safety_factor_ > 0.0) value(g, "design_safety_factor", scenario_safety_factor_);
  value(g, "peak_tension_n", s.peak_tension_n);
  value(g, "peak_tension_element", static_cast<ll>(s.peak_tension_element));
  value(g, "peak_tension_time_s", s.peak_tension_time_s);
  value(g, "peak_tension_altitude_m", element_altitude_m(s.peak_tension_element));
  value(g, "min_tension_n", s.min_tension_n);
  value(g, "min_tension_element", static_cast<ll>(s.min_tension_element));
  value(g, "min_tension_time_s", s.min_tension_time_s);
  value(g, "min_tension_altitude_m", element_altitude_m(s.min_tension_element));
  value(g, "min_safety_factor", s.min_safety_factor);
  value(g, "min_safety_factor_element", static_cast<ll>(s.min_safety_factor_element));
  value(g, "min_safety_factor_time_s", s.min_safety_factor_time_s);
  value(g, "min_safety_factor_altitude_m", element_altitude_m(s.min_safety_factor_element));
  value(g, "peak_east_west_m", s.peak_east_west_m);
  value(g, "peak_east_west_node", static_cast<ll>(s.peak_east_west_node));
  value(g, "peak_east_west_time_s", s.peak_east_west_time_s);
  value(g, "peak_east_west_altitude_m", node_altitude_m(s.peak_east_west_node));
  value(g, "peak_north_south_m", s.peak_north_south_m);
  value(g, "peak_north_south_node", static_cast<ll>(s.peak_north_south_node));
  value(g, "peak_north_south_time_s", s.peak_north_south_time_s);
  value(g, "peak_north_south_altitude_m", node_altitude_m(s.peak_north_south_node));
  value(g, "max_slack_elements", static_cast<ll>(s.max_slack_elements));
  value(g, "first_slack_time_s", s.first_slack_time_s);
  value(g, "ruptures", static_cast<ll>(s.ruptures.size()));
  for (const ModelSeries& ms : model_series_)
    for (std::size_t i = 0; i < ms.fields.size(); ++i)
      if (!ms.fields[i].summary_peak.empty()) value(g, ms.fields[i].summary_peak, ms.peaks[i]);
  if (!s.ruptures.empty()) {
    std::vector<double> t, st;
    std::vector<long long> el;
    for (const auto& r : s.ruptures) {
      t.push_back(r.time_s);
      el.push_back(static_cast<long long>(r.element));
      st.push_back(r.stress_pa);
    }
    array("/summary/rupture_time", {t.size()}, t.data());
    array("/summary/rupture_element", {el.size()}, el.data());
    array("/summary/rupture_stress", {st.size()}, st.data());
  }
  value(g, "steps", static_cast<ll>(s.stats.steps));
  value(g, "rhs_evals", static_cast<ll>(s.stats.rhs_evals));
  value(g, "jac_evals", static_cast<ll>(s.stats.jac_evals));
  value(g, "linear_setups", static_cast<ll>(s.stats.linear_setups));
  value(g, "error_test_failures", static_cast<ll>(s.stats.error_test_failures));
  value(g, "nonlinear_iterations", static_cast<ll>(s.stats.nonlinear_iterations));
  value(g, "nonlinear_failures", static_cast<ll>(s.stats.nonlinear_failures));
  value(g, "root_evals", static_cast<ll>(s.stats.root_evals));
  value(g, "last_step_s", s.stats.last_step_s);
  if (s.status == RunStatus::failed) {
    value(g, "failure_message", s.message);
    value(g, "failure_time_s", s.end_time_s);
    value(g, "failure_node", static_cast<ll>(s.failure_node));
  }
  file_.set_attribute("/", "status", std::string(to_string(s.status)));
  file_.erase(kCheckpoint);  // a finished run is not resumed
  file_.close();
  publish_xdmf();
}

}  // namespace hawser
