#pragma once
// The types a scenario key can have (the `type` of an entry in config/scenario_keys.yaml).
#include <string>

namespace hawser {

enum class KeyType {
  quantity,       // a number with a unit (or one of the key's keywords), stored in SI
  integer,        // a whole number
  boolean,        // true/false (yes/no, on/off)
  string,         // free text
  choice,         // one word of a fixed list
  map,            // a mapping of sub-keys
  list,           // a list of mappings (climbers[])
  name_or_map,    // an entry of a config table by name, or an inline mapping
  vector3,        // three quantities [x, y, z]
  integer_list,   // whole numbers >= 0
  quantity_list,  // quantities of one dimension
};

/// The table's spelling; false for an unknown word.
bool parse_key_type(const std::string& word, KeyType* out);
const char* to_string(KeyType t);

}  // namespace hawser
