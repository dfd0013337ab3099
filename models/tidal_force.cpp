#include "models/tidal_force.hpp"

namespace hawser {

// The bodies' positions are computed once per call, not once per node (trigonometry).
void TidalForce::add_forces(const TetherState& s, Matrix3X& f) const {
  const std::size_t nb = tide_.bodies().size();
  std::vector<Eigen::Vector3d> d(nb);
  for (std::size_t b = 0; b < nb; ++b) d[b] = tide_.body_position(b, s.t);
  for (Eigen::Index i = 0; i < s.x.cols(); ++i) {
    Eigen::Vector3d a = Eigen::Vector3d::Zero();
    for (std::size_t b = 0; b < nb; ++b)
      a += ThirdBodyTide::tidal_acceleration(tide_.bodies()[b].gm_m3_s2, d[b], s.x.col(i));
    f.col(i) += s.mass[i] * a;
  }
}

void TidalForce::add_jacobian(const TetherState& s, NodeJacobian& j) const {
  const std::size_t nb = tide_.bodies().size();
  std::vector<Eigen::Vector3d> d(nb);
  for (std::size_t b = 0; b < nb; ++b) d[b] = tide_.body_position(b, s.t);
  for (Eigen::Index i = 0; i < s.x.cols(); ++i) {
    const auto k = static_cast<std::size_t>(i);
    for (std::size_t b = 0; b < nb; ++b)
      j.dx(k, k) += s.mass[i] * ThirdBodyTide::tidal_gradient(tide_.bodies()[b].gm_m3_s2, d[b], s.x.col(i));
  }
}

std::vector<OutputField> TidalForce::output_fields(const std::vector<std::size_t>& nodes) const {
  return {{"/environment/tidal_acceleration", {nodes.size(), 3}, "m/s^2", ""}};
}

void TidalForce::sample_outputs(const TetherState& s, const std::vector<std::size_t>& nodes,
                                std::vector<std::vector<double>>& rows) const {
  for (std::size_t k : nodes) {
    const Eigen::Vector3d a = tide_.acceleration(s.x.col(static_cast<Eigen::Index>(k)), s.t);
    for (int c = 0; c < 3; ++c) rows[0].push_back(a[c]);
  }
}

}  // namespace hawser
