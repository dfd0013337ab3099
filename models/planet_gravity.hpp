#pragma once
// Gravity of the planet on every node: point mass, optionally with the J2 zonal term.
//
// Potential per unit mass (Vallado, Fundamentals of Astrodynamics and Applications, the
// zonal expansion truncated after J2; Montenbruck & Gill, Satellite Orbits, eq. 3.x):
//   U(r) = -GM / r + P (3 z^2 / r^5 - 1 / r^3),   P = GM J2 a^2 / 2
// Acceleration g = -grad U:
//   g = -GM r / |r|^3 + P (15 z^2 r / |r|^7 - 3 r / |r|^5 - 6 z e_z / |r|^5)
// Gradient dg/dr (symmetric): point mass -GM (I / r^3 - 3 r r^T / r^5); J2 part
//   P [ (15 z^2/r^7 - 3/r^5) I + (15/r^7 - 105 z^2/r^9) r r^T - 6/r^5 e_z e_z^T
//       + 30 z / r^7 (r e_z^T + e_z r^T) ].
#include "models/force_model.hpp"
#include "models/planet.hpp"

namespace hawser {

class PlanetGravity : public ForceModel {
 public:
  PlanetGravity(const Planet& planet, bool include_j2);
  std::string name() const override { return include_j2_ ? "gravity (point mass + J2)" : "gravity (point mass)"; }
  bool acts_on_point_masses() const override { return true; }
  void add_forces(const TetherState& s, Matrix3X& f) const override;
  void add_jacobian(const TetherState& s, NodeJacobian& j) const override;
  double energy(const TetherState& s) const override;  // sum m U(r)

  /// Acceleration [m/s^2] and its gradient [1/s^2] at r [m].
  Eigen::Vector3d acceleration(const Eigen::Vector3d& r) const;
  Eigen::Matrix3d gradient(const Eigen::Vector3d& r) const;
  double potential(const Eigen::Vector3d& r) const;  // [J/kg]

 private:
  double gm_, p_;  // GM [m^3/s^2], GM J2 a^2 / 2 [m^5/s^2] (0 without J2)
  bool include_j2_;
};

}  // namespace hawser
