#include "solver/input/scenario_values.hpp"

#include <stdexcept>

namespace hawser {

const ScenarioValue& ScenarioValues::at(const std::string& path) const {
  const auto it = values_.find(path);
  if (it == values_.end()) throw std::logic_error("scenario value not present: " + path);
  return it->second;
}

bool ScenarioValues::is_keyword(const std::string& path, const std::string& keyword) const {
  return has(path) && at(path).type == KeyType::quantity && at(path).text == keyword;
}

std::string ScenarioValues::where(const std::string& path) const {
  std::string p = path;
  while (!p.empty()) {
    const auto it = values_.find(p);
    if (it != values_.end() && it->second.where != "default") return it->second.where;
    const auto cut = p.find_last_of(".[");
    p = cut == std::string::npos ? "" : p.substr(0, cut);
  }
  const auto root = values_.find("");
  return root == values_.end() ? "scenario" : root->second.where;
}

}  // namespace hawser
