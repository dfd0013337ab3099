// The SUNDIALS glue: CVODE (BDF + Newton + band LU, or Adams + fixed point) and ARKODE
// (ARKStep explicit) driving an OdeSystem. See time_integrator.hpp for the contract.
//
// C callbacks never let a C++ exception cross into SUNDIALS: each callback catches it,
// stores it in the CallbackBridge and returns -1 (unrecoverable), and advance() rethrows it
// once the solver has returned. SUNDIALS' own error messages go to a handler that keeps
// the text for the exception instead of printing it; its warnings are silenced.
#include "solver/integration/time_integrator.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <functional>
#include <limits>
#include <sstream>
#include <stdexcept>

#include <sunlinsol/sunlinsol_band.h>
#include <sunmatrix/sunmatrix_band.h>
#include <sunnonlinsol/sunnonlinsol_fixedpoint.h>

#include "solver/input/errors.hpp"
#include "solver/integration/sundials_fast_vector.hpp"
#include "solver/integration/sundials_handles.hpp"

namespace hawser {

std::string SolverStats::to_string() const {
  std::ostringstream out;
  out << "steps " << steps << ", rhs evals " << rhs_evals << ", jac evals " << jac_evals
      << ", linear setups " << linear_setups << ", error-test failures " << error_test_failures
      << ", nonlinear iterations " << nonlinear_iterations << ", nonlinear failures "
      << nonlinear_failures << ", root evals " << root_evals << ", last step " << last_step_s
      << " s, last order " << last_order << ", t " << current_time_s << " s";
  return out.str();
}

namespace {
namespace sd = sundials;

std::string format_time(double t_s) {
  std::ostringstream out;
  out.precision(12);
  out << t_s;
  return out.str();
}

// ---- the C side: callbacks ------------------------------------------------------------

/// What the C callbacks reach through user_data.
struct CallbackBridge {
  OdeSystem& system;
  std::exception_ptr error;  // first exception a callback caught since the last clear()
  std::string message;       // last error text SUNDIALS reported
  std::string non_finite;    // where the derivative first turned NaN or infinite
  std::string stall;         // where the step first fell below round-off
  bool stalled = false;      // t + h == t: the run is stuck (see rhs_callback)
  double rtol = 0;           // the error weights' tolerances (see weights_callback)
  std::vector<double> atol;  // one value, or one per component
  /// The integrator's current time and next step [s] (set by the stepper).
  std::function<void(double* t_s, double* h_s)> time_and_step;

