#pragma once
// The environment of a run (environment.* and events.* keys of config/scenario_keys.yaml):
// read_environment() validates the keys into an EnvironmentSpec (every problem located, like
// the rest of the scenario); add_environment() turns it into force models, cuts and strikes
// on a built model.
//
// Choices written down here (and in the key reference):
//  - Air: none by default. us1976 on a planet (altitude |x| - equatorial radius); uniform
//    (one density) on the test bench only, where altitude is the distance from node 0.
//  - Wind, gusts and turbulence act only through drag, so they need an atmosphere.
//  - Sections seen by the wind: a ribbon's width and thickness from the element's area and
//    the width-to-thickness ratio (w t = A, w / t = k, as models/taper_design.hpp); a round
//    cable's diameter sqrt(4 A / pi); the bench cable is round.
//  - Tides: the Earth's Moon and Sun (models/third_body_tide.hpp), planet only. Longitudes are
//    planet-fixed; the rotating frame's +x points at the anchor's longitude, so a body's node
//    in that frame is its longitude minus the anchor's.
//  - Cuts by altitude cut the element spanning it in the reference geometry; strikes by
//    altitude hit the nearest free node; an impulse becomes delta_v = J / m_node.
//  - Turbulence is generated for the whole simulation (plus a margin) at build time.
#include <memory>
#include <vector>

#include "models/aerodynamic_drag.hpp"
#include "solver/input/environment_spec.hpp"
#include "solver/input/scenario_values.hpp"

namespace hawser {

struct Scenario;
struct TetherModel;

/// Reads environment.* and events.* of validated values. `s` must already hold the field kind,
/// planet, anchor, tether section and mesh; `length_m` is the tether's (or bench cable's)
/// length. Problems are appended with their locations.
EnvironmentSpec read_environment(const ScenarioValues& v, const Scenario& s, double length_m,
                                 std::vector<Problem>& problems);

/// The drag of the mean wind alone (the wind profiles blowing at t = 0; no gusts, no
/// turbulence), the wind load of the static state; null when no wind blows at t = 0.
std::shared_ptr<const AerodynamicDrag> mean_wind_drag(const Scenario& scenario,
                                                      const TetherModel& model);

/// Adds drag (when there is air), tides, cuts and strikes of `scenario.environment` to `model`
/// (whose mesh and bars are built); read_environment() has validated everything it uses.
void add_environment(const Scenario& scenario, TetherModel& model);

}  // namespace hawser
