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
class IntegratorFailure : public std::runtime_error {
 public:
  IntegratorFailure(const std::string& what, double time_s)
      : std::runtime_error(what), time_s_(time_s) {}
  double time_s() const { return time_s_; }

 private:
  double time_s_;
};

}  // namespace hawser
