#pragma once
// The figures of a static design, gathered once and written as a readable table or as JSON.
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "models/taper_design.hpp"

namespace hawser {

struct Scenario;

struct DesignSample {
  double altitude_m, area_m2, tension_n, stress_pa, safety_factor, lateral_speed_m_s;
};

struct DesignFigures {
  double synchronous_radius_m, synchronous_altitude_m, tether_length_m;
  double base_area_m2, top_area_m2, max_area_m2, max_area_altitude_m, taper_ratio;
  double tether_mass_kg, counterweight_mass_kg, total_mass_kg;
  double base_tension_n, top_tension_n, peak_tension_n, peak_tension_altitude_m;
  double peak_stress_pa, min_safety_factor, design_stress_pa;
  double longitudinal_speed_m_s, longitudinal_travel_time_s;
  double lateral_speed_base_m_s, lateral_speed_min_m_s, lateral_travel_time_s;
  double uniform_cable_stress_pa;
  std::vector<DesignSample> profile;  // along the tether
};

/// Evaluates the design: `n_profile` samples evenly in radius plus the anchor, the
/// synchronous radius and the top.
DesignFigures evaluate_design(const TetherDesign& design, int n_profile);

/// A readable table for the terminal.
std::string design_table(const Scenario& scenario, const TetherDesign& design, const DesignFigures& f);
/// JSON with stable keys; every key carries its unit as a suffix (_m, _kg, _pa, _n, _s ...).
nlohmann::json design_json(const Scenario& scenario, const TetherDesign& design, const DesignFigures& f);

}  // namespace hawser
