#pragma once
// How a climber's point load is shared among the nodes: the weights w_k(s) of its position
//   r_c = sum_k w_k(s) x_k,
// which by virtual work are also the shares of its force and enter its consistent mass
// m w w^T (physics.md section 5). Two choices:
//
// point:  the linear shape functions of the element under the climber (two nodes). The
//         weights have a kink where the climber crosses a node, so the integrator stops there.
// smooth: the same shape functions averaged over a window of half width a around the climber,
//         w_k(s) = integral phi_k(sigma) rho(sigma - s) dsigma, with the quartic (biweight)
//         kernel rho(u) = 15/(16 a) (1 - (u/a)^2)^2 on |u| <= a (Silverman, Density
//         Estimation for Statistics and Data Analysis, 1986, Table 3.1). rho is continuous
//         with its first derivative, so w is three times continuously differentiable in s and
//         a climber crosses nodes without a restart. The weights keep the partition of unity
//         and reproduce linear fields exactly (rho is symmetric with unit mass), so on a
//         straight ribbon the climber is where the point load would be; as the mesh is refined
//         (a a fixed number of elements) the load converges to the point load. Beyond the
//         tether's ends the end elements' shape functions are continued linearly.
// Closed forms, with t = u / a and P, Q the kernel's distribution and first moment:
//   P(t) = 1/2 + 15/16 (t - 2 t^3 / 3 + t^5 / 5),   Q(t) = -5/32 (1 - t^2)^3   (|t| <= 1),
// integral over [p, q] of (alpha + beta sigma) rho(sigma - s) dsigma
//   = (alpha + beta s) [P] + beta a [Q];  d/ds: beta [P];  d2/ds2: beta (rho(p-s) - rho(q-s)).
#include <array>
#include <cstddef>
#include <vector>

namespace hawser {

enum class LoadSpread { point, smooth };

/// The weights of one climber at one place: nodes first .. first + count - 1.
struct SpreadWeights {
  static constexpr std::size_t kMaxNodes = 8;
  std::size_t first = 0, count = 0;
  std::array<double, kMaxNodes> w{}, dw{}, ddw{};  // w_k [-], dw_k/ds [1/m], d2w_k/ds2 [1/m^2]
};

class LoadSpreader {
 public:
  /// s_nodes: material coordinate of every node [m], increasing; half_width_elements: the
  /// window's half width a in shortest elements (smooth only; at most 3).
  LoadSpreader(std::vector<double> s_nodes, LoadSpread kind, double half_width_elements);
  LoadSpread kind() const { return kind_; }
  double half_width_m() const { return a_; }
  /// Weights for a climber at s [m] on `element` (the element it rides, for point).
  SpreadWeights at(double s_m, std::size_t element) const;

 private:
  std::vector<double> s_;
  LoadSpread kind_;
  double a_ = 0.0;
};

}  // namespace hawser
