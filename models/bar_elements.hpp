#pragma once
// Tension-only elastic bars with Kelvin-Voigt damping joining consecutive nodes.
//
// Element e joins nodes e and e+1; d = x_{e+1} - x_e, l = |d|, n = d / l,
// ldot = n . (v_{e+1} - v_e). Tension (> 0 when stretched):
//   T = k (l - L0) + c ldot   if l > L0 and that is > 0,   else 0 (slack carries nothing),
//   k = E A / L0 [N/m],  c = tau k [N s/m] (tau: the material's retardation time).
// Force on node e: +T n; on node e+1: -T n. A cut element carries nothing from its cut time on.
// Jacobian with K = dF_e/dd = k n n^T + (T / l)(I - n n^T) + (c / l) n w^T (I - n n^T),
// w = v_{e+1} - v_e, and C = c n n^T: dF_e/dx_{e+1} = K, dF_e/dx_e = -K, dF_{e+1} = -dF_e.
// (Chrono's cable and bar elements follow the same construction; the geometric stiffness
// T/l (I - n n^T) is what carries lateral waves.)
#include <vector>

#include "models/force_model.hpp"

namespace hawser {

class BarElements : public ForceModel {
 public:
  /// Per element: axial stiffness EA [N], unstretched length L0 [m], retardation time tau [s],
  /// and the time it is cut [s] (from then on it carries nothing: both parts fly free);
  /// empty or +infinity: never cut.
  BarElements(std::vector<double> ea_n, std::vector<double> l0_m, std::vector<double> tau_s,
              std::vector<double> cut_time_s = {});
  std::string name() const override { return "bar elements"; }
  void add_forces(const TetherState& s, Matrix3X& f) const override;
  void add_jacobian(const TetherState& s, NodeJacobian& j) const override;
  double energy(const TetherState& s) const override;           // strain energy of taut elements
  double dissipated_power(const TetherState& s) const override;  // c ldot^2 while taut
  double add_forces_and_dissipation(const TetherState& s, Matrix3X& f) const override;

  double cut_time(std::size_t e) const { return cut_time_[e]; }
  std::vector<double> event_times() const override;

  /// Tension of every element at state s [N] (0 when slack or cut).
  void tensions(const TetherState& s, std::vector<double>& t) const;
  /// A continuous function of the state with the sign of max_e (T_e - capacity_e), for the
  /// integrator's root finding (capacity_n: per element [N]). Undamped elements use
  /// (l / l_c)^2 - 1 with l_c = L0 + capacity / k, the length at which T reaches the capacity:
  /// the same sign, no square root. Damped ones use T / capacity - 1.
  double rupture_indicator(const TetherState& s, const std::vector<double>& capacity_n) const;
  /// Tension of element e alone [N].
  double tension(const TetherState& s, std::size_t e) const { return kinematics(s, e).tension; }
  std::size_t size() const { return l0_.size(); }
  double l0(std::size_t e) const { return l0_[e]; }
  double ea(std::size_t e) const { return ea_[e]; }
  double damping(std::size_t e) const { return c_[e]; }  // c [N s/m]

 private:
  struct Kinematics {
    Eigen::Vector3d n, w;
    double l, ldot, tension;  // tension clamped at 0
  };
  Kinematics kinematics(const TetherState& s, std::size_t e) const;
  /// Element e's chord d = x_{e+1} - x_e on plain column-major arrays (3 values per node), its
  /// squared length, and its stretch rate ldot = d . (v_{e+1} - v_e) / l: the hot loops' view.
  struct Chord {
    double d0, d1, d2, l2;
  };
  static Chord chord(const double* x, std::size_t e) {
    const double* a = x + 3 * e;
    const double d0 = a[3] - a[0], d1 = a[4] - a[1], d2 = a[5] - a[2];
    return {d0, d1, d2, d0 * d0 + d1 * d1 + d2 * d2};
  }
  static double stretch_rate(const Chord& c, const double* v, std::size_t e, double l) {
    const double* a = v + 3 * e;
    return (c.d0 * (a[3] - a[0]) + c.d1 * (a[4] - a[1]) + c.d2 * (a[5] - a[2])) / l;
  }
  /// The element's law, in one place: T = k (l - L0) + c ldot if l > L0, the element is not
  /// cut at time t and that is > 0; else 0 [N].
  double tension_law(std::size_t e, double l_m, double ldot_m_s, double t_s) const {
    if (!(l_m > l0_[e]) || t_s >= cut_time_[e]) return 0.0;
    const double tension = k_[e] * (l_m - l0_[e]) + c_[e] * ldot_m_s;
    return tension > 0.0 ? tension : 0.0;
  }
  std::vector<double> ea_, l0_;
  std::vector<double> k_;            // k = EA / L0 [N/m]
  std::vector<double> c_;            // c = tau * EA / L0 [N s/m]
  std::vector<double> cut_time_;     // [s]; +infinity: never cut
};

}  // namespace hawser
