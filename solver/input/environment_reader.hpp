#pragma once
// Reads environment.* and events.* of validated scenario values into an EnvironmentSpec, every
// problem located (file:line:column and key), like the rest of the scenario. Part of the one
// validation stage: nothing here builds a model.
//
// Choices written down here (and in the key reference):
//  - Air: none by default. us1976 on a planet (altitude |x| - equatorial radius); uniform
//    (one density) on the test bench only, where altitude is the distance from node 0.
//  - Wind, gusts and turbulence act only through drag, so they need an atmosphere.
//  - Drag coefficient by default: a flat plate broadside for a ribbon, a circular cylinder for
//    a round cable (Hoerner, Fluid-Dynamic Drag, 1965; recalled from memory).
//  - Tides: the Earth's Moon and Sun (models/third_body_tide.hpp), planet only.
//  - Turbulence: the sample interval (given, or a fifth of the smallest L/V of the stations)
//    and the series length (the run and a margin) are resolved here.
#include <vector>

#include "solver/input/environment_spec.hpp"
#include "solver/input/scenario_values.hpp"

namespace hawser {

struct Scenario;

/// Reads environment.* and events.*. `s` must already hold the field kind, planet, anchor,
/// tether section, mesh and simulation; `length_m` is the tether's (or bench cable's) length.
/// Problems are appended with their locations.
EnvironmentSpec read_environment(const ScenarioValues& v, const Scenario& s, double length_m,
                                 std::vector<Problem>& problems);

}  // namespace hawser
