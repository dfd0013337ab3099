#include "models/climber_load.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace hawser {

ClimberLoad::ClimberLoad(std::vector<Climber> climbers, std::vector<double> s_nodes,
                         std::vector<std::shared_ptr<const ForceModel>> point_models,
                         const Matrix3X& reference_position,
                         std::shared_ptr<const BarElements> bars,
                         std::shared_ptr<const AerodynamicDrag> air)
    : climbers_(std::move(climbers)),
      s_nodes_(std::move(s_nodes)),
      path_(s_nodes_),
      spreader_(s_nodes_, LoadSpread::point, 1.0),
      point_models_(std::move(point_models)),
      reference_(reference_position),
      bars_(std::move(bars)),
      air_(std::move(air)) {}

// The window is laid out along the coordinate the profiles use (path_), where xi is measured.
void ClimberLoad::set_spread(LoadSpread kind, double half_width_elements) {
  spread_width_elements_ = half_width_elements;
  spreader_ = LoadSpreader(path_, kind, half_width_elements);
}

void ClimberLoad::set_path(std::vector<double> path_nodes) {
  path_ = std::move(path_nodes);
  spreader_ = LoadSpreader(path_, spreader_.kind(), spread_width_elements_);
}

std::vector<Attachment> ClimberLoad::attachments(double t) const {
  std::vector<Attachment> out;
  const std::size_t n_el = path_.size() - 1;
  for (std::size_t c = 0; c < climbers_.size(); ++c) {
    const Climber& cl = climbers_[c];
    ClimberProfile::Kinematics k{cl.profile.from(), 0.0, 0.0};
    double mass = cl.mass_kg;
    if (parked_) {
      if (cl.sudden) continue;
    } else {
      if (cl.sudden && t < cl.profile.start_time()) continue;
      if (t >= cl.profile.end_time()) {
        if (cl.at_end == ClimberEnd::leave) continue;
        if (cl.at_end == ClimberEnd::drop_payload) mass = cl.end_mass_kg;
      }
      k = cl.profile.at(t);
    }
    // The element entered: going down, a climber exactly on node k is on element k-1.
    const bool down = k.speed_m_s < 0.0 || (k.speed_m_s == 0.0 && cl.profile.direction() < 0 && !parked_);
    auto it = down ? std::lower_bound(path_.begin(), path_.end(), k.s_m)
                   : std::upper_bound(path_.begin(), path_.end(), k.s_m);
    long e = static_cast<long>(it - path_.begin()) - 1;
    e = std::min<long>(std::max<long>(e, 0), static_cast<long>(n_el) - 1);
    const double len = path_[e + 1] - path_[e];
    Attachment a{c, static_cast<std::size_t>(e), (k.s_m - path_[e]) / len, k.speed_m_s / len, k.accel_m_s2 / len,
                 mass, SpreadWeights{}};
    a.xi = std::min(1.0, std::max(0.0, a.xi));
    a.spread = spreader_.at(k.s_m, a.element);
    a.s_dot = k.speed_m_s;
    a.s_ddot = k.accel_m_s2;
    out.push_back(a);
  }
  return out;
}

ClimberLoad::PointState ClimberLoad::point(const TetherState& s, const Attachment& at) const {
  PointState p{Eigen::Vector3d::Zero(), Eigen::Vector3d::Zero()};
  const SpreadWeights& sw = at.spread;
  for (std::size_t i = 0; i < sw.count; ++i) {
    const std::size_t k = sw.first + i;
    p.r += sw.w[i] * s.x.col(k);
    p.v += sw.w[i] * s.v.col(k) + at.c1(i) * s.x.col(k);
  }
  return p;
}

Eigen::Vector3d ClimberLoad::relative_acceleration(const TetherState& s,
                                                   const Attachment& at) const {
  Eigen::Vector3d a = Eigen::Vector3d::Zero();
  for (std::size_t i = 0; i < at.spread.count; ++i) {
    const std::size_t k = at.spread.first + i;
    a += 2 * at.c1(i) * s.v.col(k) + at.c2(i) * s.x.col(k);
  }
  return a;
}

