#pragma once
// Reads climbers[] and schedules[] of validated scenario values into ClimberSpecs, checking
// what the key reference alone cannot: positions on the tether, directions, flyable profiles
// (each built once on the reference line, where its altitudes are measured), duplicate
// names, and climbers that would run into each other. Problems are appended, located.
#include <vector>

#include "solver/input/climber_spec.hpp"
#include "solver/input/scenario_values.hpp"

namespace hawser {

/// `length_m`: the tether's length at rest (the top's altitude; the bench cable's length);
/// `air`: the scenario has an atmosphere (climber drag needs one).
std::vector<ClimberSpec> read_climbers(const ScenarioValues& v, double length_m, bool air,
                                       std::vector<Problem>& problems);

/// The climb of `c` as a profile along the coordinate `map` gives for an altitude (the
/// identity on the reference line). Throws ProfileError when it cannot be flown.
template <class Map>
ClimberProfile climb_profile(const ClimberSpec& c, const Map& map) {
  const double from = map(c.from_m), to = map(c.to_m);
  if (c.profile == ClimbProfileKind::speed_table) {
    std::vector<SpeedRow> rows;
    for (const SpeedRowSpec& r : c.table) rows.push_back({map(r.at_m), r.speed_m_s});
    return ClimberProfile::table(c.start_s, from, to, rows);
  }
  std::vector<Dwell> dwells;
  for (const DwellSpec& d : c.dwells) dwells.push_back({map(d.at_m), d.duration_s});
  return ClimberProfile::ramps(c.start_s, from, to, c.cruise_m_s, c.accel_m_s2, c.decel_m_s2,
                               dwells);
}

}  // namespace hawser
