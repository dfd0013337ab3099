#pragma once
// The assembled physical model of one tether: mesh, equilibrium, the bar elements and the
// list of other force models, the prescribed nodes. Built from a scenario; knows nothing of
// the integrator.
#include <memory>
#include <vector>

#include "models/anchor_motion.hpp"
#include "models/bar_elements.hpp"
#include "models/climber_load.hpp"
#include "models/force_model.hpp"
#include "solver/equilibrium.hpp"
#include "solver/mesh.hpp"

namespace hawser {

struct Scenario;

/// A sudden change of a node's velocity at a given time (a strike): momentum m dv is added.
struct VelocityJump {
  double time_s;
  std::size_t node;
  Eigen::Vector3d delta_v_m_s;
};

struct TetherModel {
  Mesh mesh;
  Equilibrium equilibrium;
  std::unique_ptr<BarElements> bars;
  std::vector<std::shared_ptr<ForceModel>> body;  // gravity, frame, ... (not the bars); shared
                                                 // with the climbers, which feel some of them
  std::unique_ptr<PrescribedMotion> anchor;       // node 0
  std::unique_ptr<PrescribedMotion> far_end;      // node N, or null when free
  double ultimate_strength_pa = 0.0;
  double spin_rate_rad_s = 0.0;                   // 0 on the test bench
  double reference_radius_m = 0.0;                // planet radius (0 on the bench): altitude = |x| - this
  std::vector<VelocityJump> jumps;                // strikes, applied by the run driver
  std::unique_ptr<ClimberLoad> climbers;          // null when the scenario has none

  std::size_t nodes() const { return mesh.nodes(); }
  std::size_t elements() const { return mesh.elements(); }
  /// All force models: bars first, climbers last.
  std::vector<const ForceModel*> forces() const;
};

/// Builds the model of a validated scenario (design, mesh, equilibrium, force models).
TetherModel build_model(const Scenario& scenario);

}  // namespace hawser
