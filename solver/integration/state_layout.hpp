#pragma once
// The layout of the integrator's state vector, documented once (physics.md section 6).
//
// Only free nodes are in the state; prescribed nodes (the anchor, a held far end) are not.
// Per free node k, in order, six components interleaved so the Jacobian is banded with
// half-bandwidth 11 (a node couples to its two neighbours only):
//   y[6 (k - first) + 0..2]  u_k = x_k - x_k(equilibrium)   displacement [m]
//   y[6 (k - first) + 3..5]  v_k                             velocity [m/s], rotating frame
// then the quadratures, integrated alongside (nothing depends on them):
//   y[6 F + 0]  energy dissipated so far [J]
//   y[6 F + 1]  angular impulse of the anchor about the spin axis [N m s]
//   y[6 F + 2 + c]  work done on the tether through channel c since t = 0 [J] (the
//                   energy budget's channels: TetherSystem::work_channels)
// The displacement, not the position, is the state so that the error control acts on the
// motion (|u| of metres) rather than on positions of 1e8 m.
#include <cstddef>

namespace hawser {

class StateLayout {
 public:
  static constexpr std::size_t kPerNode = 6;
  static constexpr std::size_t kQuadratures = 2;  // before the work channels
  static constexpr long kHalfBandwidth = 11;

  StateLayout(std::size_t first_free, std::size_t last_free, std::size_t work_channels = 0)
      : first_(first_free), last_(last_free), channels_(work_channels) {}
  std::size_t first_free() const { return first_; }
  std::size_t last_free() const { return last_; }
  std::size_t free_nodes() const { return last_ - first_ + 1; }
  bool is_free(std::size_t node) const { return node >= first_ && node <= last_; }
  std::size_t size() const { return kPerNode * free_nodes() + kQuadratures + channels_; }
  /// Index of displacement component a (0..2) of node k.
  std::size_t u(std::size_t node, int a) const { return kPerNode * (node - first_) + a; }
  /// Index of velocity component a (0..2) of node k.
  std::size_t v(std::size_t node, int a) const { return kPerNode * (node - first_) + 3 + a; }
  /// Number of the motion's components (displacements and velocities), before the quadratures.
  std::size_t dynamic() const { return kPerNode * free_nodes(); }
  std::size_t dissipated_energy() const { return kPerNode * free_nodes(); }
  std::size_t anchor_angular_impulse() const { return kPerNode * free_nodes() + 1; }
  std::size_t work_channels() const { return channels_; }
  /// Index of the work of channel c.
  std::size_t work(std::size_t c) const { return kPerNode * free_nodes() + kQuadratures + c; }

 private:
  std::size_t first_, last_, channels_;
};

}  // namespace hawser
