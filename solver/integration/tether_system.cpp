#include "solver/integration/tether_system.hpp"

#include <Eigen/LU>
#include <algorithm>
#include <cmath>

namespace hawser {

TetherSystem::TetherSystem(const TetherModel& model)
    : model_(model),
      forces_(model.forces()),
      channels_(work_channels(model)),
      layout_(1, model.far_end ? model.nodes() - 2 : model.nodes() - 1, channels_.size()),
      diag_(model.mesh.node_mass),
      inverse_mass_(model.mesh.node_mass.cwiseInverse()),
      off_(Eigen::VectorXd::Zero(model.nodes())),
      thomas_c_(model.nodes()),
      x_(3, model.nodes()),
      v_(3, model.nodes()),
      f_(3, model.nodes()),
      jac_(model.nodes()),
      newton_jac_(model.nodes()),
      blocks_(model.nodes()),
      work_(model.nodes()) {
  for (double a : model.mesh.element_area) capacity_.push_back(a * model.ultimate_strength_pa);
  for (const ForceModel* m : forces_) {
    const std::vector<std::string> names = m->work_channels();
    if (names.empty()) continue;
    WorkModel w{m, {}, Matrix3X::Zero(3, model.nodes()), std::vector<double>(names.size(), 0.0)};
    for (const std::string& name : names)
      w.channel.push_back(static_cast<std::size_t>(
          std::find(channels_.begin(), channels_.end(), name) - channels_.begin()));
    work_models_.push_back(std::move(w));
  }
}

std::vector<std::string> TetherSystem::work_channels(const TetherModel& model) {
  std::vector<std::string> out;
  auto add = [&](const std::string& name) {
    if (std::find(out.begin(), out.end(), name) == out.end()) out.push_back(name);
  };
  for (const ForceModel* m : model.forces())
    for (const std::string& name : m->work_channels()) add(name);
  if (!model.jumps.empty()) add("strikes");
  for (std::size_t e = 0; e < model.elements(); ++e)
    if (std::isfinite(model.bars->cut_time(e))) {
      add("cuts");
      break;
    }
  if (model.climbers) add("climber_events");
  return out;
}

void TetherSystem::add_event_work(double t, double* y, double strike_kinetic_j, bool energy_jumps) const {
  const auto slot = [&](const char* name) {
    return static_cast<std::size_t>(std::find(channels_.begin(), channels_.end(), name) - channels_.begin());
  };
  const std::size_t strikes = slot("strikes"), climbers = slot("climber_events"), cuts = slot("cuts");
  if (strikes < channels_.size()) y[layout_.work(strikes)] += strike_kinetic_j;
  if (!energy_jumps || (climbers == channels_.size() && cuts == channels_.size())) return;
  Matrix3X x, v;
  node_state(t, y, x, v);
  if (climbers < channels_.size())
    y[layout_.work(climbers)] += model_.climbers->event_energy_jump({t, x, v, model_.mesh.node_mass});
  if (cuts < channels_.size()) {
    // The strain energy of elements cut at t, gone with them: measured across the instant,
    // as the climbers' jump (ClimberLoad::kEventWindow_s either side).
    const double dt = ClimberLoad::kEventWindow_s;
    const TetherState after{t + dt, x, v, model_.mesh.node_mass}, before{t - dt, x, v, model_.mesh.node_mass};
    y[layout_.work(cuts)] += model_.bars->energy(after) - model_.bars->energy(before);
  }
}

void TetherSystem::node_state(double t, const double* y, Matrix3X& x, Matrix3X& v) const {
  const std::size_t n = model_.nodes();
  const std::size_t first = layout_.first_free(), last = layout_.last_free();
  x.resize(3, n);
  v.resize(3, n);
  const Matrix3X& x_eq = model_.mesh.position;
  // Prescribed nodes (the anchor, a held far end) from their motions.
  x.col(0) = x_eq.col(0) + model_.anchor->displacement(t);
  v.col(0) = model_.anchor->velocity(t);
  if (model_.far_end) {
    x.col(n - 1) = x_eq.col(n - 1) + model_.far_end->displacement(t);
    v.col(n - 1) = model_.far_end->velocity(t);
  }
  // Free nodes: equilibrium plus displacement, and the velocity, in one pass on the
  // column-major storage (3 values per node).
  const double* xe = x_eq.data() + 3 * first;
  double* xp = x.data() + 3 * first;
  double* vp = v.data() + 3 * first;
  for (std::size_t i = 0, free = last + 1 - first; i < free; ++i) {
    const double* yk = y + StateLayout::kPerNode * i;
    for (int a = 0; a < 3; ++a) {
      xp[3 * i + a] = xe[3 * i + a] + yk[a];
      vp[3 * i + a] = yk[3 + a];
    }
  }
}

void TetherSystem::rhs(double t, const double* y, double* ydot) {
  node_state(t, y, x_, v_);
  state_t_ = t;
  const TetherState s{t, x_, v_, model_.mesh.node_mass};
  f_.setZero();
  double dissipation = 0.0;
  // Models whose work is booked put their forces apart first, for their power below.
  std::size_t next_work = 0;
  for (const ForceModel* m : forces_) {
    if (next_work < work_models_.size() && work_models_[next_work].model == m) {
      WorkModel& w = work_models_[next_work++];
      w.f.setZero();
      dissipation += m->add_forces_and_dissipation(s, w.f);
      f_ += w.f;
    } else {
      dissipation += m->add_forces_and_dissipation(s, f_);
    }
  }
  assemble_mass(t);
  solve_mass(f_);  // f_ now holds the accelerations
  const std::size_t first = layout_.first_free(), last = layout_.last_free();
  const double* vp = v_.data() + 3 * first;
  const double* ap = f_.data() + 3 * first;
  for (std::size_t i = 0, free = last + 1 - first; i < free; ++i) {
    double* dk = ydot + StateLayout::kPerNode * i;
    for (int a = 0; a < 3; ++a) {
      dk[a] = vp[3 * i + a];
      dk[3 + a] = ap[3 * i + a];
    }
  }
  for (std::size_t c = 0; c < channels_.size(); ++c) ydot[layout_.work(c)] = 0.0;
  const TetherState with_a{t, x_, v_, model_.mesh.node_mass, &f_};
  for (WorkModel& w : work_models_) {
    w.model->work_power(with_a, w.f, w.power_w.data());
    for (std::size_t c = 0; c < w.channel.size(); ++c) ydot[layout_.work(w.channel[c])] += w.power_w[c];
  }
  ydot[layout_.dissipated_energy()] = dissipation;
  // Torque about z of the anchor's pull on node 1, -T0 n0 applied at x_1 (equal to its
  // moment at x_0, the force being along the element).
  const Eigen::Vector3d d0 = x_.col(1) - x_.col(0);
  const double l0 = d0.norm();
  const double tension0 = model_.bars->tension(s, 0);
  const Eigen::Vector3d pull_on_tether = -tension0 * d0 / l0;
  ydot[layout_.anchor_angular_impulse()] = x_(0, 0) * pull_on_tether.y() - x_(1, 0) * pull_on_tether.x();
}

void TetherSystem::jacobian(double t, const double* y, const double*, const BandJacobian& j) {
  node_state(t, y, x_, v_);
  state_t_ = t;
  const TetherState s{t, x_, v_, model_.mesh.node_mass};
  jac_.set_zero();
  for (const ForceModel* m : forces_) m->add_jacobian(s, jac_);
  const std::size_t first = layout_.first_free(), last = layout_.last_free();
  // With climbers the exact J = M^-1 dF/dy reaches beyond the band; this band form divides
  // by the diagonal of M only. The integrator uses the exact structured Newton solver
  // (newton_*) instead; the band form serves generic solvers and checks.
  assemble_mass(t);
  for (std::size_t k = first; k <= last; ++k) {
    const double inv_m = 1.0 / diag_[k];
    for (int a = 0; a < 3; ++a) j(layout_.u(k, a), layout_.v(k, a)) = 1.0;
    const std::size_t lo = std::max(first, k - 1), hi = std::min(last, k + 1);
    for (std::size_t q = lo; q <= hi; ++q) {
      const Eigen::Matrix3d& dx = jac_.dx(k, q);
      const Eigen::Matrix3d& dv = jac_.dv(k, q);
      for (int a = 0; a < 3; ++a)
        for (int b = 0; b < 3; ++b) {
          j(layout_.v(k, a), layout_.u(q, b)) = dx(a, b) * inv_m;
          j(layout_.v(k, a), layout_.v(q, b)) = dv(a, b) * inv_m;
        }
    }
  }
  // The quadrature rows stay zero: nothing depends on the quadratures, and their own
  // Newton update is exact given the others.
}

void TetherSystem::roots(double t, const double* y, double* g) {
  node_state(t, y, x_, v_);
  state_t_ = t;
  const TetherState s{t, x_, v_, model_.mesh.node_mass};
  g[0] = model_.bars->rupture_indicator(s, capacity_);
}

TetherDiagnostics TetherSystem::diagnose(double t, const double* y) const {
  Matrix3X x, v;
  node_state(t, y, x, v);
  const TetherState s{t, x, v, model_.mesh.node_mass};
  TetherDiagnostics d;
  model_.bars->tensions(s, d.tension_n);
  d.strain_j = model_.bars->energy(s);
  for (const auto& b : model_.body) d.potential_j += b->energy(s);
  const double w = model_.spin_rate_rad_s;
  for (std::size_t k = 0; k < model_.nodes(); ++k) {
    const double m = model_.mesh.node_mass[k];
    d.kinetic_j += 0.5 * m * v.col(k).squaredNorm();
    if (layout_.is_free(k))
      d.angular_momentum_z +=
          m * (x(0, k) * v(1, k) - x(1, k) * v(0, k) + w * (x(0, k) * x(0, k) + x(1, k) * x(1, k)));
  }
  d.dissipated_j = y[layout_.dissipated_energy()];
  d.anchor_angular_impulse = y[layout_.anchor_angular_impulse()];
  for (std::size_t c = 0; c < channels_.size(); ++c) {
    d.work_j.push_back(y[layout_.work(c)]);
    if (channels_[c] == "climber_drives") d.drive_work_j = d.work_j.back();
  }
  if (model_.climbers) {
    d.climber_j = model_.climbers->climber_energy(s);
    d.angular_momentum_z += model_.climbers->climber_angular_momentum(s, w);
  }
  const Eigen::Vector3d d0 = x.col(1) - x.col(0);
  d.anchor_force_n = d.tension_n[0] * d0 / d0.norm();
  for (std::size_t e = 0; e < d.tension_n.size(); ++e) {
    const double ratio = d.tension_n[e] / model_.mesh.element_area[e] / model_.ultimate_strength_pa;
    if (ratio > d.max_stress_ratio) {
      d.max_stress_ratio = ratio;
      d.max_stress_element = e;
    }
    if (d.tension_n[e] == 0.0) ++d.slack_elements;
  }
  return d;
}

}  // namespace hawser

