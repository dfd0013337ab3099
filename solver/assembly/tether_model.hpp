#pragma once
// The assembled physical model of one tether: mesh, as-built and loaded static states, the bar
// elements and the list of other force models, the prescribed nodes. Built from a scenario;
// knows nothing of the integrator.
#include <memory>
#include <vector>

#include "models/anchor_motion.hpp"
#include "models/bar_elements.hpp"
#include "models/climber_load.hpp"
#include "models/force_model.hpp"
#include "solver/assembly/environment_builder.hpp"
#include "solver/assembly/equilibrium.hpp"
#include "solver/assembly/mesh.hpp"

namespace hawser {

struct Scenario;

struct TetherModel {
  Mesh mesh;
  Equilibrium equilibrium;
  std::shared_ptr<BarElements> bars;              // shared with the climbers (tensions)
  std::vector<std::shared_ptr<ForceModel>> body;  // gravity, frame, ... (not the bars); shared
                                                 // with the climbers, which feel some of them
  std::size_t static_body_models = 0;             // the first ones (gravity, frame) act in
                                                 // every static state; the rest (drag, tides) not
  std::vector<Climber> built_under;               // parked climbers the tether was built under
                                                 // (tether.built_under), at material coordinates
  std::string built_under_case;                   // that load case's name; empty: built unloaded
  std::unique_ptr<PrescribedMotion> anchor;       // node 0
  std::unique_ptr<PrescribedMotion> far_end;      // node N, or null when free
  double ultimate_strength_pa = 0.0;
  double spin_rate_rad_s = 0.0;                   // 0 on the test bench
  double reference_radius_m = 0.0;                // planet radius (0 on the bench): altitude = |x| - this
  std::vector<VelocityJump> jumps;                // strikes, applied by the run driver
  std::unique_ptr<ClimberLoad> climbers;          // null when the scenario has none
  /// The mean wind's drag (no gusts, no turbulence), the wind of the static state and of
  /// the modes; null when no wind blows at t = 0.
  std::shared_ptr<const ForceModel> mean_drag;
  /// The full drag (also in `body`), which climbers with a drag area feel; null without air.
  std::shared_ptr<const AerodynamicDrag> drag;

  std::size_t nodes() const { return mesh.nodes(); }
  std::size_t elements() const { return mesh.elements(); }
  /// All force models: bars first, climbers last.
  std::vector<const ForceModel*> forces() const;
  /// The same, with the drag of the mean wind in place of the full drag (gusts and
  /// turbulence): the forces about the static state, which the modes linearise.
  std::vector<const ForceModel*> mean_forces() const;
};

/// The as-built tether of a validated scenario and its force models, with no load on it:
/// Mesh::position is the as-built geometry (node masses carry the scenario's counterweight,
/// mean_drag the mean wind, for solver/assembly/static_loads.hpp to hang on it).
TetherModel build_as_built(const Scenario& scenario);

/// Builds the model of a validated scenario: the as-built tether (design, mesh, L0 of the
/// unloaded design with its computed counterweight), its force models, and the static
/// state under the scenario's loads (parked climbers, a counterweight other than the
/// design's, the mean wind), found by solver/assembly/static_solver.hpp with L0 fixed. Mesh::position
/// and Equilibrium::tension_n are that static state; Mesh::as_built_position and
/// Equilibrium::as_built_tension_n the unloaded design. InputError when no static state exists.
TetherModel build_model(const Scenario& scenario);

}  // namespace hawser