  template <class Body>
  int guard(Body&& body) noexcept {
    try {
      body();
      return 0;
    } catch (...) {
      if (!error) error = std::current_exception();
      return -1;  // negative: unrecoverable, the solver returns at once
    }
  }
  void clear() {
    error = nullptr;
    message.clear();
    non_finite.clear();
    stall.clear();
    stalled = false;
  }
};

CallbackBridge& bridge_of(void* user_data) { return *static_cast<CallbackBridge*>(user_data); }
double* data(N_Vector v) { return N_VGetArrayPointer(v); }

/// True once the integrator's next step is below round-off (t + h == t), noted in the
/// bridge. CVODE and ARKODE only warn then and "continue anyway", and can burn the whole
/// step budget without moving (seen when f turns NaN beyond a fixed time); so the run fails
/// instead. Asked of the integrator rather than read from its warning: SUNDIALS 7 sends
/// warnings to its logger, not to the error handler.
bool below_roundoff(CallbackBridge& b) {
  if (b.stalled) return true;
  double t_s = 0.0, h_s = 0.0;
  b.time_and_step(&t_s, &h_s);
  if (h_s == 0.0 || t_s + h_s != t_s) return false;  // h is 0 before the first step
  b.stalled = true;
  b.stall = "step size below round-off (t = " + format_time(t_s) + " s, h = " +
            format_time(h_s) + " s: t + h == t)";
  return true;
}

/// A non-finite derivative is reported as a recoverable failure (positive return): CVODE
/// retries with a smaller step, which cures a NaN caused by too large a step, and gives up
/// after repeated failures instead of stepping on with NaN; ARKStep's explicit stages
/// treat it as unrecoverable. Checking costs well under 1 us per 6000 components.
int rhs_callback(sd::real t, N_Vector y, N_Vector ydot, void* user_data) {
  CallbackBridge& b = bridge_of(user_data);
  if (below_roundoff(b)) return -1;  // turns the stall into a failure
  const int status = b.guard([&] { b.system.rhs(t, data(y), data(ydot)); });
  if (status != 0) return status;
  const double* f = data(ydot);
  const long n = N_VGetLength(ydot);
  if (sd::all_finite(ydot)) return 0;  // one vectorised pass; the search runs only then
  for (long i = 0; i < n; ++i) {
    if (!std::isfinite(f[i])) {
      if (b.non_finite.empty())
        b.non_finite = "the right-hand side is not finite in component " +
                       std::to_string(i) + " at t = " + format_time(t) + " s";
      return 1;
    }
  }
  return 0;
}

int root_callback(sd::real t, N_Vector y, sd::real* g, void* user_data) {
  CallbackBridge& b = bridge_of(user_data);
  return b.guard([&] { b.system.roots(t, data(y), g); });
}

/// Hands the system a view on the SUNBandMatrix storage itself (no copy), zeroed first.
int jacobian_callback(sd::real t, N_Vector y, N_Vector fy, SUNMatrix J, void* user_data,
                      N_Vector, N_Vector, N_Vector) {
  CallbackBridge& b = bridge_of(user_data);
  return b.guard([&] {
    sd::check_status(SUNMatZero(J), "SUNMatZero");
    const BandJacobian view{SUNBandMatrix_Data(J),
                            SUNBandMatrix_LDim(J),
                            SUNBandMatrix_StoredUpperBandwidth(J),
                            SUNBandMatrix_UpperBandwidth(J),
                            SUNBandMatrix_LowerBandwidth(J),
                            SUNBandMatrix_Columns(J)};
    b.system.jacobian(t, data(y), data(fy), view);
  });
}

// ---- the system's own Newton solver behind CVODE's matrix-based interface ---------------

/// CVODE's matrix-based linear solver interface decides when to evaluate the Jacobian
/// (every 20 steps, after convergence failures) and when to refactor (gamma changed), and
/// scales corrections between refactorisations; only matrix-based solvers get this logic.
/// So the system's structured solver (OdeSystem::newton_*) sits behind a stand-in matrix:
/// CVODE's Jacobian call makes the system evaluate and keep J, the matrix records the
/// gamma of "A = I - gamma J" (SUNMatScaleAddI), and the linear solver's setup factors
/// the system for that gamma and its solve solves with it. The stand-in holds no numbers.
struct StandInMatrix {
  double gamma = 0.0;  // A = I - gamma J, as CVODE last formed it
};

StandInMatrix& stand_in(SUNMatrix a) { return *static_cast<StandInMatrix*>(a->content); }

SUNMatrix_ID stand_in_id(SUNMatrix) { return SUNMATRIX_CUSTOM; }
void stand_in_destroy(SUNMatrix a);
SUNMatrix stand_in_clone(SUNMatrix a) {
  SUNMatrix b = SUNMatNewEmpty(a->sunctx);
  if (b == nullptr) return nullptr;
  SUNMatCopyOps(a, b);
  b->content = new StandInMatrix(stand_in(a));
  return b;
}
void stand_in_destroy(SUNMatrix a) {
  if (a == nullptr) return;
  delete static_cast<StandInMatrix*>(a->content);
  a->content = nullptr;
  SUNMatFreeEmpty(a);
}
int stand_in_zero(SUNMatrix a) {
  stand_in(a).gamma = 0.0;  // A = 0 stands for "J about to be evaluated"
  return sd::kSuccess;
}
int stand_in_copy(SUNMatrix a, SUNMatrix b) {
  stand_in(b) = stand_in(a);
  return sd::kSuccess;
}
int stand_in_scale_add_identity(sd::real c, SUNMatrix a) {
  stand_in(a).gamma = -c;  // CVODE forms A = I - gamma J as ScaleAddI(-gamma, J)
  return sd::kSuccess;
}

SUNMatrix make_stand_in_matrix(SUNContext ctx) {
  SUNMatrix a = sd::check_created(SUNMatNewEmpty(ctx), "SUNMatNewEmpty");
  a->ops->getid = stand_in_id;
  a->ops->clone = stand_in_clone;
  a->ops->destroy = stand_in_destroy;
  a->ops->zero = stand_in_zero;
  a->ops->copy = stand_in_copy;
  a->ops->scaleaddi = stand_in_scale_add_identity;
  a->content = new StandInMatrix();
  return a;
}

/// Jacobian callback for the structured solver: the system evaluates and keeps J.
int system_jacobian_callback(sd::real t, N_Vector y, N_Vector, SUNMatrix, void* user_data,
                             N_Vector, N_Vector, N_Vector) {
  CallbackBridge& b = bridge_of(user_data);
  return b.guard([&] { b.system.newton_jacobian(t, data(y)); });
}

struct NewtonSolverContent {
  CallbackBridge* bridge;
};

NewtonSolverContent& newton_content(SUNLinearSolver ls) { return *static_cast<NewtonSolverContent*>(ls->content); }
SUNLinearSolver_Type newton_type(SUNLinearSolver) { return SUNLINEARSOLVER_DIRECT; }
SUNLinearSolver_ID newton_id(SUNLinearSolver) { return SUNLINEARSOLVER_CUSTOM; }

int newton_setup(SUNLinearSolver ls, SUNMatrix a) {
  CallbackBridge& b = *newton_content(ls).bridge;
  const double gamma = stand_in(a).gamma;
  return b.guard([&] { b.system.newton_factor(gamma); }) == 0 ? sd::kSuccess
                                                               : sd::kLinearSolverFailed;
}

int newton_solve(SUNLinearSolver ls, SUNMatrix, N_Vector x, N_Vector b, sd::real) {
  CallbackBridge& br = *newton_content(ls).bridge;
  return br.guard([&] { br.system.newton_solve(data(b), data(x)); }) == 0 ? sd::kSuccess
                                                                          : sd::kLinearSolverFailed;
}

int newton_free(SUNLinearSolver ls) {
  if (ls == nullptr) return sd::kSuccess;
  delete static_cast<NewtonSolverContent*>(ls->content);
  ls->content = nullptr;
  SUNLinSolFreeEmpty(ls);
  return sd::kSuccess;
}

SUNLinearSolver make_newton_solver(CallbackBridge& bridge, SUNContext ctx) {
  SUNLinearSolver ls = sd::check_created(SUNLinSolNewEmpty(ctx), "SUNLinSolNewEmpty");
  ls->content = new NewtonSolverContent{&bridge};
  ls->ops->gettype = newton_type;
  ls->ops->getid = newton_id;
  ls->ops->setup = newton_setup;
  ls->ops->solve = newton_solve;
  ls->ops->free = newton_free;
  return ls;
}

/// Keeps SUNDIALS' error text for the exception (sd::install_error_handler).
void error_callback(int /*code*/, const char* function, const char* msg, void* user_data) {
  bridge_of(user_data).message = std::string(function ? function : "SUNDIALS") + ": " + msg;
}

/// Return flags that mean the caller misused the solver rather than the solver giving up.
/// CVODE and ARKODE share these values.
bool is_usage_error(int flag) {
  static_assert(CV_MEM_FAIL == ARK_MEM_FAIL && CV_TOO_CLOSE == ARK_TOO_CLOSE &&
                    CV_ILL_INPUT == ARK_ILL_INPUT && CV_BAD_T == ARK_BAD_T,
                "CVODE and ARKODE flag values agree");
  return flag <= CV_MEM_FAIL && flag >= CV_TOO_CLOSE;  // -20 .. -27
}

// ---- one SUNDIALS integrator behind a common face -------------------------------------

/// argmax_i |local error_i * weight_i|, from the solver's own estimates (-1 if unavailable).
template <class Fetch>
long worst_component(SUNContext ctx, long n, Fetch fetch) {
  try {
    sd::Vector w = sd::make_vector(n, ctx), e = sd::make_vector(n, ctx);
    if (!fetch(w.get(), e.get())) return -1;
    long worst = -1;
    double largest = -1.0;
    for (long i = 0; i < n; ++i) {
      const double x = std::abs(data(w.get())[i] * data(e.get())[i]);
      if (x > largest) {
        largest = x;
        worst = i;
      }
    }
    return worst;
  } catch (...) {
    return -1;  // a diagnostic only: never mask the failure being reported
  }
}

class Stepper {
 public:
  virtual ~Stepper() = default;
  virtual void set_stop_time(double t_s) = 0;
  /// Raw return flag of CVode / ARKODE's Evolve in normal mode.
  virtual int evolve(double tout_s, N_Vector yout, double* t_reached_s) = 0;
  virtual void root_info(int* found) = 0;
  virtual void reinit(double t_s, N_Vector y) = 0;
  /// Index of the component with the largest weighted local error estimate (-1: unknown).
  virtual long largest_error_component(SUNContext ctx) = 0;
  virtual double internal_time() = 0;
  virtual SolverStats segment_stats() = 0;
  virtual std::string flag_name(int flag) = 0;
  virtual const char* evolve_call() const = 0;
};

/// The linear solver of the Newton iterations (bdf, esdirk) and its Jacobian callback: the
/// system's structured solver behind a stand-in matrix if it has one, else band LU on
/// SUNBandMatrix storage (SUNBandMatrix 6.x sets the storage upper bandwidth to mu + ml
/// itself, the room the band LU factorisation needs for fill-in).
struct LinearSolverChoice {
  sd::Matrix matrix;
  sd::LinearSolver solver;
  int (*jacobian)(sd::real, N_Vector, N_Vector, SUNMatrix, void*, N_Vector, N_Vector, N_Vector);
};
LinearSolverChoice make_linear_solver(CallbackBridge& bridge, N_Vector y0, SUNContext ctx) {
  LinearSolverChoice out;
  if (bridge.system.has_newton_solver()) {
    out.matrix.reset(make_stand_in_matrix(ctx));
    out.solver.reset(make_newton_solver(bridge, ctx));
    out.jacobian = system_jacobian_callback;
    return out;
  }
  const long n = N_VGetLength(y0);
  const long b = std::min<long>(bridge.system.half_bandwidth(), n - 1);
  out.matrix.reset(sd::check_created(SUNBandMatrix(n, b, b, ctx), "SUNBandMatrix"));
  out.solver.reset(sd::check_created(SUNLinSol_Band(y0, out.matrix.get(), ctx), "SUNLinSol_Band"));
  out.jacobian = jacobian_callback;
  return out;
}

/// Error weights 1 / (rtol |y_i| + atol_i), computed in one pass (sd::error_weights)
/// rather than the library's four; the same weights as CVodeSVtolerances would use.
int weights_callback(N_Vector y, N_Vector w, void* user_data) {
  const CallbackBridge& b = bridge_of(user_data);
  return sd::error_weights(y, b.rtol, b.atol.data(), b.atol.size() == 1, w) ? 0 : -1;
}

/// The set-up calls CVODE and ARKODE share, one row per family: both steppers apply
/// apply_common_setup() and then do only what differs (method, tables, nonlinear solver).
struct CommonSetup {
  int (*set_user_data)(void*, void*);
  int (*wf_tolerances)(void*, int (*)(N_Vector, N_Vector, void*));
  int (*set_max_num_steps)(void*, long);
  int (*set_max_step)(void*, sd::real);
  int (*set_init_step)(void*, sd::real);
  int (*set_linear_solver)(void*, SUNLinearSolver, SUNMatrix);
  int (*set_jac_fn)(void*, int (*)(sd::real, N_Vector, N_Vector, SUNMatrix, void*, N_Vector,
                                   N_Vector, N_Vector));
  int (*root_init)(void*, int, int (*)(sd::real, N_Vector, sd::real*, void*));
  void (*check)(int flag, const char* call);     // the integrator's own return flags
  void (*check_ls)(int flag, const char* call);  // its linear-solver interface's
  const char* names[8];                          // the calls above, for messages
};

const CommonSetup kCvodeSetup = {
    CVodeSetUserData, CVodeWFtolerances, CVodeSetMaxNumSteps, CVodeSetMaxStep, CVodeSetInitStep,
    CVodeSetLinearSolver, CVodeSetJacFn, CVodeRootInit, sd::check_cvode, sd::check_cvls,
    {"CVodeSetUserData", "CVodeWFtolerances", "CVodeSetMaxNumSteps", "CVodeSetMaxStep",
     "CVodeSetInitStep", "CVodeSetLinearSolver", "CVodeSetJacFn", "CVodeRootInit"}};

const CommonSetup kArkodeSetup = {
    HAWSER_ARKODE(SetUserData), HAWSER_ARKODE(WFtolerances), HAWSER_ARKODE(SetMaxNumSteps),
    HAWSER_ARKODE(SetMaxStep), HAWSER_ARKODE(SetInitStep), HAWSER_ARKODE(SetLinearSolver),
    HAWSER_ARKODE(SetJacFn), HAWSER_ARKODE(RootInit), sd::check_arkode, sd::check_arkode,
    {HAWSER_ARKODE_NAME(SetUserData), HAWSER_ARKODE_NAME(WFtolerances),
     HAWSER_ARKODE_NAME(SetMaxNumSteps), HAWSER_ARKODE_NAME(SetMaxStep),
     HAWSER_ARKODE_NAME(SetInitStep), HAWSER_ARKODE_NAME(SetLinearSolver),
     HAWSER_ARKODE_NAME(SetJacFn), HAWSER_ARKODE_NAME(RootInit)}};

/// User data, tolerances (by weights), step limits, root functions and, for the implicit
/// methods (newton), the linear solver, kept in `ls` for the stepper's lifetime.
void apply_common_setup(const CommonSetup& c, void* m, const IntegratorOptions& o,
                        CallbackBridge& bridge, N_Vector y0, SUNContext ctx, bool newton,
                        LinearSolverChoice* ls) {
  c.check(c.set_user_data(m, &bridge), c.names[0]);
  c.check(c.wf_tolerances(m, weights_callback), c.names[1]);
  c.check(c.set_max_num_steps(m, o.max_steps_between_outputs), c.names[2]);
  if (o.max_step_s > 0) c.check(c.set_max_step(m, o.max_step_s), c.names[3]);
  if (o.initial_step_s > 0) c.check(c.set_init_step(m, o.initial_step_s), c.names[4]);
  if (newton) {
    *ls = make_linear_solver(bridge, y0, ctx);
    c.check_ls(c.set_linear_solver(m, ls->solver.get(), ls->matrix.get()), c.names[5]);
    c.check_ls(c.set_jac_fn(m, ls->jacobian), c.names[6]);
  }
  const int roots = bridge.system.num_roots();
  if (roots > 0) c.check(c.root_init(m, roots, root_callback), c.names[7]);
}

class CvodeStepper final : public Stepper {
 public:
  CvodeStepper(const IntegratorOptions& o, double t0, N_Vector y0,
               CallbackBridge& bridge, SUNContext ctx)
      : bdf_(o.method == Method::bdf), roots_(bridge.system.num_roots()), n_(N_VGetLength(y0)) {
    mem_.reset(sd::check_created(CVodeCreate(bdf_ ? CV_BDF : CV_ADAMS, ctx), "CVodeCreate"));
    void* m = mem_.get();
    bridge.time_and_step = [m](double* t_s, double* h_s) {
      CVodeGetCurrentTime(m, t_s);
      CVodeGetCurrentStep(m, h_s);
    };
    sd::check_status(sd::install_error_handler<error_callback>(ctx, m, false, &bridge),
                     "install_error_handler (CVODE)");
    sd::check_cvode(CVodeInit(m, rhs_callback, t0, y0), "CVodeInit");
    if (o.max_order > 0) sd::check_cvode(CVodeSetMaxOrd(m, o.max_order), "CVodeSetMaxOrd");
    if (bdf_ && o.stability_limit_detection)
      sd::check_cvode(CVodeSetStabLimDet(m, SUNTRUE), "CVodeSetStabLimDet");
    if (!bdf_) {
      nonlinear_.reset(sd::check_created(SUNNonlinSol_FixedPoint(y0, 0, ctx),
                                         "SUNNonlinSol_FixedPoint"));
      sd::check_cvode(CVodeSetNonlinearSolver(m, nonlinear_.get()), "CVodeSetNonlinearSolver");
    }
    apply_common_setup(kCvodeSetup, m, o, bridge, y0, ctx, bdf_, &ls_);
  }

