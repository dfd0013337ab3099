#include "solver/integration/initial_state.hpp"

#include <algorithm>
#include <cmath>

namespace hawser {

std::vector<double> initial_state(const TetherSystem& sys, const InitialSpec& spec) {
  const StateLayout& lay = sys.layout();
  const Mesh& mesh = sys.model().mesh;
  std::vector<double> y(sys.size(), 0.0);
  const std::vector<double> dist = reference_distance(mesh);
  for (const DisplacementSpec& d : spec.displacements) {
    Eigen::Vector3d dir = mesh.axis;
    if (d.direction == DisplacementSpec::Direction::east) dir = Eigen::Vector3d::UnitY();
    if (d.direction == DisplacementSpec::Direction::north) dir = Eigen::Vector3d::UnitZ();
    for (std::size_t k = lay.first_free(); k <= lay.last_free(); ++k) {
      if (dist[k] < d.from_m || dist[k] > d.to_m) continue;
      const double shape = std::sin(M_PI * (dist[k] - d.from_m) / (d.to_m - d.from_m));
      for (int a = 0; a < 3; ++a) y[lay.u(k, a)] += d.amplitude_m * shape * dir[a];
    }
  }
  for (const KickSpec& k : spec.kicks)
    for (int a = 0; a < 3; ++a) y[lay.v(static_cast<std::size_t>(k.node), a)] += k.velocity_m_s[a];
  return y;
}

std::vector<std::size_t> output_nodes(std::size_t nodes, const OutputSpec& spec) {
  std::vector<std::size_t> out;
  if (!spec.nodes.empty()) {
    for (int n : spec.nodes) out.push_back(static_cast<std::size_t>(n));
  } else {
    for (std::size_t k = 0; k < nodes; k += static_cast<std::size_t>(spec.node_stride)) out.push_back(k);
    out.push_back(nodes - 1);
  }
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

}  // namespace hawser
