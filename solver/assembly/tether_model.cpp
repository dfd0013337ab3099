#include "solver/assembly/tether_model.hpp"

#include "models/aerodynamic_drag.hpp"
#include "models/planet_gravity.hpp"
#include "models/rotating_frame.hpp"
#include "models/taper_design.hpp"
#include "models/uniform_gravity.hpp"
#include <limits>

#include "solver/assembly/climber_builder.hpp"
#include "solver/assembly/environment_builder.hpp"
#include "solver/input/scenario.hpp"
#include "solver/assembly/static_loads.hpp"

namespace hawser {

std::vector<const ForceModel*> TetherModel::forces() const {
  std::vector<const ForceModel*> out{bars.get()};
  for (const auto& b : body) out.push_back(b.get());
  if (climbers) out.push_back(climbers.get());
  return out;
}

std::vector<const ForceModel*> TetherModel::mean_forces() const {
  std::vector<const ForceModel*> out{bars.get()};
  for (const auto& b : body)
    if (!std::dynamic_pointer_cast<const AerodynamicDrag>(b)) out.push_back(b.get());
  if (mean_drag) out.push_back(mean_drag.get());
  if (climbers) out.push_back(climbers.get());
  return out;
}

TetherModel build_as_built(const Scenario& sc) {
  TetherModel m;
  double counterweight_kg = 0.0;
  if (sc.field.uniform) {
    m.mesh = build_bench_mesh(sc.material, sc.field, sc.mesh);
    if (sc.field.gravity_m_s2 > 0.0)
      m.body.push_back(std::make_unique<UniformGravity>(sc.field.gravity_m_s2, m.mesh.axis));
    if (sc.field.far_end_fixed) m.far_end = std::make_unique<FixedPoint>();
  } else {
    // The as-built tether is the design with its computed counterweight; a counterweight
    // given in the scenario is a load hung on it (physics.md section 3).
    const EquatorialField field(sc.planet, sc.j2);
    const TetherDesign design(field, sc.material, sc.tether, CounterweightSpec{});
    m.mesh = build_planet_mesh(design, sc.mesh);
    counterweight_kg =
        sc.counterweight.mass_kg ? *sc.counterweight.mass_kg : design.counterweight_mass();
    // (with tether.built_under, the as-built counterweight is that case's; see below)
    m.body.push_back(std::make_unique<PlanetGravity>(sc.planet, sc.j2));
    m.body.push_back(std::make_unique<RotatingFrame>(sc.planet.spin_rate_rad_s));
    m.spin_rate_rad_s = sc.planet.spin_rate_rad_s;
    m.reference_radius_m = sc.planet.equatorial_radius_m;
  }
  m.static_body_models = m.body.size();
  m.anchor = std::make_unique<FixedPoint>();
  std::vector<const ForceModel*> body;
  std::vector<std::shared_ptr<const ForceModel>> point_models;
  for (const auto& b : m.body) {
    body.push_back(b.get());
    if (b->acts_on_point_masses()) point_models.push_back(b);
  }
  // Built under a design load case: its counterweight at the top and its climbers parked on
  // the design line (positions on the reference line: the fraction of an element is the same
  // in material coordinates, which are not known yet).
  const std::vector<double> reference = reference_distance(m.mesh);
  std::unique_ptr<ClimberLoad> case_climbers;
  std::vector<double> case_altitudes_m;
  if (sc.built_under >= 0) {
    const LoadCaseSpec& c = sc.load_cases[static_cast<std::size_t>(sc.built_under)];
    const double cw = m.mesh.as_built_counterweight_kg * (1.0 + c.counterweight_change);
    m.mesh.node_mass[m.mesh.nodes() - 1] += cw - m.mesh.as_built_counterweight_kg;
    m.mesh.as_built_counterweight_kg = cw;
    m.mesh.counterweight_mass = cw;
    std::vector<Climber> on_line;
    for (std::size_t j = 0; j < c.climbers.size(); ++j) {
      on_line.push_back(parked_climber(c.name + " #" + std::to_string(j + 1),
                                       c.climbers[j].mass_kg, c.climbers[j].altitude_m));
      case_altitudes_m.push_back(c.climbers[j].altitude_m);
    }
    if (!on_line.empty()) {
      case_climbers = std::make_unique<ClimberLoad>(on_line, reference, point_models,
                                                    m.mesh.position);
      case_climbers->set_parked(true);
      case_climbers->set_spread(sc.mesh.climber_load_smooth ? LoadSpread::smooth : LoadSpread::point,
                                sc.mesh.climber_load_width);
      body.push_back(case_climbers.get());
    }
    m.built_under_case = c.name;
  }
  // The exact discrete equilibrium of the design line: its L0 are the as-built tether.
  m.equilibrium =
      solve_equilibrium(m.mesh, sc.material.youngs_modulus_pa, sc.field.pretension_n, body);
  for (std::size_t j = 0; case_climbers && j < case_altitudes_m.size(); ++j)
    m.built_under.push_back(parked_climber(case_climbers->climbers()[j].name,
                                           case_climbers->climbers()[j].mass_kg,
                                           material_coordinate(reference, m.equilibrium.s0_m,
                                                               case_altitudes_m[j])));
  std::vector<double> ea, tau;
  for (std::size_t e = 0; e < m.mesh.elements(); ++e) {
    ea.push_back(sc.material.youngs_modulus_pa * m.mesh.element_area[e]);
    tau.push_back(sc.material.damping_time_s);
  }
  if (!sc.field.uniform) {
    m.mesh.node_mass[m.mesh.nodes() - 1] += counterweight_kg - m.mesh.as_built_counterweight_kg;
    m.mesh.counterweight_mass = counterweight_kg;
  }
  // Drag, tides and the scheduled events (solver/assembly/environment_builder.hpp).
  EnvironmentLoads env = build_environment(sc, m.mesh, m.reference_radius_m, m.spin_rate_rad_s);
  for (auto& b : env.body) m.body.push_back(std::move(b));
  std::vector<double> cut_time_s(m.mesh.elements(), std::numeric_limits<double>::infinity());
  for (const ElementCut& c : env.cuts) cut_time_s[c.element] = c.time_s;
  m.bars = std::make_shared<BarElements>(ea, m.equilibrium.l0_m, tau, cut_time_s);
  m.jumps = std::move(env.jumps);
  m.drag = env.drag;
  m.mean_drag = env.mean_drag;
  m.ultimate_strength_pa = sc.material.ultimate_strength_pa;
  return m;
}

TetherModel build_model(const Scenario& sc) {
  TetherModel m = build_as_built(sc);
  // The loads of the starting state: climbers parked at their start points (sudden loads
  // excepted), at their material coordinates on the as-built tether; the counterweight; the
  // mean wind.
  const std::vector<double> reference = reference_distance(m.mesh);
  StaticLoads loads;
  // Climbers' positions and speeds along the ribbon at rest, stretched (what the wheels see),
  // or along the unstretched ribbon (material coordinate) when the scenario asks for it.
  const bool over_stretched = sc.climber_speeds == ClimberSpeedReference::stretched_ribbon;
  loads.parked =
      build_climbers(sc.climbers, reference, over_stretched ? reference : m.equilibrium.s0_m);
  if (over_stretched) loads.climber_path = reference;
  loads.counterweight_kg = m.mesh.counterweight_mass;
  loads.mean_wind = m.mean_drag != nullptr;
  loads.tides = sc.environment.tides.in_static_state;
  loads.spread = sc.mesh.climber_load_smooth ? LoadSpread::smooth : LoadSpread::point;
  loads.spread_width = sc.mesh.climber_load_width;
  const LoadedState st = solve_static_loads(m, loads);
  if (st.loaded) {
    m.mesh.position = st.state.position_m;
    m.equilibrium.tension_n = st.state.tension_n;
    m.equilibrium.load_case = st.description;
    m.equilibrium.fold_load_factor = st.state.fold_load_factor;
    m.equilibrium.relax_iterations = st.state.relax_iterations;
    m.equilibrium.newton_iterations = st.state.newton_iterations;
    m.equilibrium.load_steps = st.state.load_steps;
    m.equilibrium.residual_n = st.state.residual_n;
  }
  if (!loads.parked.empty()) {
    // In the run the climbers also feel the tides and, when they have a drag area, the air.
    std::vector<std::shared_ptr<const ForceModel>> point_models;
    for (const auto& b : m.body)
      if (b->acts_on_point_masses()) point_models.push_back(b);
    m.climbers = std::make_unique<ClimberLoad>(loads.parked, m.equilibrium.s0_m, point_models,
                                               m.mesh.as_built_position, m.bars, m.drag);
    if (over_stretched) m.climbers->set_path(reference);
    m.climbers->set_spread(sc.mesh.climber_load_smooth ? LoadSpread::smooth : LoadSpread::point,
                           sc.mesh.climber_load_width);
  }
  return m;
}

}  // namespace hawser
