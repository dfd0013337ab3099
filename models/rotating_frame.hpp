#pragma once
// Fictitious forces of the frame rotating with the planet at Omega = omega e_z:
//   centrifugal  F = -m Omega x (Omega x r) = m omega^2 (x, y, 0)
//   Coriolis     F = -2 m Omega x v        = 2 m omega (v_y, -v_x, 0)
// (Goldstein, Classical Mechanics, the equations of motion in a rotating frame.)
// The centrifugal force derives from the potential -m omega^2 (x^2 + y^2) / 2; Coriolis
// does no work. Jacobian: dF/dx = m omega^2 diag(1, 1, 0), dF/dv = 2 m omega [[0,1,0],[-1,0,0],[0,0,0]].
#include "models/force_model.hpp"

namespace hawser {

class RotatingFrame : public ForceModel {
 public:
  explicit RotatingFrame(double omega_rad_s) : omega_(omega_rad_s) {}
  std::string name() const override { return "rotating frame (centrifugal, Coriolis)"; }
  bool acts_on_point_masses() const override { return true; }
  void add_forces(const TetherState& s, Matrix3X& f) const override;
  void add_jacobian(const TetherState& s, NodeJacobian& j) const override;
  double energy(const TetherState& s) const override;  // centrifugal potential

 private:
  double omega_;
};

}  // namespace hawser
