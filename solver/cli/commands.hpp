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
int cmd_keys();
/// `output` empty: <scenario file name without .yaml>.h5 in the current directory.
/// `resume`: a killed run's result file to continue (empty: a new run).
int cmd_run(const CommonOptions& opt, std::string output, const std::string& resume);

}  // namespace hawser