  void set_stop_time(double t_s) override {
    sd::check_cvode(CVodeSetStopTime(mem_.get(), t_s), "CVodeSetStopTime");
  }
  int evolve(double tout_s, N_Vector yout, double* t_reached_s) override {
    return CVode(mem_.get(), tout_s, yout, t_reached_s, CV_NORMAL);
  }
  void root_info(int* found) override {
    sd::check_cvode(CVodeGetRootInfo(mem_.get(), found), "CVodeGetRootInfo");
  }
  void reinit(double t_s, N_Vector y) override {
    sd::check_cvode(CVodeReInit(mem_.get(), t_s, y), "CVodeReInit");
  }
  long largest_error_component(SUNContext ctx) override {
    return worst_component(ctx, n_, [&](N_Vector w, N_Vector e) {
      return CVodeGetErrWeights(mem_.get(), w) == CV_SUCCESS && CVodeGetEstLocalErrors(mem_.get(), e) == CV_SUCCESS;
    });
  }
  double internal_time() override {
    sd::real t = 0;
    sd::check_cvode(CVodeGetCurrentTime(mem_.get(), &t), "CVodeGetCurrentTime");
    return t;
  }
  SolverStats segment_stats() override {
    void* m = mem_.get();
    SolverStats s;
    int q_current = 0;
    sd::real h_initial = 0, h_current = 0;
    sd::check_cvode(CVodeGetIntegratorStats(m, &s.steps, &s.rhs_evals, &s.linear_setups,
                                            &s.error_test_failures, &s.last_order, &q_current,
                                            &h_initial, &s.last_step_s, &h_current,
                                            &s.current_time_s),
                    "CVodeGetIntegratorStats");
    sd::check_cvode(CVodeGetNonlinSolvStats(m, &s.nonlinear_iterations, &s.nonlinear_failures),
                    "CVodeGetNonlinSolvStats");
    if (bdf_) sd::check_cvls(CVodeGetNumJacEvals(m, &s.jac_evals), "CVodeGetNumJacEvals");
    if (roots_ > 0) sd::check_cvode(CVodeGetNumGEvals(m, &s.root_evals), "CVodeGetNumGEvals");
    return s;
  }
  std::string flag_name(int flag) override {
    return sd::flag_name(CVodeGetReturnFlagName, flag);
  }
  const char* evolve_call() const override { return "CVode"; }

