#include "solver/assembly/static_solver.hpp"

#include <Eigen/SparseCore>
#include <Eigen/SparseLU>
#include <algorithm>
#include <cmath>
#include <sstream>

#include "models/bar_elements.hpp"
#include "solver/assembly/differenced_jacobian.hpp"
#include "solver/input/errors.hpp"

namespace hawser {

namespace {

using SpMat = Eigen::SparseMatrix<double>;

/// R(x, lambda) and dR/dx on the free nodes, unknown 3 (k - first) + a for axis a of node k.
class StaticResidual {
 public:
  explicit StaticResidual(const StaticLoadSet& loads)
      : l_(loads),
        nodes_(static_cast<std::size_t>(loads.built_mass_kg.size())),
        rest_(Matrix3X::Zero(3, nodes_)),
        mass_(loads.built_mass_kg),
        f_(3, nodes_),
        fa_(3, nodes_),
        jc_(nodes_),
        ja_(nodes_),
        jr_(nodes_) {}

  Eigen::Index unknowns() const {
    return static_cast<Eigen::Index>(3 * (l_.last_free - l_.first_free + 1));
  }

  void set_load(double lambda) {
    lambda_ = lambda;
    mass_ = l_.built_mass_kg + lambda * (l_.loaded_mass_kg - l_.built_mass_kg);
  }

  Eigen::VectorXd residual(const Matrix3X& x) {
    const TetherState s{0.0, x, rest_, mass_};
    f_.setZero();
    for (const ForceModel* m : l_.common) m->add_forces(s, f_);
    if (lambda_ != 0.0 && !l_.added.empty()) {
      fa_.setZero();
      for (const ForceModel* m : l_.added) m->add_forces(s, fa_);
      f_ += lambda_ * fa_;
    }
    if (lambda_ != 1.0 && !l_.removed.empty()) {
      fa_.setZero();
      for (const ForceModel* m : l_.removed) m->add_forces(s, fa_);
      f_ += (1.0 - lambda_) * fa_;
    }
    Eigen::VectorXd r(unknowns());
    for (std::size_t k = l_.first_free; k <= l_.last_free; ++k)
      r.segment<3>(static_cast<Eigen::Index>(3 * (k - l_.first_free))) =
          f_.col(static_cast<Eigen::Index>(k));
    return r;
  }

  /// dR/dx; every entry of every coupling block is stored (zeros too), so the sparsity
  /// pattern is the same at every call and is analysed once.
  const SpMat& jacobian(const Matrix3X& x) {
    const TetherState s{0.0, x, rest_, mass_};
    jc_.set_zero();
    ja_.set_zero();
    add_complete_jacobian(l_.common, s, l_.first_free, l_.last_free, jc_);
    if (lambda_ != 0.0) add_complete_jacobian(l_.added, s, l_.first_free, l_.last_free, ja_);
    jr_.set_zero();
    if (lambda_ != 1.0) add_complete_jacobian(l_.removed, s, l_.first_free, l_.last_free, jr_);
    triplets_.clear();
    const std::size_t first = l_.first_free, last = l_.last_free;
    for (std::size_t i = first; i <= last; ++i)
      for (std::size_t j = (i > first ? i - 1 : i); j <= std::min(last, i + 1); ++j) {
        const Eigen::Matrix3d b =
            jc_.dx(i, j) + lambda_ * ja_.dx(i, j) + (1.0 - lambda_) * jr_.dx(i, j);
        for (int a = 0; a < 3; ++a)
          for (int c = 0; c < 3; ++c)
            triplets_.emplace_back(static_cast<Eigen::Index>(3 * (i - first) + a),
                                   static_cast<Eigen::Index>(3 * (j - first) + c), b(a, c));
      }
    j_.resize(unknowns(), unknowns());
    j_.setFromTriplets(triplets_.begin(), triplets_.end());
    return j_;
  }

  double largest_tension(const Matrix3X& x, std::size_t* slack) {
    const TetherState s{0.0, x, rest_, mass_};
    l_.bars->tensions(s, tension_);
    if (slack)
      *slack = static_cast<std::size_t>(std::find(tension_.begin(), tension_.end(), 0.0) -
                                        tension_.begin());
    return *std::max_element(tension_.begin(), tension_.end());
  }
  const std::vector<double>& tensions() const { return tension_; }
  const Eigen::VectorXd& mass() const { return mass_; }

