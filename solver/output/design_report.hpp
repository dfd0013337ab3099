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
  /// Section: width and thickness [m] at the base, the widest section and the top (a round
  /// section's diameter for both).
  double base_width_m, base_thickness_m, max_width_m, max_thickness_m, top_width_m, top_thickness_m;
  /// Breaking length sigma_u / (rho g0), g0 = GM / a^2 the planet's surface gravity without
  /// rotation: the length of uniform cable that breaks under its own weight in that field
  /// (the fibre trade's "breaking length", tenacity over g0: common practice).
  double breaking_length_m;
  /// Total elastic stretch of the as-built tether at rest: its length minus its unstretched
  /// length, integral of eps / (1 + eps) dr along the design line, eps = sigma(r) / E.
  double elastic_stretch_m;
  std::vector<DesignSample> profile;  // along the tether
  /// Things the reader must not miss (an unbuildable taper ratio).
  std::vector<std::string> warnings;
};

/// A taper ratio above this is flagged as not buildable: the widest section is then more
/// than a hundred times the base, and the tether's mass grows with it. A judgement, stated
/// so it can be argued with (common practice in tether studies: ratios of a few to ten).
constexpr double kBuildableTaperRatio = 100.0;

/// Evaluates the design: `n_profile` samples evenly in radius plus the anchor, the
/// synchronous radius and the top.
DesignFigures evaluate_design(const TetherDesign& design, int n_profile);

/// A readable table for the terminal.
std::string design_table(const Scenario& scenario, const TetherDesign& design, const DesignFigures& f);
/// JSON with stable keys; every key carries its unit as a suffix (_m, _kg, _pa, _n, _s ...).
nlohmann::json design_json(const Scenario& scenario, const TetherDesign& design, const DesignFigures& f);

}  // namespace hawser
