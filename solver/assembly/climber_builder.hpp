#pragma once
// Climber models from the validated ClimberSpecs (solver/input/climber_spec.hpp): altitudes on
// the reference line become material coordinates on the built tether.
#include <vector>

#include "models/climber_load.hpp"
#include "solver/input/climber_spec.hpp"

namespace hawser {

/// `reference_m`: distance of each node from the anchor along the tether at rest (altitudes
/// are measured on it); `coordinate_m`: the material coordinate to express positions in
/// (the same reference before the equilibrium is known, the unstretched arc length after).
/// The validation stage flew every profile on the reference line; should one not fit in
/// material coordinates (a leg shortened by the strain), InputError names its entry.
std::vector<Climber> build_climbers(const std::vector<ClimberSpec>& specs,
                                    const std::vector<double>& reference_m,
                                    const std::vector<double>& coordinate_m);

}  // namespace hawser