 private:
  bool bdf_;
  int roots_;
  long n_;  // state size
  // Declared before mem_ so that the CVODE memory is freed first.
  LinearSolverChoice ls_;
  sd::NonlinearSolver nonlinear_;
  sd::CvodeMemory mem_;
};

class ArkodeStepper final : public Stepper {
 public:
  ArkodeStepper(const IntegratorOptions& o, double t0, N_Vector y0,
                CallbackBridge& bridge, SUNContext ctx)
      : implicit_(o.method == Method::esdirk),
        roots_(bridge.system.num_roots()),
        n_(N_VGetLength(y0)) {
    // erk: fi == NULL, purely explicit ARK, i.e. an explicit Runge-Kutta method; esdirk:
    // fe == NULL, purely implicit (a diagonally implicit Runge-Kutta method).
    mem_.reset(sd::check_created(implicit_ ? ARKStepCreate(nullptr, rhs_callback, t0, y0, ctx)
                                          : ARKStepCreate(rhs_callback, nullptr, t0, y0, ctx),
                                 "ARKStepCreate"));
    void* m = mem_.get();
    bridge.time_and_step = [m](double* t_s, double* h_s) {
      HAWSER_ARKODE(GetCurrentTime)(m, t_s);
      HAWSER_ARKODE(GetCurrentStep)(m, h_s);
    };
    if (implicit_) {
      // The implicit table of Kennedy & Carpenter's ARK3(2)4L[2]SA (Appl. Numer. Math. 44,
      // 2003): an ESDIRK of order 3 with an embedded order-2 error estimate, L-stable and
      // stiffly accurate, so the tether's undamped high modes are damped rather than
      // amplified (unlike BDF3-5), at 3 implicit stages per step. Each stage's Newton systems
      // go to the system's structured solver, as for bdf.
      sd::check_arkode(ARKStepSetTableNum(m, ARKODE_ARK324L2SA_DIRK_4_2_3, ARKODE_ERK_NONE),
                       "ARKStepSetTableNum");
      // A stage's derivative is deduced from its converged Newton solution,
      // f_i = (z_i - a_i) / (h A_ii), instead of one more right-hand side per stage; and each
      // stage starts from the previous step's dense output (the maximum-order predictor, 1)
      // rather than from y_n. Together they cut the P1 benchmark's right-hand sides from
      // 23,858 to 13,069 and Newton iterations from 11,475 to 9,976 at equal accuracy.
      HAWSER_ARKODE_CHECKED(SetDeduceImplicitRhs, m, SUNTRUE);
      HAWSER_ARKODE_CHECKED(SetPredictorMethod, m, 1);
    }
    sd::check_status(sd::install_error_handler<error_callback>(ctx, m, true, &bridge),
                     "install_error_handler (ARKODE)");
    if (o.max_order > 0 && !implicit_)  // esdirk has one table (validate() allows only 3)
      HAWSER_ARKODE_CHECKED(SetOrder, m, o.max_order);
    apply_common_setup(kArkodeSetup, m, o, bridge, y0, ctx, implicit_, &ls_);
  }

