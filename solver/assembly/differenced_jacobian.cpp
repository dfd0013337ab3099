#include "solver/assembly/differenced_jacobian.hpp"

#include <algorithm>
#include <vector>

namespace hawser {

void add_differenced_position_jacobian(const ForceModel& model, const TetherState& s,
                                       std::size_t first, std::size_t last, NodeJacobian& j) {
  const std::size_t nodes = static_cast<std::size_t>(s.x.cols());
  std::vector<double> step(nodes, 0.0);
  for (std::size_t k = first; k <= last; ++k) {
    const auto i = static_cast<Eigen::Index>(k);
    double chord =
        k > 0 ? (s.x.col(i) - s.x.col(i - 1)).norm() : (s.x.col(i + 1) - s.x.col(i)).norm();
    if (k + 1 < nodes) chord = std::min(chord, (s.x.col(i + 1) - s.x.col(i)).norm());
    step[k] = 1e-5 * chord;
  }
  Matrix3X xp = s.x, fp(3, nodes), fm(3, nodes);
  const TetherState sp{s.t, xp, s.v, s.mass};
  for (std::size_t colour = 0; colour < 3; ++colour)
    for (int a = 0; a < 3; ++a) {
      for (int sign : {1, -1}) {
        xp = s.x;
        for (std::size_t k = first + colour; k <= last; k += 3)
          xp(a, static_cast<Eigen::Index>(k)) += sign * step[k];
        Matrix3X& out = sign > 0 ? fp : fm;
        out.setZero();
        model.add_forces(sp, out);
      }
      for (std::size_t k = first + colour; k <= last; k += 3)
        for (std::size_t i = (k > 0 ? k - 1 : k); i <= std::min(nodes - 1, k + 1); ++i) {
          const auto c = static_cast<Eigen::Index>(i);
          j.dx(i, k).col(a) += (fp.col(c) - fm.col(c)) / (2.0 * step[k]);
        }
    }
}

void add_complete_jacobian(const std::vector<const ForceModel*>& models, const TetherState& s,
                           std::size_t first, std::size_t last, NodeJacobian& j) {
  NodeJacobian own(0);
  for (const ForceModel* m : models) {
    if (m->exact_position_jacobian()) {
      m->add_jacobian(s, j);
      continue;
    }
    own.resize(j.nodes());
    m->add_jacobian(s, own);
    for (std::size_t i = 0; i < j.nodes(); ++i)
      for (std::size_t k = (i > 0 ? i - 1 : i); k <= std::min(j.nodes() - 1, i + 1); ++k)
        j.dv(i, k) += own.dv(i, k);
    add_differenced_position_jacobian(*m, s, first, last, j);
  }
}

}  // namespace hawser
