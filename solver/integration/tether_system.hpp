#pragma once
// The tether as an ODE system for the integrator: assembles the right-hand side and its
// banded Jacobian from the force models (the one place this happens), following the state
// layout of solver/integration/state_layout.hpp. Equations of motion of free node k (lumped mass m_k):
//   u_k' = v_k,   m_k v_k' = sum of the model forces on node k.
#include <Eigen/LU>
#include <array>
#include <vector>

#include "solver/integration/ode_system.hpp"
#include "solver/integration/state_layout.hpp"
#include "solver/assembly/tether_model.hpp"

namespace hawser {

/// Quantities derived from one state, for output and checks.
struct TetherDiagnostics {
  std::vector<double> tension_n;        // (N) [N]
  double kinetic_j = 0, potential_j = 0, strain_j = 0, dissipated_j = 0;  // [J]
  Eigen::Vector3d anchor_force_n = Eigen::Vector3d::Zero();  // pull of the tether on the anchor [N]
  double angular_momentum_z = 0;        // of the free nodes and climbers about the spin axis, inertial [kg m^2/s]
  double anchor_angular_impulse = 0;    // integral of the anchor's torque on the tether [N m s]
  double climber_j = 0;                 // climbers' kinetic + potential energy [J]
  double drive_work_j = 0;              // work done by the climbers' drives since t = 0 [J]
  std::vector<double> work_j;           // per work channel (TetherSystem::work_channels) [J]
  double max_stress_ratio = 0;          // max over elements of stress / ultimate strength
  std::size_t max_stress_element = 0;
  std::size_t slack_elements = 0;
  Matrix3X acceleration;                // all nodes [m/s^2], filled by the run driver (outputs)
};

class TetherSystem : public OdeSystem {
 public:
  explicit TetherSystem(const TetherModel& model);

  std::size_t size() const override { return layout_.size(); }
  long half_bandwidth() const override { return StateLayout::kHalfBandwidth; }
  void rhs(double t, const double* y, double* ydot) override;
  void jacobian(double t, const double* y, const double* fy, const BandJacobian& j) override;
  /// One root: an element reaching its ultimate strength (BarElements::rupture_indicator).
  int num_roots() const override { return 1; }
  void roots(double t, const double* y, double* g) override;

  /// Newton systems (I - gamma J) x = b reduced to the velocity corrections: with
  /// du = r_u + gamma dv, each free node k gives
  ///   sum_j (m_k delta_kj I - gamma dF_k/dv_j - gamma^2 dF_k/dx_j) dv_j = m_k r_v,k + gamma sum_j dF_k/dx_j r_u,j,
  /// a block-tridiagonal system of 3x3 blocks solved by block Gaussian elimination (block
  /// Thomas algorithm) in O(N). The matrix is the tether's effective dynamic stiffness:
  /// mass plus damping plus (positive) stiffness terms, so elimination without pivoting
  /// between blocks is stable; each diagonal block is inverted exactly. The climbers' terms
  /// (consistent mass and dF/dx, dF/dv over all the nodes of their spread, which for a smooth
  /// spread reach beyond the band) are a low-rank update, 3 per climber, solved exactly by
  /// the Woodbury identity: still O(N) per solve for a fixed number of climbers.
  bool has_newton_solver() const override { return true; }
  void newton_jacobian(double t, const double* y) override;
  void newton_factor(double gamma) override;
  void newton_solve(const double* b, double* x) const override;

  /// The energy budget's channels of a model, in the state's order: those its force models
  /// name (ForceModel::work_channels), then "strikes" (kinetic energy of the velocity jumps)
  /// "climber_events" (ClimberLoad::event_energy_jump: climbers arriving, leaving, and
  /// crossing nodes) and "cuts" (the strain energy of cut elements, gone with them) when the
  /// model has them; the run driver books those at their instants (add_event_work).
  static std::vector<std::string> work_channels(const TetherModel& model);
  const std::vector<std::string>& work_channels() const { return channels_; }
  /// Adds the energy that jumps at an event at time t to the channels that book it: a
  /// strike's change of kinetic energy `strike_kinetic_j` (the caller measures it across the
  /// jump) and, with `energy_jumps`, the jumps of stored energy at t (climbers, cuts).
  void add_event_work(double t, double* y, double strike_kinetic_j, bool energy_jumps) const;
  const StateLayout& layout() const { return layout_; }
  const TetherModel& model() const { return model_; }
  /// Positions and velocities of all nodes at (t, y) [m, m/s].
  void node_state(double t, const double* y, Matrix3X& x, Matrix3X& v) const;
  TetherDiagnostics diagnose(double t, const double* y) const;

