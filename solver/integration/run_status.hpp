#pragma once
// How a run ended, as the result file's root `status` attribute spells it.
#include <string>

namespace hawser {

enum class RunStatus {
  running,   // not finished (a file read while its run goes on, or after a kill)
  complete,  // reached its end time
  stopped,   // ended on purpose before it: a rupture with simulation.stop_on_rupture
  failed,    // the integrator could not go on; everything up to the failure is kept
};

/// The attribute's text: "running", "complete", "stopped", "failed".
const char* to_string(RunStatus s);
/// The inverse of to_string; false for any other text.
bool parse_run_status(const std::string& text, RunStatus* out);

}  // namespace hawser
