#pragma once
// A scenario's climbers (climbers[] and the departures of schedules[]), validated, in SI.
// Positions are altitudes: distances from the anchor along the tether at rest (the reference
// line); solver/assembly/climber_builder.hpp turns them into the material coordinates the
// climber model rides on, once the as-built tether is known.
#include <string>
#include <vector>

#include "models/climber_load.hpp"

namespace hawser {

struct SpeedRowSpec {
  double at_m = 0.0;      // altitude [m]
  double speed_m_s = 0.0;
};

struct DwellSpec {
  double at_m = 0.0;      // altitude [m]
  double duration_s = 0.0;
};

enum class ClimbProfileKind { ramps, speed_table };

struct ClimberSpec {
  std::string name;
  std::string key;        // climbers[i] or schedules[i], for messages
  std::string where;      // file:line:column of that entry
  double mass_kg = 0.0;
  bool sudden = false;    // not in the starting equilibrium
  ClimberEnd at_end = ClimberEnd::park;
  double end_mass_kg = 0.0;   // drop_payload: the mass that stays on
  double drag_area_m2 = 0.0;  // Cd A; 0: no drag
  double start_s = 0.0;
  double from_m = 0.0, to_m = 0.0;  // altitudes [m]
  ClimbProfileKind profile = ClimbProfileKind::ramps;
  double cruise_m_s = 0.0, accel_m_s2 = 0.0, decel_m_s2 = 0.0;  // ramps
  std::vector<DwellSpec> dwells;                               // ramps
  std::vector<SpeedRowSpec> table;                             // speed_table
};

}  // namespace hawser
