#pragma once
// Runs a sweep's unfinished variants on the local cores, at most `jobs` processes at once
// (each a VariantProcess), recording each one's outcome in the sweep folder as it ends. A
// failed variant is recorded and the others go on. A progress line (finished, running,
// failed, ETA) on a terminal, nothing when standard error is not one.
#include <cstddef>
#include <vector>

#include "solver/input/study.hpp"
#include "solver/cli/sweep_folder.hpp"

namespace hawser {

struct PoolResult {
  std::size_t started = 0;  // processes started (a refused resume and its fresh start: 2)
  std::size_t failed = 0;   // runs that ended with a nonzero exit code
  int last_exit_code = 0;   // the exit code of the last run to end (for a single variant)
};

/// Runs every variant of `todo` that `folder` does not hold finished.
PoolResult run_variants(const Study& st, const std::vector<const Variant*>& todo,
                        const SweepFolder& folder, int jobs, bool progress);

}  // namespace hawser