Eigen::Vector3d ClimberLoad::relative_velocity(const TetherState& s, const Attachment& at) const {
  Eigen::Vector3d u = Eigen::Vector3d::Zero();
  for (std::size_t i = 0; i < at.spread.count; ++i) u += at.c1(i) * s.x.col(at.spread.first + i);
  return u;
}

Eigen::Vector3d ClimberLoad::body_force(double t, const PointState& p, double mass, Eigen::Matrix3d* dr,
                                        Eigen::Matrix3d* dv) const {
  Matrix3X x(3, 1), v(3, 1), f = Matrix3X::Zero(3, 1);
  x.col(0) = p.r;
  v.col(0) = p.v;
  Eigen::VectorXd m(1);
  m[0] = mass;
  const TetherState one{t, x, v, m};
  for (const auto& pm : point_models_) pm->add_forces(one, f);
  if (dr || dv) {
    NodeJacobian j(1);
    for (const auto& pm : point_models_) pm->add_jacobian(one, j);
    if (dr) *dr = j.dx(0, 0);
    if (dv) *dv = j.dv(0, 0);
  }
  return f.col(0);
}

Eigen::Vector3d ClimberLoad::point_force(double t, const PointState& p, const Attachment& at, Eigen::Matrix3d* dr,
                                         Eigen::Matrix3d* dv) const {
  Eigen::Vector3d f = body_force(t, p, at.mass_kg, dr, dv);
  const double cd_area = climbers_[at.climber].drag_area_m2;
  if (!air_ || cd_area <= 0.0) return f;
  // Drag of the air on the climber, a bluff body: F = (1/2) rho Cd A |w| w with the relative
  // wind w = u(r_c, t) - v_c (the drag equation; Hoerner, Fluid-Dynamic Drag, 1965, recalled
  // from memory). dF/dv_c = -(1/2) rho Cd A (|w| I + w w^T / |w|); as for the elements, the
  // change of rho and u with position is left out of the Jacobian.
  const AerodynamicDrag::Air air = air_->air_at(p.r, t);
  const Eigen::Vector3d w = air.wind_m_s - p.v;
  const double speed = w.norm(), c = 0.5 * air.density_kg_m3 * cd_area;
  f += c * speed * w;
  if (dv && speed > 0.0) *dv -= c * (speed * Eigen::Matrix3d::Identity() + w * w.transpose() / speed);
  return f;
}

void ClimberLoad::add_forces(const TetherState& s, Matrix3X& f) const {
  for (const Attachment& at : attachments(s.t)) {
    const PointState p = point(s, at);
    const Eigen::Vector3d g =
        point_force(s.t, p, at, nullptr, nullptr) - at.mass_kg * relative_acceleration(s, at);
    for (std::size_t i = 0; i < at.spread.count; ++i)
      f.col(at.spread.first + i) += at.spread.w[i] * g;
  }
}

void ClimberLoad::jacobian_blocks(const TetherState& s, std::vector<Attachment>& out,
                                  std::vector<ClimberJacobian>& jac) const {
  const Eigen::Matrix3d I = Eigen::Matrix3d::Identity();
  out = attachments(s.t);
  jac.resize(out.size());
  for (std::size_t a = 0; a < out.size(); ++a) {
    const Attachment& at = out[a];
    Eigen::Matrix3d fr, fv;
    point_force(s.t, point(s, at), at, &fr, &fv);
    const double m = at.mass_kg;
    // dG/dx_k = w_k F_r + c1_k F_v - m c2_k I and dG/dv_k = w_k F_v - 2 m c1_k I
    // (r_c = sum w x, v_c = sum (w v + c1 x), a_rel = sum (2 c1 v + c2 x)).
    for (std::size_t c = 0; c < at.spread.count; ++c) {
      jac[a].gx[c] = at.spread.w[c] * fr + at.c1(c) * fv - m * at.c2(c) * I;
      jac[a].gv[c] = at.spread.w[c] * fv - 2 * m * at.c1(c) * I;
    }
  }
}

