#pragma once
// Loaded static states of the as-built tether (physics.md section 3): the unstretched lengths
// L0, areas and element masses are fixed; the nodes move until every free node is at rest,
//   R(x) = sum of the model forces on each free node at v = 0, t = 0   = 0.
//
// Method: Newton's method on the full 3-D equilibrium with the analytic tangent dR/dx that the
// force models already provide (their NodeJacobian dx blocks, the same K the modal analysis
// assembles, with the opposite sign; differenced for models whose analytic dF/dx is
// incomplete, the drag: solver/assembly/differenced_jacobian.hpp). It couples neighbours only, so it is
// block-tridiagonal; it is factorised as a sparse matrix (Eigen SparseLU, fill-in O(N), never
// dense), since drag makes it unsymmetric. Each Newton step is damped (halved until accepted) by
// the natural monotonicity test (Deuflhard, Newton Methods for Nonlinear Problems, 2004,
// section 3.3): the simplified Newton correction at the trial point must shrink. A test on |R|
// instead (Armijo's) stalled on nearly inextensible cables, where |R| is ruled by the stiff
// stretch.
//
// Continuation in load (a natural-parameter homotopy, Allgower & Georg, Numerical
// Continuation Methods, 1990): with the load factor lambda in [0, 1],
//   R(x, lambda) = F_common(x; m_built + lambda (m_loaded - m_built)) + lambda F_added(x)
//                  + (1 - lambda) F_removed(x),
// where F_common are the models present in every state (bars, gravity, frame) with the node
// masses interpolated (gravity and the frame's forces are linear in mass: a heavier or lighter
// counterweight), and F_added the loads the as-built tether did not carry (parked climbers,
// the mean wind's drag), F_removed those it was built under and no longer carries (the parked
// climbers of a design load case, tether.built_under). At lambda = 0 the as-built geometry is
// the solution. The first attempt is the whole load in one step; a step whose Newton iteration
// fails is halved and retried from the last converged state, a successful one lets the next
// grow again.
// A load step counts only if Newton's method converged without damping below min_damping:
// a heavily damped iteration may end on another branch of states far from the one followed
// (measured on scenarios/storm.yaml: with any damping allowed, the end state depended on the
// step sequence; two of them differed by 13 km at the top).
// When the step falls below `min_load_step`, the branch of states grown from the as-built one
// ends before the whole load (a fold: on scenarios/storm.yaml, where the mean wind's drag on
// the upright ribbon, 420 kN, is twice the base tension, the lean runs away at 96.6 % of the
// wind). From the last state on the branch, pseudo-transient relaxation under the whole load
// (Kelley & Keyes 1998; see relax() in the .cpp) lets the tether move to a state at rest on
// another branch, if there is one (in the storm: the lower ribbon blown down to a shallow
// slope). When that fails too (for example the base goes slack and the tether falls), there
// is no equilibrium: InputError, naming the load and the factor the continuation reached.
//
// Converged when |R|_inf <= force_tolerance * (largest element tension), or when the Newton
// correction (or the simplified one after a full step) moves no node by more than
// position_tolerance * (tether length), which is then applied. Every element must be taut in
// the result (tension-only bars cannot hold a slack state in place).
#include <string>
#include <vector>

#include "models/force_model.hpp"

namespace hawser {

class BarElements;

struct StaticLoadSet {
  std::string description;                    // what is hung on the tether, for messages
  const BarElements* bars = nullptr;          // for tensions and the slack check
  std::vector<const ForceModel*> common;      // bars, gravity, frame: in every state
  std::vector<const ForceModel*> added;       // climbers, mean drag: scaled by the load factor
  std::vector<const ForceModel*> removed;     // loads the tether was built under (a design
                                              // load case): scaled by 1 - load factor
  Eigen::VectorXd built_mass_kg;              // (N+1) node masses of the as-built tether [kg]
  Eigen::VectorXd loaded_mass_kg;             // (N+1) node masses under load [kg]
  std::size_t first_free = 1, last_free = 0;  // nodes that move; the others are held
  /// Free nodes may not come closer to the centre than this [m]: the ground, whose contact is
  /// not modelled (0: no ground, the test bench). A state below it is no equilibrium: a
  /// tether whose base goes slack otherwise "hangs" its lower part through the planet.
  double ground_radius_m = 0.0;
};

struct StaticOptions {
  double force_tolerance = 1e-11;     // of the largest tension [-]
  double position_tolerance = 1e-12;  // of the tether length [-]
  int max_newton_iterations = 15;     // per load step (a failed step is halved)
  double min_damping = 1.0;           // smallest damping factor before the load step fails
  double min_load_step = 1.0 / 4096;
  int max_load_steps = 2000;
  double relax_first_step_s = 10.0;  // first pseudo time step [s]
  double relax_newton_step_s = 1e8;  // pseudo time step beyond which a step is Newton's [s]
  int max_relax_iterations = 400;
};

struct StaticState {
  Matrix3X position_m;            // (3, N+1)
  std::vector<double> tension_n;  // (N) [N]
  int newton_iterations = 0;      // over all load steps
  int load_steps = 0;             // successful steps of the continuation
  int failed_steps = 0;           // steps halved
  double fold_load_factor = 1.0;  // where the continuation's branch ended (1: it did not)
  int relax_iterations = 0;       // steps of pseudo-transient relaxation past it
  double residual_n = 0.0;        // final |R|_inf [N]
};

/// Solves R(x, 1) = 0 from `as_built_m` (the solution of R(x, 0) = 0).
StaticState solve_static(const StaticLoadSet& loads, const Matrix3X& as_built_m,
                         const StaticOptions& options = {});

}  // namespace hawser
