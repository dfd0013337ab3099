#pragma once
// The caution that goes with every output that could be taken for safety evidence: the result
// files (root attribute `caution`), the JSON outputs, the end of `run`'s and `modes`' text.
namespace hawser {

/// One line, as the result files' root attribute and the JSON outputs carry it.
inline constexpr const char* kCaution =
    "hawser is a research tool, not a certification method; real structures answer to "
    "licensed engineering practice and the applicable standards.";

/// The same for a terminal: two-space indent, lines under 100 columns.
inline constexpr const char* kCautionLines =
    "  hawser is a research tool, not a certification method: real structures answer to licensed\n"
    "  engineering practice and the applicable standards.\n";

}  // namespace hawser