void ClimberLoad::add_jacobian(const TetherState& s, NodeJacobian& j) const {
  std::vector<Attachment> att;
  std::vector<ClimberJacobian> jac;
  jacobian_blocks(s, att, jac);
  for (std::size_t a = 0; a < att.size(); ++a) {
    const SpreadWeights& sw = att[a].spread;
    // Couplings beyond a node's neighbours (a smooth spread over more than two nodes) stay
    // out of this banded form; the integrator's Newton solver takes them from jacobian_blocks().
    for (std::size_t c = 0; c < sw.count; ++c)
      for (std::size_t r = 0; r < sw.count; ++r) {
        if (r > c + 1 || c > r + 1) continue;
        j.dx(sw.first + r, sw.first + c) += sw.w[r] * jac[a].gx[c];
        j.dv(sw.first + r, sw.first + c) += sw.w[r] * jac[a].gv[c];
      }
  }
}

std::vector<double> ClimberLoad::event_times() const {
  std::vector<double> t;
  for (const Climber& c : climbers_) {
    for (double ts : c.profile.segment_times()) t.push_back(ts);
    if (spreader_.kind() == LoadSpread::point)
      for (double tc : c.profile.crossing_times(path_)) t.push_back(tc);
  }
  std::sort(t.begin(), t.end());
  t.erase(std::unique(t.begin(), t.end()), t.end());
  return t;
}

Eigen::Vector3d ClimberLoad::reaction(const TetherState& s, const Attachment& at) const {
  if (s.a == nullptr) return Eigen::Vector3d::Constant(std::nan(""));
  const Matrix3X& a = *s.a;
  Eigen::Vector3d a_c = relative_acceleration(s, at);
  for (std::size_t i = 0; i < at.spread.count; ++i)
    a_c += at.spread.w[i] * a.col(at.spread.first + i);
  return at.mass_kg * a_c - point_force(s.t, point(s, at), at, nullptr, nullptr);
}

double ClimberLoad::drive_power(const TetherState& s) const {
  double p = 0.0;
  for (const Attachment& at : attachments(s.t))
    p += reaction(s, at).dot(relative_velocity(s, at));
  return p;
}

double ClimberLoad::climber_energy_at(const TetherState& s, double t_attach) const {
  double e = 0.0;
  for (const Attachment& at : attachments(t_attach)) {
    const PointState p = point(s, at);
    Matrix3X x(3, 1), v = Matrix3X::Zero(3, 1);
    x.col(0) = p.r;
    Eigen::VectorXd m(1);
    m[0] = at.mass_kg;
    const TetherState one{s.t, x, v, m};
    for (const auto& pm : point_models_) e += pm->energy(one);
    e += 0.5 * at.mass_kg * p.v.squaredNorm();
  }
  return e;
}

double ClimberLoad::material_coordinate(double p) const {
  const auto it = std::upper_bound(path_.begin(), path_.end(), p);
  std::size_t e = static_cast<std::size_t>(std::max<long>(0, (it - path_.begin()) - 1));
  e = std::min(e, path_.size() - 2);
  const double xi = (p - path_[e]) / (path_[e + 1] - path_[e]);
  return s_nodes_[e] + xi * (s_nodes_[e + 1] - s_nodes_[e]);
}

double ClimberLoad::event_energy_jump(const TetherState& s) const {
  return climber_energy_at(s, s.t + kEventWindow_s) - climber_energy_at(s, s.t - kEventWindow_s);
}

std::vector<std::string> ClimberLoad::work_channels() const {
  std::vector<std::string> c{"climber_drives"};
  const bool drag = air_ && std::any_of(climbers_.begin(), climbers_.end(),
                                        [](const Climber& cl) { return cl.drag_area_m2 > 0.0; });
  if (drag) c.push_back("drag");
  for (const auto& pm : point_models_)
    for (const std::string& name : pm->work_channels())
      if (std::find(c.begin(), c.end(), name) == c.end()) c.push_back(name);
  return c;
}

