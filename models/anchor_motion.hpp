#pragma once
// Prescribed motion of a node held by the ground (the anchor) or by a test fixture, as a
// displacement from its equilibrium position in the rotating frame. Fixed for now; anchor
// motion and control models derive from this so the boundary is never a hard-wired zero.
#include <Eigen/Core>

namespace hawser {

class PrescribedMotion {
 public:
  virtual ~PrescribedMotion() = default;
  virtual Eigen::Vector3d displacement(double t) const = 0;  // [m]
  virtual Eigen::Vector3d velocity(double t) const = 0;      // [m/s]
};

class FixedPoint : public PrescribedMotion {
 public:
  Eigen::Vector3d displacement(double) const override { return Eigen::Vector3d::Zero(); }
  Eigen::Vector3d velocity(double) const override { return Eigen::Vector3d::Zero(); }
};

}  // namespace hawser