namespace hawser {

void TetherSystem::newton_jacobian(double t, const double* y) {
  newton_t_ = t;
  node_state(t, y, x_, v_);
  state_t_ = t;
  const TetherState s{t, x_, v_, model_.mesh.node_mass};
  newton_jac_.set_zero();
  // The climbers' terms reach beyond the band for a smooth spread: they are kept apart, whole.
  for (const ForceModel* m : forces_)
    if (m != model_.climbers.get()) m->add_jacobian(s, newton_jac_);
  newton_att_.clear();
  newton_cj_.clear();
  if (model_.climbers) model_.climbers->jacobian_blocks(s, newton_att_, newton_cj_);
}

void TetherSystem::newton_factor(double gamma) {
  newton_gamma_ = gamma;
  const std::size_t first = layout_.first_free(), last = layout_.last_free();
  const double g2 = gamma * gamma;
  const Eigen::VectorXd& mass = model_.mesh.node_mass;
  auto block = [&](std::size_t k, std::size_t j) -> Eigen::Matrix3d {
    Eigen::Matrix3d a = -gamma * newton_jac_.dv(k, j) - g2 * newton_jac_.dx(k, j);
    if (k == j) a.diagonal().array() += mass[k];
    return a;
  };
  // The tether's part T (lumped masses, every model but the climbers), block tridiagonal.
  // Block Gaussian elimination: D_first = A_ff; L_k = A_{k,k-1} D_{k-1}^-1;
  // E_{k-1} = D_{k-1}^-1 A_{k-1,k}; D_k = A_kk - A_{k,k-1} E_{k-1}.
  for (std::size_t k = first; k <= last; ++k) {
    NewtonBlocks& nb = blocks_[k];
    nb.gdx_prev = k > first ? Eigen::Matrix3d(gamma * newton_jac_.dx(k, k - 1)) : Eigen::Matrix3d::Zero();
    nb.gdx_self = gamma * newton_jac_.dx(k, k);
    nb.gdx_next = k < last ? Eigen::Matrix3d(gamma * newton_jac_.dx(k, k + 1)) : Eigen::Matrix3d::Zero();
    Eigen::Matrix3d d = block(k, k);
    if (k > first) {
      const Eigen::Matrix3d a_prev = block(k, k - 1);
      NewtonBlocks& pb = blocks_[k - 1];
      pb.e_next = pb.d_inv * block(k - 1, k);
      nb.lower = a_prev * pb.d_inv;
      d -= a_prev * pb.e_next;
    } else {
      nb.lower.setZero();
    }
    nb.d_inv = d.inverse();
  }
  blocks_[last].e_next.setZero();
  // The climbers' part, taken afresh at the latest state the system saw (the integrator's
  // current stage, while the tether's part may be some steps old): a moving climber's mass
  // leaves the nodes the kept Jacobian put it on, and on short elements that stalls Newton.
  if (model_.climbers) {
    const TetherState now{state_t_, x_, v_, model_.mesh.node_mass};
    model_.climbers->jacobian_blocks(now, newton_att_, newton_cj_);
  }
  // U V^T: climber c adds w_k R_cj to block (k, j), with
  // R_cj = m w_j I - gamma dG/dv_j - gamma^2 dG/dx_j; U's columns (w_k e_a) go through T^-1
  // now, for the Woodbury identity in newton_solve (Golub and Van Loan, Matrix
  // Computations, 4th ed., section 2.1.4). 3 columns per climber, O(N) each.
  const std::size_t nc = newton_att_.size();
  newton_r_.resize(nc);
  z_cols_.resize(3 * nc);
  for (std::size_t c = 0; c < nc; ++c) {
    const Attachment& at = newton_att_[c];
    for (std::size_t j = 0; j < at.spread.count; ++j) {
      newton_r_[c][j] = -gamma * newton_cj_[c].gv[j] - g2 * newton_cj_[c].gx[j];
      newton_r_[c][j].diagonal().array() += at.mass_kg * at.spread.w[j];
    }
    for (int a = 0; a < 3; ++a) {
      std::vector<Eigen::Vector3d>& z = z_cols_[3 * c + a];
      z.assign(model_.nodes(), Eigen::Vector3d::Zero());
      for (std::size_t i = 0; i < at.spread.count; ++i) {
        const std::size_t k = at.spread.first + i;
        if (k >= first && k <= last) z[k][a] = at.spread.w[i];
      }
      block_solve(z);
    }
  }
  Eigen::MatrixXd cap = Eigen::MatrixXd::Identity(3 * nc, 3 * nc);  // I + V^T T^-1 U
  for (std::size_t c = 0; c < nc; ++c)
    for (std::size_t col = 0; col < 3 * nc; ++col)
      cap.block<3, 1>(3 * c, col) += climber_product(c, z_cols_[col]);
  capacitance_.compute(cap);
}

Eigen::Vector3d TetherSystem::climber_product(std::size_t c,
                                              const std::vector<Eigen::Vector3d>& z) const {
  // (V^T z) for climber c: sum over its free nodes j of R_cj z_j.
  const Attachment& at = newton_att_[c];
  Eigen::Vector3d out = Eigen::Vector3d::Zero();
  for (std::size_t j = 0; j < at.spread.count; ++j) {
    const std::size_t k = at.spread.first + j;
    if (layout_.is_free(k)) out.noalias() += newton_r_[c][j] * z[k];
  }
  return out;
}

void TetherSystem::block_solve(std::vector<Eigen::Vector3d>& r) const {
  // Forward: z_k = r_k - L_k z_{k-1}, y_k = D_k^-1 z_k; back: w_k = y_k - E_k w_{k+1}.
  const std::size_t first = layout_.first_free(), last = layout_.last_free();
  Eigen::Vector3d z_prev = Eigen::Vector3d::Zero();
  for (std::size_t k = first; k <= last; ++k) {
    r[k].noalias() -= blocks_[k].lower * z_prev;
    z_prev = r[k];
    r[k] = blocks_[k].d_inv * z_prev;
  }
  for (std::size_t k = last; k-- > first;) r[k].noalias() -= blocks_[k].e_next * r[k + 1];
}

void TetherSystem::newton_solve(const double* b, double* x) const {
  using Vec3 = Eigen::Vector3d;
  using CMap = Eigen::Map<const Vec3>;
  const std::size_t first = layout_.first_free(), last = layout_.last_free();
  const double gamma = newton_gamma_;
  const Eigen::VectorXd& mass = model_.mesh.node_mass;
  constexpr std::size_t kStride = StateLayout::kPerNode;  // per free node: u_k (3) then v_k (3)
  auto r_u = [&](std::size_t k) { return CMap(b + kStride * (k - first)); };
  auto r_v = [&](std::size_t k) { return CMap(b + kStride * (k - first) + 3); };
  // The reduced right-hand side M r_v + gamma dF/dx r_u: the tether's part node by node ...
  for (std::size_t k = first; k <= last; ++k) {
    const NewtonBlocks& nb = blocks_[k];
    Vec3 r = mass[k] * r_v(k) + nb.gdx_self * r_u(k);
    if (k > first) r.noalias() += nb.gdx_prev * r_u(k - 1);
    if (k < last) r.noalias() += nb.gdx_next * r_u(k + 1);
    work_[k] = r;
  }
  // ... and each climber's, w_k (m w . r_v + gamma dG/dx . r_u) on its nodes.
  const std::size_t nc = newton_att_.size();
  for (std::size_t c = 0; c < nc; ++c) {
    const Attachment& at = newton_att_[c];
    Vec3 g = Vec3::Zero();
    for (std::size_t j = 0; j < at.spread.count; ++j) {
      const std::size_t k = at.spread.first + j;
      if (!layout_.is_free(k)) continue;
      g.noalias() += at.mass_kg * at.spread.w[j] * r_v(k) + gamma * (newton_cj_[c].gx[j] * r_u(k));
    }
    for (std::size_t i = 0; i < at.spread.count; ++i) {
      const std::size_t k = at.spread.first + i;
      if (layout_.is_free(k)) work_[k] += at.spread.w[i] * g;
    }
  }
  block_solve(work_);  // y = T^-1 r
  if (nc > 0) {
    // Woodbury: dv = y - Z (I + V^T Z)^-1 V^T y, Z = T^-1 U.
    Eigen::VectorXd vy(3 * nc);
    for (std::size_t c = 0; c < nc; ++c) vy.segment<3>(3 * c) = climber_product(c, work_);
    const Eigen::VectorXd q = capacitance_.solve(vy);
    for (std::size_t col = 0; col < 3 * nc; ++col) {
      const std::vector<Vec3>& z = z_cols_[col];
      for (std::size_t k = first; k <= last; ++k) work_[k].noalias() -= q[col] * z[k];
    }
  }
  // dv = w, du = r_u + gamma dv; the quadrature rows are identity. x may be b: each node's
  // b is read before its x is written, and nothing later reads it.
  for (std::size_t k = first; k <= last; ++k) {
    const double* bk = b + kStride * (k - first);
    double* xk = x + kStride * (k - first);
    for (int a = 0; a < 3; ++a) {
      xk[a] = bk[a] + gamma * work_[k][a];
      xk[3 + a] = work_[k][a];
    }
  }
  for (std::size_t q = layout_.dissipated_energy(); q < layout_.size(); ++q) x[q] = b[q];
}

}  // namespace hawser

