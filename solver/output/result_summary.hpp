#pragma once
// What a sweep reads of a variant's result file: the root `status` and every scalar attribute
// of /summary (numbers and texts), in the file's name order. A file whose status is "running"
// is not final (a run still going, or killed: see result_recorder.hpp).
#include <map>
#include <optional>
#include <string>

namespace hawser {

struct SummaryValue {
  bool is_text = false;
  bool is_integer = false;
  double number = 0.0;
  long long integer = 0;
  std::string text;
  /// Exact text: integers in full, doubles with 17 significant digits (round-trips bit for bit).
  std::string str() const;
};

struct ResultSummary {
  std::string status;                           // "running", "complete", "stopped", "failed"
  std::map<std::string, SummaryValue> summary;  // empty while running
  bool final() const { return status == "complete" || status == "stopped" || status == "failed"; }
  std::optional<double> number(const std::string& metric) const;
};

/// Reads `path`; throws LibraryError if it is not a readable HDF5 file.
ResultSummary read_result_summary(const std::string& path);

}  // namespace hawser
