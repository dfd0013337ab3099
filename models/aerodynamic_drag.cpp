#include "models/aerodynamic_drag.hpp"

#include <cmath>
#include <limits>
#include <stdexcept>

namespace hawser {

AirDensity::AirDensity(bool standard, double rho)
    : standard_(standard), uniform_kg_m3_(rho), airless_m_(std::numeric_limits<double>::infinity()) {
  if (!standard_) return;
  // The extended standard atmosphere falls monotonically; find once where it drops below
  // kVacuumDensity, so that the many elements above cost nothing.
  double lo = 86000.0, hi = 1e9;
  if (atmosphere_.at(hi).density_kg_m3 >= kVacuumDensity) return;
  while (hi - lo > 1.0) {
    const double mid = 0.5 * (lo + hi);
    (atmosphere_.at(mid).density_kg_m3 >= kVacuumDensity ? lo : hi) = mid;
  }
  airless_m_ = hi;
}

AirDensity AirDensity::us1976() { return AirDensity(true, 0.0); }

AirDensity AirDensity::uniform(double density_kg_m3) {
  if (!(density_kg_m3 >= 0.0) || !std::isfinite(density_kg_m3))
    throw std::invalid_argument("AirDensity: uniform density must be finite and >= 0");
  return AirDensity(false, density_kg_m3);
}

double AirDensity::at(double h) const {
  if (!standard_) return uniform_kg_m3_;
  return h >= airless_m_ ? 0.0 : atmosphere_.at(h).density_kg_m3;
}

struct AerodynamicDrag::Element {
  Eigen::Vector3d n, w, a, east, e1;
  double l = 0.0, a_norm = 0.0, b_norm = 0.0, c = 0.0;  // c = rho Cd / 2 [kg/m^3]
  double p_scale = 0.0;  // D = p_scale P (+ face_extra e1 e1^T when `faces`) [m]
  double face_extra = 0.0;  // W - t [m]
  bool faces = false;  // ribbon with a defined face normal e1
  /// g = D w [m^2/s], without forming D.
  Eigen::Vector3d width_times_wind() const {
    Eigen::Vector3d g = p_scale * a;
    if (faces) g += face_extra * e1.dot(w) * e1;
    return g;
  }
};

AerodynamicDrag::AerodynamicDrag(std::vector<DragSection> sections, double cd, AirDensity air,
                                 std::shared_ptr<const WindField> wind)
    : sections_(std::move(sections)), cd_(cd), air_(std::move(air)), wind_(std::move(wind)) {
  if (!(cd_ >= 0.0) || !std::isfinite(cd_)) throw std::invalid_argument("AerodynamicDrag: Cd must be finite and >= 0");
  if (!wind_) throw std::invalid_argument("AerodynamicDrag: needs a wind field (calm air is an empty one)");
  for (const DragSection& s : sections_)
    if (!(s.width_m >= s.thickness_m) || !(s.thickness_m >= 0.0))
      throw std::invalid_argument("AerodynamicDrag: a section needs width >= thickness >= 0");
}

AerodynamicDrag::Air AerodynamicDrag::air_at(const Eigen::Vector3d& r, double t) const {
  const double h = wind_->frame().altitude(r);
  const double rho = air_.at(h);
  if (rho <= 0.0 || wind_->calm()) return {rho, Eigen::Vector3d::Zero()};
  return {rho, wind_->frame().enu_axes(r) * wind_->velocity_enu(h, t)};
}

bool AerodynamicDrag::element(const TetherState& s, std::size_t e, Element& el) const {
  const auto i = static_cast<Eigen::Index>(e);
  const Eigen::Vector3d mid = 0.5 * (s.x.col(i) + s.x.col(i + 1));
  const AltitudeFrame& frame = wind_->frame();
  const double h = frame.altitude(mid);
  const double rho = air_.at(h);
  if (!(rho > 0.0)) return false;
  const Eigen::Vector3d d = s.x.col(i + 1) - s.x.col(i);
  el.l = d.norm();
  if (!(el.l > 0.0)) return false;
  el.n = d / el.l;
  const Eigen::Matrix3d axes = frame.enu_axes(mid);
  const Eigen::Vector3d u = wind_->calm() ? Eigen::Vector3d::Zero() : Eigen::Vector3d(axes * wind_->velocity_enu(h, s.t));
  el.w = u - 0.5 * (s.v.col(i) + s.v.col(i + 1));
  el.a = el.w - el.n.dot(el.w) * el.n;  // P w
  el.a_norm = el.a.norm();
  el.c = 0.5 * rho * cd_;
  const DragSection& sec = sections_[e];
  el.p_scale = sec.thickness_m;
  el.face_extra = sec.width_m - sec.thickness_m;
  el.faces = false;
  if (sec.width_m != sec.thickness_m) {
    el.east = axes.col(0);
    const Eigen::Vector3d b = el.east - el.n.dot(el.east) * el.n;  // P east
    el.b_norm = b.norm();
    if (el.b_norm > 1e-12) {
      el.e1 = b / el.b_norm;
      el.faces = true;
    } else {
      el.p_scale = sec.width_m;  // an element lying east-west has no face normal: take the width
    }
  }
  return true;
}

Eigen::Vector3d AerodynamicDrag::element_force(const TetherState& s, std::size_t e) const {
  Element el;
  if (!in_air(s, e, air_top()) || !element(s, e, el)) return Eigen::Vector3d::Zero();
  return el.c * el.l * el.a_norm * el.width_times_wind();
}

void AerodynamicDrag::add_forces(const TetherState& s, Matrix3X& f) const {
  const AltitudeFrame::Level top = air_top();
  for (std::size_t e = 0; e < sections_.size(); ++e) {
    if (!in_air(s, e, top)) continue;
    Element el;
    if (!element(s, e, el)) continue;
    const Eigen::Vector3d half = 0.5 * el.c * el.l * el.a_norm * el.width_times_wind();
    f.col(static_cast<Eigen::Index>(e)) += half;
    f.col(static_cast<Eigen::Index>(e + 1)) += half;
  }
}

void AerodynamicDrag::add_jacobian(const TetherState& s, NodeJacobian& jac) const {
  const Eigen::Matrix3d id = Eigen::Matrix3d::Identity();
  const AltitudeFrame::Level top = air_top();
  for (std::size_t e = 0; e < sections_.size(); ++e) {
    if (!in_air(s, e, top)) continue;
    Element el;
    if (!element(s, e, el) || !(el.a_norm > 0.0)) continue;
    const Eigen::Matrix3d p = id - el.n * el.n.transpose();
    Eigen::Matrix3d d = el.p_scale * p;
    if (el.faces) d += el.face_extra * el.e1 * el.e1.transpose();
    const Eigen::Vector3d g = el.width_times_wind();
    // Velocities: dF_e/dw, and w falls by half of each end node's velocity.
    const Eigen::Matrix3d df_dw = el.c * el.l * (g * el.a.transpose() / el.a_norm + el.a_norm * d);
    // Positions, through the element's length and direction.
    const double nw = el.n.dot(el.w);
    const Eigen::Matrix3d da_dd = -(nw * id + el.n * el.w.transpose()) * p / el.l;
    const Eigen::RowVector3d dan_dd = -nw * el.a.transpose() / (el.l * el.a_norm);
    Eigen::Matrix3d dg_dd = el.p_scale * da_dd;
    if (el.faces) {
      const double ne = el.n.dot(el.east);
      const Eigen::Matrix3d db_dd = -(ne * id + el.n * el.east.transpose()) * p / el.l;
      const Eigen::Matrix3d de1_dd = (id - el.e1 * el.e1.transpose()) * db_dd / el.b_norm;
      dg_dd += el.face_extra * (el.e1.dot(el.w) * id + el.e1 * el.w.transpose()) * de1_dd;
    }
    const Eigen::Matrix3d df_dd =
        el.c * (el.a_norm * g * el.n.transpose() + el.l * g * dan_dd + el.l * el.a_norm * dg_dd);
    for (std::size_t node : {e, e + 1}) {
      jac.dv(node, e) -= 0.25 * df_dw;
      jac.dv(node, e + 1) -= 0.25 * df_dw;
      jac.dx(node, e + 1) += 0.5 * df_dd;
      jac.dx(node, e) -= 0.5 * df_dd;
    }
  }
}

std::vector<OutputField> AerodynamicDrag::output_fields(const std::vector<std::size_t>& nodes) const {
  const std::size_t k = nodes.size(), n = sections_.size();
  return {{"/environment/wind", {k, 3}, "m/s", ""},
          {"/environment/air_density", {k}, "kg/m^3", ""},
          {"/environment/drag_force", {n, 3}, "N", ""},
          {"/environment/drag_load", {n}, "N/m", "peak_aerodynamic_load_n_per_m"}};
}

void AerodynamicDrag::sample_outputs(const TetherState& s, const std::vector<std::size_t>& nodes,
                                     std::vector<std::vector<double>>& rows) const {
  std::vector<double>& wind = rows[0];
  std::vector<double>& density = rows[1];
  std::vector<double>& force = rows[2];
  std::vector<double>& load = rows[3];
  for (std::size_t k : nodes) {
    const Air air = air_at(s.x.col(static_cast<Eigen::Index>(k)), s.t);
    for (int a = 0; a < 3; ++a) wind.push_back(air.wind_m_s[a]);
    density.push_back(air.density_kg_m3);
  }
  for (std::size_t e = 0; e < sections_.size(); ++e) {
    const Eigen::Vector3d fe = element_force(s, e);
    for (int a = 0; a < 3; ++a) force.push_back(fe[a]);
    const auto i = static_cast<Eigen::Index>(e);
    const double l = (s.x.col(i + 1) - s.x.col(i)).norm();
    load.push_back(l > 0.0 ? fe.norm() / l : 0.0);
  }
}

}  // namespace hawser
