#include "models/wind_field.hpp"

#include <Eigen/Geometry>
#include <algorithm>
#include <cmath>

namespace hawser {

AltitudeFrame AltitudeFrame::planet(double equatorial_radius_m) { return AltitudeFrame(false, equatorial_radius_m); }
AltitudeFrame AltitudeFrame::bench() { return AltitudeFrame(true, 0.0); }

double AltitudeFrame::altitude(const Eigen::Vector3d& r) const { return bench_ ? r.x() : r.norm() - radius_m_; }

Eigen::Matrix3d AltitudeFrame::enu_axes(const Eigen::Vector3d& r) const {
  if (bench_) {
    Eigen::Matrix3d axes;  // columns east = +y, north = +z, up = +x
    axes << 0.0, 0.0, 1.0, 1.0, 0.0, 0.0, 0.0, 1.0, 0.0;
    return axes;
  }
  const Eigen::Vector3d up = r.normalized();
  Eigen::Vector3d east(-up.y(), up.x(), 0.0);  // e_z x up
  const double n = east.norm();
  // On the spin axis east is undefined; any horizontal direction will do (never on a tether
  // anchored at the equator).
  east = n > 1e-12 ? Eigen::Vector3d(east / n) : Eigen::Vector3d::UnitY();
  Eigen::Matrix3d axes;
  axes.col(0) = east;
  axes.col(1) = up.cross(east);
  axes.col(2) = up;
  return axes;
}

WindField::WindField(AltitudeFrame frame, std::vector<WindProfile> winds, GustSet gusts,
                     std::shared_ptr<const DrydenTurbulence> turbulence, double turbulence_from_deg)
    : frame_(frame),
      winds_(std::move(winds)),
      gusts_(std::move(gusts)),
      turbulence_(std::move(turbulence)),
      turbulence_downwind_enu_(WindProfile::downwind_unit_enu(turbulence_from_deg)) {}

Eigen::Vector3d WindField::velocity_enu(double h, double t) const {
  Eigen::Vector3d u = Eigen::Vector3d::Zero();
  for (const WindProfile& w : winds_) u += w.velocity_enu(h, t);
  if (gusts_.size() > 0) u += gusts_.velocity_enu(h, t);
  if (turbulence_) u += DrydenTurbulence::to_enu(turbulence_uvw(h, t), turbulence_downwind_enu_);
  return u;
}

Eigen::Vector3d WindField::turbulence_uvw(double h, double t) const {
  return turbulence_->velocity_uvw(h, std::clamp(t, 0.0, turbulence_->end_s()));  // held past the end
}

Eigen::Vector3d WindField::velocity(const Eigen::Vector3d& r, double t) const {
  if (calm()) return Eigen::Vector3d::Zero();
  return frame_.enu_axes(r) * velocity_enu(frame_.altitude(r), t);
}

std::vector<double> WindField::event_times() const {
  std::vector<double> out = gusts_.event_times();
  for (const WindProfile& w : winds_)
    for (double te : {w.start_s(), w.end_s()})
      if (std::isfinite(te) && te > 0.0) out.push_back(te);  // a wind from t = 0 is no jump
  std::sort(out.begin(), out.end());
  out.erase(std::unique(out.begin(), out.end()), out.end());
  return out;
}

}  // namespace hawser
