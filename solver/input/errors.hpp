#pragma once
// The one error path of hawser: every failure is an exception of one of these types,
// caught in main(), which maps it to the exit codes of the command-line contract.
#include <stdexcept>
#include <string>

namespace hawser {

/// Bad input or usage (exit code 2). The message names file, line and key where known.
class InputError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// A call into a library (SUNDIALS, HDF5) failed; the message names the call (exit code 1).
class LibraryError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// The time integrator gave up (exit code 4); `time_s` is where it stopped.
/// `component` is the state component with the largest weighted local error estimate
/// when the integrator gave up (-1 if unknown): where the trouble is.
class IntegratorFailure : public std::runtime_error {
 public:
  IntegratorFailure(const std::string& what, double time_s, long component = -1)
      : std::runtime_error(what), time_s_(time_s), component_(component) {}
  double time_s() const { return time_s_; }
  long component() const { return component_; }

 private:
  double time_s_;
  long component_;
};

}  // namespace hawser
