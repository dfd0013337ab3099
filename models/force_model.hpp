#pragma once
// The one narrow interface through which every physical model acts on the tether.
//
// A model sees the positions and velocities of all nodes 0..N in the rotating frame
// (prescribed nodes included) and adds its forces [N] on every node; beside them it adds
// its analytic Jacobian, the derivatives of those forces with respect to the positions and
// velocities of the node itself and of its two neighbours (the only couplings a bar chain
// has, which keeps the system's Jacobian banded). Models also report the energy they
// store and the power they dissipate, for the energy bookkeeping of a run.
#include <Eigen/Core>
#include <string>
#include <vector>

namespace hawser {

using Matrix3X = Eigen::Matrix<double, 3, Eigen::Dynamic>;

/// Positions [m] and velocities [m/s] of all nodes in the rotating frame at time t [s].
struct TetherState {
  double t;
  const Matrix3X& x;
  const Matrix3X& v;
  const Eigen::VectorXd& mass;  // node masses [kg]
  const Matrix3X* a = nullptr;  // node accelerations [m/s^2], where known (outputs)
};

/// dF_i/dx_j and dF_i/dv_j for j = i-1, i, i+1 ([0], [1], [2]), per node i, in N/m and N s/m.
class NodeJacobian {
 public:
  explicit NodeJacobian(std::size_t nodes) { resize(nodes); }
  void resize(std::size_t nodes) {
    for (auto& b : dx_) b.assign(nodes, Eigen::Matrix3d::Zero());
    for (auto& b : dv_) b.assign(nodes, Eigen::Matrix3d::Zero());
  }
  void set_zero() {
    for (auto& b : dx_) for (auto& m : b) m.setZero();
    for (auto& b : dv_) for (auto& m : b) m.setZero();
  }
  std::size_t nodes() const { return dx_[1].size(); }
  /// Block of dF_i/dx_j; j must be i-1, i or i+1.
  Eigen::Matrix3d& dx(std::size_t i, std::size_t j) { return dx_[j + 1 - i][i]; }
  Eigen::Matrix3d& dv(std::size_t i, std::size_t j) { return dv_[j + 1 - i][i]; }
  const Eigen::Matrix3d& dx(std::size_t i, std::size_t j) const { return dx_[j + 1 - i][i]; }
  const Eigen::Matrix3d& dv(std::size_t i, std::size_t j) const { return dv_[j + 1 - i][i]; }

 private:
  std::vector<Eigen::Matrix3d> dx_[3], dv_[3];
};

/// A time history a model offers for the result file: its dataset path ("/environment/wind"),
/// the shape of one row (time is the first axis, added by the recorder) and its units. If
/// `summary_peak` is set, the recorder also writes the largest |value| seen under that
/// name in /summary.
struct OutputField {
  std::string path;
  std::vector<std::size_t> row_dims;
  std::string units;
  std::string summary_peak;
};

/// A fact a model states about itself in the result file, so that the file explains itself
/// without the scenario (a climber's mass and profile): attribute `name` on the group or
/// dataset `object_path`; a number (with its unit in the name: `mass_kg`) or a text.
struct OutputAttribute {
  std::string object_path;
  std::string name;
  double number = 0.0;
  std::string text;       // used when not empty
};

class ForceModel {
 public:
  virtual ~ForceModel() = default;
  virtual std::string name() const = 0;
  /// True for a force on each node from that node's own position, velocity and mass alone
  /// (gravity, the frame's forces, tides): such a model also acts on a climber, evaluated on
  /// it as on a point mass (models/climber_load.hpp).
  virtual bool acts_on_point_masses() const { return false; }
  /// False when add_jacobian() leaves terms of dF/dx out (enough to steer an integrator's
  /// Newton iteration); static solves and linearisations then difference the forces
  /// (solver/assembly/differenced_jacobian.hpp).
  virtual bool exact_position_jacobian() const { return true; }
  /// F(:, i) += force on node i [N].
  virtual void add_forces(const TetherState& s, Matrix3X& f) const = 0;
  /// Adds this model's derivatives of the forces.
  virtual void add_jacobian(const TetherState& s, NodeJacobian& j) const = 0;
  /// Energy stored by this model (potential or strain) [J]; 0 for non-conservative models.
  virtual double energy(const TetherState&) const { return 0.0; }
  /// Power this model removes from the tether's mechanical energy [W] (>= 0 for dampers).
  virtual double dissipated_power(const TetherState&) const { return 0.0; }
  /// add_forces() and dissipated_power() together, as the right-hand side needs both; a
  /// model whose two share their work (the bars' kinematics) does it in one pass.
  virtual double add_forces_and_dissipation(const TetherState& s, Matrix3X& f) const {
    add_forces(s, f);
    return dissipated_power(s);
  }
  /// The energy budget's one hook (DEVELOPERS.md, "Adding a force model"). A model whose
  /// forces do work that is neither stored in energy() nor lost in dissipated_power() (drag,
  /// tides, climbers' drives, thrusters, a moving anchor) names the channels its work is
  /// booked under; the run integrates each channel's power as a quadrature along the
  /// integrator's own steps and records it as /energy/work/<channel> [J]. Models may share
  /// a channel (the air's drag on the ribbon and on the climbers both go to "drag").
  virtual std::vector<std::string> work_channels() const { return {}; }
  /// Power [W] into each channel of work_channels(), in its order, at state s. `own_f` holds
  /// this model's forces on the nodes (what add_forces() gave) and s.a the accelerations.
  /// The default, for one channel: sum_i F_i . v_i, the power of nodal forces on the discrete
  /// system (exact for it: m_i a_i . v_i sums to the change of its kinetic energy).
  virtual void work_power(const TetherState& s, const Matrix3X& own_f, double* power_w) const {
    double p = 0.0;
    for (Eigen::Index i = 0; i < own_f.cols(); ++i) p += own_f.col(i).dot(s.v.col(i));
    power_w[0] = p;
  }
  /// Times at which this model's forces change abruptly (a gust's onset, a cut) [s]: the
  /// integrator stops there so that no step straddles them.
  virtual std::vector<double> event_times() const { return {}; }
  /// The time histories this model offers; `nodes` are the nodes the run records.
  virtual std::vector<OutputField> output_fields(const std::vector<std::size_t>& /*nodes*/) const { return {}; }
  /// Attributes for the result file (written once, with the fixed data).
  virtual std::vector<OutputAttribute> output_attributes() const { return {}; }
  /// One row per field of output_fields(), in its order, at state s.
  virtual void sample_outputs(const TetherState& /*s*/, const std::vector<std::size_t>& /*nodes*/,
                              std::vector<std::vector<double>>& /*rows*/) const {}
};

}  // namespace hawser
