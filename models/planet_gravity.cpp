#include "models/planet_gravity.hpp"

#include <cmath>

namespace hawser {

PlanetGravity::PlanetGravity(const Planet& planet, bool include_j2)
    : gm_(planet.gm_m3_s2),
      p_(include_j2 ? 0.5 * planet.gm_m3_s2 * planet.j2 * planet.equatorial_radius_m * planet.equatorial_radius_m : 0.0),
      include_j2_(include_j2) {}

Eigen::Vector3d PlanetGravity::acceleration(const Eigen::Vector3d& r) const {
  const double r2 = r.squaredNorm(), rn = std::sqrt(r2), r3 = r2 * rn;
  Eigen::Vector3d g = -gm_ / r3 * r;
  if (p_ != 0.0) {
    const double z = r.z(), r5 = r3 * r2, r7 = r5 * r2;
    g += p_ * ((15.0 * z * z / r7 - 3.0 / r5) * r);
    g.z() -= p_ * 6.0 * z / r5;
  }
  return g;
}

Eigen::Matrix3d PlanetGravity::gradient(const Eigen::Vector3d& r) const {
  const double r2 = r.squaredNorm(), rn = std::sqrt(r2), r3 = r2 * rn, r5 = r3 * r2;
  const Eigen::Matrix3d I = Eigen::Matrix3d::Identity();
  const Eigen::Matrix3d rr = r * r.transpose();
  Eigen::Matrix3d G = -gm_ * (I / r3 - 3.0 * rr / r5);
  if (p_ != 0.0) {
    const double z = r.z(), r7 = r5 * r2, r9 = r7 * r2;
    const Eigen::Vector3d ez = Eigen::Vector3d::UnitZ();
    G += p_ * ((15.0 * z * z / r7 - 3.0 / r5) * I + (15.0 / r7 - 105.0 * z * z / r9) * rr -
               6.0 / r5 * ez * ez.transpose() + 30.0 * z / r7 * (r * ez.transpose() + ez * r.transpose()));
  }
  return G;
}

double PlanetGravity::potential(const Eigen::Vector3d& r) const {
  const double r2 = r.squaredNorm(), rn = std::sqrt(r2), r3 = r2 * rn;
  double u = -gm_ / rn;
  if (p_ != 0.0) u += p_ * (3.0 * r.z() * r.z() / (r3 * r2) - 1.0 / r3);
  return u;
}

void PlanetGravity::add_forces(const TetherState& s, Matrix3X& f) const {
  if (p_ != 0.0) {
    for (Eigen::Index i = 0; i < s.x.cols(); ++i) f.col(i) += s.mass[i] * acceleration(s.x.col(i));
    return;
  }
  // Point mass alone, the common case, on plain arrays: m g = -(m GM / r^3) r.
  const double* x = s.x.data();
  double* fp = f.data();
  for (Eigen::Index i = 0; i < s.x.cols(); ++i) {
    const double* r = x + 3 * i;
    const double r2 = r[0] * r[0] + r[1] * r[1] + r[2] * r[2];
    const double q = s.mass[i] * gm_ / (r2 * std::sqrt(r2));
    fp[3 * i] -= q * r[0];
    fp[3 * i + 1] -= q * r[1];
    fp[3 * i + 2] -= q * r[2];
  }
}

void PlanetGravity::add_jacobian(const TetherState& s, NodeJacobian& j) const {
  for (Eigen::Index i = 0; i < s.x.cols(); ++i) j.dx(i, i) += s.mass[i] * gradient(s.x.col(i));
}

double PlanetGravity::energy(const TetherState& s) const {
  double e = 0.0;
  for (Eigen::Index i = 0; i < s.x.cols(); ++i) e += s.mass[i] * potential(s.x.col(i));
  return e;
}

}  // namespace hawser
