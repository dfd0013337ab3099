#include "solver/output/design_report.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <sstream>

#include "solver/input/scenario.hpp"

namespace hawser {

DesignFigures evaluate_design(const TetherDesign& d, int n_profile) {
  DesignFigures f{};
  const double R = d.base_radius(), top = d.top_radius();
  const double rg = d.field().synchronous_radius();
  const double rho = d.material().density_kg_m3;
  f.synchronous_radius_m = rg;
  f.synchronous_altitude_m = rg - R;
  f.tether_length_m = top - R;
  f.design_stress_pa = d.design_stress();
  f.base_area_m2 = d.area(R);
  f.top_area_m2 = d.area(top);
  f.tether_mass_kg = d.tether_mass();
  f.counterweight_mass_kg = d.counterweight_mass();
  f.total_mass_kg = f.tether_mass_kg + f.counterweight_mass_kg;
  f.base_tension_n = d.tension(R);
  f.top_tension_n = d.tension(top);
  f.longitudinal_speed_m_s = std::sqrt(d.material().youngs_modulus_pa / rho);
  f.longitudinal_travel_time_s = d.longitudinal_travel_time();
  f.lateral_travel_time_s = d.lateral_travel_time();
  f.uniform_cable_stress_pa = d.uniform_cable_stress();

  std::vector<double> radii;
  for (int i = 0; i <= n_profile; ++i) radii.push_back(R + (top - R) * i / n_profile);
  if (rg > R && rg < top) radii.push_back(rg);
  std::sort(radii.begin(), radii.end());
  f.peak_tension_n = -1.0;
  f.max_area_m2 = -1.0;
  f.peak_stress_pa = -1.0;
  f.lateral_speed_min_m_s = 1e300;
  for (double r : radii) {
    DesignSample s;
    s.altitude_m = r - R;
    s.area_m2 = d.area(r);
    s.tension_n = d.tension(r);
    s.stress_pa = s.tension_n / s.area_m2;
    s.safety_factor = d.material().ultimate_strength_pa / s.stress_pa;
    s.lateral_speed_m_s = std::sqrt(std::max(s.stress_pa, 0.0) / rho);
    f.profile.push_back(s);
    if (s.tension_n > f.peak_tension_n) {
      f.peak_tension_n = s.tension_n;
      f.peak_tension_altitude_m = s.altitude_m;
    }
    // Ties (uniform section) keep the lowest altitude.
    if (s.area_m2 > f.max_area_m2 * (1 + 1e-12)) {
      f.max_area_m2 = s.area_m2;
      f.max_area_altitude_m = s.altitude_m;
    }
    f.peak_stress_pa = std::max(f.peak_stress_pa, s.stress_pa);
    f.lateral_speed_min_m_s = std::min(f.lateral_speed_min_m_s, s.lateral_speed_m_s);
  }
  f.min_safety_factor = d.material().ultimate_strength_pa / f.peak_stress_pa;
  f.taper_ratio = d.area(std::min(std::max(rg, R), top)) / f.base_area_m2;
  f.lateral_speed_base_m_s = f.profile.front().lateral_speed_m_s;
  return f;
}

namespace {
std::string line(const char* label, double value, const char* unit, const char* fmt = "%.6g") {
  char buf[256];
  char val[64];
  std::snprintf(val, sizeof val, fmt, value);
  std::snprintf(buf, sizeof buf, "  %-44s %16s %s\n", label, val, unit);
  return buf;
}
}  // namespace

std::string design_table(const Scenario& sc, const TetherDesign& d, const DesignFigures& f) {
  std::ostringstream os;
  const auto& m = d.material();
  os << "hawser design: " << sc.name << "\n";
  os << "  planet " << sc.planet.name << (sc.j2 ? " (with J2)" : "") << ", material " << m.name << " ("
     << m.source << ")\n";
  os << "  profile " << (d.spec().profile == TaperProfile::uniform ? "uniform section" : "constant stress (Pearson taper)")
     << ", safety factor " << d.spec().safety_factor << ", counterweight "
     << (d.counterweight_computed() ? "computed" : "given") << "\n\n";
  os << line("synchronous (geostationary) altitude", f.synchronous_altitude_m / 1e3, "km", "%.3f");
  os << line("tether length (anchor to top)", f.tether_length_m / 1e3, "km", "%.3f");
  os << line("design stress", f.design_stress_pa / 1e9, "GPa", "%.4f");
  os << line("base area", f.base_area_m2 * 1e6, "mm^2", "%.6g");
  os << line("largest area", f.max_area_m2 * 1e6, "mm^2", "%.6g");
  os << line("  at altitude", f.max_area_altitude_m / 1e3, "km", "%.3f");
  os << line("top area", f.top_area_m2 * 1e6, "mm^2", "%.6g");
  os << line("taper ratio A(r_g)/A(base)", f.taper_ratio, "", "%.6g");
  os << line("tether mass", f.tether_mass_kg / 1e3, "t", "%.6g");
  os << line("counterweight mass", f.counterweight_mass_kg / 1e3, "t", "%.6g");
  os << line("total mass", f.total_mass_kg / 1e3, "t", "%.6g");
  os << line("base tension", f.base_tension_n / 1e3, "kN", "%.6g");
  os << line("top tension", f.top_tension_n / 1e3, "kN", "%.6g");
  os << line("peak tension", f.peak_tension_n / 1e3, "kN", "%.6g");
  os << line("  at altitude", f.peak_tension_altitude_m / 1e3, "km", "%.3f");
  os << line("peak stress", f.peak_stress_pa / 1e9, "GPa", "%.4f");
  os << line("smallest safety factor", f.min_safety_factor, "", "%.4f");
  os << line("longitudinal wave speed sqrt(E/rho)", f.longitudinal_speed_m_s / 1e3, "km/s", "%.4f");
  os << line("  one-way travel time", f.longitudinal_travel_time_s / 3600, "h", "%.4f");
  os << line("lateral wave speed sqrt(sigma/rho) at base", f.lateral_speed_base_m_s / 1e3, "km/s", "%.4f");
  os << line("  smallest along the tether", f.lateral_speed_min_m_s / 1e3, "km/s", "%.4f");
  os << line("  one-way travel time", f.lateral_travel_time_s / 3600, "h", "%.4f");
  os << line("stress a uniform cable would need at r_g", f.uniform_cable_stress_pa / 1e9, "GPa", "%.4f");
  os << "\n  " << "altitude [km]      area [mm^2]    tension [kN]   stress [GPa]  safety factor\n";
  // About fifteen rows: every k-th sample plus the synchronous radius.
  const std::size_t step = std::max<std::size_t>(1, f.profile.size() / 14);
  for (std::size_t i = 0; i < f.profile.size(); ++i) {
    const auto& s = f.profile[i];
    const bool at_sync = std::abs(s.altitude_m - f.synchronous_altitude_m) < 1e-6 * f.tether_length_m;
    if (i % step != 0 && i + 1 != f.profile.size() && !at_sync) continue;
    char buf[200];
    std::snprintf(buf, sizeof buf, "  %13.3f %16.6g %15.6g %14.4f %14.4f%s\n", s.altitude_m / 1e3, s.area_m2 * 1e6,
                  s.tension_n / 1e3, s.stress_pa / 1e9, s.safety_factor, at_sync ? "   <- synchronous" : "");
    os << buf;
  }
  os << "\n  hawser is a research tool, not a certification method: real structures answer to licensed\n"
        "  engineering practice and the applicable standards.\n";
  return os.str();
}

nlohmann::json design_json(const Scenario& sc, const TetherDesign& d, const DesignFigures& f) {
  using nlohmann::json;
  const auto& m = d.material();
  json j;
  j["format"] = "hawser-design";
  j["format_version"] = 1;
  j["scenario"] = sc.name;
  j["planet"] = {{"name", sc.planet.name},
                 {"gm_m3_per_s2", sc.planet.gm_m3_s2},
                 {"spin_rate_rad_per_s", sc.planet.spin_rate_rad_s},
                 {"equatorial_radius_m", sc.planet.equatorial_radius_m},
                 {"j2", sc.planet.j2},
                 {"j2_in_model", sc.j2}};
  j["material"] = {{"name", m.name},
                   {"density_kg_per_m3", m.density_kg_m3},
                   {"youngs_modulus_pa", m.youngs_modulus_pa},
                   {"ultimate_strength_pa", m.ultimate_strength_pa},
                   {"damping_time_s", m.damping_time_s},
                   {"source", m.source}};
  j["design"] = {{"profile", d.spec().profile == TaperProfile::uniform ? "uniform" : "constant_stress"},
                 {"safety_factor", d.spec().safety_factor},
                 {"design_stress_pa", f.design_stress_pa},
                 {"counterweight_computed", d.counterweight_computed()},
                 {"synchronous_radius_m", f.synchronous_radius_m},
                 {"synchronous_altitude_m", f.synchronous_altitude_m},
                 {"base_radius_m", d.base_radius()},
                 {"top_radius_m", d.top_radius()},
                 {"tether_length_m", f.tether_length_m},
                 {"base_area_m2", f.base_area_m2},
                 {"top_area_m2", f.top_area_m2},
                 {"max_area_m2", f.max_area_m2},
                 {"max_area_altitude_m", f.max_area_altitude_m},
                 {"taper_ratio", f.taper_ratio},
                 {"tether_mass_kg", f.tether_mass_kg},
                 {"counterweight_mass_kg", f.counterweight_mass_kg},
                 {"total_mass_kg", f.total_mass_kg},
                 {"base_tension_n", f.base_tension_n},
                 {"top_tension_n", f.top_tension_n},
                 {"peak_tension_n", f.peak_tension_n},
                 {"peak_tension_altitude_m", f.peak_tension_altitude_m},
                 {"peak_stress_pa", f.peak_stress_pa},
                 {"min_safety_factor", f.min_safety_factor},
                 {"longitudinal_wave_speed_m_per_s", f.longitudinal_speed_m_s},
                 {"longitudinal_travel_time_s", f.longitudinal_travel_time_s},
                 {"lateral_wave_speed_base_m_per_s", f.lateral_speed_base_m_s},
                 {"lateral_wave_speed_min_m_per_s", f.lateral_speed_min_m_s},
                 {"lateral_travel_time_s", f.lateral_travel_time_s},
                 {"uniform_cable_stress_pa", f.uniform_cable_stress_pa}};
  json prof;
  for (const auto& s : f.profile) {
    prof["altitude_m"].push_back(s.altitude_m);
    prof["area_m2"].push_back(s.area_m2);
    prof["tension_n"].push_back(s.tension_n);
    prof["stress_pa"].push_back(s.stress_pa);
    prof["safety_factor"].push_back(s.safety_factor);
    prof["lateral_wave_speed_m_s"].push_back(s.lateral_speed_m_s);
  }
  j["profile"] = prof;
  j["caution"] = "hawser is a research tool, not a certification method; real structures answer to licensed "
                 "engineering practice and the applicable standards.";
  return j;
}

}  // namespace hawser
