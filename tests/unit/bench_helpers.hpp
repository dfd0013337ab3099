#pragma once
// Helpers of the test-bench verification (test_bench_verification.cpp): the scenario text of
// a straight bench cable, one run kept in memory, and the signal measurements (modal
// coordinate, frequency from zero crossings, peaks for decay and pulse arrival).
//
// Bench geometry (solver/assembly/mesh.cpp): node k sits at x_k along +x from node 0, the suspension
// point; gravity pulls along +x; cable_length is the stretched length and node masses are
// rho A times the stretched length of the adjacent half-elements.
#include <algorithm>
#include <cmath>
#include <iomanip>
#include <memory>
#include <sstream>
#include <stdexcept>
#include <string>
#include <vector>

#include "memory_sink.hpp"
#include "solver/integration/initial_state.hpp"
#include "solver/input/scenario.hpp"
#include "solver/integration/simulation.hpp"
#include "solver/assembly/tether_model.hpp"

namespace hawser::testing::bench {

constexpr double pi = 3.14159265358979323846;

/// One bench cable and how to run it (SI units). Materials here are invented test values.
struct BenchSpec {
  double gravity_m_s2 = 0.0;
  double length_m = 1.0;
  double area_m2 = 1e-6;
  bool far_end_fixed = true;
  double pretension_n = 0.0;
  double density_kg_m3 = 1000.0;
  double youngs_modulus_pa = 1e9;
  double ultimate_strength_pa = 1e12;  // far above any stress of these runs
  double damping_time_s = 0.0;
  int elements = 50;
  double duration_s = 0.1;
  double output_interval_s = 1e-3;
  std::string method = "erk";
  double rtol = 1e-8;
  double atol_position_m = 1e-12;
  double atol_velocity_m_s = 1e-10;
  int max_order = 0;         // integrator order cap (RunOptions; not a scenario key); 0: default
  std::string initial_yaml;  // body of the `initial:` block (built with the helpers below), or ""
};

inline std::string number(double v) {
  std::ostringstream os;
  os << std::setprecision(17) << v;
  return os.str();
}

/// A half-sine displacement entry of the `initial:` block.
inline std::string displacement_entry(const std::string& direction, double amplitude_m, double from_m, double to_m) {
  return "    - {direction: " + direction + ", amplitude: " + number(amplitude_m) + ", from: " + number(from_m) +
         ", to: " + number(to_m) + "}\n";
}

/// sin(n pi x / L) over [0, L] as n half-sines of alternating sign, one per sub-interval.
inline std::string sine_mode_displacements(const std::string& direction, int n, double amplitude_m, double length_m) {
  std::string out = "  displacements:\n";
  for (int j = 0; j < n; ++j)
    out += displacement_entry(direction, (j % 2 == 0 ? 1.0 : -1.0) * amplitude_m, j * length_m / n,
                              (j + 1) * length_m / n);
  return out;
}

/// Kicks giving every node in [first, last] the velocity `speed_m_s[k]` along component `axis`.
inline std::string kick_entries(int axis, const std::vector<double>& speed_m_s, int first, int last) {
  std::string out = "  kicks:\n";
  for (int k = first; k <= last; ++k) {
    double v[3] = {0.0, 0.0, 0.0};
    v[axis] = speed_m_s[static_cast<std::size_t>(k)];
    out += "    - {node: " + std::to_string(k) + ", velocity: [" + number(v[0]) + ", " + number(v[1]) + ", " +
           number(v[2]) + "]}\n";
  }
  return out;
}

inline std::string scenario_text(const BenchSpec& s) {
  std::ostringstream y;
  y << "name: bench verification\n"
    << "material: {density: " << number(s.density_kg_m3) << ", youngs_modulus: " << number(s.youngs_modulus_pa)
    << ", ultimate_strength: " << number(s.ultimate_strength_pa) << ", damping_time: " << number(s.damping_time_s)
    << ", kind: invented}\n"
    << "field: {kind: uniform, gravity: " << number(s.gravity_m_s2) << ", cable_length: " << number(s.length_m)
    << ", cable_area: " << number(s.area_m2) << ", far_end: " << (s.far_end_fixed ? "fixed" : "free")
    << ", pretension: " << number(s.pretension_n) << "}\n"
    << "mesh: {elements: " << s.elements << "}\n"
    << "simulation: {duration: " << number(s.duration_s) << ", output_interval: " << number(s.output_interval_s)
    << ", method: " << s.method << ", rtol: " << number(s.rtol) << ", atol_position: " << number(s.atol_position_m)
    << ", atol_velocity: " << number(s.atol_velocity_m_s) << "}\n";
  if (!s.initial_yaml.empty()) y << "initial:\n" << s.initial_yaml;
  return y.str();
}

/// A finished run kept in memory, with the model it ran on.
struct BenchRun {
  Scenario scenario;
  TetherModel model;
  MemorySink sink;
  RunSummary summary;
  /// Distance of node k from node 0 along the reference cable [m].
  double x(std::size_t k) const { return model.mesh.position(0, static_cast<Eigen::Index>(k)); }
  std::size_t nodes() const { return model.nodes(); }
  /// Index of the last node that moves (the far end when free).
  std::size_t last_free() const { return model.far_end ? model.nodes() - 2 : model.nodes() - 1; }
};

inline std::unique_ptr<BenchRun> run_bench(const BenchSpec& spec) {
  auto r = std::make_unique<BenchRun>();
  r->scenario = load_scenario_text(scenario_text(spec), "bench.yaml", {});
  r->model = build_model(r->scenario);
  TetherSystem sys(r->model);
  const std::vector<double> y0 = initial_state(sys, r->scenario.initial);
  RunOptions opt = run_options(r->scenario.simulation, sys.layout());
  opt.integrator.max_order = spec.max_order;
  r->summary = run_simulation(sys, y0, opt, r->sink);
  return r;
}

/// Velocity component `axis` of node k at every output [m/s].
inline std::vector<double> node_velocity(const BenchRun& r, std::size_t k, int axis) {
  std::vector<double> v;
  for (const Matrix3X& vs : r.sink.v) v.push_back(vs(axis, static_cast<Eigen::Index>(k)));
  return v;
}

/// Mass-weighted projection of the displacement component `axis` on a shape phi (one value per
/// node) over the free nodes: q = sum m_k phi_k u_k / sum m_k phi_k^2 [m]. Modes of the
/// lumped-mass chain are M-orthogonal, so a shape near mode n filters out the others.
inline std::vector<double> modal_coordinate(const BenchRun& r, int axis, const std::vector<double>& phi) {
  const Eigen::VectorXd& m = r.model.mesh.node_mass;
  double norm = 0.0;
  for (std::size_t k = 1; k <= r.last_free(); ++k) norm += m[static_cast<Eigen::Index>(k)] * phi[k] * phi[k];
  std::vector<double> q;
  for (const Matrix3X& x : r.sink.x) {
    double s = 0.0;
    for (std::size_t k = 1; k <= r.last_free(); ++k) {
      const auto c = static_cast<Eigen::Index>(k);
      s += m[c] * phi[k] * (x(axis, c) - r.model.mesh.position(axis, c));
    }
    q.push_back(s / norm);
  }
  return q;
}

/// Times where q rises through zero, by linear interpolation between samples [s]. The
/// signals are displacements from the equilibrium, so they oscillate about zero (a level such
/// as the record's mean would bias the period of a decaying record).
inline std::vector<double> upward_crossings(const std::vector<double>& t, const std::vector<double>& q) {
  std::vector<double> out;
  for (std::size_t i = 1; i < q.size(); ++i) {
    const double a = q[i - 1], b = q[i];
    if (a < 0.0 && b >= 0.0) out.push_back(t[i - 1] + (t[i] - t[i - 1]) * a / (a - b));
  }
  return out;
}

/// Frequency of an oscillation [Hz]: the least-squares slope of the upward crossing times
/// against their count (t_j = t_0 + j P), f = 1 / P. Needs at least three crossings.
inline double crossing_frequency_hz(const std::vector<double>& t, const std::vector<double>& q) {
  const std::vector<double> c = upward_crossings(t, q);
  if (c.size() < 3) throw std::runtime_error("crossing_frequency_hz: fewer than three crossings");
  const double n = static_cast<double>(c.size());
  double sj = 0, st = 0, sjj = 0, sjt = 0;
  for (std::size_t j = 0; j < c.size(); ++j) {
    sj += j;
    st += c[j];
    sjj += static_cast<double>(j) * j;
    sjt += j * c[j];
  }
  const double period = (n * sjt - sj * st) / (n * sjj - sj * sj);
  return 1.0 / period;
}

struct Peak {
  double t_s, value;
};

/// Local maxima of q, each refined by the parabola through the three samples around it.
inline std::vector<Peak> maxima(const std::vector<double>& t, const std::vector<double>& q) {
  std::vector<Peak> out;
  for (std::size_t i = 1; i + 1 < q.size(); ++i) {
    if (!(q[i] > q[i - 1] && q[i] >= q[i + 1])) continue;
    // Uniform sampling h: vertex at offset d = h (q- - q+) / (2 (q- - 2 q0 + q+)).
    const double h = t[i] - t[i - 1];
    const double den = q[i - 1] - 2.0 * q[i] + q[i + 1];
    const double d = den != 0.0 ? 0.5 * (q[i - 1] - q[i + 1]) / den : 0.0;
    out.push_back({t[i] + d * h, q[i] - 0.25 * (q[i - 1] - q[i + 1]) * d});
  }
  return out;
}

/// The largest maximum of q (the peak of a passing pulse).
inline Peak highest_peak(const std::vector<double>& t, const std::vector<double>& q) {
  const std::vector<Peak> p = maxima(t, q);
  if (p.empty()) throw std::runtime_error("highest_peak: no maximum");
  return *std::max_element(p.begin(), p.end(), [](const Peak& a, const Peak& b) { return a.value < b.value; });
}

}  // namespace hawser::testing::bench
