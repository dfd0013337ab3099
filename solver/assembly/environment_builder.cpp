#include "solver/assembly/environment_builder.hpp"

#include <cmath>
#include <memory>
#include <utility>

#include "models/discrete_gust.hpp"
#include "models/dryden_turbulence.hpp"
#include "models/tidal_force.hpp"
#include "models/wind_field.hpp"
#include "solver/input/scenario.hpp"

namespace hawser {
namespace {

constexpr double kPi = 3.14159265358979323846;

/// Altitude of a node in the as-built geometry [m] (the bench: distance from node 0).
double reference_altitude(const Mesh& mesh, double radius_m, std::size_t node) {
  const Eigen::Vector3d r = mesh.as_built_position.col(static_cast<Eigen::Index>(node));
  return radius_m > 0.0 ? r.norm() - radius_m : r.x();
}

/// The element spanning altitude h in the reference geometry (its lower node's side at a node).
std::size_t element_at(const Mesh& mesh, double radius_m, double h) {
  for (std::size_t e = 0; e + 1 < mesh.elements(); ++e)
    if (h < reference_altitude(mesh, radius_m, e + 1)) return e;
  return mesh.elements() - 1;
}

/// The free node nearest to altitude h in the reference geometry.
std::size_t free_node_near(const Mesh& mesh, double radius_m, double h) {
  const std::size_t last = mesh.far_end_fixed ? mesh.nodes() - 2 : mesh.nodes() - 1;
  std::size_t best = 1;
  for (std::size_t k = 1; k <= last; ++k)
    if (std::abs(reference_altitude(mesh, radius_m, k) - h) <
        std::abs(reference_altitude(mesh, radius_m, best) - h))
      best = k;
  return best;
}

std::vector<DragSection> sections(const Scenario& sc, const Mesh& mesh) {
  std::vector<DragSection> out;
  const bool ribbon = !sc.field.uniform && sc.tether.shape == SectionShape::ribbon;
  for (double a : mesh.element_area) {
    if (ribbon) {
      const double k = sc.tether.width_to_thickness;
      out.push_back({std::sqrt(a * k), std::sqrt(a / k)});
    } else {
      const double d = std::sqrt(4.0 * a / kPi);
      out.push_back({d, d});
    }
  }
  return out;
}

std::shared_ptr<const DrydenTurbulence> turbulence(const TurbulenceSpec& t) {
  if (!t.given) return nullptr;
  std::vector<DrydenStation> st;
  for (const auto& s : t.stations)
    st.push_back({s.altitude_m, s.mean_speed_m_s, s.sigma_m_s[0], s.sigma_m_s[1], s.sigma_m_s[2],
                  s.scale_m[0], s.scale_m[1], s.scale_m[2]});
  return std::make_shared<const DrydenTurbulence>(st, t.seed, t.sample_interval_s,
                                                  t.series_length_s);
}

/// The drag of `winds` (and gusts and turbulence, when given) on the tether's sections.
std::shared_ptr<AerodynamicDrag> drag(const Scenario& sc, const Mesh& mesh, double radius_m,
                                            std::vector<WindProfile> winds, GustSet gusts,
                                            std::shared_ptr<const DrydenTurbulence> turb) {
  const EnvironmentSpec& env = sc.environment;
  const AltitudeFrame frame =
      sc.field.uniform ? AltitudeFrame::bench() : AltitudeFrame::planet(radius_m);
  auto wind = std::make_shared<const WindField>(frame, std::move(winds), std::move(gusts),
                                                std::move(turb),
                                                env.turbulence.from_direction_deg);
  const AirDensity air = env.atmosphere == AtmosphereKind::us1976
                             ? AirDensity::us1976()
                             : AirDensity::uniform(env.air_density_kg_m3);
  return std::make_shared<AerodynamicDrag>(sections(sc, mesh), env.drag_coefficient, air, wind);
}

}  // namespace

EnvironmentLoads build_environment(const Scenario& sc, const Mesh& mesh, double radius_m,
                                   double spin_rate_rad_s) {
  const EnvironmentSpec& env = sc.environment;
  EnvironmentLoads out;
  if (env.any_air()) {
    std::vector<WindProfile> winds, mean;
    for (const WindSpec& w : env.winds) {
      winds.push_back(w.profile);
      if (w.profile.active(0.0)) mean.push_back(w.profile);
    }
    GustSet gusts;
    for (const GustItemSpec& g : env.gusts)
      gusts.add(DiscreteGust({g.amplitude_m_s, g.gradient_time_s, g.direction_enu,
                              g.altitude_low_m, g.altitude_high_m, g.edge_width_m, g.onset_s}));
    auto full = drag(sc, mesh, radius_m, std::move(winds), std::move(gusts),
                     turbulence(env.turbulence));
    out.drag = full;
    out.body.push_back(std::move(full));
    if (!mean.empty()) out.mean_drag = drag(sc, mesh, radius_m, std::move(mean), GustSet(), nullptr);
  }
  if (env.tides.moon.on || env.tides.sun.on) {
    std::vector<ThirdBody> bodies;
    auto add = [&](const TideBodySpec& spec, ThirdBody b) {
      if (!spec.on) return;
      b.ascending_node_rad = spec.node_longitude_rad - sc.anchor.longitude_rad;
      b.initial_phase_rad = spec.phase_rad;
      if (spec.inclination_rad) b.inclination_rad = *spec.inclination_rad;
      bodies.push_back(b);
    };
    add(env.tides.moon, earth_moon_mean_orbit());
    add(env.tides.sun, earth_sun_mean_orbit());
    out.body.push_back(std::make_shared<TidalForce>(ThirdBodyTide(bodies, spin_rate_rad_s)));
  }
  for (const CutSpec& c : env.cuts)
    out.cuts.push_back({c.element ? *c.element : element_at(mesh, radius_m, *c.altitude_m),
                        c.time_s});
  for (const StrikeSpec& s : env.strikes) {
    const std::size_t node = s.node ? *s.node : free_node_near(mesh, radius_m, *s.altitude_m);
    const Eigen::Vector3d dv =
        s.delta_v_m_s ? *s.delta_v_m_s
                      : Eigen::Vector3d(*s.impulse_n_s /
                                        mesh.node_mass[static_cast<Eigen::Index>(node)]);
    out.jumps.push_back({s.time_s, node, dv});
  }
  return out;
}

}  // namespace hawser
