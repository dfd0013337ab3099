#pragma once
// Reads a scenario file, applies --set overrides, resolves named planets and materials from
// config/, and validates every key against the key reference. Collects every problem before
// failing, so the user sees them all at once.
#include <string>
#include <vector>

#include "solver/input/scenario_values.hpp"

namespace hawser {

struct ReadScenario {
  ScenarioValues values;
  std::string text_as_run;  // the scenario after --set, named table entries written out in full
};

class ScenarioReader {
 public:
  /// `overrides` are "key.path=value" strings from --set.
  ScenarioReader(std::string file, std::vector<std::string> overrides);
  /// Reads and validates. Problems found are appended to `problems`; the result is only
  /// meaningful when `problems` stays empty.
  ReadScenario read(std::vector<Problem>& problems) const;
  /// Same, from text already in memory (tests); `file` is used for locations only.
  ReadScenario read_text(const std::string& text, std::vector<Problem>& problems) const;

 private:
  std::string file_;
  std::vector<std::string> overrides_;
};

/// Formats problems one per line, for an InputError.
std::string format_problems(const std::vector<Problem>& problems);

}  // namespace hawser
