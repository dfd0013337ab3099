#pragma once
// A sweep on a cluster, through the scheduler its users already have: the sbatch script of a
// Slurm job array with one array task per unfinished variant, each task running
// `hawser sweep STUDY --variant $SLURM_ARRAY_TASK_ID -o DIR`; and its submission with sbatch.
// (Slurm documentation: sbatch(1), "--array"; job array environment SLURM_ARRAY_TASK_ID.)
#include <cstddef>
#include <string>
#include <vector>

namespace hawser {

struct SlurmOptions {
  std::string partition, time, mem;  // passed to #SBATCH as given; empty: the cluster's default
};

/// "0-3,5,7-9" for {0,1,2,3,5,7,8,9} (sorted, distinct).
std::string array_ranges(const std::vector<std::size_t>& indices);

/// The script's text. `program`, `study` and `dir` should be absolute paths.
std::string sbatch_script(const std::string& job_name, const std::vector<std::size_t>& indices,
                          const std::string& program, const std::string& study,
                          const std::string& dir, const SlurmOptions& opt);

/// Submits `script_path` with `sbatch --parsable`; returns the job id. Throws std::runtime_error
/// with sbatch's own message if it is missing or refuses.
std::string submit_sbatch(const std::string& script_path);

/// True if an `sbatch` program is on PATH.
bool sbatch_available();

}  // namespace hawser
