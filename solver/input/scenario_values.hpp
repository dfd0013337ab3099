#pragma once
// A scenario file after validation against the key reference: a flat map from key path
// ("tether.safety_factor", "climbers[0].mass") to a typed value in SI, with where each value
// was written ("demo.yaml:12:5" or "--set tether.safety_factor=3"). Defaults of the table are
// filled in for absent keys whose parent is present.
#include <map>
#include <string>
#include <vector>

#include "solver/input/key_type.hpp"

namespace hawser {

struct ScenarioValue {
  KeyType type = KeyType::map;  // the key's type from the reference
  bool invalid = false;   // given, but its value was refused (no second "missing" for it)
  double number = 0.0;    // quantity (SI)
  long long integer = 0;  // integer; list: number of items
  bool boolean = false;
  std::string text;       // string, choice, keyword of a quantity, table name of name_or_map
  std::vector<double> vector;  // vector3 (SI)
  std::string where;      // file:line:column or the --set that gave it; "default" if defaulted
};

/// One problem found in a scenario, with its location and key path.
struct Problem {
  std::string where;
  std::string key;
  std::string message;
  std::string str() const { return where + ": " + key + ": " + message; }
};

class ScenarioValues {
 public:
  bool has(const std::string& path) const { return values_.count(path) > 0; }
  const ScenarioValue& at(const std::string& path) const;
  double quantity(const std::string& path) const { return at(path).number; }
  long long integer(const std::string& path) const { return at(path).integer; }
  bool boolean(const std::string& path) const { return at(path).boolean; }
  const std::string& text(const std::string& path) const { return at(path).text; }
  /// True if the quantity at `path` was given as `keyword` (e.g. "computed").
  bool is_keyword(const std::string& path, const std::string& keyword) const;
  /// Where the key (or, failing that, its nearest present parent) was written.
  std::string where(const std::string& path) const;
  void set(const std::string& path, ScenarioValue v) { values_[path] = std::move(v); }
  const std::map<std::string, ScenarioValue>& all() const { return values_; }

 private:
  std::map<std::string, ScenarioValue> values_;
};

}  // namespace hawser
