#pragma once
// The state a run starts from: the equilibrium (all zeros in the displacement state), plus
// the scenario's half-sine displacements and single-node velocity kicks.
#include <vector>

#include "solver/input/scenario.hpp"
#include "solver/integration/tether_system.hpp"

namespace hawser {

std::vector<double> initial_state(const TetherSystem& system, const InitialSpec& spec);

/// Nodes kept in the time histories: every k-th (always with the first and last) or an
/// explicit, sorted, de-duplicated choice.
std::vector<std::size_t> output_nodes(std::size_t nodes, const OutputSpec& spec);

}  // namespace hawser
