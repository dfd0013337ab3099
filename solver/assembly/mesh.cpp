#include "solver/assembly/mesh.hpp"

#include <boost/math/quadrature/gauss.hpp>
#include <cmath>
#include <stdexcept>

#include "models/taper_design.hpp"
#include "solver/input/scenario.hpp"

namespace hawser {

std::vector<double> graded_stations(double length, int n, bool geometric, double first) {
  std::vector<double> s(n + 1, 0.0);
  if (!geometric || n == 1 || std::abs(first * n - length) < 1e-12 * length) {
    for (int i = 0; i <= n; ++i) s[i] = length * i / n;
    return s;
  }
  if (first * n > length) throw std::invalid_argument("graded_stations: first element too long to grow");
  // Solve first (q^n - 1) / (q - 1) = length for q > 1 by bisection on log q (monotone).
  auto total = [&](double q) { return first * (std::pow(q, n) - 1.0) / (q - 1.0); };
  double lo = 1.0 + 1e-15, hi = 2.0;
  while (total(hi) < length) hi = 1.0 + 2.0 * (hi - 1.0);
  for (int it = 0; it < 200; ++it) {
    const double mid = 0.5 * (lo + hi);
    (total(mid) < length ? lo : hi) = mid;
  }
  const double q = 0.5 * (lo + hi);
  double h = first;
  for (int i = 1; i <= n; ++i, h *= q) s[i] = s[i - 1] + h;
  s[n] = length;  // exact end despite round-off
  return s;
}

Mesh build_planet_mesh(const TetherDesign& design, const MeshSpec& spec) {
  const double r0 = design.base_radius(), length = design.top_radius() - r0;
  const std::vector<double> st = graded_stations(length, spec.elements, spec.geometric, spec.first_element_length_m);
  const int n = spec.elements;
  Mesh m;
  m.position = Matrix3X::Zero(3, n + 1);
  m.node_mass = Eigen::VectorXd::Zero(n + 1);
  for (int i = 0; i <= n; ++i) m.position(0, i) = r0 + st[i];
  const double rho = design.material().density_kg_m3;
  for (int e = 0; e < n; ++e) {
    const double a = r0 + st[e], b = r0 + st[e + 1];
    // 10-point Gauss-Legendre per element: the area is smooth on the element's scale.
    const double area_integral =
        boost::math::quadrature::gauss<double, 10>::integrate([&](double r) { return design.area(r); }, a, b);
    m.element_mass.push_back(rho * area_integral);
    m.element_area.push_back(area_integral / (b - a));
    m.node_mass[e] += 0.5 * m.element_mass.back();
    m.node_mass[e + 1] += 0.5 * m.element_mass.back();
  }
  m.counterweight_mass = design.counterweight_mass();
  m.as_built_counterweight_kg = design.counterweight_mass();
  m.node_mass[n] += m.counterweight_mass;
  m.as_built_position = m.position;
  return m;
}

Mesh build_bench_mesh(const Material& material, const FieldSpec& field, const MeshSpec& spec) {
  const int n = spec.elements;
  const std::vector<double> st = graded_stations(field.cable_length_m, n, spec.geometric, spec.first_element_length_m);
  Mesh m;
  m.position = Matrix3X::Zero(3, n + 1);
  m.node_mass = Eigen::VectorXd::Zero(n + 1);
  for (int i = 0; i <= n; ++i) m.position(0, i) = st[i];
  for (int e = 0; e < n; ++e) {
    m.element_area.push_back(field.cable_area_m2);
    m.element_mass.push_back(material.density_kg_m3 * field.cable_area_m2 * (st[e + 1] - st[e]));
    m.node_mass[e] += 0.5 * m.element_mass.back();
    m.node_mass[e + 1] += 0.5 * m.element_mass.back();
  }
  m.far_end_fixed = field.far_end_fixed;
  m.as_built_position = m.position;
  return m;
}

std::vector<double> reference_distance(const Mesh& mesh) {
  std::vector<double> d(mesh.nodes());
  const Matrix3X& x = mesh.as_built_position;
  for (std::size_t k = 0; k < mesh.nodes(); ++k) d[k] = (x.col(k) - x.col(0)).norm();
  return d;
}

}  // namespace hawser
