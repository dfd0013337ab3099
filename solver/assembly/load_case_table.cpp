#include "solver/assembly/load_case_table.hpp"

#include <algorithm>
#include <cstdio>
#include <limits>
#include <sstream>

#include "solver/input/errors.hpp"
#include "solver/input/scenario.hpp"
#include "solver/assembly/static_loads.hpp"
#include "solver/assembly/tether_model.hpp"

namespace hawser {

namespace {

/// Radius of the point at material coordinate s in the geometry x [m].
double radius_at(const Matrix3X& x, const std::vector<double>& s0_m, double s_m) {
  const auto it = std::upper_bound(s0_m.begin(), s0_m.end(), s_m);
  std::size_t e = static_cast<std::size_t>(std::max<long>(0, (it - s0_m.begin()) - 1));
  e = std::min(e, s0_m.size() - 2);
  const double xi = (s_m - s0_m[e]) / (s0_m[e + 1] - s0_m[e]);
  const auto i = static_cast<Eigen::Index>(e);
  return ((1 - xi) * x.col(i) + xi * x.col(i + 1)).norm();
}

}  // namespace

std::vector<LoadCaseResult> evaluate_load_cases(const Scenario& sc) {
  std::vector<LoadCaseResult> out;
  if (sc.load_cases.empty()) return out;
  const TetherModel m = build_as_built(sc);
  const std::vector<double> reference = reference_distance(m.mesh);
  const std::vector<double>& s0 = m.equilibrium.s0_m;
  const std::size_t top = m.nodes() - 1;
  const double t0_built = m.equilibrium.as_built_tension_n.front();
  for (const LoadCaseSpec& c : sc.load_cases) {
    LoadCaseResult r;
    r.name = c.name;
    StaticLoads loads;
    std::vector<double> s_climber;
    for (std::size_t j = 0; j < c.climbers.size(); ++j) {
      s_climber.push_back(material_coordinate(reference, s0, c.climbers[j].altitude_m));
      loads.parked.push_back(parked_climber(c.name + " #" + std::to_string(j + 1),
                                            c.climbers[j].mass_kg, s_climber.back()));
    }
    loads.counterweight_kg = m.mesh.as_built_counterweight_kg * (1.0 + c.counterweight_change);
    loads.mean_wind = c.mean_wind;
    loads.tides = c.tides;
    // As a run would start from (tether_model.cpp): the climbers' load spread as in the run.
    loads.spread = sc.mesh.climber_load_smooth ? LoadSpread::smooth : LoadSpread::point;
    loads.spread_width = sc.mesh.climber_load_width;
    try {
      const LoadedState st = solve_static_loads(m, loads);
      const Matrix3X& x = st.state.position_m;
      r.loads = st.description;
      r.equilibrium = true;
      const auto n = static_cast<Eigen::Index>(top);
      r.top_radial_m = x.col(n).norm() - m.mesh.as_built_position.col(n).norm();
      r.top_east_m = x(1, n) - m.mesh.as_built_position(1, n);
      for (double s : s_climber)
        r.climber_radial_m.push_back(radius_at(x, s0, s) -
                                     radius_at(m.mesh.as_built_position, s0, s));
      r.base_tension_n = st.state.tension_n.front();
      r.base_margin = r.base_tension_n / t0_built;
      r.min_safety_factor = std::numeric_limits<double>::infinity();
      for (std::size_t e = 0; e < m.elements(); ++e)
        r.min_safety_factor =
            std::min(r.min_safety_factor,
                     m.ultimate_strength_pa * m.mesh.element_area[e] / st.state.tension_n[e]);
      r.newton_iterations = st.state.newton_iterations;
      r.load_steps = st.state.load_steps;
      if (r.base_margin < sc.min_base_margin) {
        char buf[160];
        std::snprintf(buf, sizeof buf,
                      "base-tension margin %.3g below %.3g (load_case_checks.min_base_margin)",
                      r.base_margin, sc.min_base_margin);
        r.warning = buf;
      }
    } catch (const InputError& e) {
      r.failure = e.what();
      const auto cut = r.failure.find("error: ");
      if (cut == 0) r.failure.erase(0, 7);
      r.warning = "no equilibrium (the base goes slack, or a load the tether cannot hold)";
    }
    out.push_back(r);
  }
  return out;
}

std::string load_case_table(const Scenario& sc, const std::vector<LoadCaseResult>& cases) {
  std::ostringstream os;
  if (cases.empty()) return "";
  char buf[400];
  os << "\n  Static load cases on the as-built tether (unstretched lengths fixed; base-tension "
        "margin =\n"
        "  base tension / as-built base tension; warn below "
     << sc.min_base_margin << ")\n";
  os << "  case                            top radial [km]  top east [km]  climber radial [km]  "
        "base tension [kN]"
        "  margin  smallest SF\n";
  for (const LoadCaseResult& r : cases) {
    if (!r.equilibrium) {
      std::snprintf(buf, sizeof buf, "  %-30.30s  %s\n", r.name.c_str(), "no equilibrium");
      os << buf;
    } else {
      std::string climbers;
      for (double d : r.climber_radial_m) {
        char c[32];
        std::snprintf(c, sizeof c, "%s%.4g", climbers.empty() ? "" : " ", d / 1e3);
        climbers += c;
      }
      if (climbers.empty()) climbers = "-";
      std::snprintf(buf, sizeof buf, "  %-30.30s %15.6g %14.6g %20s %18.6g %7.3f %12.4f\n",
                    r.name.c_str(), r.top_radial_m / 1e3, r.top_east_m / 1e3, climbers.c_str(),
                    r.base_tension_n / 1e3, r.base_margin, r.min_safety_factor);
      os << buf;
    }
  }
  for (const LoadCaseResult& r : cases) {
    if (!r.warning.empty()) os << "  warning: " << r.name << ": " << r.warning << "\n";
    if (!r.failure.empty()) os << "    (" << r.failure << ")\n";
  }
  return os.str();
}

nlohmann::json load_case_json(const Scenario& sc, const std::vector<LoadCaseResult>& cases) {
  using nlohmann::json;
  json rows = json::array();
  for (const LoadCaseResult& r : cases) {
    json j;
    j["name"] = r.name;
    j["equilibrium"] = r.equilibrium;
    if (r.equilibrium) {
      j["loads"] = r.loads;
      j["top_radial_displacement_m"] = r.top_radial_m;
      j["top_east_displacement_m"] = r.top_east_m;
      j["climber_radial_displacement_m"] = r.climber_radial_m;
      j["base_tension_n"] = r.base_tension_n;
      j["base_tension_margin"] = r.base_margin;
      j["min_safety_factor"] = r.min_safety_factor;
      j["newton_iterations"] = r.newton_iterations;
      j["load_steps"] = r.load_steps;
    } else {
      j["failure"] = r.failure;
    }
    j["warning"] = r.warning.empty() ? json() : json(r.warning);
    rows.push_back(j);
  }
  json out;
  out["min_base_margin"] = sc.min_base_margin;
  out["cases"] = rows;
  return out;
}

}  // namespace hawser
