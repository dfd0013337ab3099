#include "solver/integration/run_status.hpp"

namespace hawser {

namespace {
constexpr struct {
  RunStatus status;
  const char* text;
} kNames[] = {{RunStatus::running, "running"},
              {RunStatus::complete, "complete"},
              {RunStatus::stopped, "stopped"},
              {RunStatus::failed, "failed"}};
}  // namespace

const char* to_string(RunStatus s) {
  for (const auto& n : kNames)
    if (n.status == s) return n.text;
  return "running";
}

bool parse_run_status(const std::string& text, RunStatus* out) {
  for (const auto& n : kNames)
    if (text == n.text) {
      *out = n.status;
      return true;
    }
  return false;
}

}  // namespace hawser
