#pragma once
// The load-case table of `hawser design`: each static load case of the scenario
// (load_cases[]) hung on the as-built tether, L0 fixed (solver/assembly/static_loads.hpp), and what it
// does to the tether:
//  - displacement of the top node (radial, east) and of each parked climber (radial) from the
//    as-built state [m];
//  - base tension T_0 (the pull on the anchor) [N] and the base-tension margin
//    T_0(case) / T_0(as built) [-]: the share of the anchor's pull that is left (0: slack);
//  - the smallest safety factor over the elements, ultimate strength x A_e / T_e [-].
// A case warns when there is no equilibrium (the base going slack, a load the tether cannot
// hold) or when its margin is below load_case_checks.min_base_margin.
#include <nlohmann/json.hpp>
#include <string>
#include <vector>

namespace hawser {

struct Scenario;

struct LoadCaseResult {
  std::string name;
  std::string loads;  // what was hung, as the static solver describes it
  bool equilibrium = false;
  std::string failure;  // why not, when there is no equilibrium
  double top_radial_m = 0.0, top_east_m = 0.0;
  std::vector<double> climber_radial_m;  // per parked climber
  double base_tension_n = 0.0, base_margin = 0.0, min_safety_factor = 0.0;
  int newton_iterations = 0, load_steps = 0;
  std::string warning;  // empty: none
};

/// Solves every load case of the scenario (none: empty).
std::vector<LoadCaseResult> evaluate_load_cases(const Scenario& scenario);

/// The table for the terminal (with the as-built base tension for reference).
std::string load_case_table(const Scenario& scenario, const std::vector<LoadCaseResult>& cases);
/// JSON rows with the units as key suffixes.
nlohmann::json load_case_json(const Scenario& scenario, const std::vector<LoadCaseResult>& cases);

}  // namespace hawser
