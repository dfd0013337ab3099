#include "solver/tether_model.hpp"

#include <cstdio>
#include <sstream>

#include "models/aerodynamic_drag.hpp"
#include "models/planet_gravity.hpp"
#include "models/rotating_frame.hpp"
#include "models/taper_design.hpp"
#include "models/uniform_gravity.hpp"
#include "solver/climber_builder.hpp"
#include "solver/environment_builder.hpp"
#include "solver/initial_state.hpp"
#include "solver/scenario.hpp"
#include "solver/static_solver.hpp"

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

namespace {

std::string describe_loads(const std::vector<Climber>& parked, double cw_kg, double cw_built_kg, bool wind) {
  std::ostringstream os;
  const char* sep = "";
  char buf[160];
  for (const Climber& c : parked) {
    std::snprintf(buf, sizeof buf, "%sclimber '%s' (%.6g kg) parked at s = %.6g km", sep, c.name.c_str(),
                  c.mass_kg, c.profile.from() / 1e3);
    os << buf;
    sep = ", ";
  }
  if (cw_kg != cw_built_kg) {
    std::snprintf(buf, sizeof buf, "%scounterweight %.6g t (the design's %.6g t)", sep, cw_kg / 1e3, cw_built_kg / 1e3);
    os << buf;
    sep = ", ";
  }
  if (wind) os << sep << "the mean wind";
  return os.str();
}

}  // namespace

TetherModel build_model(const Scenario& sc) {
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
    counterweight_kg = sc.counterweight.mass_kg ? *sc.counterweight.mass_kg : design.counterweight_mass();
    m.body.push_back(std::make_unique<PlanetGravity>(sc.planet, sc.j2));
    m.body.push_back(std::make_unique<RotatingFrame>(sc.planet.spin_rate_rad_s));
    m.spin_rate_rad_s = sc.planet.spin_rate_rad_s;
    m.reference_radius_m = sc.planet.equatorial_radius_m;
  }
  m.anchor = std::make_unique<FixedPoint>();
  std::vector<const ForceModel*> body;
  for (const auto& b : m.body) body.push_back(b.get());
  // What a climber feels as a point mass: the body models that act on point masses.
  auto point_models = [&m] {
    std::vector<std::shared_ptr<const ForceModel>> out;
    for (const auto& b : m.body)
      if (b->acts_on_point_masses()) out.push_back(b);
    return out;
  };
  const auto static_point_models = point_models();  // gravity and frame (no tides: not static)

  // 1. The as-built tether: the exact discrete equilibrium of the unloaded design.
  m.equilibrium = solve_equilibrium(m.mesh, sc.material.youngs_modulus_pa, sc.field.pretension_n, body);
  std::vector<double> ea, tau;
  for (std::size_t e = 0; e < m.mesh.elements(); ++e) {
    ea.push_back(sc.material.youngs_modulus_pa * m.mesh.element_area[e]);
    tau.push_back(sc.material.damping_time_s);
  }
  m.bars = std::make_unique<BarElements>(ea, m.equilibrium.l0_m, tau);
  const Eigen::VectorXd built_mass = m.mesh.node_mass;
  if (!sc.field.uniform) {
    m.mesh.node_mass[m.mesh.nodes() - 1] += counterweight_kg - m.mesh.as_built_counterweight_kg;
    m.mesh.counterweight_mass = counterweight_kg;
  }
  add_environment(sc, m);  // drag, tides, cuts, strikes (solver/environment_builder.hpp)
  m.ultimate_strength_pa = sc.material.ultimate_strength_pa;
  m.mean_drag = mean_wind_drag(sc, m);

  // 2. The loads of the static state: climbers parked at their start points (except sudden
  // loads), at their material coordinates on the as-built tether; the counterweight; the wind.
  const std::vector<double> reference = reference_distance(m.mesh);
  const std::vector<Climber> parked_climbers = read_climbers(sc, reference, m.equilibrium.s0_m);
  std::unique_ptr<ClimberLoad> parked;
  StaticLoadSet loads;
  if (!parked_climbers.empty()) {
    parked = std::make_unique<ClimberLoad>(parked_climbers, m.equilibrium.s0_m, static_point_models,
                                           m.mesh.as_built_position);
    parked->set_parked(true);
    if (auto air = std::dynamic_pointer_cast<const AerodynamicDrag>(m.mean_drag)) parked->set_air(air);
    if (!parked->attachments(0.0).empty()) loads.added.push_back(parked.get());
  }
  if (m.mean_drag) loads.added.push_back(m.mean_drag.get());
  loads.common = {m.bars.get()};
  loads.common.insert(loads.common.end(), body.begin(), body.end());
  loads.bars = m.bars.get();
  loads.built_mass_kg = built_mass;
  loads.loaded_mass_kg = m.mesh.node_mass;
  loads.first_free = 1;
  loads.last_free = m.mesh.nodes() - (m.far_end ? 2 : 1);
  loads.ground_radius_m = m.reference_radius_m;  // the anchor is on it; 0 on the bench
  if (!loads.added.empty() || loads.loaded_mass_kg != loads.built_mass_kg) {
    std::vector<Climber> in_state;
    for (const Climber& c : parked_climbers)
      if (!c.sudden) in_state.push_back(c);
    loads.description = describe_loads(in_state, m.mesh.counterweight_mass, m.mesh.as_built_counterweight_kg,
                                       m.mean_drag != nullptr);
    const StaticState st = solve_static(loads, m.mesh.as_built_position);
    // No Newton step taken: the loads act on held nodes only (a climber at the anchor) and
    // the as-built state, exact by construction, stays as it is.
    if (st.newton_iterations > 0) {
      m.mesh.position = st.position_m;
      m.equilibrium.tension_n = st.tension_n;
    }
    m.equilibrium.load_case = loads.description;
    if (st.fold_load_factor < 1.0) {
      char note[160];
      std::snprintf(note, sizeof note,
                    " (continuation stopped at %.4g %% of the load; reached by pseudo-transient relaxation)",
                    100.0 * st.fold_load_factor);
      m.equilibrium.load_case += note;
    }
    m.equilibrium.fold_load_factor = st.fold_load_factor;
    m.equilibrium.relax_iterations = st.relax_iterations;
    m.equilibrium.newton_iterations = st.newton_iterations;
    m.equilibrium.load_steps = st.load_steps;
    m.equilibrium.residual_n = st.residual_n;
  }

  if (!parked_climbers.empty()) {
    // In the run the climbers also feel the tides and, when they have a drag area, the air.
    m.climbers = std::make_unique<ClimberLoad>(read_climbers(sc, reference, m.equilibrium.s0_m), m.equilibrium.s0_m,
                                               point_models(), m.mesh.as_built_position);
    m.climbers->set_bars(m.bars.get());
    for (const auto& b : m.body)
      if (auto air = std::dynamic_pointer_cast<const AerodynamicDrag>(b)) m.climbers->set_air(air);
  }
  return m;
}

}  // namespace hawser
