#include "solver/integration/modal_analysis.hpp"

// GCC 12 reports a -Wuse-after-free inside Eigen's storage as inlined into Spectra's
// UpperHessenbergEigen: a known false positive of that compiler on Eigen, not a fault here.
#if defined(__GNUC__) && !defined(__clang__) && __GNUC__ >= 12
#pragma GCC diagnostic ignored "-Wuse-after-free"
#endif

#include <Eigen/Eigenvalues>
#include <Eigen/SparseCholesky>
#include <Eigen/SparseLU>
#include <Spectra/GenEigsRealShiftSolver.h>
#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>
#include <numeric>
#include <sstream>
#include <stdexcept>

#include "solver/assembly/differenced_jacobian.hpp"
#include "solver/input/errors.hpp"
#include "solver/integration/tether_system.hpp"

namespace hawser {

using SpMat = Eigen::SparseMatrix<double>;
using Complex = std::complex<double>;
using ComplexVector = Eigen::VectorXcd;

const char* mode_kind_name(ModeKind kind) {
  switch (kind) {
    case ModeKind::along: return "along";
    case ModeKind::east_west: return "east-west";
    case ModeKind::north_south: return "north-south";
  }
  return "?";
}

LinearisedTether linearise(const TetherModel& model) {
  const TetherSystem system(model);  // the one definition of which nodes are free
  const std::size_t first = system.layout().first_free(), last = system.layout().last_free();
  const std::size_t nodes = model.nodes(), n = 3 * (last - first + 1);
  const Matrix3X rest = Matrix3X::Zero(3, nodes);
  const TetherState s{0.0, model.mesh.position, rest, model.mesh.node_mass};
  NodeJacobian jac(nodes);
  add_complete_jacobian(model.mean_forces(), s, first, last, jac);  // the drag's dF/dx differenced

  std::vector<Eigen::Triplet<double>> k_entries, c_entries, m_entries;
  // Climbers where they are at t = 0 add m w w^T per axis, w = (1 - xi, xi) on their element's
  // two nodes (the consistent mass of physics.md section 5, as TetherSystem::assemble_mass);
  // couplings to a prescribed node drop out of the free equations.
  if (model.climbers) {
    for (const Attachment& at : model.climbers->attachments(0.0)) {
      const std::size_t e = at.element;
      const double w[2] = {1.0 - at.xi, at.xi};
      for (int p = 0; p < 2; ++p)
        for (int q = 0; q < 2; ++q) {
          const std::size_t i = e + p, j = e + q;
          const double m = at.mass_kg * w[p] * w[q];
          if (i < first || i > last || j < first || j > last || m == 0.0) continue;
          for (int a = 0; a < 3; ++a) m_entries.emplace_back(3 * (i - first) + a, 3 * (j - first) + a, m);
        }
    }
  }
  for (std::size_t i = first; i <= last; ++i) {
    const std::size_t row = 3 * (i - first);
    for (int a = 0; a < 3; ++a) m_entries.emplace_back(row + a, row + a, model.mesh.node_mass[i]);
    for (std::size_t j = std::max(first, i - 1); j <= std::min(last, i + 1); ++j) {
      const std::size_t col = 3 * (j - first);
      for (int a = 0; a < 3; ++a)
        for (int b = 0; b < 3; ++b) {
          // Exact zeros are left out: the block split below relies on the sparsity pattern.
          if (jac.dx(i, j)(a, b) != 0.0) k_entries.emplace_back(row + a, col + b, -jac.dx(i, j)(a, b));
          if (jac.dv(i, j)(a, b) != 0.0) c_entries.emplace_back(row + a, col + b, -jac.dv(i, j)(a, b));
        }
    }
  }
  LinearisedTether lin;
  lin.first_free = first;
  lin.last_free = last;
  const auto sz = static_cast<Eigen::Index>(n);
  lin.mass.resize(sz, sz);
  lin.stiffness.resize(sz, sz);
  SpMat c(sz, sz);
  lin.mass.setFromTriplets(m_entries.begin(), m_entries.end());
  lin.stiffness.setFromTriplets(k_entries.begin(), k_entries.end());
  c.setFromTriplets(c_entries.begin(), c_entries.end());
  const SpMat ct = c.transpose();
  lin.gyroscopic = 0.5 * (c - ct);
  lin.damping = 0.5 * (c + ct);
  lin.gyroscopic.prune(0.0);
  lin.damping.prune(0.0);
  return lin;
}

namespace {

// Shift about which the spectrum is inverted. 0 is the right place for the lowest modes of
// an anchored tether in tension: the modes nearest lambda = 0 are the lowest in frequency,
// K alone is factorised (symmetric: LDL^T, which also gives K's inertia), and K is regular
// unless the tether has a free rigid motion.
constexpr double kShift = 0.0;

/// A^-1 B (shift 0) for one block, in the form Spectra's shift-solve solvers call, on the
/// problem in the scaled time tau = s t: M~ = s^2 M, C~ = s C, K~ = K, lambda = s lambda~,
/// z = [q; p] = [q; s p~]. Why: unscaled, the operator [-K^-1 C, -K^-1 M; I, 0] has blocks
/// of size 1 and 1/omega^2 (1e-8 for a bar's axial modes), and the Arnoldi iteration
/// stalls above its tolerance on round-off. With s near the lowest frequencies both blocks
/// are of order 1. s^2 is a Rayleigh quotient after a few steps of inverse iteration.
class ShiftInvertOp {
 public:
  using Scalar = double;

