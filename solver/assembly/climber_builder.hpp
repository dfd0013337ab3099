#pragma once
// Reads a scenario's climbers and schedules into Climber models, validating what the key
// reference alone cannot: positions on the tether, directions, flyable profiles, climbers
// that would run into each other. Every problem is collected before failing (InputError).
#include <vector>

#include "models/climber_load.hpp"
#include "solver/input/scenario.hpp"

namespace hawser {

/// `reference_m`: distance of each node from the anchor along the tether at rest (altitudes
/// are measured on it); `coordinate_m`: the material coordinate to express positions in
/// (the same reference before the equilibrium is known, the unstretched arc length after).
std::vector<Climber> read_climbers(const Scenario& scenario, const std::vector<double>& reference_m,
                                   const std::vector<double>& coordinate_m);

}  // namespace hawser