  void set_stop_time(double t_s) override {
    HAWSER_ARKODE_CHECKED(SetStopTime, mem_.get(), t_s);
  }
  int evolve(double tout_s, N_Vector yout, double* t_reached_s) override {
    return HAWSER_ARKODE(Evolve)(mem_.get(), tout_s, yout, t_reached_s, ARK_NORMAL);
  }
  void root_info(int* found) override {
    HAWSER_ARKODE_CHECKED(GetRootInfo, mem_.get(), found);
  }
  long largest_error_component(SUNContext ctx) override {
    return worst_component(ctx, n_, [&](N_Vector w, N_Vector e) {
      return HAWSER_ARKODE(GetErrWeights)(mem_.get(), w) == ARK_SUCCESS &&
             HAWSER_ARKODE(GetEstLocalErrors)(mem_.get(), e) == ARK_SUCCESS;
    });
  }
  void reinit(double t_s, N_Vector y) override {
    ARKRhsFn explicit_part = implicit_ ? nullptr : rhs_callback;
    ARKRhsFn implicit_part = implicit_ ? rhs_callback : nullptr;
    sd::check_arkode(ARKStepReInit(mem_.get(), explicit_part, implicit_part, t_s, y), "ARKStepReInit");
  }
  double internal_time() override {
    sd::real t = 0;
    HAWSER_ARKODE_CHECKED(GetCurrentTime, mem_.get(), &t);
    return t;
  }
  SolverStats segment_stats() override {
    void* m = mem_.get();
    SolverStats s;
    long implicit_evals = 0;
    HAWSER_ARKODE_CHECKED(GetNumSteps, m, &s.steps);
    sd::check_arkode(ARKStepGetNumRhsEvals(m, &s.rhs_evals, &implicit_evals),
                     "ARKStepGetNumRhsEvals");
    HAWSER_ARKODE_CHECKED(GetNumErrTestFails, m, &s.error_test_failures);
    HAWSER_ARKODE_CHECKED(GetLastStep, m, &s.last_step_s);
    HAWSER_ARKODE_CHECKED(GetCurrentTime, m, &s.current_time_s);
    ARKodeButcherTable implicit_table = nullptr, explicit_table = nullptr;
    sd::check_arkode(ARKStepGetCurrentButcherTables(m, &implicit_table, &explicit_table),
                     "ARKStepGetCurrentButcherTables");
    s.last_order = explicit_table ? explicit_table->q : (implicit_table ? implicit_table->q : 0);
    s.rhs_evals += implicit_evals;
    if (implicit_) {
      HAWSER_ARKODE_CHECKED(GetNumNonlinSolvIters, m, &s.nonlinear_iterations);
      HAWSER_ARKODE_CHECKED(GetNumNonlinSolvConvFails, m, &s.nonlinear_failures);
      HAWSER_ARKODE_CHECKED(GetNumLinSolvSetups, m, &s.linear_setups);
      HAWSER_ARKODE_CHECKED(GetNumJacEvals, m, &s.jac_evals);
    }
    if (roots_ > 0) HAWSER_ARKODE_CHECKED(GetNumGEvals, m, &s.root_evals);
    return s;
  }
  std::string flag_name(int flag) override {
    return sd::flag_name(HAWSER_ARKODE(GetReturnFlagName), flag);
  }
  const char* evolve_call() const override { return HAWSER_ARKODE_NAME(Evolve); }

