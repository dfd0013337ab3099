#pragma once
// `hawser sweep STUDY.yaml`: many variants of one scenario, on the local cores or as a Slurm
// job array, then a summary table and a ranking. See study_reader.hpp (the study file),
// sweep_folder.hpp (the output folder), sweep_pool.hpp (local runs), slurm_array.hpp.
#include <string>

#include "solver/cli/slurm_array.hpp"

namespace hawser {

struct SweepOptions {
  std::string study;
  std::string output;    // the sweep folder; empty: <study name>-sweep in the current directory
  int jobs = 0;          // local processes at once; 0: every core
  long variant = -1;     // >= 0: run only this variant (a Slurm array task)
  bool slurm = false;    // write and submit the job array
  bool dry_run = false;  // with slurm: print the script instead of submitting it
  bool collect = false;  // build the tables from the folder only
  SlurmOptions slurm_options;
};

/// Exit codes: 0 every variant has a final result (complete, stopped or failed run: see the
/// tables); 1 some variant has none (a run that could not start or crashed); 2 bad study or
/// usage. With --variant: that run's own exit code.
int cmd_sweep(const SweepOptions& opt);

}  // namespace hawser
