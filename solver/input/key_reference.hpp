#pragma once
// The reference table of scenario keys (config/scenario_keys.yaml): what each key is, its
// unit, limits and meaning. The loader validates against it; `hawser keys` prints it.
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "solver/input/key_type.hpp"

namespace hawser {

struct KeySpec {
  std::string path;           // "tether.safety_factor", "climbers[].mass"
  KeyType type = KeyType::quantity;
  std::string dimension;      // quantity / vector3: a row of the unit table
  bool required = false;
  std::string required_when_key, required_when_value;  // "field.kind=planet" split
  std::optional<std::string> default_text;  // as written in the table
  std::optional<double> min, max, min_exclusive, max_exclusive;  // SI
  std::vector<std::string> choices;   // choice
  std::vector<std::string> keywords;  // quantity: words accepted instead of a number
  std::string table;                  // name_or_map: config file
  std::string meaning;
  /// Parent path ("" for top level), e.g. "tether.section" for "tether.section.shape".
  std::string parent() const;
  /// Last component, e.g. "shape".
  std::string leaf() const;
};

class KeyReference {
 public:
  static KeyReference from_yaml(const std::string& text);
  /// The table built into the program.
  static const KeyReference& builtin();

  const KeySpec* find(const std::string& pattern) const;
  /// Entries whose parent is `pattern`, in table order.
  std::vector<const KeySpec*> children(const std::string& pattern) const;
  const std::vector<KeySpec>& all() const { return keys_; }
  /// Human-readable listing: path, type, unit, default, meaning.
  std::string describe() const;

 private:
  std::vector<KeySpec> keys_;
  std::map<std::string, std::size_t> index_;
};

}  // namespace hawser
