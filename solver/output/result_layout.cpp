#include "solver/output/result_layout.hpp"

#include <stdexcept>

#include <yaml-cpp/yaml.h>

#include "solver/input/embedded_config.hpp"

namespace hawser {

namespace {
const char* const kFromSummary = "from /summary";  // /checkpoint/summary repeats /summary

const std::string* find(const std::vector<std::pair<std::string, std::string>>& entries,
                        const std::string& name) {
  for (const auto& [pattern, units] : entries)
    if (layout_pattern_matches(pattern, name)) return &units;
  return nullptr;
}
}  // namespace

bool layout_pattern_matches(const std::string& pattern, const std::string& name) {
  std::size_t p = 0, n = 0;
  while (p < pattern.size()) {
    if (pattern[p] != '*') {
      if (n >= name.size() || name[n] != pattern[p]) return false;
      ++p, ++n;
      continue;
    }
    // `*`: at least one character, never '/'; try every length (the names are short).
    for (std::size_t end = n + 1; end <= name.size() && name[end - 1] != '/'; ++end)
      if (layout_pattern_matches(pattern.substr(p + 1), name.substr(end))) return true;
    return false;
  }
  return n == name.size();
}

const ResultLayout& ResultLayout::embedded() {
  static const ResultLayout layout(embedded_config().at("result_layout.yaml"));
  return layout;
}

ResultLayout::ResultLayout(const std::string& yaml_text) {
  try {
    const YAML::Node root = YAML::Load(yaml_text);
    format_ = root["format"].as<std::string>();
    format_version_ = root["format_version"].as<int>();
    for (const auto& kv : root["datasets"])
      datasets_.emplace_back(kv.first.as<std::string>(), kv.second["units"].as<std::string>());
    for (const auto& group : root["values"]) {
      Entries entries;
      for (const auto& kv : group.second)
        entries.emplace_back(kv.first.as<std::string>(), kv.second["units"].as<std::string>());
      values_.emplace_back(group.first.as<std::string>(), std::move(entries));
    }
  } catch (const YAML::Exception& e) {
    throw std::logic_error(std::string("config/result_layout.yaml: ") + e.what());
  }
}

const std::string& ResultLayout::dataset_units(const std::string& path) const {
  if (const std::string* u = find(datasets_, path)) return *u;
  throw std::logic_error("the result layout (config/result_layout.yaml) lists no dataset " + path);
}

const std::string& ResultLayout::value_units(const std::string& group,
                                             const std::string& name) const {
  for (const auto& [pattern, entries] : values_) {
    if (!layout_pattern_matches(pattern, group)) continue;
    const std::string* u = find(entries, name);
    if (u && *u == kFromSummary) return value_units("/summary", name);
    if (u) return *u;
  }
  throw std::logic_error("the result layout (config/result_layout.yaml) lists no value " + name +
                         " of " + group);
}

}  // namespace hawser
