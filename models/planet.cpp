#include "models/planet.hpp"

#include <cmath>

namespace hawser {

EquatorialField::EquatorialField(const Planet& planet, bool include_j2)
    : planet_(planet), j2_(include_j2 ? planet.j2 : 0.0) {}

double EquatorialField::potential(double r) const {
  const double gm = planet_.gm_m3_s2, a = planet_.equatorial_radius_m, w = planet_.spin_rate_rad_s;
  return -gm / r - gm * j2_ * a * a / (2.0 * r * r * r) - 0.5 * w * w * r * r;
}

double EquatorialField::outward_force(double r) const {
  const double gm = planet_.gm_m3_s2, a = planet_.equatorial_radius_m, w = planet_.spin_rate_rad_s;
  return -gm / (r * r) - 1.5 * gm * j2_ * a * a / (r * r * r * r) + w * w * r;
}

double EquatorialField::synchronous_radius() const {
  const double gm = planet_.gm_m3_s2, w = planet_.spin_rate_rad_s;
  double r = std::cbrt(gm / (w * w));  // exact without J2
  // Newton on f(r) = 0; f is increasing in r, so this converges from the point-mass root.
  for (int it = 0; it < 50 && j2_ != 0.0; ++it) {
    const double a = planet_.equatorial_radius_m;
    const double df = 2.0 * gm / (r * r * r) + 6.0 * gm * j2_ * a * a / std::pow(r, 5) + w * w;
    const double step = outward_force(r) / df;
    r -= step;
    if (std::abs(step) < 1e-9 * r) break;
  }
  return r;
}

}  // namespace hawser
