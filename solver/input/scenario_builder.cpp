// The validation stage's last step: validated scenario values into the typed structs of
// solver/input/scenario.hpp, with the checks that need more than one key (a design that cannot
// stand, climbers that collide, events off the tether). Every input error is found here, before
// anything is built; nothing after this stage sees a key.
#include <sstream>

#include "solver/input/climber_reader.hpp"
#include "solver/input/integration_method.hpp"
#include "solver/input/environment_reader.hpp"
#include "solver/input/errors.hpp"
#include "solver/input/scenario.hpp"
#include "solver/input/scenario_reader.hpp"

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

SimulationSpec build_simulation(const ScenarioValues& v) {
  SimulationSpec sim;
  sim.given = v.has("simulation");
  sim.method = parse_method(v.text("simulation.method"));  // the key table allows only these
  sim.rtol = v.quantity("simulation.rtol");
  sim.atol_position_m = v.quantity("simulation.atol_position");
  sim.atol_velocity_m_s = v.quantity("simulation.atol_velocity");
  sim.max_step_s = v.quantity("simulation.max_step");
  sim.max_order = static_cast<int>(v.integer("simulation.max_order"));
  sim.max_steps_per_output = static_cast<long>(v.integer("simulation.max_steps_per_output"));
  sim.stop_on_rupture = v.boolean("simulation.stop_on_rupture");
  if (sim.given) {
    sim.duration_s = v.quantity("simulation.duration");
    sim.output_interval_s = v.quantity("simulation.output_interval");
  }
  return sim;
}

/// Initial-state and output settings; checks that need the tether's length and node count.
void build_initial_and_output(const ScenarioValues& v, double length_m, int elements, bool far_end_fixed,
                              Scenario& s, std::vector<Problem>& problems) {
  const int last_free = far_end_fixed ? elements - 1 : elements;
  const long long nd = v.has("initial.displacements") ? v.integer("initial.displacements") : 0;
  for (long long i = 0; i < nd; ++i) {
    const std::string p = "initial.displacements[" + std::to_string(i) + "]";
    DisplacementSpec d;
    const std::string dir = v.text(p + ".direction");
    d.direction = dir == "east" ? DisplacementSpec::Direction::east
                  : dir == "north" ? DisplacementSpec::Direction::north
                                   : DisplacementSpec::Direction::along;
    d.amplitude_m = v.quantity(p + ".amplitude");
    d.from_m = v.quantity(p + ".from");
    d.to_m = v.has(p + ".to") ? v.quantity(p + ".to") : length_m;
    if (d.to_m > length_m * (1 + 1e-12))
      problems.push_back({v.where(p + ".to"), p + ".to", "beyond the far end of the tether (" +
                                                             std::to_string(length_m / 1e3) + " km)"});
    if (d.from_m >= d.to_m) problems.push_back({v.where(p + ".from"), p + ".from", "must lie below `to`"});
    s.initial.displacements.push_back(d);
  }
  const long long nk = v.has("initial.kicks") ? v.integer("initial.kicks") : 0;
  for (long long i = 0; i < nk; ++i) {
    const std::string p = "initial.kicks[" + std::to_string(i) + "]";
    KickSpec k;
    k.node = static_cast<int>(v.integer(p + ".node"));
    const auto& vel = v.at(p + ".velocity").vector;
    for (int a = 0; a < 3; ++a) k.velocity_m_s[a] = vel[a];
    if (k.node > last_free)
      problems.push_back({v.where(p + ".node"), p + ".node",
                          "node " + std::to_string(k.node) + " is not a free node (free nodes are 1.." +
                              std::to_string(last_free) + ")"});
    s.initial.kicks.push_back(k);
  }
  if (v.has("initial.mode")) {
    s.initial.mode_index = static_cast<int>(v.integer("initial.mode.index"));
    s.initial.mode_where = v.where("initial.mode.index");
    s.initial.mode_amplitude_m = v.quantity("initial.mode.amplitude");
  }
  s.output.node_stride = static_cast<int>(v.integer("output.node_stride"));
  s.output.flush_every = static_cast<int>(v.integer("output.flush_every"));
  s.output.flush_interval_s = v.quantity("output.flush_interval");
  s.output.deflate_level = v.text("output.compression") == "deflate" ? 4 : 0;
  if (v.has("output.nodes")) {
    for (double x : v.at("output.nodes").vector) {
      const int node = static_cast<int>(x);
      if (node > elements)
        problems.push_back({v.where("output.nodes"), "output.nodes",
                            "node " + std::to_string(node) + " does not exist (nodes are 0.." + std::to_string(elements) + ")"});
      s.output.nodes.push_back(node);
    }
  }
  s.environment = read_environment(v, s, length_m, problems);  // environment.*, events.*
  s.climbers = read_climbers(v, length_m, s.environment.any_air(), problems);
  s.climber_speeds = v.text("climber_speeds") == "over_unstretched_ribbon"
                         ? ClimberSpeedReference::unstretched_ribbon
                         : ClimberSpeedReference::stretched_ribbon;
}