  ShiftInvertOp(const SpMat& k, const SpMat& c, const SpMat& m) {
    const SpMat kt = k.transpose();
    const double scale = std::max(max_abs(k), std::numeric_limits<double>::min());
    if (max_abs(SpMat(k - kt)) <= 1e-12 * scale) {
      ldlt_ = std::make_unique<Eigen::SimplicialLDLT<SpMat>>(k);
      if (ldlt_->info() != Eigen::Success) singular();
      const Eigen::VectorXd d = ldlt_->vectorD();
      if (!d.allFinite() || (d.array().abs() <= 1e-14 * d.cwiseAbs().maxCoeff()).any()) singular();
      negative_ = static_cast<long>((d.array() < 0.0).count());
    } else {
      lu_ = std::make_unique<Eigen::SparseLU<SpMat>>(k);
      if (lu_->info() != Eigen::Success) singular();
      negative_ = -1;
    }
    Eigen::VectorXd x = Eigen::VectorXd::Ones(k.rows());
    for (int it = 0; it < 4; ++it) x = solve(m * x).normalized();
    const double rayleigh = std::abs(x.dot(k * x) / x.dot(m * x));
    s_ = std::isfinite(rayleigh) && rayleigh > 0.0 ? std::sqrt(rayleigh) : 1.0;
    c_ = s_ * c;
    m_ = s_ * s_ * m;
  }
  Eigen::Index rows() const { return 2 * m_.rows(); }
  Eigen::Index cols() const { return 2 * m_.rows(); }
  /// s [1/s]: lambda = s lambda~, p = s p~.
  double time_scale() const { return s_; }
  long applications() const { return applications_; }
  /// Negative pivots of K = LDL^T (its negative eigenvalues, Sylvester); -1: not symmetric.
  long negative_directions() const { return negative_; }

  void set_shift(double sigma) {
    if (sigma != kShift) throw std::logic_error("ShiftInvertOp: only the shift 0 is implemented");
  }

  // [x; y] = A~^-1 B~ [z1; z2]:  x = -K^-1 (M~ z2 + C~ z1),  y = z1.
  void perform_op(const double* in, double* out) const {
    const Eigen::Index n = m_.rows();
    const Eigen::Map<const Eigen::VectorXd> z1(in, n), z2(in + n, n);
    Eigen::Map<Eigen::VectorXd> x(out, n), y(out + n, n);
    x = -solve(m_ * z2 + c_ * z1);
    y = z1;
    ++applications_;
  }

 private:
  Eigen::VectorXd solve(const Eigen::VectorXd& b) const {
    return ldlt_ ? Eigen::VectorXd(ldlt_->solve(b)) : Eigen::VectorXd(lu_->solve(b));
  }
  static double max_abs(const SpMat& a) {
    double m = 0.0;
    for (Eigen::Index j = 0; j < a.outerSize(); ++j)
      for (SpMat::InnerIterator it(a, j); it; ++it) m = std::max(m, std::abs(it.value()));
    return m;
  }
  [[noreturn]] static void singular() {
    throw InputError(
        "error: modes: the tangent stiffness of the tether is singular at its equilibrium (a free rigid motion, "
        "or an element without tension); no modes about this state");
  }

