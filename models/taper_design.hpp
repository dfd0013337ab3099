#pragma once
// The static design of a radial tether from the anchor (radius R) to its top (r_top), at
// rest in the rotating frame: cross-section A(r), tension T(r), masses.
//
// Equilibrium of a slice dr (tension > 0 when stretched):  dT/dr = -rho A(r) f(r),
// f(r) = -dPhi/dr the net outward specific force of EquatorialField (negative below r_g).
//
// Profiles (sigma_d = ultimate strength / safety factor):
//  - constant_stress (Pearson, "The orbital tower", Acta Astronautica 2, 1975):
//      A(r) = A0 exp((rho/sigma_d)(Phi(r) - Phi(R))), and then
//      T(r) = T_top + sigma_d (A(r) - A(r_top))        (closed form of the integral)
//  - uniform: A(r) = A, T(r) = T_top + rho A (Phi(r) - Phi(r_top)); sized so that the peak
//    stress, at r_g, is sigma_d.
// Counterweight: T_top = m_cw f(r_top). If computed, m_cw = T_design(r_top) / f(r_top);
// if given, T(r) follows from it and the stress departs from sigma_d.
#include <optional>
#include <vector>

#include "models/material.hpp"
#include "models/planet.hpp"

namespace hawser {

enum class TaperProfile { constant_stress, uniform };
enum class SectionShape { ribbon, round };

struct TetherSpec {
  TaperProfile profile = TaperProfile::constant_stress;
  double safety_factor = 0.0;                 // sigma_u / sigma_d [-]
  std::optional<double> base_area_m2;         // A at the anchor [m^2], or
  std::optional<double> base_design_load_n;   // tension at the anchor at design stress [N]
  double top_altitude_m = 0.0;                // above the equatorial radius [m]
  SectionShape shape = SectionShape::ribbon;
  double width_to_thickness = 1.0;            // ribbon only [-]
};

struct CounterweightSpec {
  std::optional<double> mass_kg;  // nullopt: computed from the design
};

/// What can be wrong with a design; the scenario layer turns these into located errors.
struct DesignProblem {
  enum Kind { top_below_synchronous, uniform_infeasible, taper_impractical, counterweight_too_light, overstressed };
  Kind kind;
  std::string message;
};

class TetherDesign {
 public:
  TetherDesign(const EquatorialField& field, const Material& material, const TetherSpec& spec,
               const CounterweightSpec& counterweight);

  /// Problems that make the design unusable (empty when it is sound).
  const std::vector<DesignProblem>& problems() const { return problems_; }

  double base_radius() const { return r_base_; }      // [m]
  double top_radius() const { return r_top_; }        // [m]
  double design_stress() const { return sigma_d_; }   // [Pa]
  double area(double r) const;                        // [m^2]
  double tension(double r) const;                     // static tension [N]
  double stress(double r) const { return tension(r) / area(r); }  // [Pa]
  /// Width and thickness of the section at r [m] (round: diameter for both).
  double width(double r) const;
  double thickness(double r) const;
  /// rho * integral of A over [r1, r2] [kg].
  double mass_between(double r1, double r2) const;
  double tether_mass() const { return mass_between(r_base_, r_top_); }
  double counterweight_mass() const { return m_cw_; }  // [kg]
  double top_tension() const { return t_top_; }        // [N]
  bool counterweight_computed() const { return cw_computed_; }
  /// Stress at r_g of a uniform cable hanging free from r_g to the ground [Pa].
  double uniform_cable_stress() const;
  /// One-way travel time of longitudinal waves, c = sqrt(E/rho), anchor to top [s].
  double longitudinal_travel_time() const;
  /// One-way travel time of lateral waves, c = sqrt(sigma(r)/rho), anchor to top [s].
  double lateral_travel_time() const;
  const EquatorialField& field() const { return field_; }
  const Material& material() const { return material_; }
  const TetherSpec& spec() const { return spec_; }

 private:
  EquatorialField field_;
  Material material_;
  TetherSpec spec_;
  double r_base_, r_top_, sigma_d_;
  double a0_ = 0.0;      // base area [m^2]
  double t_top_ = 0.0;   // top tension [N]
  double m_cw_ = 0.0;    // counterweight [kg]
  bool cw_computed_ = true;
  std::vector<DesignProblem> problems_;
};

}  // namespace hawser
