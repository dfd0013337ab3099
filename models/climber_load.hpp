#pragma once
// Climbers: moving masses riding the tether (physics.md section 5).
//
// A climber of mass m at material coordinate s(t) on element e sits at
//   r_c = (1 - xi) x_e + xi x_{e+1},   xi = (s - s0_e) / L0_e,
// moving with v_c = w^T v + xi' d and a_c = w^T a + a_rel, where w = (1 - xi, xi),
// d = x_{e+1} - x_e and a_rel = 2 xi' (v_{e+1} - v_e) + xi'' d. Its equation m a_c = F_c + R
// (F_c: gravity, centrifugal and Coriolis forces on it, from the same point models as the
// nodes; R: the tether's push on it), with -R shared to the two nodes by the weights w,
// gives for the nodes (virtual work, consistent inertia)
//   (M + m w w^T) a = F + w (F_c - m a_rel).
// This model adds w (F_c - m a_rel) to the forces and its Jacobian; the mass term m w w^T is
// the system's (attachments()). The drive force is R along the element, the part of R that
// keeps s(t) on its profile; R's power on the relative motion, R . (xi' d), is the drive's work.
// In general the weights w_k(s) come from a LoadSpreader (models/load_spread.hpp): with
// s' = ds/dt, r_c = sum w_k x_k, v_c = sum (w_k v_k + s' w_k' x_k) and
// a_rel = sum (2 s' w_k' v_k + (s'' w_k' + s'^2 w_k'') x_k); the two-node form above is the
// `point` spread (w' = -+1/L0, w'' = 0), whose node crossings are stop times of the run.
#include <memory>
#include <string>
#include <vector>

#include "models/aerodynamic_drag.hpp"
#include "models/bar_elements.hpp"
#include "models/climber_profile.hpp"
#include "models/force_model.hpp"
#include "models/load_spread.hpp"

namespace hawser {

enum class ClimberEnd { park, leave, drop_payload };

struct Climber {
  std::string name;
  double mass_kg = 0.0;
  ClimberProfile profile;
  ClimberEnd at_end = ClimberEnd::park;
  double end_mass_kg = 0.0;  // drop_payload: the mass that stays on
  bool sudden = false;       // not in the starting equilibrium: its weight arrives at its start time
  double drag_area_m2 = 0.0; // drag coefficient times frontal area, Cd A [m^2]; 0: no drag
};

/// One climber's share of the Jacobian: it adds w_k G to node k, G = F_c(r_c, v_c) - m a_rel,
/// so dF_k/dx_j = w_k dG/dx_j and dF_k/dv_j = w_k dG/dv_j for the nodes j of its spread.
struct ClimberJacobian {
  std::array<Eigen::Matrix3d, SpreadWeights::kMaxNodes> gx, gv;  // dG/dx_j [N/m], dG/dv_j [N s/m]
};

/// Where a climber is at time t, for the mass matrix and the forces.
struct Attachment {
  std::size_t climber;
  std::size_t element;
  double xi, xi_dot, xi_ddot;  // [-], [1/s], [1/s^2]
  double mass_kg;
  SpreadWeights spread;        // the nodes the climber loads and their weights
  double s_dot = 0.0, s_ddot = 0.0;  // [m/s], [m/s^2]
  /// s' w_k' [1/s] and s'' w_k' + s'^2 w_k'' [1/s^2] of node spread.first + i.
  double c1(std::size_t i) const { return s_dot * spread.dw[i]; }
  double c2(std::size_t i) const { return s_ddot * spread.dw[i] + s_dot * s_dot * spread.ddw[i]; }
};

class ClimberLoad : public ForceModel {
 public:
  /// s_nodes: material coordinate of every node [m]; point_models: the forces that act on a
  /// point mass (gravity, frame, tides), evaluated at the climber.
  /// bars: for the tensions next to each climber in the outputs (may be null); air: the air
  /// (density and wind) for the drag of climbers with a drag area (null: no drag).
  ClimberLoad(std::vector<Climber> climbers, std::vector<double> s_nodes,
              std::vector<std::shared_ptr<const ForceModel>> point_models,
              const Matrix3X& reference_position,
              std::shared_ptr<const BarElements> bars = nullptr,
              std::shared_ptr<const AerodynamicDrag> air = nullptr);
  std::string name() const override { return "climbers"; }
  /// The drag of climbers with a drag area leaves the change of the air with position out.
  bool exact_position_jacobian() const override { return !air_; }
  /// The coordinate the profiles' positions and speeds are measured along, at every node
  /// [m]: by default the material coordinate (unstretched arc length, s_nodes); given the
  /// distance along the ribbon at rest (stretched), a climber's speed is what its wheels see
  /// over the stretched ribbon. Between nodes both coordinates are linear in the element's
  /// parameter xi, so a profile p(t) gives xi = (p - p_e) / (p_{e+1} - p_e).
  void set_path(std::vector<double> path_nodes);
  /// The material coordinate [m] of path coordinate p [m].
  double material_coordinate(double path_m) const;