 private:
 private:
  const StaticLoadSet& l_;
  std::size_t nodes_;
  double lambda_ = 0.0;
  Matrix3X rest_;
  Eigen::VectorXd mass_;
  Matrix3X f_, fa_;
  NodeJacobian jc_, ja_, jr_;
  std::vector<Eigen::Triplet<double>> triplets_;
  SpMat j_;
  std::vector<double> tension_;
};

/// The first free node below the ground, or 0 if none.
std::size_t below_ground(const StaticLoadSet& l, const Matrix3X& x) {
  if (l.ground_radius_m <= 0.0) return 0;
  for (std::size_t k = l.first_free; k <= l.last_free; ++k)
    if (x.col(static_cast<Eigen::Index>(k)).norm() < l.ground_radius_m) return k;
  return 0;
}

void apply(const StaticLoadSet& l, const Eigen::VectorXd& dx, double alpha, Matrix3X& x) {
  for (std::size_t k = l.first_free; k <= l.last_free; ++k)
    x.col(static_cast<Eigen::Index>(k)) +=
        alpha * dx.segment<3>(static_cast<Eigen::Index>(3 * (k - l.first_free)));
}

/// Newton's method with backtracking at a fixed load factor; x is updated in place.
/// Returns an empty string on success, else why it failed.
std::string newton(StaticResidual& res, const StaticLoadSet& l, const StaticOptions& o,
                   double length_m, Matrix3X& x, int& iterations, double& residual_n) {
  Eigen::SparseLU<SpMat> lu;
  bool analysed = false;
  Eigen::VectorXd r = res.residual(x);
  for (int it = 0; it < o.max_newton_iterations; ++it) {
    std::size_t slack = 0;
    const double t_max = res.largest_tension(x, &slack);
    residual_n = r.lpNorm<Eigen::Infinity>();
    if (!std::isfinite(residual_n)) return "the forces are not finite";
    if (residual_n <= o.force_tolerance * t_max && slack == res.tensions().size()) return "";
    const SpMat& j = res.jacobian(x);
    if (!analysed) {
      lu.analyzePattern(j);
      analysed = true;
    }
    lu.factorize(j);
    if (lu.info() != Eigen::Success)
      return slack < res.tensions().size() ? "element " + std::to_string(slack) + " went slack"
                                           : "the tangent stiffness is singular";
    const Eigen::VectorXd dx = lu.solve(-r);
    if (!dx.allFinite()) return "the tangent stiffness is singular";
    ++iterations;
    if (dx.lpNorm<Eigen::Infinity>() <= o.position_tolerance * length_m) {
      // A correction at the level of round-off in the positions: converged (the force
      // test above can sit below round-off on short, stiff elements).
      apply(l, dx, 1.0, x);
      r = res.residual(x);
      residual_n = r.lpNorm<Eigen::Infinity>();
      res.largest_tension(x, &slack);
      if (slack == res.tensions().size()) return "";
      return "element " + std::to_string(slack) + " went slack";
    }
    // Damping by the natural monotonicity test (Deuflhard, Newton Methods for Nonlinear
    // Problems, 2004, section 3.3): accept x + alpha dx when the simplified Newton correction
    // there, J^-1 R(x + alpha dx) with the same factors, is shorter than (1 - alpha / 2) |dx|.
    // Unlike |R|, this measure is affine invariant: on a nearly inextensible cable a tiny
    // stretch of one link makes a huge force, and |R| rejects good steps.
    const double dx_norm = dx.norm();
    double alpha = 1.0;
    Matrix3X trial = x;
    Eigen::VectorXd simplified;
    for (int back = 0;; ++back) {
      trial = x;
      apply(l, dx, alpha, trial);
      const Eigen::VectorXd rt = res.residual(trial);
      if (rt.allFinite()) {
        simplified = lu.solve(-rt);
        if (simplified.allFinite() && simplified.norm() <= (1.0 - 0.5 * alpha) * dx_norm + 1e-300) {
          r = rt;
          break;
        }
      }
      // Deuflhard's minimal damping factor: a step that must be cut further is a poor guess
      // of this load step (measured on storm.yaml: such iterations went on shrinking alpha
      // while |dx| grew), so give the load step back to the continuation at once.
      if (alpha <= o.min_damping) return "the Newton step had to be damped below the minimum";
      alpha *= 0.5;
    }
    x = trial;
    if (alpha == 1.0 && simplified.lpNorm<Eigen::Infinity>() <= o.position_tolerance * length_m) {
      // The next correction is below the tolerance (quadratic convergence): take it and stop.
      apply(l, simplified, 1.0, x);
      r = res.residual(x);
      residual_n = r.lpNorm<Eigen::Infinity>();
      res.largest_tension(x, &slack);
      if (slack == res.tensions().size()) return "";
    }
  }
  return "Newton's method did not converge in " + std::to_string(o.max_newton_iterations) +
         " iterations";
}

/// Pseudo-transient continuation at the full load (Kelley & Keyes, "Convergence analysis of
/// pseudo-transient continuation", SIAM J. Numer. Anal. 35, 1998): each step solves
///   (M / h^2 - dR/dx) dx = R(x),
/// one implicit step of the undamped motion from rest, so the iterates follow the tether's
/// own motion toward a state that is at rest, through slack or folded geometry that stops
/// Newton's method. The pseudo time step h grows as the residual falls (switched evolution
/// relaxation, Mulder & van Leer 1985: h <- h |R_old| / |R_new|, here at least doubled and at
/// most quadrupled per step, since the residual is ruled by the fast local motions while the
/// slow ones, such as the tilt of the whole tether (a period of days), need h of hours; with
/// the plain rule h stayed near 10 s on scenarios/storm.yaml and the top never moved) and,
/// once large, leaves Newton's method itself. A step that makes the residual grow tenfold is
/// retaken with h / 4.
std::string relax(StaticResidual& res, const StaticLoadSet& l, const StaticOptions& o,
                  double length_m, Matrix3X& x, int& iterations, double& residual_n) {
  Eigen::SparseLU<SpMat> lu;
  bool analysed = false;
  Eigen::VectorXd r = res.residual(x);
  double h = o.relax_first_step_s;
  Eigen::VectorXd m3(r.size());
  for (std::size_t k = l.first_free; k <= l.last_free; ++k)
    m3.segment<3>(static_cast<Eigen::Index>(3 * (k - l.first_free)))
        .setConstant(res.mass()[static_cast<Eigen::Index>(k)]);
  for (int it = 0; it < o.max_relax_iterations; ++it) {
    std::size_t slack = 0;
    const double t_max = res.largest_tension(x, &slack);
    residual_n = r.lpNorm<Eigen::Infinity>();
    if (residual_n <= o.force_tolerance * t_max && slack == res.tensions().size()) return "";
    SpMat a = res.jacobian(x);
    a.diagonal() -= m3 / (h * h);
    if (!analysed) {
      lu.analyzePattern(a);
      analysed = true;
    }
    lu.factorize(a);
    ++iterations;
    const Eigen::VectorXd dx =
        lu.info() == Eigen::Success ? Eigen::VectorXd(lu.solve(-r)) : Eigen::VectorXd();
    Matrix3X trial = x;
    Eigen::VectorXd rt;
    if (dx.size() && dx.allFinite()) {
      apply(l, dx, 1.0, trial);
      rt = res.residual(trial);
    }
    if (!rt.size() || !rt.allFinite() || rt.norm() > 10.0 * r.norm()) {
      h *= 0.25;
      continue;
    }
    h *= std::max(2.0, std::min(4.0, r.norm() / rt.norm()));
    x = trial;
    r = rt;
    if (const std::size_t k = below_ground(l, x))
      return "node " + std::to_string(k) + " went below the ground (the tether falls)";
    if (h > o.relax_newton_step_s &&
        dx.lpNorm<Eigen::Infinity>() <= o.position_tolerance * length_m) {
      res.largest_tension(x, &slack);
      residual_n = r.lpNorm<Eigen::Infinity>();
      if (slack == res.tensions().size()) return "";
    }
  }
  return "no state at rest after " + std::to_string(o.max_relax_iterations) +
         " steps of pseudo-transient relaxation";
}

}  // namespace

StaticState solve_static(const StaticLoadSet& l, const Matrix3X& as_built_m,
                         const StaticOptions& o) {
  StaticResidual res(l);
  const Eigen::Index last = static_cast<Eigen::Index>(as_built_m.cols()) - 1;
  const double length_m = (as_built_m.col(last) - as_built_m.col(0)).norm();
  StaticState out;
  Matrix3X x = as_built_m, previous = as_built_m;
  double lambda = 0.0, lambda_previous = 0.0, step = 1.0;
  std::string why;
  while (lambda < 1.0) {
    const double target = std::min(1.0, lambda + step);
    // Secant predictor from the last two converged states (none on the first step).
    Matrix3X trial = x;
    if (lambda > lambda_previous)
      trial += (target - lambda) / (lambda - lambda_previous) * (x - previous);
    res.set_load(target);
    double residual_n = 0.0;
    why = newton(res, l, o, length_m, trial, out.newton_iterations, residual_n);
    if (why.empty())
      if (const std::size_t k = below_ground(l, trial))
        why = "node " + std::to_string(k) + " went below the ground";
    if (why.empty()) {
      previous = x;
      lambda_previous = lambda;
      x = trial;
      lambda = target;
      out.residual_n = residual_n;
      ++out.load_steps;
      step = std::min(1.0, 2.0 * step);
      continue;
    }
    ++out.failed_steps;
    step *= 0.5;
    if (step < o.min_load_step || out.load_steps + out.failed_steps > o.max_load_steps) {
      // The branch of states grown from the as-built one ends here (a fold, or a load the
      // tether cannot hold): let the tether move under the full load from the last state.
      out.fold_load_factor = lambda;
      res.set_load(1.0);
      double residual_n = 0.0;
      Matrix3X relaxed = x;
      const std::string why_relax =
          relax(res, l, o, length_m, relaxed, out.relax_iterations, residual_n);
      if (why_relax.empty()) {
        x = relaxed;
        out.residual_n = residual_n;
        break;
      }
      std::ostringstream os;
      os << "error: static state: no equilibrium of the as-built tether under " << l.description
         << ": the continuation in load reached " << 100.0 * lambda << "% of it (" << why
         << " beyond that), and from there " << why_relax
         << " under the whole load (a slack base, or a load the tether cannot hold?)";
      throw InputError(os.str());
    }
  }
  out.position_m = x;
  res.largest_tension(x, nullptr);
  out.tension_n = res.tensions();
  return out;
}

}  // namespace hawser
