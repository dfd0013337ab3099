#include "solver/cli/cmd_modes.hpp"

#include <chrono>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <sstream>

#include <nlohmann/json.hpp>

#include "solver/input/errors.hpp"
#include "solver/output/caution.hpp"
#include "solver/output/h5_writer.hpp"
#include "solver/integration/modal_analysis.hpp"
#include "solver/input/scenario.hpp"

namespace hawser {

namespace {

const char* frame_of(const Scenario& sc) {
  return sc.field.uniform ? "test bench: x along the cable from node 0, no rotation"
                          : "planet-centred, rotating with the planet: x up at the anchor, y east, z north";
}

std::string solver_line(const ModalResult& r) {
  std::ostringstream os;
  os << r.dofs << " degrees of freedom in " << r.block_dofs.size() << " decoupled block"
     << (r.block_dofs.size() == 1 ? "" : "s") << " (";
  for (std::size_t b = 0; b < r.block_dofs.size(); ++b)
    os << (b ? ", " : "") << r.block_dofs[b] << ": " << r.block_method[b];
  os << ")";
  return os.str();
}

std::string stiffness_line(const ModalResult& r) {
  if (r.stiffness_negative_directions == 0) return "positive definite (statically stable equilibrium)";
  if (r.stiffness_negative_directions < 0) return "not symmetric: its inertia was not checked";
  return std::to_string(r.stiffness_negative_directions) +
         " negative direction(s): the equilibrium stands only if the rotation stabilises it; "
         "a negative damping ratio below marks a growing mode";
}

std::string modes_table(const Scenario& sc, const TetherModel& model, const ModalResult& r, double wall_s) {
  std::ostringstream os;
  char buf[256];
  os << "hawser modes: " << sc.name << "\n";
  os << "  " << model.elements() << " elements, " << solver_line(r) << "\n";
  os << "  linearised about the static state: M q'' + (G + D) q' + K q = 0\n";
  os << "  static state: the as-built tether under " << model.equilibrium.load_case << "\n";
  os << "  tangent stiffness K: " << stiffness_line(r) << "\n";
  std::snprintf(buf, sizeof buf, "  largest backward error %.2g, %ld operator applications, wall %.3g s\n\n",
                r.max_backward_error, r.operator_applications, wall_s);
  os << buf;
  const bool bench = sc.field.uniform;
  os << "  mode      period [s]    period [h]  damping ratio  kind          largest motion at   "
        "kinetic energy fraction\n";
  os << "                                                                  "
     << (bench ? "from node 0 [m]     " : "altitude [km]       ") << "along  east-west  north-south\n";
  for (std::size_t i = 0; i < r.modes.size(); ++i) {
    const Mode& m = r.modes[i];
    const double where = bench ? m.peak_altitude_m : m.peak_altitude_m / 1e3;
    std::snprintf(buf, sizeof buf, "  %4zu  %14.7g %13.6g %14.4g  %-12s %14.6g %10.3f %10.3f %12.3f\n", i + 1,
                  m.period_s, m.period_s / 3600.0, m.damping_ratio + 0.0 /* no "-0" */, mode_kind_name(m.kind), where,
                  m.kinetic_fraction[0], m.kinetic_fraction[1], m.kinetic_fraction[2]);
    os << buf;
  }
  os << "\n  kind: the axis with the largest share of the mode's kinetic energy (along = x, east-west = y,\n"
        "  north-south = z). Damping ratio -Re(lambda)/|lambda|; period 2 pi/Im(lambda).\n";
  return os.str();
}

nlohmann::json finite_or_null(double v) { return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(); }

nlohmann::json modes_json(const Scenario& sc, const TetherModel& model, const ModalResult& r, double wall_s,
                          const std::string& output) {
  using nlohmann::json;
  json j;
  j["format"] = "hawser-modes";
  j["format_version"] = 1;
  j["scenario"] = sc.name;
  j["frame"] = frame_of(sc);
  j["elements"] = model.elements();
  j["degrees_of_freedom"] = r.dofs;
  j["blocks"] = json::array();
  for (std::size_t b = 0; b < r.block_dofs.size(); ++b)
    j["blocks"].push_back({{"degrees_of_freedom", r.block_dofs[b]}, {"method", r.block_method[b]}});
  j["stiffness_negative_directions"] = r.stiffness_negative_directions;  // -1: K not symmetric
  j["max_backward_error"] = r.max_backward_error;
  j["operator_applications"] = r.operator_applications;
  j["wall_s"] = wall_s;
  j["modes"] = json::array();
  for (std::size_t i = 0; i < r.modes.size(); ++i) {
    const Mode& m = r.modes[i];
    j["modes"].push_back({{"index", i + 1},
                          {"period_s", finite_or_null(m.period_s)},
                          {"frequency_hz", m.eigenvalue.imag() / (2 * M_PI)},
                          {"eigenvalue_real_per_s", m.eigenvalue.real()},
                          {"eigenvalue_imag_per_s", m.eigenvalue.imag()},
                          {"damping_ratio", m.damping_ratio},
                          {"kind", mode_kind_name(m.kind)},
                          {"kinetic_fraction",
                           {{"along", m.kinetic_fraction[0]},
                            {"east_west", m.kinetic_fraction[1]},
                            {"north_south", m.kinetic_fraction[2]}}},
                          {"largest_motion_node", m.peak_node},
                          {"largest_motion_altitude_m", m.peak_altitude_m}});
  }
  j["shapes_file"] = output.empty() ? json() : json(output);
  j["caution"] = kCaution;
  return j;
}

void write_modes_h5(const std::string& path, const Scenario& sc, const TetherModel& model, const ModalResult& r) {
  H5Writer f = H5Writer::create(path);
  const hsize_t k = r.modes.size(), nn = model.nodes(), ne = model.elements();
  f.set_attribute("/", "format", "hawser-modes");
  f.set_attribute("/", "format_version", 1);
  f.set_attribute("/", "program_version", HAWSER_VERSION);
  f.set_attribute("/", "scenario_name", sc.name);
  f.set_attribute("/", "caution", kCaution);
  f.set_attribute("/", "frame", frame_of(sc));
  f.write_string("/input/scenario", sc.text_as_run);
  f.write_array("/mesh/s0", {nn}, model.equilibrium.s0_m.data(), "m");
  f.write_array("/mesh/node_mass", {nn}, model.mesh.node_mass.data(), "kg");
  f.set_attribute("/mesh", "reference_radius_m", model.reference_radius_m);
  // Eigen's (3, N+1) column-major is the contract's (N+1, 3) row-major.
  f.write_array("/equilibrium/position", {nn, 3}, model.mesh.position.data(), "m");
  f.write_array("/equilibrium/tension", {ne}, model.equilibrium.tension_n.data(), "N");
  f.set_attribute("/equilibrium", "load_case", model.equilibrium.load_case);

  std::vector<double> period, freq, zeta, re, im, where, frac, shape_re, shape_im;
  std::vector<long long> kind, node;
  for (const Mode& m : r.modes) {
    period.push_back(m.period_s);
    freq.push_back(m.eigenvalue.imag() / (2 * M_PI));
    zeta.push_back(m.damping_ratio);
    re.push_back(m.eigenvalue.real());
    im.push_back(m.eigenvalue.imag());
    where.push_back(m.peak_altitude_m);
    kind.push_back(static_cast<long long>(m.kind));
    node.push_back(static_cast<long long>(m.peak_node));
    for (int a = 0; a < 3; ++a) frac.push_back(m.kinetic_fraction[a]);
    for (Eigen::Index i = 0; i < m.shape.cols(); ++i)
      for (int a = 0; a < 3; ++a) {
        shape_re.push_back(m.shape(a, i).real());
        shape_im.push_back(m.shape(a, i).imag());
      }
  }
  f.write_array("/modes/period", {k}, period.data(), "s");
  f.write_array("/modes/frequency", {k}, freq.data(), "Hz");
  f.write_array("/modes/damping_ratio", {k}, zeta.data(), "1");
  f.write_array("/modes/eigenvalue_real", {k}, re.data(), "1/s");
  f.write_array("/modes/eigenvalue_imag", {k}, im.data(), "1/s");
  f.write_array("/modes/kind", {k}, kind.data(), "1");
  f.set_attribute("/modes/kind", "codes", "0 along the tether (x), 1 east-west (y), 2 north-south (z)");
  f.write_array("/modes/kinetic_fraction", {k, 3}, frac.data(), "1");
  f.set_attribute("/modes/kinetic_fraction", "columns", "along (x), east-west (y), north-south (z)");
  f.write_array("/modes/largest_motion_altitude", {k}, where.data(), "m");
  f.write_array("/modes/largest_motion_node", {k}, node.data(), "1");
  f.write_array("/modes/shape_real", {k, nn, 3}, shape_re.data(), "m");
  f.write_array("/modes/shape_imag", {k, nn, 3}, shape_im.data(), "m");
  f.set_attribute("/modes", "meaning",
                  "lowest modes about the static equilibrium, lowest |lambda| first; node k of mode j moves as "
                  "Re((shape_real + i shape_imag)[j, k, :] exp(lambda_j t)) with lambda_j = eigenvalue_real + i "
                  "eigenvalue_imag; shapes scaled to a largest node amplitude of 1 m, prescribed nodes zero");
  f.set_attribute("/modes", "stiffness_negative_directions", r.stiffness_negative_directions);
  f.set_attribute("/modes", "max_backward_error", r.max_backward_error);
  f.close();
}

}  // namespace

int cmd_modes(const CommonOptions& opt, int k, const std::string& output, bool json) {
  if (k < 1) throw InputError("error: hawser modes: -k must be at least 1 (got " + std::to_string(k) + ")");
  const Scenario sc = load_scenario(opt.scenario, opt.overrides);
  const TetherModel model = build_model(sc);
  ModalOptions mo;
  mo.modes = k;
  const auto start = std::chrono::steady_clock::now();
  const ModalResult r = modal_analysis(model, mo);
  const double wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  if (!output.empty()) write_modes_h5(output, sc, model, r);
  if (json) {
    std::cout << modes_json(sc, model, r, wall_s, output).dump(1) << '\n';
  } else {
    std::cout << modes_table(sc, model, r, wall_s);
    if (!output.empty()) std::cout << "  shapes: " << output << "\n";
    std::cout << "\n" << kCautionLines;
  }
  return 0;
}

}  // namespace hawser
