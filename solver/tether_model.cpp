#include "solver/tether_model.hpp"

#include "models/aerodynamic_drag.hpp"
#include "models/planet_gravity.hpp"
#include "models/rotating_frame.hpp"
#include "models/taper_design.hpp"
#include "models/uniform_gravity.hpp"
#include "solver/climber_builder.hpp"
#include "solver/initial_state.hpp"
#include "solver/environment_builder.hpp"
#include "solver/scenario.hpp"

namespace hawser {

std::vector<const ForceModel*> TetherModel::forces() const {
  std::vector<const ForceModel*> out{bars.get()};
  for (const auto& b : body) out.push_back(b.get());
  if (climbers) out.push_back(climbers.get());
  return out;
}

TetherModel build_model(const Scenario& sc) {
  TetherModel m;
  if (sc.field.uniform) {
    m.mesh = build_bench_mesh(sc.material, sc.field, sc.mesh);
    if (sc.field.gravity_m_s2 > 0.0)
      m.body.push_back(std::make_unique<UniformGravity>(sc.field.gravity_m_s2, m.mesh.axis));
    if (sc.field.far_end_fixed) m.far_end = std::make_unique<FixedPoint>();
  } else {
    const TetherDesign design(EquatorialField(sc.planet, sc.j2), sc.material, sc.tether, sc.counterweight);
    m.mesh = build_planet_mesh(design, sc.mesh);
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
  // Climbers parked at their start points load the starting equilibrium (except sudden
  // loads); positions are first taken on the reference geometry, where the fraction of an
  // element is the same as in material coordinates.
  const std::vector<double> reference = reference_distance(m.mesh);
  std::vector<const ForceModel*> with_parked = body;
  std::unique_ptr<ClimberLoad> parked;
  const std::vector<Climber> on_reference = read_climbers(sc, reference, reference);
  if (!on_reference.empty()) {
    parked = std::make_unique<ClimberLoad>(on_reference, reference, point_models(), m.mesh.position);
    parked->set_parked(true);
    with_parked.push_back(parked.get());
  }
  m.equilibrium = solve_equilibrium(m.mesh, sc.material.youngs_modulus_pa, sc.field.pretension_n, with_parked);
  std::vector<double> ea, tau;
  for (std::size_t e = 0; e < m.mesh.elements(); ++e) {
    ea.push_back(sc.material.youngs_modulus_pa * m.mesh.element_area[e]);
    tau.push_back(sc.material.damping_time_s);
  }
  m.bars = std::make_unique<BarElements>(ea, m.equilibrium.l0_m, tau);
  add_environment(sc, m);  // drag, tides, cuts, strikes (solver/environment_builder.hpp)
  m.ultimate_strength_pa = sc.material.ultimate_strength_pa;
  if (!on_reference.empty()) {
    // In the run the climbers also feel the tides and, when they have a drag area, the air.
    m.climbers = std::make_unique<ClimberLoad>(read_climbers(sc, reference, m.equilibrium.s0_m), m.equilibrium.s0_m,
                                               point_models(), m.mesh.position);
    m.climbers->set_bars(m.bars.get());
    for (const auto& b : m.body)
      if (auto air = std::dynamic_pointer_cast<const AerodynamicDrag>(b)) m.climbers->set_air(air);
  }
  return m;
}

}  // namespace hawser
