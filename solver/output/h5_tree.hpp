#pragma once
// H5Tree: the fixed part of a result file held in memory (groups, fixed arrays of doubles or
// integers, strings, scalar attributes on any object), so that it can be written whole into
// every file the writer publishes (h5_writer.hpp). Objects are kept by absolute path
// ("/mesh/s0"); writing one replaces it. Nothing here knows about time series.
//
// Strings (attributes and string datasets) are fixed-length UTF-8, NUL-padded, so h5py returns
// them as bytes (decode("utf-8")). Every array carries a `units` attribute ("1": dimensionless).
#include <hdf5.h>

#include <map>
#include <string>
#include <variant>
#include <vector>

namespace hawser {

class H5Tree {
 public:
  using AttributeValue = std::variant<double, long long, std::string>;

  void put_array(const std::string& path, const std::vector<hsize_t>& dims, const double* data,
                 const std::string& units);
  void put_array(const std::string& path, const std::vector<hsize_t>& dims,
                 const long long* data, const std::string& units);
  void put_string(const std::string& path, const std::string& text);
  /// Attribute `name` on `object_path` ("/" is the root); the object, if it is not an array
  /// or string of this tree (or a series the caller writes), is written as a group.
  void put_attribute(const std::string& object_path, const std::string& name,
                     AttributeValue value);
  /// Removes the array or string at `path` and every object and attribute below it.
  void erase(const std::string& path);
  bool has_dataset(const std::string& path) const { return datasets_.count(path) > 0; }

  /// Writes the groups and datasets into `file` (which must not hold them yet). Attributes are
  /// written separately, by write_attributes, once the caller has added its own datasets.
  void write_datasets(hid_t file) const;
  /// Writes every attribute, making a group for any object path that does not exist.
  void write_attributes(hid_t file) const;

 private:
  struct Dataset {
    std::vector<hsize_t> dims;     // empty with `is_text`
    std::vector<double> reals;     // one of these three holds the content
    std::vector<long long> integers;
    std::string text;
    bool is_text = false;
    bool is_integer = false;
  };
  std::map<std::string, Dataset> datasets_;
  std::map<std::string, std::map<std::string, AttributeValue>> attributes_;
};

/// Creates every missing group on the way to `path` (not `path` itself).
void h5_make_parents(hid_t file, const std::string& path);

}  // namespace hawser
