#include "solver/assembly/static_loads.hpp"

#include <algorithm>
#include <cstdio>
#include <memory>
#include <sstream>

#include "models/aerodynamic_drag.hpp"
#include "models/tidal_force.hpp"
#include "solver/assembly/tether_model.hpp"

namespace hawser {

namespace {

std::string describe(const std::vector<Climber>& parked, double cw_kg, double cw_built_kg,
                     bool counterweight, bool wind, bool tides) {
  std::ostringstream os;
  const char* sep = "";
  char buf[200];
  for (const Climber& c : parked) {
    if (c.sudden) continue;
    std::snprintf(buf, sizeof buf, "%sclimber '%s' (%.6g kg) parked at s = %.6g km", sep,
                  c.name.c_str(), c.mass_kg, c.profile.from() / 1e3);
    os << buf;
    sep = ", ";
  }
  if (counterweight && cw_kg != cw_built_kg) {
    std::snprintf(buf, sizeof buf, "%scounterweight %.6g t (the design's %.6g t)", sep, cw_kg / 1e3,
                  cw_built_kg / 1e3);
    os << buf;
    sep = ", ";
  }
  if (wind) {
    os << sep << "the mean wind";
    sep = ", ";
  }
  if (tides) os << sep << "the tides at t = 0";
  return os.str();
}

}  // namespace

double material_coordinate(const std::vector<double>& reference_m, const std::vector<double>& s0_m,
                           double h_m) {
  const auto it = std::upper_bound(reference_m.begin(), reference_m.end(), h_m);
  std::size_t e = static_cast<std::size_t>(std::max<long>(0, (it - reference_m.begin()) - 1));
  e = std::min(e, reference_m.size() - 2);
  const double xi = (h_m - reference_m[e]) / (reference_m[e + 1] - reference_m[e]);
  return s0_m[e] + xi * (s0_m[e + 1] - s0_m[e]);
}

Climber parked_climber(const std::string& name, double mass_kg, double s_m) {
  Climber c;
  c.name = name;
  c.mass_kg = mass_kg;
  c.profile = ClimberProfile::parked(s_m);
  return c;
}

LoadedState solve_static_loads(const TetherModel& m, const StaticLoads& l) {
  const bool planet = m.reference_radius_m > 0.0;
  const std::size_t top = m.nodes() - 1;
  // Models in every static state: the bars and the first static_body_models of the body
  // (gravity, frame; not the drag, tides or other time-dependent loads added after them).
  StaticLoadSet set;
  set.bars = m.bars.get();
  set.common = {m.bars.get()};
  std::vector<std::shared_ptr<const ForceModel>> point_models;
  for (std::size_t i = 0; i < m.static_body_models; ++i) {
    set.common.push_back(m.body[i].get());
    if (m.body[i]->acts_on_point_masses()) point_models.push_back(m.body[i]);
  }
  // Node masses: as built (the design's counterweight), and with the counterweight of the loads.
  set.built_mass_kg = m.mesh.node_mass;
  set.loaded_mass_kg = m.mesh.node_mass;
  if (planet) {
    const double others =
        m.mesh.node_mass[static_cast<Eigen::Index>(top)] - m.mesh.counterweight_mass;
    set.built_mass_kg[static_cast<Eigen::Index>(top)] = others + m.mesh.as_built_counterweight_kg;
    set.loaded_mass_kg[static_cast<Eigen::Index>(top)] = others + l.counterweight_kg;
  }
  // The tides at t = 0 (the residual is evaluated at t = 0): on the nodes and the climbers.
  std::shared_ptr<const ForceModel> tide;
  if (l.tides)
    for (const auto& b : m.body)
      if (std::dynamic_pointer_cast<const TidalForce>(b)) tide = b;
  const auto untided = point_models;  // what the built-under climbers felt when it was built
  if (tide) point_models.push_back(tide);
  std::unique_ptr<ClimberLoad> parked;
  if (!l.parked.empty()) {
    std::shared_ptr<const AerodynamicDrag> air;
    if (l.mean_wind) air = std::dynamic_pointer_cast<const AerodynamicDrag>(m.mean_drag);
    parked = std::make_unique<ClimberLoad>(l.parked, m.equilibrium.s0_m, point_models,
                                           m.mesh.as_built_position, nullptr, air);
    parked->set_parked(true);
    if (!l.climber_path.empty()) parked->set_path(l.climber_path);
    parked->set_spread(l.spread, l.spread_width);
    if (!parked->attachments(0.0).empty()) set.added.push_back(parked.get());
  }
  if (l.mean_wind && m.mean_drag) set.added.push_back(m.mean_drag.get());
  // The climbers the tether was built under come off (they are in `loads` again if they stay).
  std::unique_ptr<ClimberLoad> built_under;
  if (!m.built_under.empty()) {
    built_under = std::make_unique<ClimberLoad>(m.built_under, m.equilibrium.s0_m, untided,
                                                m.mesh.as_built_position);
    built_under->set_parked(true);
    built_under->set_spread(l.spread, l.spread_width);
    set.removed.push_back(built_under.get());
  }
  if (tide) set.added.push_back(tide.get());
  set.first_free = 1;
  set.last_free = m.nodes() - (m.far_end ? 2 : 1);
  set.ground_radius_m = m.reference_radius_m;  // the anchor is on it; 0 on the bench

  LoadedState out;
  out.loaded = !set.added.empty() || !set.removed.empty() ||
               set.loaded_mass_kg != set.built_mass_kg;
  set.description = describe(l.parked, l.counterweight_kg, m.mesh.as_built_counterweight_kg, planet,
                             l.mean_wind && m.mean_drag, tide != nullptr);
  if (set.description.empty()) set.description = "no load";
  if (!m.built_under_case.empty())
    set.description += " (on the tether built under load case '" + m.built_under_case + "')";
  out.description = out.loaded ? set.description : "no load";
  if (!out.loaded) {
    out.state.position_m = m.mesh.as_built_position;
    out.state.tension_n = m.equilibrium.as_built_tension_n;
    return out;
  }
  out.state = solve_static(set, m.mesh.as_built_position);
  if (out.state.newton_iterations == 0 && out.state.relax_iterations == 0) {
    // No step taken: the loads act on held nodes only (a climber at the anchor) and the
    // as-built state, exact by construction, stays as it is.
    out.state.position_m = m.mesh.as_built_position;
    out.state.tension_n = m.equilibrium.as_built_tension_n;
  }
  if (out.state.fold_load_factor < 1.0) {
    char note[160];
    std::snprintf(
        note, sizeof note,
        " (continuation stopped at %.4g %% of the load; reached by pseudo-transient relaxation)",
        100.0 * out.state.fold_load_factor);
    out.description += note;
  }
  return out;
}

}  // namespace hawser
