#include "models/taper_design.hpp"

#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <cmath>
#include <sstream>

namespace hawser {
namespace {

// Adaptive Gauss-Kronrod over [a, b], split at r_g where the integrands have their kink-free
// maximum (keeps the panels balanced).
template <class F>
double integrate(F f, double a, double b, double r_g) {
  using boost::math::quadrature::gauss_kronrod;
  if (b <= a) return 0.0;
  auto q = [&](double lo, double hi) { return gauss_kronrod<double, 31>::integrate(f, lo, hi, 15, 1e-13); };
  if (a < r_g && r_g < b) return q(a, r_g) + q(r_g, b);
  return q(a, b);
}

std::string gpa(double pa) {
  std::ostringstream os;
  os.precision(4);
  os << pa / 1e9 << " GPa";
  return os.str();
}

}  // namespace

TetherDesign::TetherDesign(const EquatorialField& field, const Material& material, const TetherSpec& spec,
                           const CounterweightSpec& counterweight)
    : field_(field), material_(material), spec_(spec) {
  r_base_ = field.planet().equatorial_radius_m;
  r_top_ = r_base_ + spec.top_altitude_m;
  sigma_d_ = material.ultimate_strength_pa / spec.safety_factor;
  const double rho = material.density_kg_m3;
  const double r_g = field.synchronous_radius();

  if (r_top_ <= r_g) {
    std::ostringstream os;
    os.precision(8);
    os << "the top at " << spec.top_altitude_m / 1e3 << " km altitude is not above the synchronous (geostationary) altitude "
       << (r_g - r_base_) / 1e3 << " km: the tether would fall";
    problems_.push_back({DesignProblem::top_below_synchronous, os.str()});
  }
  const double dphi_g = field.potential(r_g) - field.potential(r_base_);
  if (spec.profile == TaperProfile::uniform && sigma_d_ <= rho * dphi_g) {
    problems_.push_back({DesignProblem::uniform_infeasible,
                         "a uniform cable of this material needs a design stress above " + gpa(rho * dphi_g) +
                             " at the synchronous radius; the design stress is " + gpa(sigma_d_) +
                             " (use profile constant_stress, a stronger material or a lower safety factor)"});
    return;
  }
  // A taper ratio beyond 1e12 cannot be built, and its exponentials lose all precision.
  const double log10_ratio = rho * dphi_g / sigma_d_ / std::log(10.0);
  if (spec.profile == TaperProfile::constant_stress && log10_ratio > 12.0) {
    std::ostringstream os;
    os.precision(4);
    os << "a constant-stress taper of this material at " << gpa(sigma_d_) << " needs a taper ratio of about 10^"
       << log10_ratio << ": no practical tether (a stronger or lighter material, or a lower safety factor)";
    problems_.push_back({DesignProblem::taper_impractical, os.str()});
    return;
  }
  // Base area and the design tension at the top.
  if (spec.profile == TaperProfile::constant_stress) {
    a0_ = spec.base_area_m2 ? *spec.base_area_m2 : *spec.base_design_load_n / sigma_d_;
  } else {
    a0_ = spec.base_area_m2 ? *spec.base_area_m2 : *spec.base_design_load_n / (sigma_d_ - rho * dphi_g);
  }
  const double t_top_design = spec.profile == TaperProfile::constant_stress
                                  ? sigma_d_ * area(r_top_)
                                  : a0_ * (sigma_d_ - rho * (field.potential(r_g) - field.potential(r_top_)));
  const double f_top = field.outward_force(r_top_);
  if (!problems_.empty()) return;  // below r_g no counterweight can hold anything up
  if (counterweight.mass_kg) {
    cw_computed_ = false;
    m_cw_ = *counterweight.mass_kg;
    t_top_ = m_cw_ * f_top;
  } else {
    m_cw_ = t_top_design / f_top;
    t_top_ = t_top_design;
  }
  const double t_base = tension(r_base_);
  if (t_base <= 0.0) {
    std::ostringstream os;
    os.precision(5);
    os << "a counterweight of " << m_cw_ << " kg cannot hold the tether up (the tension at the anchor would be "
       << t_base << " N); the design needs " << t_top_design / f_top << " kg"
       << " (at least " << (t_top_ - t_base) / f_top << " kg to keep the anchor in tension)";
    problems_.push_back({DesignProblem::counterweight_too_light, os.str()});
    return;
  }
  const double peak = std::max({stress(r_base_), stress(std::min(r_g, r_top_)), stress(r_top_)});
  if (peak >= material.ultimate_strength_pa)
    problems_.push_back({DesignProblem::overstressed, "the counterweight stresses the tether to " + gpa(peak) +
                                                          ", at or above the ultimate strength " +
                                                          gpa(material.ultimate_strength_pa)});
}

double TetherDesign::area(double r) const {
  if (spec_.profile == TaperProfile::uniform) return a0_;
  const double k = material_.density_kg_m3 / sigma_d_;
  return a0_ * std::exp(k * (field_.potential(r) - field_.potential(r_base_)));
}

double TetherDesign::tension(double r) const {
  if (spec_.profile == TaperProfile::uniform)
    return t_top_ + material_.density_kg_m3 * a0_ * (field_.potential(r) - field_.potential(r_top_));
  return t_top_ + sigma_d_ * (area(r) - area(r_top_));
}

double TetherDesign::width(double r) const {
  const double a = area(r);
  if (spec_.shape == SectionShape::round) return std::sqrt(4.0 * a / M_PI);
  return std::sqrt(a * spec_.width_to_thickness);
}

double TetherDesign::thickness(double r) const {
  const double a = area(r);
  if (spec_.shape == SectionShape::round) return std::sqrt(4.0 * a / M_PI);
  return std::sqrt(a / spec_.width_to_thickness);
}

double TetherDesign::mass_between(double r1, double r2) const {
  return material_.density_kg_m3 * integrate([this](double r) { return area(r); }, r1, r2, field_.synchronous_radius());
}

double TetherDesign::uniform_cable_stress() const {
  return material_.density_kg_m3 * (field_.potential(field_.synchronous_radius()) - field_.potential(r_base_));
}

double TetherDesign::longitudinal_travel_time() const {
  return (r_top_ - r_base_) / std::sqrt(material_.youngs_modulus_pa / material_.density_kg_m3);
}

double TetherDesign::lateral_travel_time() const {
  const double rho = material_.density_kg_m3;
  return integrate([&](double r) { return 1.0 / std::sqrt(std::max(stress(r), 1e-300) / rho); }, r_base_, r_top_,
                   field_.synchronous_radius());
}

}  // namespace hawser
