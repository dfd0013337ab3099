#pragma once
// Tidal force of third bodies (the Moon, the Sun) on every node (physics.md section 4):
//   F_i = m_i a_tide(x_i, t),   dF_i/dx_i = m_i da_tide/dr,
// with a_tide the differential acceleration of models/third_body_tide.hpp (the body's pull on
// the node minus its pull on the planet's centre, evaluated without cancellation).
// Frame: the planet's rotating frame with the anchor on +x; ThirdBodyTide's inertial frame is
// the one that coincides with it at t = 0, so a body's node longitude here is its planet-fixed
// longitude minus the anchor's (done by the scenario layer).
// The tide is time dependent, so it belongs to no conserved energy: energy() stays 0 (the
// run's Jacobi integral then changes by the tide's work, as it should).
#include "models/force_model.hpp"
#include "models/third_body_tide.hpp"

namespace hawser {

class TidalForce : public ForceModel {
 public:
  explicit TidalForce(ThirdBodyTide tide) : tide_(std::move(tide)) {}
  std::string name() const override { return "tides"; }
  bool acts_on_point_masses() const override { return true; }
  void add_forces(const TetherState& s, Matrix3X& f) const override;
  /// The tide's work, F . v on the nodes (and on the climbers, through them).
  std::vector<std::string> work_channels() const override { return {"tides"}; }
  void add_jacobian(const TetherState& s, NodeJacobian& j) const override;
  /// /environment/tidal_acceleration (K,3) m/s^2 at the recorded nodes.
  std::vector<OutputField> output_fields(const std::vector<std::size_t>& nodes) const override;
  void sample_outputs(const TetherState& s, const std::vector<std::size_t>& nodes,
                      std::vector<std::vector<double>>& rows) const override;
  const ThirdBodyTide& tide() const { return tide_; }

 private:
  ThirdBodyTide tide_;
};

}  // namespace hawser