/// load_cases[] and load_case_checks (planet tether; `length_m` is the tether's).
void build_load_cases(const ScenarioValues& v, double length_m, Scenario& s,
                      std::vector<Problem>& problems) {
  s.min_base_margin = v.quantity("load_case_checks.min_base_margin");
  const long long n = v.has("load_cases") ? v.integer("load_cases") : 0;
  bool wind_at_start = false;
  for (const WindSpec& w : s.environment.winds)
    wind_at_start = wind_at_start || w.profile.active(0.0);
  for (long long i = 0; i < n; ++i) {
    const std::string p = "load_cases[" + std::to_string(i) + "]";
    LoadCaseSpec c;
    c.name = v.text(p + ".name");
    c.counterweight_change = v.quantity(p + ".counterweight_change");
    c.mean_wind = v.boolean(p + ".mean_wind");
    c.tides = v.boolean(p + ".tides");
    if (c.tides && !s.environment.tides.moon.on && !s.environment.tides.sun.on)
      problems.push_back(
          {v.where(p + ".tides"), p + ".tides", "no tides in the scenario (environment.tides)"});
    if (c.mean_wind && !wind_at_start)
      problems.push_back({v.where(p + ".mean_wind"), p + ".mean_wind",
                          "no mean wind blows at t = 0 (environment.winds with an atmosphere)"});
    const long long nc = v.has(p + ".climbers") ? v.integer(p + ".climbers") : 0;
    for (long long j = 0; j < nc; ++j) {
      const std::string q = p + ".climbers[" + std::to_string(j) + "]";
      LoadCaseSpec::Parked pk{v.quantity(q + ".mass"), v.quantity(q + ".altitude")};
      if (pk.altitude_m > length_m)
        problems.push_back({v.where(q + ".altitude"), q + ".altitude",
                            "beyond the top of the tether (" +
                                std::to_string(length_m / 1e3) + " km)"});
      c.climbers.push_back(pk);
    }
    s.load_cases.push_back(c);
  }
  if (!v.has("tether.built_under")) return;
  const std::string name = v.text("tether.built_under");
  for (std::size_t i = 0; i < s.load_cases.size(); ++i)
    if (s.load_cases[i].name == name) s.built_under = static_cast<int>(i);
  if (s.built_under < 0) {
    problems.push_back({v.where("tether.built_under"), "tether.built_under",
                        "no load case named '" + name + "' in load_cases"});
  } else if (s.load_cases[s.built_under].mean_wind || s.load_cases[s.built_under].tides) {
    problems.push_back({v.where("tether.built_under"), "tether.built_under",
                        "a tether is built along its straight design line: the case may hold "
                        "parked climbers and a counterweight change, not wind or tides"});
  }
}

Scenario build(const ReadScenario& read, const std::string& file) {
  const ScenarioValues& v = read.values;
  std::vector<Problem> problems;
  Scenario s;
  s.file = file;
  s.text_as_run = read.text_as_run;
  s.where = v.where("");
  s.name = v.has("name") ? v.text("name") : file;
  s.field.uniform = v.text("field.kind") == "uniform";
  s.j2 = v.boolean("model.j2");
  s.material = build_material(v);
  s.mesh.elements = static_cast<int>(v.integer("mesh.elements"));
  s.mesh.geometric = v.text("mesh.grading") == "geometric";
  s.mesh.climber_load_smooth = v.text("mesh.climber_load") == "smooth";
  s.mesh.climber_load_width = v.quantity("mesh.climber_load_width");
  if (s.mesh.geometric) s.mesh.first_element_length_m = v.quantity("mesh.first_element_length");

  s.simulation = build_simulation(v);
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
    build_initial_and_output(v, s.field.cable_length_m, s.mesh.elements, s.field.far_end_fixed, s, problems);
    if (v.has("load_cases") && v.integer("load_cases") > 0)
      problems.push_back({v.where("load_cases"), "load_cases",
                          "static load cases are for a planet tether only"});
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
  build_initial_and_output(v, design.top_radius() - design.base_radius(), s.mesh.elements, false, s, problems);
  build_load_cases(v, design.top_radius() - design.base_radius(), s, problems);
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
