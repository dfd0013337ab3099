#pragma once
// Reads a study file (`hawser sweep STUDY.yaml`): validates it against config/study_keys.yaml,
// expands its axes into variants, and validates every variant's overrides exactly as `--set`
// validates them, on the base scenario. Every problem is collected, each with the study's
// file:line:column and the key path; InputError (exit 2) if there is any, before anything runs.
#include <string>

#include "solver/input/study.hpp"

namespace hawser {

/// Throws InputError listing every problem. `only` >= 0: of the variants' overrides, check
/// only that variant's (a Slurm array task runs one; the submission checked them all).
Study read_study(const std::string& file, long only = -1);

}  // namespace hawser
