// Turns validated scenario values into the plain structs of solver/scenario.hpp and runs the
// checks that need more than one key (a design that cannot stand).
#include <sstream>

#include "solver/errors.hpp"
#include "solver/scenario.hpp"
#include "solver/scenario_reader.hpp"

namespace hawser {
namespace {

Planet build_planet(const ScenarioValues& v) {
  Planet p;
  p.name = v.at("planet").text;
  p.gm_m3_s2 = v.quantity("planet.gm");
  p.spin_rate_rad_s = v.quantity("planet.spin_rate");
  p.equatorial_radius_m = v.quantity("planet.equatorial_radius");
  p.j2 = v.quantity("planet.j2");
  return p;
}

Material build_material(const ScenarioValues& v) {
  Material m;
  m.name = v.at("material").text;
  m.density_kg_m3 = v.quantity("material.density");
  m.youngs_modulus_pa = v.quantity("material.youngs_modulus");
  m.ultimate_strength_pa = v.quantity("material.ultimate_strength");
  m.damping_time_s = v.quantity("material.damping_time");
  m.source = v.has("material.source") ? v.text("material.source") : "inline";
  return m;
}

Scenario build(const ReadScenario& read, const std::string& file) {
  const ScenarioValues& v = read.values;
  std::vector<Problem> problems;
  Scenario s;
  s.file = file;
  s.text_as_run = read.text_as_run;
  s.values = v;
  s.name = v.has("name") ? v.text("name") : file;
  s.field.uniform = v.text("field.kind") == "uniform";
  s.j2 = v.boolean("model.j2");
  s.material = build_material(v);
  s.mesh.elements = static_cast<int>(v.integer("mesh.elements"));
  s.mesh.geometric = v.text("mesh.grading") == "geometric";
  if (s.mesh.geometric) s.mesh.first_element_length_m = v.quantity("mesh.first_element_length");

  if (s.field.uniform) {
    s.field.gravity_m_s2 = v.quantity("field.gravity");
    s.field.cable_length_m = v.quantity("field.cable_length");
    s.field.cable_area_m2 = v.quantity("field.cable_area");
    s.field.far_end_fixed = v.text("field.far_end") == "fixed";
    s.field.pretension_n = v.quantity("field.pretension");
    if (s.mesh.geometric && s.mesh.first_element_length_m * s.mesh.elements > s.field.cable_length_m * (1 + 1e-12) &&
        s.mesh.elements > 1)
      problems.push_back({v.where("mesh.first_element_length"), "mesh.first_element_length",
                          "geometric grading must grow toward the far end: N times the first length exceeds the cable length"});
    if (!problems.empty()) throw InputError(format_problems(problems));
    return s;
  }

  s.planet = build_planet(v);
  s.anchor.latitude_rad = v.quantity("anchor.latitude");
  s.anchor.longitude_rad = v.quantity("anchor.longitude");
  TetherSpec& t = s.tether;
  t.profile = v.text("tether.profile") == "uniform" ? TaperProfile::uniform : TaperProfile::constant_stress;
  t.safety_factor = v.quantity("tether.safety_factor");
  t.top_altitude_m = v.quantity("tether.top_altitude");
  t.shape = v.text("tether.section.shape") == "round" ? SectionShape::round : SectionShape::ribbon;
  if (t.shape == SectionShape::ribbon) t.width_to_thickness = v.quantity("tether.section.width_to_thickness");
  const bool has_area = v.has("tether.base_area"), has_load = v.has("tether.base_design_load");
  if (has_area == has_load)
    problems.push_back({v.where("tether"), "tether.base_area",
                        has_area ? "give either base_area or base_design_load, not both"
                                 : "missing: give the base cross-section as base_area [m^2] or size it with base_design_load [N]"});
  if (has_area) t.base_area_m2 = v.quantity("tether.base_area");
  if (has_load) t.base_design_load_n = v.quantity("tether.base_design_load");
  if (!v.is_keyword("counterweight.mass", "computed")) s.counterweight.mass_kg = v.quantity("counterweight.mass");
  if (!problems.empty()) throw InputError(format_problems(problems));

  const EquatorialField field(s.planet, s.j2);
  const TetherDesign design(field, s.material, s.tether, s.counterweight);
  for (const auto& p : design.problems()) {
    std::string key = "tether.top_altitude";
    if (p.kind == DesignProblem::uniform_infeasible || p.kind == DesignProblem::taper_impractical) key = "tether.profile";
    if (p.kind == DesignProblem::counterweight_too_light || p.kind == DesignProblem::overstressed)
      key = "counterweight.mass";
    problems.push_back({v.where(key), key, p.message});
  }
  if (s.mesh.geometric &&
      s.mesh.first_element_length_m * s.mesh.elements > (design.top_radius() - design.base_radius()) && s.mesh.elements > 1)
    problems.push_back({v.where("mesh.first_element_length"), "mesh.first_element_length",
                        "geometric grading must grow toward the top: N times the first length exceeds the tether length"});
  if (!problems.empty()) throw InputError(format_problems(problems));
  return s;
}

}  // namespace

Scenario load_scenario_text(const std::string& text, const std::string& file, const std::vector<std::string>& overrides) {
  std::vector<Problem> problems;
  const ReadScenario read = ScenarioReader(file, overrides).read_text(text, problems);
  if (!problems.empty()) throw InputError(format_problems(problems));
  return build(read, file);
}

Scenario load_scenario(const std::string& file, const std::vector<std::string>& overrides) {
  std::vector<Problem> problems;
  const ReadScenario read = ScenarioReader(file, overrides).read(problems);
  if (!problems.empty()) throw InputError(format_problems(problems));
  return build(read, file);
}

}  // namespace hawser