  /// In parked mode (for the starting equilibrium) every climber that is not a sudden load
  /// sits at its start, at rest.
  void set_parked(bool parked) { parked_ = parked; }
  /// How the load is shared among the nodes (default: point); half_width_elements: the
  /// smooth window's half width in shortest elements.
  void set_spread(LoadSpread kind, double half_width_elements);
  LoadSpread spread() const { return spreader_.kind(); }
  std::vector<Attachment> attachments(double t_s) const;

  void add_forces(const TetherState& s, Matrix3X& f) const override;
  void add_jacobian(const TetherState& s, NodeJacobian& j) const override;
  /// The attachments at s.t and, for each, its dG/dx_j and dG/dv_j (the whole Jacobian, also
  /// for a spread beyond a node's neighbours: for the integrator's Newton solver).
  void jacobian_blocks(const TetherState& s, std::vector<Attachment>& at,
                       std::vector<ClimberJacobian>& jac) const;
  std::vector<double> event_times() const override;
  std::vector<OutputField> output_fields(const std::vector<std::size_t>& nodes) const override;
  std::vector<OutputAttribute> output_attributes() const override;
  void sample_outputs(const TetherState& s, const std::vector<std::size_t>& nodes,
                      std::vector<std::vector<double>>& rows) const override;

  /// Kinetic (rotating frame) plus potential energy of the climbers [J].
  double climber_energy(const TetherState& s) const { return climber_energy_at(s, s.t); }
  /// The same with the climbers where they are at time t_attach_s, on the tether of s.
  double climber_energy_at(const TetherState& s, double t_attach_s) const;
  /// Angular momentum of the climbers about the spin axis, inertial frame [kg m^2/s].
  double climber_angular_momentum(const TetherState& s, double omega) const;
  /// Power of the drives on the climbers' motion relative to the tether [W]; needs s.a.
  double drive_power(const TetherState& s) const;
  /// Energy budget: "climber_drives" (drive_power), "drag" when the air acts on a climber,
  /// and the channels of the point models (the tides' work on the climbers), each as F . v_c.
  std::vector<std::string> work_channels() const override;
  void work_power(const TetherState& s, const Matrix3X& own_f, double* power_w) const override;
  /// The jump of the climbers' energy at an event at time s.t [J], which no force's power
  /// accounts for: climbers arriving (+) or leaving, dropping a payload (-), and the kink at a
  /// node crossing, where a climber's velocity in space w^T v + xi' d jumps with the
  /// direction and stretch of d from element to element (the model applies no impulse
  /// there). Measured across the instant, kEventWindow_s either side, on the tether of s.
  double event_energy_jump(const TetherState& s) const;
  /// Half-width of that instant [s]: wider than the round-off of the event times, narrow
  /// enough that the climbers move by a negligible amount (1e-6 s at 55 m/s: 55 um).
  static constexpr double kEventWindow_s = 1e-6;
  const std::vector<Climber>& climbers() const { return climbers_; }

 private:
  struct PointState {
    Eigen::Vector3d r, v;
  };
  PointState point(const TetherState& s, const Attachment& at) const;
  /// The point models' force on a point of this mass, and its derivatives.
  Eigen::Vector3d body_force(double t, const PointState& p, double mass, Eigen::Matrix3d* dr, Eigen::Matrix3d* dv) const;
  /// F_c and its derivatives with respect to r_c, v_c: the point models, and the drag of
  /// the air on a climber with a drag area.
  Eigen::Vector3d point_force(double t, const PointState& p, const Attachment& at, Eigen::Matrix3d* dr,
                              Eigen::Matrix3d* dv) const;
  /// The tether's push R on the climber (m a_c - F_c); needs s.a.
  Eigen::Vector3d reaction(const TetherState& s, const Attachment& at) const;
  /// The climber's acceleration relative to the tether's, a_rel, and its velocity s' w' . x.
  Eigen::Vector3d relative_acceleration(const TetherState& s, const Attachment& at) const;
  Eigen::Vector3d relative_velocity(const TetherState& s, const Attachment& at) const;

  std::vector<Climber> climbers_;
  std::vector<double> s_nodes_;
  std::vector<double> path_;  // the profiles' coordinate at the nodes (set_path; default s_nodes_)
  LoadSpreader spreader_;
  double spread_width_elements_ = 1.0;  // the window's half width (set_spread)
  std::vector<std::shared_ptr<const ForceModel>> point_models_;
  Matrix3X reference_;
  std::shared_ptr<const BarElements> bars_;     // null: no tensions in the outputs
  std::shared_ptr<const AerodynamicDrag> air_;  // null: no air
  bool parked_ = false;
};

}  // namespace hawser
