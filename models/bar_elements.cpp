#include "models/bar_elements.hpp"

#include <cmath>
#include <limits>
#include <stdexcept>

namespace hawser {

BarElements::BarElements(std::vector<double> ea_n, std::vector<double> l0_m, std::vector<double> tau_s)
    : ea_(std::move(ea_n)), l0_(std::move(l0_m)), c_(l0_.size()),
      cut_time_(l0_.size(), std::numeric_limits<double>::infinity()) {
  if (ea_.size() != l0_.size() || tau_s.size() != l0_.size())
    throw std::invalid_argument("BarElements: per-element arrays differ in length");
  for (std::size_t e = 0; e < l0_.size(); ++e) c_[e] = tau_s[e] * ea_[e] / l0_[e];
}

BarElements::Kinematics BarElements::kinematics(const TetherState& s, std::size_t e) const {
  Kinematics k;
  const Eigen::Vector3d d = s.x.col(e + 1) - s.x.col(e);
  k.w = s.v.col(e + 1) - s.v.col(e);
  k.l = d.norm();
  k.n = d / k.l;
  k.ldot = k.n.dot(k.w);
  k.tension = 0.0;
  if (k.l > l0_[e] && s.t < cut_time_[e]) {
    const double t = ea_[e] / l0_[e] * (k.l - l0_[e]) + c_[e] * k.ldot;
    if (t > 0.0) k.tension = t;
  }
  return k;
}

void BarElements::add_forces(const TetherState& s, Matrix3X& f) const { add_forces_and_dissipation(s, f); }

double BarElements::add_forces_and_dissipation(const TetherState& s, Matrix3X& f) const {
  double power = 0.0;
  for (std::size_t e = 0; e < l0_.size(); ++e) {
    const Kinematics k = kinematics(s, e);
    if (k.tension == 0.0) continue;
    const Eigen::Vector3d fe = k.tension * k.n;
    f.col(e) += fe;
    f.col(e + 1) -= fe;
    // The damping part of the tension, (T - elastic), does work -(T - elastic) ldot.
    if (c_[e] != 0.0) power += (k.tension - ea_[e] / l0_[e] * (k.l - l0_[e])) * k.ldot;
  }
  return power;
}

void BarElements::add_jacobian(const TetherState& s, NodeJacobian& j) const {
  const Eigen::Matrix3d I = Eigen::Matrix3d::Identity();
  for (std::size_t e = 0; e < l0_.size(); ++e) {
    const Kinematics k = kinematics(s, e);
    if (k.tension == 0.0) continue;
    const Eigen::Matrix3d nn = k.n * k.n.transpose();
    const Eigen::Matrix3d P = I - nn;  // projector normal to the element
    const double kax = ea_[e] / l0_[e];
    const Eigen::Matrix3d K = kax * nn + (k.tension / k.l) * P + (c_[e] / k.l) * k.n * (k.w.transpose() * P);
    const Eigen::Matrix3d C = c_[e] * nn;
    j.dx(e, e) -= K;
    j.dx(e, e + 1) += K;
    j.dx(e + 1, e) += K;
    j.dx(e + 1, e + 1) -= K;
    if (c_[e] != 0.0) {
      j.dv(e, e) -= C;
      j.dv(e, e + 1) += C;
      j.dv(e + 1, e) += C;
      j.dv(e + 1, e + 1) -= C;
    }
  }
}

void BarElements::cut(std::size_t e, double t_s) { cut_time_.at(e) = t_s; }

std::vector<double> BarElements::event_times() const {
  std::vector<double> t;
  for (double c : cut_time_)
    if (std::isfinite(c)) t.push_back(c);
  return t;
}

double BarElements::energy(const TetherState& s) const {
  double u = 0.0;
  for (std::size_t e = 0; e < l0_.size(); ++e) {
    if (s.t >= cut_time_[e]) continue;
    const double l = (s.x.col(e + 1) - s.x.col(e)).norm();
    if (l > l0_[e]) u += 0.5 * ea_[e] / l0_[e] * (l - l0_[e]) * (l - l0_[e]);
  }
  return u;
}

double BarElements::dissipated_power(const TetherState& s) const {
  Matrix3X scratch = Matrix3X::Zero(3, s.x.cols());
  return add_forces_and_dissipation(s, scratch);
}

void BarElements::tensions(const TetherState& s, std::vector<double>& t) const {
  t.resize(l0_.size());
  for (std::size_t e = 0; e < l0_.size(); ++e) t[e] = kinematics(s, e).tension;
}

}  // namespace hawser
