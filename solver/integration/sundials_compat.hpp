#pragma once
// Every difference between the SUNDIALS 6 and 7 interfaces that hawser meets, in one place.
//
// Covers SUNDIALS 6.4 (Debian 12) and 7.1 (Debian 13); the checks are on the major (and, for
// ARKODE's names, minor) version of sundials_config.h. Only the SUNDIALS glue includes it:
// sundials_handles.hpp, sundials_fast_vector.*, time_integrator.cpp and the vector test.
// Each shim says which change of SUNDIALS it covers; the rest of the glue is written once.
#include <sundials/sundials_config.h>

#include <arkode/arkode_arkstep.h>
#include <sundials/sundials_context.h>
#include <sundials/sundials_linearsolver.h>
#include <sundials/sundials_matrix.h>
#include <sundials/sundials_types.h>

#if SUNDIALS_VERSION_MAJOR == 6
#include <cvode/cvode.h>
#elif SUNDIALS_VERSION_MAJOR == 7
#include <sundials/sundials_errors.h>
#include <sundials/sundials_logger.h>
#else
#error "hawser supports SUNDIALS 6 and 7 (see solver/integration/sundials_compat.hpp)"
#endif

namespace hawser::sundials {

// 7.0 removed realtype and booleantype; the names that replace them exist since 6.0.
using real = sunrealtype;
using boolean = sunbooleantype;

// The success code of matrix, linear-solver and fused vector operations: 6 had one per module
// (SUNMAT_SUCCESS, SUNLS_SUCCESS, 0), 7 returns SUNErrCode, SUN_SUCCESS for all of them.
// A negative code from a linear solver's setup or solve stops the integrator; 7 removed
// SUNLS_PACKAGE_FAIL_UNREC, whose place SUN_ERR_EXT_FAIL takes ("an external library failed").
#if SUNDIALS_VERSION_MAJOR >= 7
inline constexpr int kSuccess = SUN_SUCCESS;
inline constexpr int kLinearSolverFailed = SUN_ERR_EXT_FAIL;
#else
inline constexpr int kSuccess = 0;
static_assert(SUNMAT_SUCCESS == kSuccess && SUNLS_SUCCESS == kSuccess, "one success code");
inline constexpr int kLinearSolverFailed = SUNLS_PACKAGE_FAIL_UNREC;
#endif

// Whether serial vectors get the compiled arithmetic of sundials_fast_vector.cpp instead of
// the library's. Debian builds SUNDIALS' C code without optimisation on both releases (13's
// sundials_config.h: C flags "-fcommon", and SUNDIALS_ENABLE_ERROR_CHECKS on), so it wins on
// both: bench_tether p1 1000 esdirk, best of 3, 0.58 s against 3.09 s on 6.4 and 0.54 s
// against 2.55 s on 7.1 (p1 1000 bdf: 1.11/5.67 s and 1.09/5.04 s). HAWSER_LIBRARY_VECTOR_OPS
// (CMake option HAWSER_FAST_VECTORS=OFF) keeps the library's, to measure it again.
#if defined(HAWSER_LIBRARY_VECTOR_OPS)
inline constexpr bool kCompiledVectorOps = false;
#else
inline constexpr bool kCompiledVectorOps = true;
#endif

/// Creates a context without a communicator (hawser is serial): 6 takes a void* (NULL),
/// 7 a SUNComm (SUN_COMM_NULL, MPI_COMM_NULL in Debian's MPI-enabled build). 0 on success.
inline int create_context(SUNContext* ctx) {
#if SUNDIALS_VERSION_MAJOR >= 7
  return SUNContext_Create(SUN_COMM_NULL, ctx);
#else
  return SUNContext_Create(nullptr, ctx);
#endif
}

/// Where SUNDIALS' error messages go: code (negative, the integrator's flag), the reporting
/// function and the text. Warnings never reach it (see install_error_handler).
using ErrorSink = void (*)(int code, const char* function, const char* message, void* data);

/// Sends the errors of one integrator (CVODE or ARKStep memory `mem`, created in `ctx`) to
/// `Sink` instead of SUNDIALS' own printing, and silences its warnings. 0 on success.
///   6: a handler per integrator (CVodeSetErrHandlerFn, ARKStepSetErrHandlerFn), which also
///      receives the warnings (code CV_WARNING): they are dropped here.
///   7: those setters are gone; handlers sit on a stack in the context (the default one prints
///      to stderr, so it is cleared first), and warnings go to the context's logger, which
///      prints them on stdout (Debian builds with SUNDIALS_LOGGING_LEVEL 2): it is pointed at
///      /dev/null. hawser detects the one warning that matters, t + h == t, by itself.
template <ErrorSink Sink>
int install_error_handler(SUNContext ctx, void* mem, bool arkode, void* data) {
#if SUNDIALS_VERSION_MAJOR >= 7
  (void)mem;
  (void)arkode;
  struct Bridge {
    static void handle(int, const char* function, const char*, const char* msg, SUNErrCode code,
                       void* data, SUNContext) {
      Sink(code, function, msg, data);
    }
  };
  SUNLogger logger = nullptr;
  int flag = SUNContext_ClearErrHandlers(ctx);
  if (flag == SUN_SUCCESS) flag = SUNContext_PushErrHandler(ctx, Bridge::handle, data);
  if (flag == SUN_SUCCESS) flag = SUNContext_GetLogger(ctx, &logger);
  if (flag == SUN_SUCCESS) flag = SUNLogger_SetWarningFilename(logger, "/dev/null");
  return flag;
#else
  (void)ctx;
  struct Bridge {
    static void handle(int code, const char*, const char* function, char* msg, void* data) {
      if (code != CV_WARNING) Sink(code, function, msg, data);
    }
  };
  static_assert(CV_WARNING == ARK_WARNING, "one warning code for both integrators");
  return arkode ? ARKStepSetErrHandlerFn(mem, Bridge::handle, data)
                : CVodeSetErrHandlerFn(mem, Bridge::handle, data);
#endif
}

}  // namespace hawser::sundials

// ARKODE 7.1 moved the options and queries that all its steppers share from ARKStep<Name> to
// ARKode<Name> and deprecated the old names; 6.x has only those. HAWSER_ARKODE(Name) is the
// function, HAWSER_ARKODE_NAME(Name) its name for messages. Stepper-specific calls
// (ARKStepCreate, ARKStepReInit, ARKStepSetTableNum, ...) keep their names in both.
#if SUNDIALS_VERSION_MAJOR > 7 || (SUNDIALS_VERSION_MAJOR == 7 && SUNDIALS_VERSION_MINOR >= 1)
#define HAWSER_ARKODE(name) ARKode##name
#define HAWSER_ARKODE_NAME(name) "ARKode" #name
#else
#define HAWSER_ARKODE(name) ARKStep##name
#define HAWSER_ARKODE_NAME(name) "ARKStep" #name
#endif
