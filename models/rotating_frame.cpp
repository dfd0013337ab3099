#include "models/rotating_frame.hpp"

namespace hawser {

void RotatingFrame::add_forces(const TetherState& s, Matrix3X& f) const {
  const double w2 = omega_ * omega_, w_twice = 2.0 * omega_;
  const double* x = s.x.data();  // column-major, 3 values per node
  const double* v = s.v.data();
  const double* m = s.mass.data();
  double* fp = f.data();
  for (Eigen::Index i = 0; i < s.x.cols(); ++i) {
    fp[3 * i] += m[i] * (w2 * x[3 * i] + w_twice * v[3 * i + 1]);
    fp[3 * i + 1] += m[i] * (w2 * x[3 * i + 1] - w_twice * v[3 * i]);
  }
}

void RotatingFrame::add_jacobian(const TetherState& s, NodeJacobian& j) const {
  const double w2 = omega_ * omega_;
  for (Eigen::Index i = 0; i < s.x.cols(); ++i) {
    const double m = s.mass[i];
    j.dx(i, i)(0, 0) += m * w2;
    j.dx(i, i)(1, 1) += m * w2;
    j.dv(i, i)(0, 1) += 2.0 * m * omega_;
    j.dv(i, i)(1, 0) -= 2.0 * m * omega_;
  }
}

double RotatingFrame::energy(const TetherState& s) const {
  double e = 0.0;
  for (Eigen::Index i = 0; i < s.x.cols(); ++i)
    e -= 0.5 * s.mass[i] * omega_ * omega_ * (s.x(0, i) * s.x(0, i) + s.x(1, i) * s.x(1, i));
  return e;
}

}  // namespace hawser