void ClimberLoad::work_power(const TetherState& s, const Matrix3X&, double* power_w) const {
  const std::vector<std::string> channels = work_channels();
  std::fill(power_w, power_w + channels.size(), 0.0);
  auto slot = [&](const std::string& name) {
    const auto it = std::find(channels.begin(), channels.end(), name);
    return static_cast<std::size_t>(it - channels.begin());
  };
  const std::size_t drag = slot("drag");
  std::vector<double> p;
  for (const Attachment& at : attachments(s.t)) {
    const PointState pt = point(s, at);
    power_w[0] += reaction(s, at).dot(relative_velocity(s, at));  // as drive_power()
    if (drag < channels.size() && climbers_[at.climber].drag_area_m2 > 0.0) {
      const Eigen::Vector3d f_air = point_force(s.t, pt, at, nullptr, nullptr) -
                                    body_force(s.t, pt, at.mass_kg, nullptr, nullptr);
      power_w[drag] += f_air.dot(pt.v);
    }
    // The point models that do work (tides) on the climber as on a point mass.
    Matrix3X x(3, 1), v(3, 1);
    x.col(0) = pt.r;
    v.col(0) = pt.v;
    Eigen::VectorXd m(1);
    m[0] = at.mass_kg;
    const TetherState one{s.t, x, v, m};
    for (const auto& pm : point_models_) {
      const std::vector<std::string> own = pm->work_channels();
      if (own.empty()) continue;
      Matrix3X f = Matrix3X::Zero(3, 1);
      pm->add_forces(one, f);
      p.assign(own.size(), 0.0);
      pm->work_power(one, f, p.data());
      for (std::size_t k = 0; k < own.size(); ++k) power_w[slot(own[k])] += p[k];
    }
  }
}

double ClimberLoad::climber_angular_momentum(const TetherState& s, double omega) const {
  double l = 0.0;
  for (const Attachment& at : attachments(s.t)) {
    const PointState p = point(s, at);
    l += at.mass_kg * (p.r.x() * p.v.y() - p.r.y() * p.v.x() + omega * (p.r.x() * p.r.x() + p.r.y() * p.r.y()));
  }
  return l;
}

std::vector<OutputField> ClimberLoad::output_fields(const std::vector<std::size_t>&) const {
  std::vector<OutputField> f;
  for (const Climber& c : climbers_) {
    const std::string g = "/climbers/" + c.name + "/";
    f.push_back({g + "s", {}, "m", ""});  // material coordinate: unstretched arc length from the anchor
    f.push_back({g + "altitude", {}, "m", ""});
    f.push_back({g + "on_tether", {}, "1", ""});
    f.push_back({g + "position", {3}, "m", ""});
    f.push_back({g + "velocity", {3}, "m/s", ""});
    f.push_back({g + "drive_force", {}, "N", "climber_" + c.name + "_peak_drive_force_n"});
    f.push_back({g + "coriolis_force", {3}, "N", ""});
    f.push_back({g + "lateral_offset", {2}, "m", "climber_" + c.name + "_peak_lateral_offset_m"});
    f.push_back({g + "tension_below", {}, "N", ""});
    f.push_back({g + "tension_above", {}, "N", ""});
  }
  return f;
}

std::vector<OutputAttribute> ClimberLoad::output_attributes() const {
  static const char* ends[] = {"park", "leave", "drop_payload"};
  std::vector<OutputAttribute> out;
  for (const Climber& c : climbers_) {
    const std::string g = "/climbers/" + c.name;
    const ClimberProfile& p = c.profile;
    double top_speed = 0.0;
    std::string table = "t [s], s [m], ds/dt [m/s] at each change of the profile:";
    for (const double t : p.segment_times()) {
      const ClimberProfile::Kinematics k = p.at(t);
      top_speed = std::max(top_speed, std::abs(k.speed_m_s));
      char row[96];
      std::snprintf(row, sizeof row, "\n%.9g, %.9g, %.9g", t, k.s_m, k.speed_m_s);
      table += row;
    }
    out.push_back({g, "mass_kg", c.mass_kg, ""});
    out.push_back({g, "from_m", p.from(), ""});
    out.push_back({g, "to_m", p.to(), ""});
    out.push_back({g, "start_time_s", p.start_time(), ""});
    out.push_back({g, "end_time_s", p.end_time(), ""});
    out.push_back({g, "top_speed_m_per_s", top_speed, ""});
    out.push_back({g, "drag_area_m2", c.drag_area_m2, ""});
    out.push_back({g, "at_end", 0.0, ends[static_cast<int>(c.at_end)]});
    if (c.at_end == ClimberEnd::drop_payload) out.push_back({g, "end_mass_kg", c.end_mass_kg, ""});
    out.push_back({g, "sudden_load", c.sudden ? 1.0 : 0.0, ""});
    // from_m, to_m and the speeds are along this (scenario key climber_speeds).
    out.push_back({g, "profile_measured_over", 0.0,
                   path_ == s_nodes_ ? "unstretched ribbon (material coordinate)"
                                     : "stretched ribbon at rest"});
    out.push_back({g, "profile", 0.0, table});
    out.push_back({g, "meaning", 0.0,
                   "s: material coordinate (unstretched arc length from the anchor); from_m, to_m: "
                   "the profile's ends along the line profile_measured_over names; speeds along "
                   "it"});
  }
  return out;
}

