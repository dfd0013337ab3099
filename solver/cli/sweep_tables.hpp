#pragma once
// The tables of a sweep, built from its folder alone (so `--collect` after a Slurm array gives
// the same as a local sweep): summary.csv, one row per variant (the keys varied, status, exit
// code, wall time, message, every /summary metric), and the ranking by the study's metrics,
// with the variants that break a limit marked (ranking.md, also printed).
#include <optional>
#include <string>
#include <vector>

#include "solver/output/result_summary.hpp"
#include "solver/input/study.hpp"
#include "solver/cli/sweep_folder.hpp"

namespace hawser {

struct SweepRow {
  const Variant* variant = nullptr;
  std::string
      status;  // the result file's, or "not run", "running", "no result" (failed before writing)
  std::optional<int> exit_code;
  std::optional<double> wall_s;
  std::string message;
  ResultSummary result;
  std::vector<std::string> broken;  // limits broken, as "min_safety_factor >= 1.5 (1.23)"
};

std::vector<SweepRow> gather_rows(const Study& st, const SweepFolder& folder);
std::string summary_csv(const Study& st, const std::vector<SweepRow>& rows);
/// The rows in ranked order (see ranking_markdown for the rule).
std::vector<const SweepRow*> ranked(const Study& st, const std::vector<SweepRow>& rows);
/// Markdown: complete runs holding every limit first, by the rank metrics; then those breaking
/// a limit; then runs without a complete result.
std::string ranking_markdown(const Study& st, const std::vector<SweepRow>& rows);

}  // namespace hawser
