#pragma once
// ResultLayout: config/result_layout.yaml, the contract of the result file between the
// recorder and every reader (postprocess/hawser_result.py reads the same file). The recorder
// asks it the units of every dataset and numeric value it writes; a path the layout does not
// list is a program error (std::logic_error), so the file and its contract cannot drift apart.
#include <string>
#include <utility>
#include <vector>

namespace hawser {

/// `*` in `pattern` matches one or more characters other than '/'.
bool layout_pattern_matches(const std::string& pattern, const std::string& name);

class ResultLayout {
 public:
  /// The layout compiled into the program (config/result_layout.yaml).
  static const ResultLayout& embedded();
  /// Parses layout YAML text; std::logic_error when it is malformed.
  explicit ResultLayout(const std::string& yaml_text);

  const std::string& format() const { return format_; }
  int format_version() const { return format_version_; }
  /// Units of the dataset at `path`; std::logic_error when the layout does not list it.
  const std::string& dataset_units(const std::string& path) const;
  /// Units of the attribute `name` of the group at `group` ("text" for a string);
  /// std::logic_error when the layout does not list it.
  const std::string& value_units(const std::string& group, const std::string& name) const;

 private:
  using Entries = std::vector<std::pair<std::string, std::string>>;  // pattern, units
  std::string format_;
  int format_version_ = 0;
  Entries datasets_;
  std::vector<std::pair<std::string, Entries>> values_;  // group pattern, its values
};

}  // namespace hawser