 private:
  bool implicit_;  // esdirk (fi given), else erk (fe given)
  int roots_;
  long n_;  // state size
  LinearSolverChoice ls_;
  sd::ArkodeMemory mem_;
};

void validate(const IntegratorOptions& o, std::size_t n) {
  auto fail = [](const std::string& what) { throw InputError("integrator options: " + what); };
  if (!(o.rtol > 0) || !std::isfinite(o.rtol)) fail("rtol must be positive and finite");
  if (o.atol.size() != 1 && o.atol.size() != n)
    fail("atol needs 1 or " + std::to_string(n) + " values, got " + std::to_string(o.atol.size()));
  for (double a : o.atol)
    if (!(a >= 0) || !std::isfinite(a)) fail("atol values must be finite and >= 0");
  if (!(o.max_step_s >= 0)) fail("max_step_s must be >= 0 (0: no limit)");
  if (!(o.initial_step_s >= 0)) fail("initial_step_s must be >= 0 (0: estimated)");
  if (o.max_steps_between_outputs <= 0) fail("max_steps_between_outputs must be positive");
  const int q = o.max_order;
  switch (o.method) {
    case Method::bdf:
      if (q < 0 || q > 5) fail("max_order for bdf must be 1..5 (0: default 5)");
      break;
    case Method::adams:
      if (q < 0 || q > 12) fail("max_order for adams must be 1..12 (0: default 12)");
      break;
    case Method::esdirk:  // one table: Kennedy & Carpenter's ESDIRK of order 3
      if (q != 0 && q != 3) fail("max_order for esdirk must be 3 (0: default 3)");
      break;
    case Method::erk:  // the orders for which ARKStep has a default explicit table
      if (q != 0 && q != 2 && q != 3 && q != 4 && q != 5 && q != 6 && q != 8)
        fail("max_order for erk must be 2, 3, 4, 5, 6 or 8 (0: default 4)");
      break;
  }
}

SolverStats& add_counters(SolverStats& to, const SolverStats& from) {
  to.steps += from.steps;
  to.rhs_evals += from.rhs_evals;
  to.jac_evals += from.jac_evals;
  to.linear_setups += from.linear_setups;
  to.error_test_failures += from.error_test_failures;
  to.nonlinear_iterations += from.nonlinear_iterations;
  to.nonlinear_failures += from.nonlinear_failures;
  to.root_evals += from.root_evals;
  return to;
}

}  // namespace

// ---- TimeIntegrator --------------------------------------------------------------------

struct TimeIntegrator::Impl {
  // Declaration order is destruction order reversed: the context outlives all handles,
  // the bridge outlives the solver memory that points at it.
  sd::Context context;
  sd::Vector io;  // owns no data: pointed at the caller's arrays for each call
  CallbackBridge bridge;
  std::unique_ptr<Stepper> stepper;
  std::vector<int> roots_found;
  double t_last_s;                // time of the last output (or of the start)
  std::vector<double> y_last;     // state at t_last_s
  SolverStats earlier;            // counters of the segments before the last restart
  bool segment_started = false;   // an advance() since construction or restart

