#pragma once
// Conversion of scenario values written with a unit ("100000 km") to SI numbers.
// The table lives in config/units.yaml (embedded in the program): one row per dimension.
#include <map>
#include <string>
#include <vector>

namespace hawser {

class UnitTable {
 public:
  /// Parses the text of config/units.yaml; throws std::runtime_error if malformed.
  static UnitTable from_yaml(const std::string& text);
  /// The table built into the program.
  static const UnitTable& builtin();

  bool has_dimension(const std::string& dimension) const;
  /// SI unit symbol of a dimension, e.g. "m/s" for speed, "1" for dimensionless.
  const std::string& si_unit(const std::string& dimension) const;
  /// Units accepted for a dimension, for error messages ("m, km, cm, ...").
  std::vector<std::string> units_of(const std::string& dimension) const;
  /// Converts "<number>" or "<number> <unit>" to SI. On failure returns false and sets `why`.
  bool to_si(const std::string& text, const std::string& dimension, double& value_si,
             std::string& why) const;

 private:
  struct Dimension {
    std::string si;
    std::map<std::string, double> factor;  // unit symbol -> factor to SI
  };
  std::map<std::string, Dimension> dims_;
};

}  // namespace hawser