namespace hawser {

void TetherSystem::assemble_mass(double t) {
  for (std::size_t k : touched_) {
    diag_[k] = model_.mesh.node_mass[k];
    off_[k] = 0.0;
  }
  touched_.clear();
  attached_.clear();
  wide_ = false;
  if (!model_.climbers) return;
  attached_ = model_.climbers->attachments(t);
  for (const Attachment& at : attached_) {
    const SpreadWeights& sw = at.spread;
    wide_ = wide_ || sw.count > 2;
    for (std::size_t i = 0; i < sw.count; ++i) {
      const std::size_t k = sw.first + i;
      touched_.push_back(k);
      for (std::size_t j = 0; j < sw.count; ++j) {
        const double mij = at.mass_kg * sw.w[i] * sw.w[j];
        if (j == i + 1)
          off_[k] += mij;
        else if (j + 1 != i)
          diag_[k] += mij;  // the diagonal, and (a wide spread) couplings beyond the band, lumped
      }
    }
  }
}

void TetherSystem::solve_mass_wide(Matrix3X& f) const {
  // M = D + W diag(m) W^T (D the lumped masses, column c of W climber c's weights on the
  // free nodes): by the Woodbury identity (Golub and Van Loan, Matrix Computations, 4th ed.,
  // section 2.1.4), with g = D^-1 f, B = W^T g and S = I + diag(m) W^T D^-1 W,
  //   M^-1 f = g - D^-1 W Y,   S Y = diag(m) B;
  // S is climbers x climbers, so the solve costs O(N + climbers^3).
  const std::size_t first = layout_.first_free(), last = layout_.last_free();
  const std::size_t nc = attached_.size();
  for (std::size_t k = first; k <= last; ++k) f.col(k) *= inverse_mass_[k];
  Eigen::MatrixXd S = Eigen::MatrixXd::Identity(nc, nc), B = Eigen::MatrixXd::Zero(nc, 3);
  auto free_weight = [&](const Attachment& at, std::size_t i) {
    const std::size_t k = at.spread.first + i;
    return (k < first || k > last) ? 0.0 : at.spread.w[i];
  };
  for (std::size_t c = 0; c < nc; ++c) {
    const Attachment& ac = attached_[c];
    for (std::size_t i = 0; i < ac.spread.count; ++i) {
      const std::size_t k = ac.spread.first + i;
      const double wc = free_weight(ac, i);
      if (wc == 0.0) continue;
      B.row(c) += wc * f.col(k).transpose();
      for (std::size_t d = 0; d < nc; ++d) {
        const Attachment& ad = attached_[d];
        if (k < ad.spread.first || k >= ad.spread.first + ad.spread.count) continue;
        S(c, d) += ac.mass_kg * wc * free_weight(ad, k - ad.spread.first) * inverse_mass_[k];
      }
    }
    B.row(c) *= ac.mass_kg;
  }
  const Eigen::MatrixXd Y = S.partialPivLu().solve(B);
  for (std::size_t c = 0; c < nc; ++c) {
    const Attachment& ac = attached_[c];
    for (std::size_t i = 0; i < ac.spread.count; ++i) {
      const std::size_t k = ac.spread.first + i;
      const double wc = free_weight(ac, i);
      if (wc != 0.0) f.col(k) -= wc * inverse_mass_[k] * Y.row(c).transpose();
    }
  }
}

void TetherSystem::solve_mass(Matrix3X& f) const {
  const std::size_t first = layout_.first_free(), last = layout_.last_free();
  // Prescribed nodes do not move with the forces: their accelerations are the prescribed
  // ones (zero for fixed points), and their mass couplings drop out of the free equations.
  for (std::size_t k = 0; k < first; ++k) f.col(k).setZero();
  for (std::size_t k = last + 1; k < static_cast<std::size_t>(f.cols()); ++k) f.col(k).setZero();
  if (wide_) return solve_mass_wide(f);
  if (touched_.empty()) {  // lumped masses only: a = f / m
    double* fp = f.data();
    for (std::size_t k = first; k <= last; ++k)
      for (int a = 0; a < 3; ++a) fp[3 * k + a] *= inverse_mass_[k];
    return;
  }
  std::size_t k = first;
  while (k <= last) {
    // A run k..q of free nodes joined by non-zero off-diagonals.
    std::size_t q = k;
    while (q < last && off_[q] != 0.0) ++q;
    if (q == k) {
      f.col(k) /= diag_[k];
    } else {
      // Thomas algorithm on the run, the same matrix for the three axes.
      thomas_c_[k] = off_[k] / diag_[k];
      f.col(k) /= diag_[k];
      for (std::size_t i = k + 1; i <= q; ++i) {
        const double denom = diag_[i] - off_[i - 1] * thomas_c_[i - 1];
        if (i < q) thomas_c_[i] = off_[i] / denom;
        f.col(i) = (f.col(i) - off_[i - 1] * f.col(i - 1)) / denom;
      }
      for (std::size_t i = q; i-- > k;) f.col(i) -= thomas_c_[i] * f.col(i + 1);
    }
    k = q + 1;
  }
}

}  // namespace hawser
