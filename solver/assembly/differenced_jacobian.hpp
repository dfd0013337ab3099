#pragma once
// dF/dx of one force model by central differences, for the models whose analytic position
// Jacobian leaves terms out (ForceModel::exact_position_jacobian() false: the drag, whose
// Jacobian omits the change of air density and wind with altitude and the turning of the
// local east). Those omissions only slow an integrator's Newton iteration; a static solve
// needs the true tangent to converge quadratically, and a linearisation needs it to be right
// (left out, the turning of the east makes a spurious circulatory force: on
// scenarios/storm.yaml the tilt mode then grew, damping ratio -4e-4).
//
// Columns of nodes three apart are differenced together (a model's force on node i depends
// on nodes i-1, i, i+1 only, force_model.hpp), so one Jacobian costs 18 force evaluations.
// Step: 1e-5 of the shorter adjacent chord (truncation ~1e-10 relative; round-off ~1e-7 on
// 1e7 m radii with 1 km elements).
#include <cstddef>
#include <vector>

#include "models/force_model.hpp"

namespace hawser {

/// Adds dF_i/dx_k of `model` at state s (velocities as given) for the nodes k in
/// [first, last] (the free ones) to j.dx(i, k), i = k-1, k, k+1.
void add_differenced_position_jacobian(const ForceModel& model, const TetherState& s,
                                       std::size_t first, std::size_t last, NodeJacobian& j);

/// Adds every model's Jacobian to j: add_jacobian() for those with an exact position
/// Jacobian; for the others their velocity blocks from add_jacobian() and their position
/// blocks by central differences.
void add_complete_jacobian(const std::vector<const ForceModel*>& models, const TetherState& s,
                           std::size_t first, std::size_t last, NodeJacobian& j);

}  // namespace hawser
