#pragma once
// The subcommands of the `hawser` program. Each returns the process exit code of the
// command-line contract (0 done, 2 bad input, 3 stopped on a physical limit, 4 integrator
// failure, 1 anything else) or throws one of the error types of solver/input/errors.hpp.
#include <string>
#include <vector>

namespace hawser {

struct CommonOptions {
  std::string scenario;
  std::vector<std::string> overrides;  // --set key.path=value
};

int cmd_check(const CommonOptions& opt);
int cmd_design(const CommonOptions& opt, bool json);
/// The key reference; with a prefix ("climbers", "simulation.rtol"), only the keys whose path
/// starts with it (InputError when none does).
int cmd_keys(const std::string& prefix = "");
/// Refuses, before any work, an output file that exists (unless `overwrite`) or whose folder
/// does not (InputError, exit 2).
void check_output_path(const std::string& path, bool overwrite);
/// `output` empty: <scenario file name without .yaml>.h5 in the current directory.
/// `resume`: a killed run's result file to continue (empty: a new run).
/// `overwrite`: replace an existing file (refused otherwise, before any work).
int cmd_run(const CommonOptions& opt, std::string output, const std::string& resume,
            bool overwrite = false);

}  // namespace hawser
