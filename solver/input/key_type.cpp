#include "solver/input/key_type.hpp"

namespace hawser {

namespace {
constexpr struct {
  KeyType type;
  const char* word;
} kTypes[] = {{KeyType::quantity, "quantity"},       {KeyType::integer, "integer"},
              {KeyType::boolean, "boolean"},         {KeyType::string, "string"},
              {KeyType::choice, "choice"},           {KeyType::map, "map"},
              {KeyType::list, "list"},               {KeyType::name_or_map, "name_or_map"},
              {KeyType::vector3, "vector3"},         {KeyType::integer_list, "integer_list"},
              {KeyType::quantity_list, "quantity_list"}};
}  // namespace

bool parse_key_type(const std::string& word, KeyType* out) {
  for (const auto& t : kTypes)
    if (word == t.word) {
      *out = t.type;
      return true;
    }
  return false;
}

const char* to_string(KeyType t) {
  for (const auto& k : kTypes)
    if (k.type == t) return k.word;
  return "?";
}

}  // namespace hawser
