#pragma once
// Time integration of an OdeSystem y' = f(t, y) with SUNDIALS 6 or 7 (sundials_compat.hpp).
// The methods (solver/input/integration_method.hpp):
//   bdf     CVODE variable-order BDF, orders 1 to 2 by default (run_options(): BDF above
//           order 2 is not A-stable and rings on undamped modes; max_order allows up to 5),
//           Newton iteration with the system's structured solver, or band LU on
//           SUNBandMatrix storage with its analytic band Jacobian. For stiff runs.
//   adams   CVODE Adams-Moulton (orders 1-12), fixed-point iteration, no Jacobian.
//   erk     ARKODE's ARKStep with an explicit table only: the default table of order 4 (or
//           the order asked for by max_order), embedded error estimate, adaptive steps.
//   esdirk  ARKODE's ARKStep with an implicit table only: the L-stable, stiffly accurate ESDIRK of
//           order 3 of Kennedy & Carpenter (2003), Newton iteration with the system's
//           structured solver when it has one. For smooth runs (free vibration, tides).
// Every method uses the weighted RMS error norm with weights 1 / (rtol |y_i| + atol_i).
// Output is by the integrator's own interpolation; events are stop times or roots.
// No SUNDIALS type appears here: all SUNDIALS code lives in time_integrator.cpp.
#include <memory>
#include <string>
#include <vector>

#include "solver/input/integration_method.hpp"
#include "solver/integration/ode_system.hpp"

namespace hawser {

struct IntegratorOptions {
  Method method = Method::bdf;
  double rtol = 1e-6;               // relative tolerance (dimensionless)
  std::vector<double> atol;         // absolute tolerance in each component's unit;
                                    // one value: the same for all components. Required:
                                    // its scale depends on the state's units.
  double max_step_s = 0;            // largest step (s); 0: no limit
  double initial_step_s = 0;        // first step (s); 0: the solver estimates it
  long max_steps_between_outputs = 1000000;  // per advance() call
  int max_order = 0;                // 0: solver default (bdf 5, adams 12, erk 4)
  bool stability_limit_detection = false;  // bdf: CVODE's BDF stability limit detection;
                                    // for erk, the order of ARKStep's default table
};

/// Counters summed over all segments since construction (restart() does not reset them);
/// last_step_s, current_time_s and last_order describe the current segment.
struct SolverStats {
  long steps = 0;
  long rhs_evals = 0;
  long jac_evals = 0;
  long linear_setups = 0;
  long error_test_failures = 0;
  long nonlinear_iterations = 0;
  long nonlinear_failures = 0;
  long root_evals = 0;
  double last_step_s = 0;
  double current_time_s = 0;  // the integrator's internal time (may lie past the last output)
  int last_order = 0;
  std::string to_string() const;
};

class TimeIntegrator {
 public:
  /// Keeps a reference to `system` (it must outlive the integrator); y0 has system.size()
  /// entries. Invalid options throw InputError, SUNDIALS set-up failures LibraryError.
  TimeIntegrator(OdeSystem& system, double t0, const double* y0, const IntegratorOptions& options);
  ~TimeIntegrator();
  TimeIntegrator(TimeIntegrator&&) noexcept;
  TimeIntegrator& operator=(TimeIntegrator&&) noexcept;
  TimeIntegrator(const TimeIntegrator&) = delete;
  TimeIntegrator& operator=(const TimeIntegrator&) = delete;

  /// Integrate toward tout, never stepping past tstop (pass +infinity for none), and write
  /// the state at the returned time into y_out by the integrator's interpolation. Returns
  /// tout normally, tstop exactly if tstop < tout, or the root time if a root function
  /// changed sign first (root_info() then tells which). Times must not go backwards.
  /// Throws IntegratorFailure (time reached, solver message and flag name) when the
  /// integrator gives up; y_out then holds the state at that time. An exception thrown
  /// by the system propagates unchanged. A NaN or infinite derivative is reported to the
  /// solver as a recoverable failure (CVODE retries with a smaller step) and named in
  /// the failure message; a step below round-off (t + h == t) ends the run as a failure.
  /// After any throw, restart() before advancing again.
  double advance(double tout, double tstop, double* y_out);

  /// One entry per root function after the last advance(): 0 if it did not stop there,
  /// +1 if it rose through zero, -1 if it fell.
  const std::vector<int>& root_info() const;

  /// Restart after a discontinuity at time t with state y (CVodeReInit / ARKStepReInit),
  /// keeping all options; the system may have changed its parameters.
  void restart(double t, const double* y);

  SolverStats stats() const;

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

}  // namespace hawser
