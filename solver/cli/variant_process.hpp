#pragma once
// One variant run as its own process: the program re-executes itself (/proc/self/exe) as
// `hawser run BASE --set ... -o DIR/<id>.h5 [--resume DIR/<id>.h5]`, its output going to the
// variant's log, so that a crash or failure of one run cannot take the others down. The child
// is killed with its parent (PR_SET_PDEATHSIG): a killed sweep leaves no orphan writing a file,
// only result files marked "running", which the next sweep resumes.
#include <sys/types.h>

#include <chrono>
#include <string>

#include "solver/input/study.hpp"
#include "solver/cli/sweep_folder.hpp"

namespace hawser {

class VariantProcess {
 public:
  /// Starts the run (resuming its result file if `resume`). Throws std::runtime_error if the
  /// process cannot be created.
  VariantProcess(const Study& st, const Variant& v, const SweepFolder& folder, bool resume);
  pid_t pid() const { return pid_; }
  const Variant& variant() const { return *variant_; }
  bool resumed() const { return resume_; }
  /// The outcome once waitpid() reported `status` for this process (reads the log's last lines).
  Outcome finish(int wait_status) const;

 private:
  const Variant* variant_;
  const SweepFolder* folder_;
  bool resume_;
  pid_t pid_ = -1;
  std::chrono::steady_clock::time_point start_;
};

}  // namespace hawser
