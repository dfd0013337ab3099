#include "solver/tether_model.hpp"

#include "models/planet_gravity.hpp"
#include "models/rotating_frame.hpp"
#include "models/taper_design.hpp"
#include "models/uniform_gravity.hpp"
#include "solver/scenario.hpp"

namespace hawser {

std::vector<const ForceModel*> TetherModel::forces() const {
  std::vector<const ForceModel*> out{bars.get()};
  for (const auto& b : body) out.push_back(b.get());
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
  m.equilibrium = solve_equilibrium(m.mesh, sc.material.youngs_modulus_pa, sc.field.pretension_n, body);
  std::vector<double> ea, tau;
  for (std::size_t e = 0; e < m.mesh.elements(); ++e) {
    ea.push_back(sc.material.youngs_modulus_pa * m.mesh.element_area[e]);
    tau.push_back(sc.material.damping_time_s);
  }
  m.bars = std::make_unique<BarElements>(ea, m.equilibrium.l0_m, tau);
  m.ultimate_strength_pa = sc.material.ultimate_strength_pa;
  return m;
}

}  // namespace hawser
