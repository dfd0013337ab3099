// H5Tree: the fixed objects of a result file in memory, written whole into each published file.
#include "solver/output/h5_tree.hpp"

#include <algorithm>
#include <stdexcept>

#include "solver/output/h5_handles.hpp"

namespace hawser {
namespace {

std::vector<std::string> split_path(const std::string& path) {
  std::vector<std::string> parts;
  std::size_t start = 0;
  while (start <= path.size()) {
    const std::size_t slash = path.find('/', start);
    const std::size_t stop = slash == std::string::npos ? path.size() : slash;
    if (stop > start) parts.push_back(path.substr(start, stop - start));
    start = stop + 1;
  }
  return parts;
}

std::string normalised(const std::string& path) {
  std::string out;
  for (const std::string& p : split_path(path)) out += "/" + p;
  return out.empty() ? "/" : out;
}

H5PropListId untimed(hid_t cls) {
  // No timestamps in object headers: two runs of the same scenario give the same objects.
  H5PropListId p{h5check(H5Pcreate(cls), "H5Pcreate")};
  h5check(H5Pset_obj_track_times(p.get(), 0), "H5Pset_obj_track_times");
  return p;
}

H5DatatypeId string_type(std::size_t length) {
  H5DatatypeId type{h5check(H5Tcopy(H5T_C_S1), "H5Tcopy")};
  h5check(H5Tset_size(type.get(), std::max<std::size_t>(length, 1)), "H5Tset_size");
  h5check(H5Tset_strpad(type.get(), H5T_STR_NULLPAD), "H5Tset_strpad");
  h5check(H5Tset_cset(type.get(), H5T_CSET_UTF8), "H5Tset_cset");
  return type;
}

void write_attribute(hid_t object, const std::string& name, const H5Tree::AttributeValue& v) {
  const H5DataspaceId scalar{h5check(H5Screate(H5S_SCALAR), "H5Screate")};
  if (const auto* d = std::get_if<double>(&v)) {
    const H5AttributeId a{h5check(H5Acreate2(object, name.c_str(), H5T_IEEE_F64LE, scalar.get(),
                                             H5P_DEFAULT, H5P_DEFAULT),
                                  "H5Acreate2")};
    h5check(H5Awrite(a.get(), H5T_NATIVE_DOUBLE, d), "H5Awrite");
  } else if (const auto* i = std::get_if<long long>(&v)) {
    const H5AttributeId a{h5check(H5Acreate2(object, name.c_str(), H5T_STD_I64LE, scalar.get(),
                                             H5P_DEFAULT, H5P_DEFAULT),
                                  "H5Acreate2")};
    h5check(H5Awrite(a.get(), H5T_NATIVE_LLONG, i), "H5Awrite");
  } else {
    const std::string& s = std::get<std::string>(v);
    const H5DatatypeId type = string_type(s.size());
    const H5AttributeId a{h5check(
        H5Acreate2(object, name.c_str(), type.get(), scalar.get(), H5P_DEFAULT, H5P_DEFAULT),
        "H5Acreate2")};
    h5check(H5Awrite(a.get(), type.get(), s.c_str()), "H5Awrite");
  }
}

}  // namespace

void h5_make_parents(hid_t file, const std::string& path) {
  const auto parts = split_path(path);
  const H5PropListId gcpl = untimed(H5P_GROUP_CREATE);
  std::string prefix;
  for (std::size_t i = 0; i + 1 < parts.size(); ++i) {
    prefix += "/" + parts[i];
    if (h5check(H5Lexists(file, prefix.c_str(), H5P_DEFAULT), "H5Lexists") > 0) continue;
    H5GroupId g{h5check(H5Gcreate2(file, prefix.c_str(), H5P_DEFAULT, gcpl.get(), H5P_DEFAULT),
                        "H5Gcreate2")};
  }
}

void H5Tree::put_array(const std::string& path, const std::vector<hsize_t>& dims,
                       const double* data, const std::string& units) {
  hsize_t count = 1;
  for (const hsize_t d : dims) count *= d;
  Dataset ds;
  ds.dims = dims;
  ds.reals.assign(data, data + count);
  const std::string p = normalised(path);
  if (p == "/") throw std::invalid_argument("H5Tree::put_array: empty dataset path");
  datasets_[p] = std::move(ds);
  put_attribute(p, "units", units);
}

void H5Tree::put_array(const std::string& path, const std::vector<hsize_t>& dims,
                       const long long* data, const std::string& units) {
  hsize_t count = 1;
  for (const hsize_t d : dims) count *= d;
  Dataset ds;
  ds.dims = dims;
  ds.integers.assign(data, data + count);
  ds.is_integer = true;
  const std::string p = normalised(path);
  if (p == "/") throw std::invalid_argument("H5Tree::put_array: empty dataset path");
  datasets_[p] = std::move(ds);
  put_attribute(p, "units", units);
}

void H5Tree::put_string(const std::string& path, const std::string& text) {
  Dataset ds;
  ds.text = text;
  ds.is_text = true;
  const std::string p = normalised(path);
  if (p == "/") throw std::invalid_argument("H5Tree::put_string: empty dataset path");
  datasets_[p] = std::move(ds);
}

void H5Tree::put_attribute(const std::string& object_path, const std::string& name,
                           AttributeValue value) {
  attributes_[normalised(object_path)][name] = std::move(value);
}

void H5Tree::erase(const std::string& path) {
  const std::string p = normalised(path);
  const auto below = [&p](const std::string& key) {
    return key == p || key.compare(0, p.size() + 1, p + "/") == 0;
  };
  for (auto it = datasets_.begin(); it != datasets_.end();)
    it = below(it->first) ? datasets_.erase(it) : ++it;
  for (auto it = attributes_.begin(); it != attributes_.end();)
    it = below(it->first) ? attributes_.erase(it) : ++it;
}

void H5Tree::write_datasets(hid_t file) const {
  const H5PropListId dcpl = untimed(H5P_DATASET_CREATE);
  for (const auto& [path, ds] : datasets_) {
    h5_make_parents(file, path);
    if (ds.is_text) {
      const H5DatatypeId type = string_type(ds.text.size());
      const H5DataspaceId scalar{h5check(H5Screate(H5S_SCALAR), "H5Screate")};
      const H5DatasetId d{h5check(H5Dcreate2(file, path.c_str(), type.get(), scalar.get(),
                                             H5P_DEFAULT, dcpl.get(), H5P_DEFAULT),
                                  "H5Dcreate2")};
      h5check(H5Dwrite(d.get(), type.get(), H5S_ALL, H5S_ALL, H5P_DEFAULT, ds.text.c_str()),
              "H5Dwrite");
      continue;
    }
    const H5DataspaceId space{h5check(
        ds.dims.empty()
            ? H5Screate(H5S_SCALAR)
            : H5Screate_simple(static_cast<int>(ds.dims.size()), ds.dims.data(), nullptr),
        "H5Screate_simple")};
    const hid_t file_type = ds.is_integer ? H5T_STD_I64LE : H5T_IEEE_F64LE;
    const H5DatasetId d{h5check(H5Dcreate2(file, path.c_str(), file_type, space.get(),
                                           H5P_DEFAULT, dcpl.get(), H5P_DEFAULT),
                                "H5Dcreate2")};
    const bool empty = ds.is_integer ? ds.integers.empty() : ds.reals.empty();
    if (empty) continue;
    if (ds.is_integer)
      h5check(H5Dwrite(d.get(), H5T_NATIVE_LLONG, H5S_ALL, H5S_ALL, H5P_DEFAULT,
                       ds.integers.data()),
              "H5Dwrite");
    else
      h5check(H5Dwrite(d.get(), H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT,
                       ds.reals.data()),
              "H5Dwrite");
  }
}

void H5Tree::write_attributes(hid_t file) const {
  const H5PropListId gcpl = untimed(H5P_GROUP_CREATE);
  for (const auto& [path, attrs] : attributes_) {
    if (path != "/") h5_make_parents(file, path);
    if (path != "/" && h5check(H5Lexists(file, path.c_str(), H5P_DEFAULT), "H5Lexists") <= 0) {
      H5GroupId g{h5check(H5Gcreate2(file, path.c_str(), H5P_DEFAULT, gcpl.get(), H5P_DEFAULT),
                          "H5Gcreate2")};
    }
    const H5ObjectId object{h5check(H5Oopen(file, path.c_str(), H5P_DEFAULT), "H5Oopen")};
    for (const auto& [name, value] : attrs) write_attribute(object.get(), name, value);
  }
}

}  // namespace hawser
