#include "solver/output/result_summary.hpp"

#include <cstdio>
#include <vector>

#include "solver/output/h5_handles.hpp"
#include "solver/output/h5_reader.hpp"

namespace hawser {

std::string SummaryValue::str() const {
  if (is_text) return text;
  if (is_integer) return std::to_string(integer);
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.17g", number);
  return buf;
}

std::optional<double> ResultSummary::number(const std::string& metric) const {
  const auto it = summary.find(metric);
  if (it == summary.end() || it->second.is_text) return std::nullopt;
  return it->second.is_integer ? static_cast<double>(it->second.integer) : it->second.number;
}

namespace {
herr_t collect_name(hid_t, const char* name, const H5A_info_t*, void* out) {
  try {  // no exception may cross the C library
    static_cast<std::vector<std::string>*>(out)->push_back(name);
    return 0;
  } catch (...) {
    return -1;
  }
}

/// Names and type classes of the attributes of `object`, in name order.
std::vector<std::pair<std::string, H5T_class_t>> attributes_of(const std::string& path,
                                                               const std::string& object) {
  const H5FileId f{h5check(H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT), "H5Fopen")};
  const H5ObjectId o{h5check(H5Oopen(f.get(), object.c_str(), H5P_DEFAULT), "H5Oopen")};
  std::vector<std::string> names;
  hsize_t idx = 0;
  h5check(H5Aiterate2(o.get(), H5_INDEX_NAME, H5_ITER_INC, &idx, &collect_name, &names),
          "H5Aiterate2");
  std::vector<std::pair<std::string, H5T_class_t>> out;
  for (const std::string& name : names) {
    const H5AttributeId a{h5check(H5Aopen(o.get(), name.c_str(), H5P_DEFAULT), "H5Aopen")};
    const H5DatatypeId t{h5check(H5Aget_type(a.get()), "H5Aget_type")};
    out.emplace_back(name, H5Tget_class(t.get()));
  }
  return out;
}
}  // namespace

ResultSummary read_result_summary(const std::string& path) {
  ResultSummary r;
  const H5Reader file(path);
  r.status = file.attribute_text("/", "status");
  if (!r.final() || !file.has("/summary")) return r;
  for (const auto& [name, type_class] : attributes_of(path, "/summary")) {
    SummaryValue v;
    switch (type_class) {
      case H5T_STRING:
        v.is_text = true;
        v.text = file.attribute_text("/summary", name);
        break;
      case H5T_INTEGER:
        v.is_integer = true;
        v.integer = file.attribute_integer("/summary", name);
        break;
      case H5T_FLOAT:
        v.number = file.attribute_double("/summary", name);
        break;
      default:
        continue;  // nothing else is written there
    }
    r.summary[name] = v;
  }
  return r;
}

}  // namespace hawser
