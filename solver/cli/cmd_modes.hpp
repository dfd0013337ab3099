#pragma once
// `hawser modes SCENARIO [-k N] [-o FILE.h5] [--json]`: the lowest modes of the tether about
// its equilibrium (solver/integration/modal_analysis.hpp) as a readable table or JSON, and their shapes
// in an HDF5 file for plotting.
#include <string>

#include "solver/cli/commands.hpp"

namespace hawser {

/// `k` modes; `output` empty: no shape file. Returns the exit code (0) or throws
/// InputError (k < 1, more modes than degrees of freedom, no modes).
int cmd_modes(const CommonOptions& opt, int k, const std::string& output, bool json);

}  // namespace hawser
