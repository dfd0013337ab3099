#pragma once
// Modal analysis of the tether about its equilibrium (physics.md section 7).
//
// Linearised equations of motion of the free nodes, q = x - x* (3 per node, node order):
//   M q'' + C q' + K q = 0,   K = -dF/dx,  C = -dF/dv  at x = x*, v = 0,
// assembled from the NodeJacobian blocks of the same force models the time integration
// uses (so the two cannot disagree on the physics). M is the lumped node mass. K is the
// tangent stiffness: elastic (E A / L0 n n^T) + geometric (T / l (I - n n^T)) + gravity
// gradient + centrifugal. C splits into its skew part G = (C - C^T) / 2, the Coriolis
// (gyroscopic) matrix 2 m [Omega]x, and its symmetric part D = (C + C^T) / 2, the
// dissipation (Kelvin-Voigt; dampers when they exist).
//
// Eigenproblem, through the first-order form z = [q; p], p = q':
//   A z = lambda B z,  A = [0 I; -K -C],  B = [I 0; 0 M],
// solved by shift-invert about sigma = 0 (Ericsson & Ruhe 1980, the spectral transformation):
// the eigenvalues nu = 1 / lambda of A^-1 B largest in magnitude are the lambda nearest 0,
// the lowest modes. Block elimination reduces one application to one solve with the banded
// n x n stiffness K, factorised once:
//   A^-1 B [z1; z2] = [x; y],   x = -K^-1 (M z2 + C z1),   y = z1,
// (in a scaled time, see ShiftInvertOp in the .cpp). Largest-magnitude eigenvalues of that
// operator come from Spectra's implicitly restarted Arnoldi method, each Ritz vector
// purified by one more application; small blocks use a dense eigen-decomposition of the
// same operator. A shift sigma != 0 (modes near a given frequency) would factorise
// K + sigma C + sigma^2 M instead; it is not implemented.
//
// Blocks: degrees of freedom that no nonzero of M, C or K couples are solved separately.
// On a straight tether this splits along / east-west / north-south (the test bench) or
// {along + east-west} / north-south (Coriolis couples x and y). It is also what makes
// exactly degenerate pairs (the bench's y and z string modes) safe: an Arnoldi iteration from
// one start vector sees one direction of a degenerate eigenspace only.
//
// Per mode: period T = 2 pi / |Im lambda|, damping ratio zeta = -Re lambda / |lambda|, the
// kinetic-energy fraction per axis from the velocity part p = lambda q (time-averaged
// p^H M p restricted to each axis), and the node of largest displacement amplitude.
//
// Axes: both the planet tether and the test bench lie along +x, so x is along the tether,
// y east-west and z north-south (the bench uses the same names for its two lateral axes).
#include <Eigen/Core>
#include <Eigen/SparseCore>
#include <complex>
#include <string>
#include <vector>

#include "solver/assembly/tether_model.hpp"

namespace hawser {

class TetherSystem;

/// The linearised tether on the free nodes; dof 3 (k - first_free) + a is axis a of node k.
///
/// Linearised about the loaded static state (mesh.position at rest, TetherModel::mean_forces():
/// the as-built tether with the climbers parked at their start points, the counterweight and
/// the mean wind's drag, which adds its aerodynamic damping; gusts and turbulence left out);
/// the climbers where they are at t = 0 add their consistent mass m w w^T per axis
/// (physics.md section 5) to M, which is why M is kept sparse rather than as a diagonal.
struct LinearisedTether {
  std::size_t first_free = 0, last_free = 0;
  Eigen::SparseMatrix<double> mass;         // M [kg]
  Eigen::SparseMatrix<double> stiffness;    // K = -dF/dx [N/m]
  Eigen::SparseMatrix<double> gyroscopic;   // G, skew part of -dF/dv [N s/m]
  Eigen::SparseMatrix<double> damping;      // D, symmetric part of -dF/dv [N s/m]
  std::size_t dofs() const { return static_cast<std::size_t>(stiffness.rows()); }
};

LinearisedTether linearise(const TetherModel& model);

enum class ModeKind { along, east_west, north_south };
/// "along", "east-west", "north-south".
const char* mode_kind_name(ModeKind kind);

struct Mode {
  std::complex<double> eigenvalue;     // lambda [1/s]; motion ~ exp(lambda t)
  double period_s = 0.0;               // 2 pi / |Im lambda|; infinity if not oscillatory
  double damping_ratio = 0.0;          // -Re lambda / |lambda| (< 0: growing)
  Eigen::Vector3d kinetic_fraction;    // along (x), east-west (y), north-south (z); sums to 1
  ModeKind kind = ModeKind::along;     // the axis with the largest kinetic fraction
  std::size_t peak_node = 0;           // node of the largest displacement amplitude
  double peak_altitude_m = 0.0;        // |x_peak| - reference radius (bench: from node 0)
  double backward_error = 0.0;         // backward error of (lambda, shape), see modal_analysis.cpp
  /// (3, N+1) complex displacement amplitude [m] of all nodes (prescribed ones zero),
  /// scaled so that the largest node amplitude |q_k| is 1 m and the largest single
  /// component is real and positive. Motion: Re(shape exp(lambda t)).
  Eigen::Matrix<std::complex<double>, 3, Eigen::Dynamic> shape;
};

struct ModalOptions {
  int modes = 10;                  // k, the number of lowest modes wanted
  std::size_t dense_limit = 200;   // blocks of up to this many first-order unknowns: dense solver
  double tolerance = 1e-10;        // relative accuracy of the Arnoldi Ritz values
  int max_restarts = 1000;
};

struct ModalResult {
  std::vector<Mode> modes;               // lowest |lambda| first
  std::size_t dofs = 0;                  // 3 x free nodes
  std::vector<std::size_t> block_dofs;   // size of each decoupled block
  std::vector<std::string> block_method; // "dense" or "shift-invert Arnoldi (Spectra)"
  long operator_applications = 0;        // solves with the factorised stiffness
  /// Negative eigenvalues of the (symmetric) tangent stiffness K, by Sylvester's law of
  /// inertia on its LDL^T factors; -1 when K is not symmetric. 0 for a statically stable
  /// tether; > 0 means the equilibrium stands only if the rotation stabilises it.
  long stiffness_negative_directions = 0;
  double max_backward_error = 0.0;
};

/// The lowest `options.modes` modes. Throws InputError for k < 1 or k above the number of
/// degrees of freedom, or when the stiffness is singular (a free rigid motion); LibraryError
/// when the iteration does not converge.
ModalResult modal_analysis(const TetherModel& model, const ModalOptions& options);

/// The state vector (layout of `system`) of the mode's free motion at t = 0 with peak node
/// amplitude `amplitude_m`: u = a Re(shape), v = a Re(lambda shape). Started there, the
/// linearised tether moves in that mode alone (the check run of a modal analysis).
std::vector<double> mode_initial_state(const TetherSystem& system, const Mode& mode, double amplitude_m);

}  // namespace hawser
