#pragma once
// The environment's part of an assembled tether: drag (when there is air), tides, and the
// scheduled events (cuts, strikes), built from the validated EnvironmentSpec
// (solver/input/environment_reader.hpp) on a built mesh. Nothing here reads keys, and nothing
// changes a model once built: the tether model takes what this returns.
//
// Choices written down here (and in the key reference):
//  - Sections seen by the wind: a ribbon's width and thickness from the element's area and
//    the width-to-thickness ratio (w t = A, w / t = k, as models/taper_design.hpp); a round
//    cable's diameter sqrt(4 A / pi); the bench cable is round.
//  - Tides: longitudes are planet-fixed; the rotating frame's +x points at the anchor's
//    longitude, so a body's node in that frame is its longitude minus the anchor's.
//  - Cuts by altitude cut the element spanning it in the reference geometry; strikes by
//    altitude hit the nearest free node; an impulse becomes delta_v = J / m_node.
//  - Turbulence is generated for the whole simulation (plus a margin) at build time.
#include <Eigen/Core>
#include <memory>
#include <vector>

#include "models/aerodynamic_drag.hpp"
#include "models/force_model.hpp"
#include "solver/assembly/mesh.hpp"

namespace hawser {

struct Scenario;

/// A sudden change of a node's velocity at a given time (a strike): momentum m dv is added.
struct VelocityJump {
  double time_s;
  std::size_t node;
  Eigen::Vector3d delta_v_m_s;
};

/// An element that parts at a given time.
struct ElementCut {
  std::size_t element;
  double time_s;
};

/// What the environment and the events add to a tether.
struct EnvironmentLoads {
  std::vector<std::shared_ptr<ForceModel>> body;     // drag (first, when there is air), tides
  std::shared_ptr<const AerodynamicDrag> drag;        // the full drag, also felt by climbers
  std::shared_ptr<const AerodynamicDrag> mean_drag;   // the mean wind alone (no gusts, no
                                                      // turbulence): the wind of the static
                                                      // state and the modes; null when calm
  std::vector<ElementCut> cuts;
  std::vector<VelocityJump> jumps;                    // strikes, sorted as written
};

/// The environment of `scenario` on `mesh` (its as-built geometry and node masses).
/// `reference_radius_m`: the planet's radius (altitude = |x| - R), 0 on the test bench;
/// `spin_rate_rad_s`: the planet's.
EnvironmentLoads build_environment(const Scenario& scenario, const Mesh& mesh,
                                   double reference_radius_m, double spin_rate_rad_s);

}  // namespace hawser
