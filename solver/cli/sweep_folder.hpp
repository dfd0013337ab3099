#pragma once
// The output folder of a sweep, the one place that knows its layout:
//   study.json          the study as planned (variants, ids, overrides); a folder serves one study
//   <id>.h5, <id>.xmf   each variant's result file (written by its own `hawser run`)
//   logs/<id>.log       the run's standard output and error
//   logs/<id>.json      its outcome: exit code, wall time, message (written when it ends)
//   sweep.log           one line per run started and ended (appended by every sweep process)
//   summary.csv, ranking.md  the tables (sweep_tables.hpp)
// A variant is finished when its result file is final (status no longer "running") or, for a
// run that failed before writing one, when its outcome says so.
#include <optional>
#include <string>

#include "solver/input/study.hpp"

namespace hawser {

struct Outcome {
  int exit_code = 0;    // the process's exit code; 128 + n if killed by signal n
  double wall_s = 0;    // wall time of the process [s]
  std::string message;  // its last "error:" line, or its last line
};

enum class VariantState { to_run, to_resume, finished };

class SweepFolder {
 public:
  explicit SweepFolder(std::string dir);
  const std::string& dir() const { return dir_; }
  std::string result(const Variant& v) const { return dir_ + "/" + v.id + ".h5"; }
  std::string log(const Variant& v) const { return dir_ + "/logs/" + v.id + ".log"; }
  std::string outcome_file(const Variant& v) const { return dir_ + "/logs/" + v.id + ".json"; }

  /// Creates the folder and writes study.json, or checks that the one there is of the same
  /// study (same base scenario text and `set`); InputError (exit 2) if not.
  void claim(const Study& st) const;
  VariantState state(const Variant& v) const;
  std::optional<Outcome> outcome(const Variant& v) const;
  void write_outcome(const Variant& v, const Outcome& o) const;
  /// Removes a result file that cannot be continued (and its segment folder and .xmf).
  void discard_result(const Variant& v) const;
  /// Appends one line, stamped with the UTC time and the process id, to sweep.log.
  void log_line(const std::string& text) const;

 private:
  std::string dir_;
};

/// Writes `text` to `path` through a temporary file and a rename: never half a file.
void write_file_atomically(const std::string& path, const std::string& text);

}  // namespace hawser