  Impl(OdeSystem& system, double t0, const double* y0, const IntegratorOptions& o)
      : context(sd::make_context()),
        io(sd::make_view_vector(static_cast<long>(system.size()), context.get())),
        bridge{system, nullptr, {}, {}, {}, false, 0.0, {}, {}},
        roots_found(static_cast<std::size_t>(std::max(0, system.num_roots())), 0),
        t_last_s(t0),
        y_last(y0, y0 + system.size()) {
    bridge.rtol = o.rtol;
    bridge.atol = o.atol;
    N_VSetArrayPointer(y_last.data(), io.get());  // read only: the solver clones it
    if (o.method == Method::erk || o.method == Method::esdirk)
      stepper = std::make_unique<ArkodeStepper>(o, t0, io.get(), bridge, context.get());
    else
      stepper = std::make_unique<CvodeStepper>(o, t0, io.get(), bridge, context.get());
    N_VSetArrayPointer(nullptr, io.get());
  }

  [[noreturn]] void fail(int flag, double t_s) {
    const std::string name = stepper->flag_name(flag);
    const std::string what = bridge.message.empty()
                                 ? std::string(stepper->evolve_call()) + ": " + name
                                 : bridge.message + " [" + name + "]";
    if (is_usage_error(flag))
      throw LibraryError(std::string(stepper->evolve_call()) + " failed: " + what);
    std::string story = what + " at t = " + format_time(t_s) + " s";
    if (!bridge.non_finite.empty()) story += "; first seen: " + bridge.non_finite;
    if (!bridge.stall.empty()) story += "; then: " + bridge.stall;
    throw IntegratorFailure(story, t_s, stepper->largest_error_component(context.get()));
  }
};

TimeIntegrator::TimeIntegrator(OdeSystem& system, double t0, const double* y0,
                               const IntegratorOptions& options) {
  if (system.size() == 0) throw std::invalid_argument("TimeIntegrator: the system has no state");
  if (system.half_bandwidth() < 0)
    throw std::invalid_argument("TimeIntegrator: negative half-bandwidth");
  validate(options, system.size());
  impl_ = std::make_unique<Impl>(system, t0, y0, options);
}

TimeIntegrator::~TimeIntegrator() = default;
TimeIntegrator::TimeIntegrator(TimeIntegrator&&) noexcept = default;
TimeIntegrator& TimeIntegrator::operator=(TimeIntegrator&&) noexcept = default;

double TimeIntegrator::advance(double tout, double tstop, double* y_out) {
  Impl& s = *impl_;
  const double target = std::min(tout, tstop);
  if (!(target >= s.t_last_s))
    throw std::invalid_argument("TimeIntegrator::advance: time " + format_time(target) +
                                " s lies before the last output at " + format_time(s.t_last_s) +
                                " s");
  std::fill(s.roots_found.begin(), s.roots_found.end(), 0);
  // Nothing to integrate when the target is the last time to round-off (a stop time computed
  // one rounding step from an output time): CVODE would refuse with "tout too close".
  if (std::abs(target - s.t_last_s) <=
      4 * std::numeric_limits<double>::epsilon() * std::max(std::abs(target), std::abs(s.t_last_s))) {
    std::copy(s.y_last.begin(), s.y_last.end(), y_out);
    return target;
  }
  // A stop time behind the solver's internal time is refused; then the target lies inside
  // the last step and is reached by interpolation alone.
  if (target > s.stepper->internal_time()) s.stepper->set_stop_time(tstop);

  s.bridge.clear();
  N_VSetArrayPointer(y_out, s.io.get());
  double reached = s.t_last_s;
  const int flag = s.stepper->evolve(target, s.io.get(), &reached);
  N_VSetArrayPointer(nullptr, s.io.get());
  s.segment_started = true;

  if (s.bridge.error) {
    std::exception_ptr error = s.bridge.error;
    s.bridge.clear();
    std::rethrow_exception(error);
  }
  if (flag < 0) s.fail(flag, reached);
  static_assert(CV_ROOT_RETURN == ARK_ROOT_RETURN, "one root-return code for both integrators");
  if (flag == CV_ROOT_RETURN) s.stepper->root_info(s.roots_found.data());

  s.t_last_s = reached;
  std::copy(y_out, y_out + s.y_last.size(), s.y_last.begin());
  return reached;
}

const std::vector<int>& TimeIntegrator::root_info() const { return impl_->roots_found; }

void TimeIntegrator::restart(double t, const double* y) {
  Impl& s = *impl_;
  // CVODE resets its linear-solver counters only at the first step after ReInit, so a
  // segment's counters are banked only if it ever stepped.
  if (s.segment_started) add_counters(s.earlier, s.stepper->segment_stats());
  s.segment_started = false;
  std::copy(y, y + s.y_last.size(), s.y_last.begin());
  s.t_last_s = t;
  std::fill(s.roots_found.begin(), s.roots_found.end(), 0);
  N_VSetArrayPointer(s.y_last.data(), s.io.get());  // read only: copied into the solver
  s.stepper->reinit(t, s.io.get());
  N_VSetArrayPointer(nullptr, s.io.get());
}

SolverStats TimeIntegrator::stats() const {
  const Impl& s = *impl_;
  SolverStats current;
  if (s.segment_started) {
    current = s.stepper->segment_stats();
  } else {
    current.current_time_s = s.t_last_s;
  }
  return add_counters(current, s.earlier);
}

}  // namespace hawser
