#include "solver/output/h5_reader.hpp"

namespace hawser {
namespace {

std::vector<std::size_t> dims_of(hid_t dataset) {
  const H5DataspaceId space{h5check(H5Dget_space(dataset), "H5Dget_space")};
  hsize_t dims[H5S_MAX_RANK];
  const int rank = h5check(H5Sget_simple_extent_dims(space.get(), dims, nullptr),
                           "H5Sget_simple_extent_dims");
  return std::vector<std::size_t>(dims, dims + rank);
}

std::size_t count_of(hid_t dataset) {
  std::size_t n = 1;
  for (const std::size_t d : dims_of(dataset)) n *= d;
  return n;
}

// Fixed- or variable-length string of an attribute or dataset, read in its own type.
std::string read_text(hid_t type, bool attribute, hid_t object) {
  std::string out;
  if (h5check(H5Tis_variable_str(type), "H5Tis_variable_str") > 0) {
    char* raw = nullptr;
    const H5DatatypeId mem{h5check(H5Tcopy(H5T_C_S1), "H5Tcopy")};
    h5check(H5Tset_size(mem.get(), H5T_VARIABLE), "H5Tset_size");
    h5check(attribute ? H5Aread(object, mem.get(), &raw)
                      : H5Dread(object, mem.get(), H5S_ALL, H5S_ALL, H5P_DEFAULT, &raw),
            "H5Aread/H5Dread");
    out = raw ? raw : "";
    H5free_memory(raw);
    return out;
  }
  out.assign(H5Tget_size(type), '\0');
  h5check(attribute ? H5Aread(object, type, out.data())
                    : H5Dread(object, type, H5S_ALL, H5S_ALL, H5P_DEFAULT, out.data()),
          "H5Aread/H5Dread");
  out.resize(out.find('\0') == std::string::npos ? out.size() : out.find('\0'));
  return out;
}

}  // namespace

H5Reader::H5Reader(const std::string& path) {
  h5_silence_errors();
  file_ = H5FileId{h5check(H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT), "H5Fopen")};
}

bool H5Reader::has(const std::string& object_path) const {
  // H5Lexists needs every parent to exist: walk down the path.
  std::string prefix;
  std::size_t start = 1;
  while (start <= object_path.size()) {
    const std::size_t slash = object_path.find('/', start);
    prefix = object_path.substr(0, slash);
    if (H5Lexists(file_.get(), prefix.c_str(), H5P_DEFAULT) <= 0) return false;
    if (slash == std::string::npos) break;
    start = slash + 1;
  }
  return true;
}

std::vector<double> H5Reader::doubles(const std::string& dataset_path) const {
  const H5DatasetId ds{h5check(H5Dopen2(file_.get(), dataset_path.c_str(), H5P_DEFAULT),
                               "H5Dopen2")};
  std::vector<double> out(count_of(ds.get()));
  if (!out.empty())
    h5check(H5Dread(ds.get(), H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, out.data()),
            "H5Dread");
  return out;
}

std::vector<long long> H5Reader::integers(const std::string& dataset_path) const {
  const H5DatasetId ds{h5check(H5Dopen2(file_.get(), dataset_path.c_str(), H5P_DEFAULT),
                               "H5Dopen2")};
  std::vector<long long> out(count_of(ds.get()));
  if (!out.empty())
    h5check(H5Dread(ds.get(), H5T_NATIVE_LLONG, H5S_ALL, H5S_ALL, H5P_DEFAULT, out.data()),
            "H5Dread");
  return out;
}

std::string H5Reader::text(const std::string& dataset_path) const {
  const H5DatasetId ds{h5check(H5Dopen2(file_.get(), dataset_path.c_str(), H5P_DEFAULT),
                               "H5Dopen2")};
  const H5DatatypeId type{h5check(H5Dget_type(ds.get()), "H5Dget_type")};
  return read_text(type.get(), false, ds.get());
}

bool H5Reader::has_attribute(const std::string& object_path, const std::string& name) const {
  return has(object_path) &&
         H5Aexists_by_name(file_.get(), object_path.c_str(), name.c_str(), H5P_DEFAULT) > 0;
}

double H5Reader::attribute_double(const std::string& object_path, const std::string& name) const {
  const H5AttributeId a{h5check(
      H5Aopen_by_name(file_.get(), object_path.c_str(), name.c_str(), H5P_DEFAULT, H5P_DEFAULT),
      "H5Aopen_by_name")};
  double v = 0.0;
  h5check(H5Aread(a.get(), H5T_NATIVE_DOUBLE, &v), "H5Aread");
  return v;
}

long long H5Reader::attribute_integer(const std::string& object_path,
                                      const std::string& name) const {
  const H5AttributeId a{h5check(
      H5Aopen_by_name(file_.get(), object_path.c_str(), name.c_str(), H5P_DEFAULT, H5P_DEFAULT),
      "H5Aopen_by_name")};
  long long v = 0;
  h5check(H5Aread(a.get(), H5T_NATIVE_LLONG, &v), "H5Aread");
  return v;
}

std::string H5Reader::attribute_text(const std::string& object_path,
                                     const std::string& name) const {
  const H5AttributeId a{h5check(
      H5Aopen_by_name(file_.get(), object_path.c_str(), name.c_str(), H5P_DEFAULT, H5P_DEFAULT),
      "H5Aopen_by_name")};
  const H5DatatypeId type{h5check(H5Aget_type(a.get()), "H5Aget_type")};
  return read_text(type.get(), true, a.get());
}

}  // namespace hawser
