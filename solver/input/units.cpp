#include "solver/input/units.hpp"

#include <yaml-cpp/yaml.h>

#include <cmath>
#include <cstdlib>
#include <stdexcept>

#include "solver/input/embedded_config.hpp"

namespace hawser {

UnitTable UnitTable::from_yaml(const std::string& text) {
  UnitTable t;
  const YAML::Node root = YAML::Load(text);
  for (const auto& d : root["dimensions"]) {
    Dimension dim;
    dim.si = d.second["si"].as<std::string>();
    for (const auto& u : d.second["units"]) dim.factor[u.first.as<std::string>()] = u.second.as<double>();
    t.dims_[d.first.as<std::string>()] = dim;
  }
  if (t.dims_.empty()) throw std::runtime_error("units table has no dimensions");
  return t;
}

const UnitTable& UnitTable::builtin() {
  static const UnitTable table = from_yaml(embedded_config().at("units.yaml"));
  return table;
}

bool UnitTable::has_dimension(const std::string& dimension) const { return dims_.count(dimension) > 0; }

const std::string& UnitTable::si_unit(const std::string& dimension) const { return dims_.at(dimension).si; }

std::vector<std::string> UnitTable::units_of(const std::string& dimension) const {
  std::vector<std::string> out;
  for (const auto& u : dims_.at(dimension).factor) out.push_back(u.first);
  return out;
}

bool UnitTable::to_si(const std::string& text, const std::string& dimension, double& value_si,
                      std::string& why) const {
  const Dimension& dim = dims_.at(dimension);
  const char* begin = text.c_str();
  char* end = nullptr;
  const double number = std::strtod(begin, &end);
  if (end == begin) {
    why = "expected a number" + std::string(dimension == "dimensionless" ? "" : " with an optional unit") +
          ", got '" + text + "'";
    return false;
  }
  std::string unit(end);
  const auto first = unit.find_first_not_of(" \t");
  unit = first == std::string::npos ? "" : unit.substr(first, unit.find_last_not_of(" \t") - first + 1);
  double factor = 1.0;
  if (!unit.empty()) {
    const auto it = dim.factor.find(unit);
    if (it == dim.factor.end()) {
      std::string list;
      for (const auto& u : dim.factor) list += (list.empty() ? "" : ", ") + u.first;
      why = "unknown unit '" + unit + "' for a " + dimension + (list.empty() ? " value (no unit allowed)" : " (use " + list + ")");
      return false;
    }
    factor = it->second;
  }
  if (!std::isfinite(number)) {
    why = "value is not finite: '" + text + "'";
    return false;
  }
  value_si = number * factor;
  return true;
}

}  // namespace hawser
