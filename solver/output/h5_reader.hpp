#pragma once
// H5Reader: the few reads hawser makes of its own files (a run's checkpoint, to resume it):
// whole datasets of doubles or integers, a string dataset, scalar attributes. Read-only, HDF5
// public API, one checked-call path (h5check).
#include <string>
#include <vector>

#include "solver/output/h5_handles.hpp"

namespace hawser {

class H5Reader {
 public:
  /// Throws LibraryError naming the call when `path` cannot be opened as HDF5.
  explicit H5Reader(const std::string& path);

  bool has(const std::string& object_path) const;
  std::vector<double> doubles(const std::string& dataset_path) const;
  std::vector<long long> integers(const std::string& dataset_path) const;
  std::string text(const std::string& dataset_path) const;
  double attribute_double(const std::string& object_path, const std::string& name) const;
  long long attribute_integer(const std::string& object_path, const std::string& name) const;
  std::string attribute_text(const std::string& object_path, const std::string& name) const;
  bool has_attribute(const std::string& object_path, const std::string& name) const;

 private:
  H5FileId file_;
};

}  // namespace hawser
