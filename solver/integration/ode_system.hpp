#pragma once
// The one seam between physics and time integration: the integrator sees a state size,
// a right-hand side, a banded Jacobian and (optionally) root functions, nothing else.
#include <cstddef>

namespace hawser {

/// Write access to a band matrix in SUNDIALS' band storage (column-major, each column
/// holding rows j-mu..j+ml at offset i-j+smu). The CVODE glue builds it on a SUNMatrix;
/// tests may build it on their own storage.
struct BandJacobian {
  double* data;   // start of column 0
  long ldim;      // stride between columns
  long smu;       // storage upper bandwidth (>= mu)
  long mu, ml;    // upper and lower half-bandwidth
  long n;         // matrix size
  /// Element (i, j); caller guarantees -mu <= i - j <= ml... i.e. j - mu <= i <= j + ml.
  double& operator()(long i, long j) const { return data[j * ldim + (i - j + smu)]; }
};

class OdeSystem {
 public:
  virtual ~OdeSystem() = default;
  /// Number of state components.
  virtual std::size_t size() const = 0;
  /// Upper and lower half-bandwidth of the Jacobian (symmetric band).
  virtual long half_bandwidth() const = 0;
  /// ydot = f(t, y).
  virtual void rhs(double t, const double* y, double* ydot) = 0;
  /// J = df/dy at (t, y); fy = f(t, y). J arrives zeroed.
  virtual void jacobian(double t, const double* y, const double* fy, const BandJacobian& J) = 0;
  /// Optional structured Newton solver. An implicit integrator solves (I - gamma J) x = b at
  /// every Newton iteration; a system that knows its structure may do that itself, faster
  /// than a general band factorisation. newton_jacobian() evaluates and keeps J at (t, y);
  /// newton_factor() factors I - gamma J for the kept J; newton_solve() writes the solution x
  /// of (I - gamma J) x = b (x may be b itself).
  virtual bool has_newton_solver() const { return false; }
  virtual void newton_jacobian(double /*t*/, const double* /*y*/) {}
  virtual void newton_factor(double /*gamma*/) {}
  virtual void newton_solve(const double* /*b*/, double* /*x*/) const {}
  /// Root functions g_k(t, y), located by the integrator (a sign change stops it).
  virtual int num_roots() const { return 0; }
  virtual void roots(double /*t*/, const double* /*y*/, double* /*g*/) {}
};

}  // namespace hawser
