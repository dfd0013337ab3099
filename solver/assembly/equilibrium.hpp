#pragma once
// The exact discrete equilibrium (physics.md section 3): the reference geometry is taken as
// the stretched state at rest; each element's tension follows from the node force balance
// worked down from the far end,
//   T_{N-1} = F_N . a            (free far end: the body force on the top node),
//   T_{e-1} = T_e + F_e . a      (node e, 0 < e < N),
// with a the unit vector along the tether and F the body forces at rest; then
//   L0_e = l_e / (1 + T_e / (E A_e)),
// so that a run started there stays there to round-off. A far end held fixed (test bench)
// carries the scenario's pretension in its last element instead.
#include <string>
#include <vector>

#include "models/force_model.hpp"
#include "solver/assembly/mesh.hpp"

namespace hawser {

struct Equilibrium {
  std::vector<double> tension_n;  // (N) [N] in the static state runs start from (Mesh::position)
  std::vector<double> as_built_tension_n;  // (N) [N] of the unloaded design
                                           // (Mesh::as_built_position)
  std::vector<double> l0_m;       // (N) unstretched lengths [m]: the as-built tether
  std::vector<double> s0_m;       // (N+1) unstretched arc length from node 0 [m]
  // The static state (solver/assembly/static_solver.hpp): what loads it, and what solving it took.
  std::string load_case = "no load";
  int newton_iterations = 0;
  int load_steps = 0;
  double residual_n = 0.0;        // final |R|_inf [N]
  double fold_load_factor = 1.0;  // < 1: the continuation from the as-built state stopped there
  int relax_iterations = 0;       // pseudo-transient steps from there to the state
};

/// The as-built tether: tension_n = as_built_tension_n. `body` are the force models other
/// than the bars, evaluated at rest on the reference geometry. Throws InputError if some element would have to push (no tension equilibrium).
Equilibrium solve_equilibrium(const Mesh& mesh, double youngs_modulus_pa, double pretension_n,
                              const std::vector<const ForceModel*>& body);

}  // namespace hawser
