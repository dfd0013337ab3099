#pragma once
// The files of config/ as compiled into the program (see scripts/embed_config.cmake).
#include <map>
#include <string>

namespace hawser {
/// File name (e.g. "materials.yaml") -> full text.
const std::map<std::string, std::string>& embedded_config();
}  // namespace hawser