 private:
  const TetherModel& model_;
  std::vector<const ForceModel*> forces_;  // model_.forces(), gathered once
  std::vector<std::string> channels_;      // work channels, in the state's order
  StateLayout layout_;
  /// Per force model naming work channels: where its channels go in the state, and its own
  /// forces (kept to the end of rhs(), where the accelerations are known for its power).
  struct WorkModel {
    const ForceModel* model;
    std::vector<std::size_t> channel;
    Matrix3X f;
    std::vector<double> power_w;
  };
  std::vector<WorkModel> work_models_;
  /// The mass matrix per axis (the same for x, y, z): lumped node masses plus each climber's
  /// m w w^T, so tridiagonal: diag_[k], off_[k] between k and k+1. Rebuilt for time t.
  void assemble_mass(double t);
  /// Solves M a = f for the free nodes, prescribed nodes having zero acceleration: the
  /// tridiagonal (Thomas) algorithm on each run of nodes coupled by climbers (a lone
  /// climber's run is two nodes); a = f / m elsewhere.
  void solve_mass(Matrix3X& f_to_a) const;
  /// The same for climbers spread over more than two nodes (a smooth spread), exactly, by
  /// the Woodbury identity. diag_ and off_ then hold the band of M, with its couplings
  /// beyond the band lumped onto the diagonal: the Newton matrix's approximation.
  void solve_mass_wide(Matrix3X& f_to_a) const;
  std::vector<Attachment> attached_;  // the climbers at the time of the last assemble_mass()
  bool wide_ = false;                 // some climber spread over more than two nodes
  Eigen::VectorXd diag_, inverse_mass_, off_;
  std::vector<std::size_t> touched_;  // nodes whose mass entries differ from the lumped ones
  mutable Eigen::VectorXd thomas_c_;
  Matrix3X x_, v_, f_;    // work arrays (all nodes)
  double state_t_ = 0.0;  // the time of x_, v_ (the latest state evaluated)
  NodeJacobian jac_;
  NodeJacobian newton_jac_;                 // Jacobian of the last newton_jacobian()
  double newton_gamma_ = 0.0;
  double newton_t_ = 0.0;                   // time of the last newton_jacobian()
  /// The factored Newton matrix, per free node k, kept together for the two solve passes.
  struct NewtonBlocks {
    Eigen::Matrix3d gdx_prev, gdx_self, gdx_next;  // gamma dF_k/dx_{k-1}, dx_k, dx_{k+1} [N s/m]
    Eigen::Matrix3d lower;                         // L_k = A_{k,k-1} D_{k-1}^-1
    Eigen::Matrix3d d_inv;                         // D_k^-1
    Eigen::Matrix3d e_next;                        // E_k = D_k^-1 A_{k,k+1}
  };
  std::vector<NewtonBlocks> blocks_;
  /// Solves T w = r in place, T the factored tether part (blocks_).
  void block_solve(std::vector<Eigen::Vector3d>& r) const;
  /// V_c^T z: climber c's rows of the low-rank part applied to z (all nodes).
  Eigen::Vector3d climber_product(std::size_t c, const std::vector<Eigen::Vector3d>& z) const;
  std::vector<Attachment> newton_att_;       // the climbers at newton_t_
  std::vector<ClimberJacobian> newton_cj_;   // their dG/dx_j, dG/dv_j
  std::vector<std::array<Eigen::Matrix3d, SpreadWeights::kMaxNodes>> newton_r_;  // R_cj
  std::vector<std::vector<Eigen::Vector3d>> z_cols_;  // T^-1 U, 3 columns per climber
  Eigen::PartialPivLU<Eigen::MatrixXd> capacitance_;  // I + V^T T^-1 U
  std::vector<double> capacity_;      // per element: area x ultimate strength [N]
  mutable std::vector<Eigen::Vector3d> work_;  // per free node, of newton_solve
};

}  // namespace hawser