  SpMat c_, m_;  // scaled: s C, s^2 M
  double s_ = 1.0;
  std::unique_ptr<Eigen::SimplicialLDLT<SpMat>> ldlt_;
  std::unique_ptr<Eigen::SparseLU<SpMat>> lu_;
  mutable long applications_ = 0;
  long negative_ = 0;
};

/// Degrees of freedom that no nonzero of the given matrices couples, grouped (union-find);
/// each group in ascending order, groups ordered by their first dof.
std::vector<std::vector<Eigen::Index>> decoupled_blocks(Eigen::Index n, const std::vector<const SpMat*>& mats) {
  std::vector<Eigen::Index> parent(n);
  std::iota(parent.begin(), parent.end(), 0);
  auto root = [&](Eigen::Index i) {
    while (parent[i] != i) i = parent[i] = parent[parent[i]];
    return i;
  };
  for (const SpMat* a : mats)
    for (Eigen::Index j = 0; j < a->outerSize(); ++j)
      for (SpMat::InnerIterator it(*a, j); it; ++it) {
        const Eigen::Index r = root(it.row()), c = root(it.col());
        if (r != c) parent[std::max(r, c)] = std::min(r, c);
      }
  std::vector<std::vector<Eigen::Index>> blocks;
  std::vector<Eigen::Index> block_of(n, -1);
  for (Eigen::Index i = 0; i < n; ++i) {
    const Eigen::Index r = root(i);
    if (block_of[r] < 0) {
      block_of[r] = static_cast<Eigen::Index>(blocks.size());
      blocks.emplace_back();
    }
    blocks[block_of[r]].push_back(i);
  }
  return blocks;
}

SpMat restrict_to(const SpMat& a, const std::vector<Eigen::Index>& dofs, const std::vector<Eigen::Index>& local) {
  std::vector<Eigen::Triplet<double>> t;
  for (Eigen::Index c : dofs)
    for (SpMat::InnerIterator it(a, c); it; ++it) t.emplace_back(local[it.row()], local[c], it.value());
  const auto n = static_cast<Eigen::Index>(dofs.size());
  SpMat out(n, n);
  out.setFromTriplets(t.begin(), t.end());
  return out;
}

struct Eigenpair {
  Complex lambda;
  ComplexVector z;  // [q; p], first-order form
};

/// From the scaled time of ShiftInvertOp back to seconds: lambda = s lambda~, p = s p~.
std::vector<Eigenpair> unscaled(std::vector<Eigenpair> pairs, double s) {
  for (Eigenpair& e : pairs) {
    e.lambda *= s;
    const Eigen::Index n = e.z.size() / 2;
    e.z.tail(n) *= s;
  }
  return pairs;
}

/// The eigenpairs of the pencil (A, B) of one block nearest lambda = 0: at least `wanted`
/// conjugate pairs when the block has that many.
std::vector<Eigenpair> block_eigenpairs(ShiftInvertOp& op, int wanted, const ModalOptions& opt, bool dense) {
  const Eigen::Index n2 = op.rows();
  std::vector<Eigenpair> out;
  if (dense) {
    // The same operator, applied to every unit vector: the eigenvalues nu of the dense
    // inverse carry the lowest modes with full relative accuracy, lambda = sigma + 1/nu.
    Eigen::MatrixXd inv(n2, n2);
    Eigen::VectorXd e = Eigen::VectorXd::Zero(n2);
    for (Eigen::Index j = 0; j < n2; ++j) {
      e[j] = 1.0;
      op.perform_op(e.data(), inv.col(j).data());
      e[j] = 0.0;
    }
    const Eigen::EigenSolver<Eigen::MatrixXd> es(inv);
    if (es.info() != Eigen::Success) throw LibraryError("Eigen::EigenSolver: no convergence on a dense block");
    for (Eigen::Index i = 0; i < n2; ++i)
      if (es.eigenvalues()[i] != 0.0) out.push_back({kShift + 1.0 / es.eigenvalues()[i], es.eigenvectors().col(i)});
    return unscaled(std::move(out), op.time_scale());
  }
  const Eigen::Index nev = 2 * wanted + 1;  // one more: a pair is never cut in half at the end
  const Eigen::Index ncv = std::min<Eigen::Index>(n2, std::max<Eigen::Index>(2 * nev + 1, 20));
  Spectra::GenEigsRealShiftSolver<ShiftInvertOp> eigs(op, nev, ncv, kShift);
  eigs.init();
  eigs.compute(Spectra::SortRule::LargestMagn, opt.max_restarts, opt.tolerance, Spectra::SortRule::SmallestMagn);
  if (eigs.info() != Spectra::CompInfo::Successful) {
    std::ostringstream os;
    os << "Spectra::GenEigsRealShiftSolver: the shift-invert Arnoldi iteration did not converge (" << nev
       << " eigenvalues of a block of " << n2 << " first-order unknowns, " << eigs.num_iterations() << " restarts)";
    throw LibraryError(os.str());
  }
  const ComplexVector lambda = eigs.eigenvalues();
  const Eigen::MatrixXcd vectors = eigs.eigenvectors();
  // Purification (Nour-Omid, Parlett, Ericsson & Jensen 1987, "How to implement the spectral
  // transformation"): one more application of the operator, divided by nu, damps what the
  // Ritz vector carries of the high, stiff modes by |nu_high / nu|; those components, small
  // as they are, dominate the residual of the untransformed problem through K.
  Eigen::VectorXd re(n2), im(n2), op_re(n2), op_im(n2);
  for (Eigen::Index i = 0; i < lambda.size(); ++i) {
    re = vectors.col(i).real();
    im = vectors.col(i).imag();
    op.perform_op(re.data(), op_re.data());
    op.perform_op(im.data(), op_im.data());
    const Complex nu = 1.0 / (lambda[i] - kShift);
    out.push_back({lambda[i], (op_re.cast<Complex>() + Complex(0.0, 1.0) * op_im.cast<Complex>()) / nu});
  }
  return unscaled(std::move(out), op.time_scale());
}

// Backward error of (lambda, q) for the quadratic eigenproblem (Tisseur 2000, "Backward error
// and condition of polynomial eigenvalue problems"), in the infinity norm:
//   |(lambda^2 M + lambda C + K) q| / ((|lambda|^2 |M| + |lambda| |C| + |K|) |q|).
// Relative to the terms' own sizes it could not be small: for the lowest modes K q is a
// difference of terms cond(K) times larger.
double inf_norm(const SpMat& a) {
  Eigen::VectorXd row_sums = Eigen::VectorXd::Zero(a.rows());
  for (Eigen::Index j = 0; j < a.outerSize(); ++j)
    for (SpMat::InnerIterator it(a, j); it; ++it) row_sums[it.row()] += std::abs(it.value());
  return row_sums.size() ? row_sums.maxCoeff() : 0.0;
}

double backward_error(const SpMat& k, const SpMat& c, const SpMat& m, Complex lambda, const ComplexVector& q) {
  const ComplexVector r = lambda * lambda * (m.cast<Complex>() * q) + lambda * (c.cast<Complex>() * q) +
                          k.cast<Complex>() * q;
  const double scale = std::norm(lambda) * inf_norm(m) + std::abs(lambda) * inf_norm(c) + inf_norm(k);
  return r.cwiseAbs().maxCoeff() / (scale * q.cwiseAbs().maxCoeff());
}

}  // namespace

ModalResult modal_analysis(const TetherModel& model, const ModalOptions& opt) {
  const LinearisedTether lin = linearise(model);
  const auto n = static_cast<Eigen::Index>(lin.dofs());
  if (opt.modes < 1) {
    throw InputError("error: modes: the number of modes must be at least 1 (got " + std::to_string(opt.modes) + ")");
  }
  if (opt.modes > n) {
    std::ostringstream os;
    os << "error: modes: " << opt.modes << " modes asked for, but the mesh has only " << n
       << " degrees of freedom (3 per free node), so at most " << n << " modes; use a finer mesh or fewer modes";
    throw InputError(os.str());
  }
  const SpMat c = lin.gyroscopic + lin.damping;
  const auto blocks = decoupled_blocks(n, {&lin.mass, &lin.stiffness, &c});

  ModalResult result;
  result.dofs = lin.dofs();
  std::vector<Mode> found;  // block by block; the stable sort keeps that order for ties
  std::vector<Eigen::Index> local(n, -1);
  for (const auto& dofs : blocks) {
    for (std::size_t i = 0; i < dofs.size(); ++i) local[dofs[i]] = static_cast<Eigen::Index>(i);
    const auto nb = static_cast<Eigen::Index>(dofs.size());
    const SpMat kb = restrict_to(lin.stiffness, dofs, local), cb = restrict_to(c, dofs, local),
                mb = restrict_to(lin.mass, dofs, local);
    ShiftInvertOp op(kb, cb, mb);
    const int wanted = static_cast<int>(std::min<Eigen::Index>(opt.modes, nb));
    const bool dense = static_cast<std::size_t>(2 * nb) <= opt.dense_limit || 2 * wanted + 3 > 2 * nb;
    std::vector<Eigenpair> pairs = block_eigenpairs(op, wanted, opt, dense);
    result.block_dofs.push_back(dofs.size());
    result.block_method.push_back(dense ? "dense" : "shift-invert Arnoldi (Spectra)");
    result.operator_applications += op.applications();
    if (op.negative_directions() < 0 || result.stiffness_negative_directions < 0)
      result.stiffness_negative_directions = -1;
    else
      result.stiffness_negative_directions += op.negative_directions();

    // One eigenvalue of each conjugate pair (Im >= 0), lowest |lambda| first.
    pairs.erase(std::remove_if(pairs.begin(), pairs.end(), [](const Eigenpair& e) { return e.lambda.imag() < 0.0; }),
                pairs.end());
    std::stable_sort(pairs.begin(), pairs.end(),
                     [](const Eigenpair& a, const Eigenpair& b) { return std::abs(a.lambda) < std::abs(b.lambda); });
    if (pairs.size() > static_cast<std::size_t>(wanted)) pairs.resize(wanted);

    for (std::size_t r = 0; r < pairs.size(); ++r) {
      const Complex lambda = pairs[r].lambda;
      const ComplexVector q = pairs[r].z.head(nb), p = pairs[r].z.tail(nb);
      Mode m;
      m.eigenvalue = lambda;
      m.period_s = lambda.imag() > 0.0 ? 2.0 * M_PI / lambda.imag() : std::numeric_limits<double>::infinity();
      m.damping_ratio = -lambda.real() / std::abs(lambda);
      m.backward_error = backward_error(kb, cb, mb, lambda, q);
      // Time-averaged kinetic energy per axis, Re(p^H M p) over that axis' dofs.
      const ComplexVector mp = mb.cast<Complex>() * p;
      Eigen::Vector3d ke = Eigen::Vector3d::Zero();
      for (Eigen::Index i = 0; i < nb; ++i) ke[dofs[i] % 3] += (std::conj(p[i]) * mp[i]).real();
      m.kinetic_fraction = ke / ke.sum();
      Eigen::Index axis;
      m.kinetic_fraction.maxCoeff(&axis);
      m.kind = static_cast<ModeKind>(axis);  // x, y, z in the enum's order
      // Shape on all nodes, normalised: largest node amplitude 1 m, largest component real.
      m.shape.setZero(3, model.nodes());
      Eigen::Index big;
      q.cwiseAbs().maxCoeff(&big);
      const Complex phase = q[big] / std::abs(q[big]);
      for (Eigen::Index i = 0; i < nb; ++i)
        m.shape(dofs[i] % 3, lin.first_free + dofs[i] / 3) = q[i] / phase;
      Eigen::Index peak;
      const double amplitude = m.shape.colwise().norm().maxCoeff(&peak);
      m.shape /= amplitude;
      m.peak_node = static_cast<std::size_t>(peak);
      m.peak_altitude_m = model.mesh.position.col(peak).norm() - model.reference_radius_m;
      found.push_back(std::move(m));
    }
    for (Eigen::Index d : dofs) local[d] = -1;
  }
  std::stable_sort(found.begin(), found.end(),
                   [](const Mode& a, const Mode& b) { return std::abs(a.eigenvalue) < std::abs(b.eigenvalue); });
  if (found.empty()) throw InputError("error: modes: no modes found about the equilibrium");
  for (std::size_t i = 0; i < found.size() && i < static_cast<std::size_t>(opt.modes); ++i) {
    result.max_backward_error = std::max(result.max_backward_error, found[i].backward_error);
    result.modes.push_back(std::move(found[i]));
  }
  return result;
}

std::vector<double> mode_initial_state(const TetherSystem& system, const Mode& mode, double amplitude_m) {
  const StateLayout& lay = system.layout();
  std::vector<double> y(system.size(), 0.0);
  for (std::size_t k = lay.first_free(); k <= lay.last_free(); ++k)
    for (int a = 0; a < 3; ++a) {
      const Complex q = mode.shape(a, static_cast<Eigen::Index>(k));
      y[lay.u(k, a)] = amplitude_m * q.real();
      y[lay.v(k, a)] = amplitude_m * (mode.eigenvalue * q).real();
    }
  return y;
}

}  // namespace hawser
