#pragma once
// Aerodynamic drag of the wind on the tether's elements (physics.md section 4), by the
// cross-flow (independence) principle: only the component of the relative wind normal to the
// element makes a force (Hoerner, Fluid-Dynamic Drag, 1965, on inclined cylinders; recalled from
// memory).
//
// Element e joins nodes e and e+1: d = x_{e+1} - x_e, l = |d|, n = d / l, P = I - n n^T.
// Relative wind at the midpoint  w = u(x_mid, t) - (v_e + v_{e+1}) / 2  (rotating frame, u from
// models/wind_field.hpp), normal part a = P w. Force on the element [N]:
//   F_e = (1/2) rho_air(h_mid) Cd l |a| D w,   D = t P + (W - t) e1 e1^T,
// a projected-width tensor [m] with W the section's width, t its thickness and e1 the unit
// normal of the wide face: the local east direction made normal to the element,
// e1 = P east / |P east|. (D w = D a, so only the normal part acts.)
//  - round cable: W = t = diameter, D = d P and F_e = (1/2) rho Cd d l |a| a;
//  - ribbon: the wide face looks east-west (tether.section.shape in config/scenario_keys.yaml),
//    so an east-west wind sees the width and a north-south wind the thickness; the ribbon's
//    twist is not modelled (its face normal follows the local east). One Cd for both
//    directions; the edge-on term is t/W (1e-3 for the demo ribbon) of the broadside one.
// F_e goes half to each end node. Drag coefficients (scenario key environment.drag.cd; its
// documented defaults by section, Hoerner, Fluid-Dynamic Drag, 1965, recalled from memory):
// circular cylinder in subcritical cross-flow about 1.2; flat plate broadside about 2.0.
//
// Jacobian (analytic, c = rho Cd / 2; the altitude dependence of rho and of the wind, and the
// turning of the local east with position, are left out; they only steer Newton's method, the
// right-hand side stays exact):
//   dF_e/dw = c l ( D w a^T / |a| + |a| D ),   dw/dv_e = dw/dv_{e+1} = -I / 2,
//   dF_e/dd = c [ |a| g n^T + l g (d|a|/dd) + l |a| dg/dd ],   g = D w,
//   da/dd = -((n.w) I + n w^T) P / l,   d|a|/dd = -(n.w) a^T / (l |a|),
//   dg/dd = t da/dd + (W - t) ((e1.w) I + e1 w^T) de1/dd,
//   de1/dd = (I - e1 e1^T) / |b| * (-((n.east) I + n east^T) P / l),  b = P east;
// all terms vanish with |a| (F is quadratic in w).
// Drag is an external force doing work from the wind: energy() and dissipated_power() stay 0
// (it is neither stored nor dissipated tether energy).
// Climbers: a climber's own drag (its Cd A, key climbers[].drag) takes the air at its place
// from air_at() (models/climber_load.cpp).
#include <memory>
#include <vector>

#include "models/force_model.hpp"
#include "models/standard_atmosphere.hpp"
#include "models/wind_field.hpp"

namespace hawser {

/// Air density against altitude: the U.S. Standard Atmosphere 1976 (with its stated extension
/// above 86 km, models/standard_atmosphere.hpp) or one uniform value (the test bench).
/// The standard's air ends where its density falls below kVacuumDensity (at about 176 km in
/// the extension, whose density is 8.8e-11 kg/m^3 at 150 km and 1.5e-14 at 200 km): above, the
/// density is 0. A 100 m/s relative wind there would press a 0.1 m ribbon (Cd 2) with at most
/// 1e-9 N/m, less than 1e-7 of the weight per metre of the demonstration ribbon (and the wind
/// tables of the scenarios end below 30 km); the cut spares the drag model the air and wind evaluations
/// of the elements above it (the extension itself only underflows near 11,000 km).
class AirDensity {
 public:
  static constexpr double kVacuumDensity = 1e-12;  // [kg/m^3]
  static AirDensity us1976();
  static AirDensity uniform(double density_kg_m3);
  double at(double altitude_m) const;  // [kg/m^3]
  /// Altitude above which the density is taken as 0 [m]; +infinity if never.
  double airless_above_m() const { return airless_m_; }

 private:
  AirDensity(bool standard, double rho);
  bool standard_;
  double uniform_kg_m3_;
  StandardAtmosphere1976 atmosphere_;
  double airless_m_;
};

/// Section seen by the wind [m]: a ribbon's width and thickness; a round cable's diameter twice.
struct DragSection {
  double width_m;
  double thickness_m;
};

class AerodynamicDrag : public ForceModel {
 public:
  /// Per element section, drag coefficient Cd [-], the air's density and its wind.
  AerodynamicDrag(std::vector<DragSection> sections, double cd, AirDensity air, std::shared_ptr<const WindField> wind);
  std::string name() const override { return "aerodynamic drag"; }
  bool exact_position_jacobian() const override { return false; }  // see the Jacobian above
  void add_forces(const TetherState& s, Matrix3X& f) const override;
  void add_jacobian(const TetherState& s, NodeJacobian& j) const override;
  /// Wind windows and gust onsets and ends.
  std::vector<double> event_times() const override { return wind_->event_times(); }
  /// /environment/wind (K,3) m/s and /environment/air_density (K) kg/m^3 at the recorded nodes;
  /// /environment/drag_force (N,3) N on each element; /environment/drag_load (N) N/m, the
  /// force per unit length |F_e| / l_e (independent of the mesh, unlike F_e), whose largest
  /// recorded value goes to /summary as peak_aerodynamic_load_n_per_m.
  std::vector<OutputField> output_fields(const std::vector<std::size_t>& nodes) const override;
  void sample_outputs(const TetherState& s, const std::vector<std::size_t>& nodes,
                      std::vector<std::vector<double>>& rows) const override;

  struct Air {
    double density_kg_m3;
    Eigen::Vector3d wind_m_s;  // rotating frame
  };
  /// The air at r [m] and time t [s] (the seam for other bodies' drag, such as climbers').
  Air air_at(const Eigen::Vector3d& r_m, double t_s) const;
  /// Drag on element e [N] (both halves).
  Eigen::Vector3d element_force(const TetherState& s, std::size_t e) const;
  double drag_coefficient() const { return cd_; }
  const DragSection& section(std::size_t e) const { return sections_[e]; }

 private:
  struct Element;  // kinematics and air of one element
  /// The top of the air, to leave out the many elements above it before any other work.
  AltitudeFrame::Level air_top() const { return wind_->frame().level(air_.airless_above_m()); }
  static bool in_air(const TetherState& s, std::size_t e, const AltitudeFrame::Level& top) {
    const auto i = static_cast<Eigen::Index>(e);
    return !top.reaches(0.5 * (s.x.col(i) + s.x.col(i + 1)));
  }
  bool element(const TetherState& s, std::size_t e, Element& out) const;
  std::vector<DragSection> sections_;
  double cd_;
  AirDensity air_;
  std::shared_ptr<const WindField> wind_;
};

}  // namespace hawser
