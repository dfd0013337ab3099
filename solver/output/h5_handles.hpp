#pragma once
// Owning handles for HDF5 identifiers and the one checked-call helper for the HDF5 C API.
//
// Every HDF5 call that can fail goes through h5check(value, "H5Xname"): a negative herr_t or
// hid_t becomes a hawser::LibraryError whose message names the call and carries the library's
// own innermost error description. HDF5's habit of printing its error stack to stderr is turned
// off (h5_silence_errors), since the exception now says it and main() decides what to print.
#include <hdf5.h>

#include <cerrno>
#include <cstring>
#include <string>
#include <type_traits>
#include <utility>

#include "solver/input/errors.hpp"

namespace hawser {

/// Stop HDF5 printing its error stack on the default stack of this thread (idempotent, cheap).
/// "<op> '<name>': <strerror(errno)>", for a failed system call on a file.
inline std::string errno_text(const char* op, const std::string& name) {
  return std::string(op) + " '" + name + "': " + std::strerror(errno);
}

inline void h5_silence_errors() { H5Eset_auto2(H5E_DEFAULT, nullptr, nullptr); }

namespace detail {
// H5Ewalk2 callback: keep the last description walked downward, i.e. the innermost one, where
// the failure was found (the first is the API call the caller made).
inline herr_t h5_collect_error(unsigned /*n*/, const H5E_error2_t* err, void* out) {
  try {  // no exception may cross the C library
    auto* text = static_cast<std::string*>(out);
    if (err != nullptr && err->desc != nullptr && err->desc[0] != '\0') {
      *text = std::string(err->func_name ? err->func_name : "?") + ": " + err->desc;
    }
    return 0;
  } catch (...) {
    return -1;
  }
}

inline std::string h5_error_text() {
  std::string text;
  H5Ewalk2(H5E_DEFAULT, H5E_WALK_DOWNWARD, &detail::h5_collect_error, &text);
  H5Eclear2(H5E_DEFAULT);
  return text;
}
}  // namespace detail

/// Throw LibraryError naming `call` if `value` (a herr_t, hid_t or htri_t) is negative;
/// otherwise return it unchanged.
template <class T>
T h5check(T value, const char* call) {
  static_assert(std::is_signed<T>::value, "h5check takes herr_t, htri_t or hid_t");
  if (value < 0) {
    const std::string detail = detail::h5_error_text();
    throw LibraryError(std::string("HDF5 call ") + call + " failed" +
                       (detail.empty() ? std::string() : " (" + detail + ")"));
  }
  return value;
}

/// Move-only owner of one HDF5 identifier, released with `Close` (H5Fclose, H5Dclose, ...).
template <herr_t (*Close)(hid_t)>
class H5Id {
 public:
  H5Id() = default;
  explicit H5Id(hid_t id) : id_(id) {}
  ~H5Id() { reset(); }
  H5Id(const H5Id&) = delete;
  H5Id& operator=(const H5Id&) = delete;
  H5Id(H5Id&& other) noexcept : id_(std::exchange(other.id_, H5I_INVALID_HID)) {}
  H5Id& operator=(H5Id&& other) noexcept {
    if (this != &other) {
      reset();
      id_ = std::exchange(other.id_, H5I_INVALID_HID);
    }
    return *this;
  }

  hid_t get() const { return id_; }
  explicit operator bool() const { return id_ >= 0; }

  /// Close now; errors on close are reported through the return value, not thrown, so the
  /// destructor can use it. Callers that must see a failed close call close() instead.
  void reset() {
    if (id_ >= 0) Close(id_);
    id_ = H5I_INVALID_HID;
  }
  /// Close now and throw LibraryError if the library reports a failure.
  void close(const char* call) {
    const hid_t id = std::exchange(id_, H5I_INVALID_HID);
    if (id >= 0) h5check(Close(id), call);
  }

 private:
  hid_t id_ = H5I_INVALID_HID;
};

using H5FileId = H5Id<H5Fclose>;
using H5GroupId = H5Id<H5Gclose>;
using H5DatasetId = H5Id<H5Dclose>;
using H5DataspaceId = H5Id<H5Sclose>;
using H5PropListId = H5Id<H5Pclose>;
using H5AttributeId = H5Id<H5Aclose>;
using H5DatatypeId = H5Id<H5Tclose>;
using H5ObjectId = H5Id<H5Oclose>;

}  // namespace hawser
