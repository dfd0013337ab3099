#pragma once
// Uniform gravity of the laboratory test bench: F = m g e, with e the unit vector along the
// reference cable pointing away from the suspension point (node 0). Potential -m g (e . x).
#include "models/force_model.hpp"

namespace hawser {

class UniformGravity : public ForceModel {
 public:
  UniformGravity(double g_m_s2, const Eigen::Vector3d& direction) : g_(g_m_s2), e_(direction.normalized()) {}
  std::string name() const override { return "uniform gravity"; }
  bool acts_on_point_masses() const override { return true; }
  void add_forces(const TetherState& s, Matrix3X& f) const override {
    for (Eigen::Index i = 0; i < s.x.cols(); ++i) f.col(i) += s.mass[i] * g_ * e_;
  }
  void add_jacobian(const TetherState&, NodeJacobian&) const override {}
  double energy(const TetherState& s) const override {
    double u = 0.0;
    for (Eigen::Index i = 0; i < s.x.cols(); ++i) u -= s.mass[i] * g_ * e_.dot(s.x.col(i));
    return u;
  }

 private:
  double g_;
  Eigen::Vector3d e_;
};

}  // namespace hawser
