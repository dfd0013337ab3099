#include "models/bar_elements.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace hawser {

BarElements::BarElements(std::vector<double> ea_n, std::vector<double> l0_m, std::vector<double> tau_s,
                         std::vector<double> cut_time_s)
    : ea_(std::move(ea_n)), l0_(std::move(l0_m)), k_(l0_.size()), c_(l0_.size()),
      cut_time_(std::move(cut_time_s)) {
  if (cut_time_.empty()) cut_time_.assign(l0_.size(), std::numeric_limits<double>::infinity());
  if (ea_.size() != l0_.size() || tau_s.size() != l0_.size() || cut_time_.size() != l0_.size())
    throw std::invalid_argument("BarElements: per-element arrays differ in length");
  for (std::size_t e = 0; e < l0_.size(); ++e) {
    k_[e] = ea_[e] / l0_[e];
    c_[e] = tau_s[e] * k_[e];
  }
}

BarElements::Kinematics BarElements::kinematics(const TetherState& s, std::size_t e) const {
  Kinematics k;
  const Eigen::Vector3d d = s.x.col(e + 1) - s.x.col(e);
  k.w = s.v.col(e + 1) - s.v.col(e);
  k.l = d.norm();
  k.n = d * (1.0 / k.l);  // one division, not three
  k.ldot = k.n.dot(k.w);
  k.tension = tension_law(e, k.l, k.ldot, s.t);
  return k;
}

void BarElements::add_forces(const TetherState& s, Matrix3X& f) const { add_forces_and_dissipation(s, f); }

double BarElements::add_forces_and_dissipation(const TetherState& s, Matrix3X& f) const {
  // The hottest loop of a run: plain arrays, one division and one square root per element.
  const double* x = s.x.data();
  const double* v = s.v.data();
  double* fp = f.data();
  double power = 0.0;
  for (std::size_t e = 0; e < l0_.size(); ++e) {
    const Chord ch = chord(x, e);
    const double l = std::sqrt(ch.l2);
    const double ldot = c_[e] != 0.0 ? stretch_rate(ch, v, e, l) : 0.0;
    const double tension = tension_law(e, l, ldot, s.t);
    if (tension == 0.0) continue;  // slack or cut: carries nothing
    // The damping part of the tension, (T - elastic), does work -(T - elastic) ldot.
    if (c_[e] != 0.0) power += (tension - k_[e] * (l - l0_[e])) * ldot;
    const double q = tension / l;  // T n = (T / l) d
    double* fa = fp + 3 * e;
    fa[0] += q * ch.d0;
    fa[1] += q * ch.d1;
    fa[2] += q * ch.d2;
    fa[3] -= q * ch.d0;
    fa[4] -= q * ch.d1;
    fa[5] -= q * ch.d2;
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

double BarElements::rupture_indicator(const TetherState& s, const std::vector<double>& capacity_n) const {
  const double* x = s.x.data();
  const double* v = s.v.data();
  double worst = -1.0;  // every element slack or cut
  for (std::size_t e = 0; e < l0_.size(); ++e) {
    if (s.t >= cut_time_[e]) continue;
    const Chord ch = chord(x, e);
    double g;
    if (c_[e] == 0.0) {
      const double lc = l0_[e] + capacity_n[e] / k_[e];
      g = ch.l2 / (lc * lc) - 1.0;
    } else {
      const double l = std::sqrt(ch.l2);
      g = tension_law(e, l, stretch_rate(ch, v, e, l), s.t) / capacity_n[e] - 1.0;
    }
    worst = std::max(worst, g);
  }
  return worst;
}

void BarElements::tensions(const TetherState& s, std::vector<double>& t) const {
  // The tension alone, without the element's direction.
  t.resize(l0_.size());
  const double* x = s.x.data();
  const double* v = s.v.data();
  for (std::size_t e = 0; e < l0_.size(); ++e) {
    const Chord ch = chord(x, e);
    const double l = std::sqrt(ch.l2);
    t[e] = tension_law(e, l, c_[e] != 0.0 ? stretch_rate(ch, v, e, l) : 0.0, s.t);
  }
}

}  // namespace hawser
