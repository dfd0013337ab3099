// ResultLayout (solver/output/result_layout.hpp): the recorder's reading of
// config/result_layout.yaml. The layout's own values are the reference here; the written files
// are checked against it by tests/cli/test_result_layout.py.
#include "catch_compat.hpp"

#include <stdexcept>
#include <string>

#include "solver/output/result_layout.hpp"

using hawser::layout_pattern_matches;
using hawser::ResultLayout;

TEST_CASE("layout patterns: * stands for one name, never for a path", "[output]") {
  CHECK(layout_pattern_matches("/time", "/time"));
  CHECK_FALSE(layout_pattern_matches("/time", "/times"));
  CHECK(layout_pattern_matches("/climbers/*/s", "/climbers/kite/s"));
  CHECK_FALSE(layout_pattern_matches("/climbers/*/s", "/climbers//s"));       // one or more
  CHECK_FALSE(layout_pattern_matches("/climbers/*/s", "/climbers/a/b/s"));    // not across '/'
  CHECK(layout_pattern_matches("climber_*_peak_drive_force_n",
                               "climber_lift_2_peak_drive_force_n"));  // '_' inside a name
  CHECK_FALSE(layout_pattern_matches("climber_*_peak_drive_force_n", "climber_x_peak_drive_force"));
}

TEST_CASE("the embedded layout gives units, and refuses what it does not list", "[output]") {
  const ResultLayout& l = ResultLayout::embedded();
  CHECK(l.format() == "hawser-timehistory");
  CHECK(l.format_version() == 2);
  CHECK(l.dataset_units("/time") == "s");
  CHECK(l.dataset_units("/elements/tension") == "N");
  CHECK(l.dataset_units("/climbers/kite/drive_force") == "N");
  CHECK(l.dataset_units("/environment/drag_load") == "N/m");
  CHECK(l.value_units("/summary", "peak_tension_n") == "N");
  CHECK(l.value_units("/summary", "status") == "text");
  CHECK(l.value_units("/summary", "climber_kite_peak_drive_force_n") == "N");
  CHECK(l.value_units("/climbers/kite", "to_m") == "m");
  CHECK(l.value_units("/checkpoint/summary", "min_tension_n") == "N");  // as in /summary
  CHECK_THROWS_AS(l.dataset_units("/elements/stress"), std::logic_error);
  CHECK_THROWS_AS(l.value_units("/summary", "peak_tension_N"), std::logic_error);
  CHECK_THROWS_AS(l.value_units("/nowhere", "x"), std::logic_error);
}

TEST_CASE("a malformed layout is a program error", "[output]") {
  CHECK_THROWS_AS(ResultLayout("format: x\n"), std::logic_error);
  CHECK_THROWS_AS(ResultLayout("format: [unclosed\n"), std::logic_error);
}