void ClimberLoad::sample_outputs(const TetherState& s, const std::vector<std::size_t>&,
                                 std::vector<std::vector<double>>& rows) const {
  const std::vector<Attachment> att = attachments(s.t);
  const std::size_t n_el = s_nodes_.size() - 1;
  for (std::size_t c = 0; c < climbers_.size(); ++c) {
    std::vector<double>* r = &rows[10 * c];
    const auto it = std::find_if(att.begin(), att.end(), [&](const Attachment& a) { return a.climber == c; });
    if (it == att.end()) {  // not on the tether (left, or a sudden load not yet applied)
      const double nan = std::nan("");
      r[0] = {material_coordinate(climbers_[c].profile.at(s.t).s_m)};
      r[1] = {nan};
      r[2] = {0.0};
      r[3] = {nan, nan, nan};
      r[4] = {nan, nan, nan};
      r[5] = {0.0};
      r[6] = {0.0, 0.0, 0.0};
      r[7] = {0.0, 0.0};
      r[8] = {nan};
      r[9] = {nan};
      continue;
    }
    const Attachment& at = *it;
    const std::size_t e = at.element;
    const PointState p = point(s, at);
    // The ribbon's direction under the climber, dr_c/ds = sum w_k' x_k (for point: the element's).
    Eigen::Vector3d along = Eigen::Vector3d::Zero();
    for (std::size_t i = 0; i < at.spread.count; ++i)
      along += at.spread.dw[i] * s.x.col(at.spread.first + i);
    const Eigen::Vector3d tangent = along.normalized();
    const Eigen::Vector3d reaction_n = reaction(s, at);
    // Coriolis force on the climber: -2 m Omega x v_c, from the point models' velocity terms.
    Eigen::Matrix3d fv;
    body_force(s.t, p, at.mass_kg, nullptr, &fv);
    const Eigen::Vector3d coriolis = fv * p.v;
    Eigen::Vector3d on_line = Eigen::Vector3d::Zero();
    for (std::size_t i = 0; i < at.spread.count; ++i)
      on_line += at.spread.w[i] * reference_.col(at.spread.first + i);
    const Eigen::Vector3d offset = p.r - on_line;
    // Tensions just below and above the climber: the elements on either side of its nearest node.
    const std::size_t k = e + (at.xi >= 0.5 ? 1 : 0);
    const std::size_t below = k == 0 ? 0 : k - 1, above = std::min(k, n_el - 1);
    const double nan = std::nan("");
    r[0] = {s_nodes_[e] + at.xi * (s_nodes_[e + 1] - s_nodes_[e])};
    // Altitude: distance from the planet's centre less the anchor's (on the bench: from node 0).
    r[1] = {p.r.norm() - reference_.col(0).norm()};
    r[2] = {1.0};
    r[3] = {p.r.x(), p.r.y(), p.r.z()};
    r[4] = {p.v.x(), p.v.y(), p.v.z()};
    r[5] = {reaction_n.dot(tangent)};
    r[6] = {coriolis.x(), coriolis.y(), coriolis.z()};
    r[7] = {offset.y(), offset.z()};
    r[8] = {bars_ ? bars_->tension(s, below) : nan};
    r[9] = {bars_ ? bars_->tension(s, above) : nan};
  }
}

}  // namespace hawser
