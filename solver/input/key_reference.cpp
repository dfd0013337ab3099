#include "solver/input/key_reference.hpp"

#include <yaml-cpp/yaml.h>

#include <sstream>
#include <stdexcept>

#include "solver/input/units.hpp"
#include "solver/input/embedded_config.hpp"

namespace hawser {

std::string KeySpec::parent() const {
  const auto dot = path.rfind('.');
  std::string p = dot == std::string::npos ? "" : path.substr(0, dot);
  return p;
}

std::string KeySpec::leaf() const {
  const auto dot = path.rfind('.');
  return dot == std::string::npos ? path : path.substr(dot + 1);
}

namespace {
std::optional<double> opt_number(const YAML::Node& n) {
  if (!n) return std::nullopt;
  return n.as<double>();
}
std::vector<std::string> string_list(const YAML::Node& n) {
  std::vector<std::string> out;
  if (n)
    for (const auto& x : n) out.push_back(x.as<std::string>());
  return out;
}
}  // namespace

KeyReference KeyReference::from_yaml(const std::string& text) {
  KeyReference ref;
  const YAML::Node root = YAML::Load(text);
  for (const auto& entry : root["keys"]) {
    KeySpec k;
    k.path = entry.first.as<std::string>();
    const YAML::Node& v = entry.second;
    const std::string type = v["type"].as<std::string>();
    if (!parse_key_type(type, &k.type))
      throw std::runtime_error("key reference: " + k.path + " has unknown type " + type);
    if (v["dimension"]) {
      k.dimension = v["dimension"].as<std::string>();
      if (!UnitTable::builtin().has_dimension(k.dimension))
        throw std::runtime_error("key reference: " + k.path + " has unknown dimension " + k.dimension);
    }
    k.required = v["required"] && v["required"].as<bool>();
    if (v["required_when"]) {
      const auto cond = v["required_when"].as<std::string>();
      const auto eq = cond.find('=');
      if (eq == std::string::npos) throw std::runtime_error("key reference: bad required_when of " + k.path);
      k.required_when_key = cond.substr(0, eq);
      k.required_when_value = cond.substr(eq + 1);
    }
    if (v["default"]) k.default_text = v["default"].as<std::string>();
    k.min = opt_number(v["min"]);
    k.max = opt_number(v["max"]);
    k.min_exclusive = opt_number(v["min_exclusive"]);
    k.max_exclusive = opt_number(v["max_exclusive"]);
    k.choices = string_list(v["choices"]);
    k.keywords = string_list(v["keywords"]);
    if (v["table"]) k.table = v["table"].as<std::string>();
    k.meaning = v["meaning"] ? v["meaning"].as<std::string>() : "";
    ref.index_[k.path] = ref.keys_.size();
    ref.keys_.push_back(std::move(k));
  }
  for (const auto& k : ref.keys_) {
    std::string parent = k.parent();  // "climbers[]" for the keys of a list's items
    if (parent.size() > 2 && parent.compare(parent.size() - 2, 2, "[]") == 0) parent.resize(parent.size() - 2);
    if (!parent.empty() && !ref.find(parent))
      throw std::runtime_error("key reference: " + k.path + " has no parent entry");
  }
  return ref;
}

const KeyReference& KeyReference::builtin() {
  static const KeyReference ref = from_yaml(embedded_config().at("scenario_keys.yaml"));
  return ref;
}

const KeySpec* KeyReference::find(const std::string& pattern) const {
  const auto it = index_.find(pattern);
  return it == index_.end() ? nullptr : &keys_[it->second];
}

std::vector<const KeySpec*> KeyReference::children(const std::string& pattern) const {
  std::vector<const KeySpec*> out;
  for (const auto& k : keys_)
    if (k.parent() == pattern) out.push_back(&k);
  return out;
}

std::string KeyReference::describe() const {
  std::ostringstream os;
  for (const auto& k : keys_) {
    os << k.path << "  (" << to_string(k.type);
    if (!k.dimension.empty()) os << ", " << UnitTable::builtin().si_unit(k.dimension);
    if (k.required) os << ", required";
    if (!k.required_when_key.empty()) os << ", required when " << k.required_when_key << " = " << k.required_when_value;
    if (k.default_text) os << ", default " << *k.default_text;
    if (!k.choices.empty()) {
      os << ", one of:";
      for (const auto& c : k.choices) os << ' ' << c;
    }
    os << ")\n    " << k.meaning << '\n';
  }
  return os.str();
}

}  // namespace hawser
