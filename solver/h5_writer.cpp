// H5Writer: groups, datasets, attributes and growing time series on the ordered-commit driver
// (solver/h5_commit_driver.hpp; the design is in h5_writer.hpp).
#include "solver/h5_writer.hpp"

#include <fcntl.h>
#include <unistd.h>

#include <algorithm>
#include <cstdint>
#include <limits>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "solver/h5_commit_driver.hpp"

namespace hawser {
namespace {

// =============================================================================================
// Paths, types and property lists
// =============================================================================================

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

std::string join_path(const std::vector<std::string>& parts, std::size_t count) {
  std::string path;
  for (std::size_t i = 0; i < count; ++i) path += "/" + parts[i];
  return path.empty() ? "/" : path;
}

H5PropListId plist(hid_t cls) { return H5PropListId{h5check(H5Pcreate(cls), "H5Pcreate")}; }

// Object creation properties without timestamps: the files are reproducible, and a growing
// dataset's header changes only in its dimensions.
H5PropListId untimed(hid_t cls) {
  H5PropListId p = plist(cls);
  h5check(H5Pset_obj_track_times(p.get(), 0), "H5Pset_obj_track_times");
  return p;
}

// Create every missing group among the first `count` components of `parts`.
void make_groups(hid_t file, const std::vector<std::string>& parts, std::size_t count) {
  const H5PropListId gcpl = untimed(H5P_GROUP_CREATE);
  for (std::size_t i = 1; i <= count; ++i) {
    const std::string prefix = join_path(parts, i);
    if (h5check(H5Lexists(file, prefix.c_str(), H5P_DEFAULT), "H5Lexists") > 0) continue;
    H5GroupId group{h5check(H5Gcreate2(file, prefix.c_str(), H5P_DEFAULT, gcpl.get(), H5P_DEFAULT),
                            "H5Gcreate2")};
  }
}

// Fixed-length UTF-8 string type of `length` bytes (at least one, so "" is storable).
H5DatatypeId string_type(std::size_t length) {
  H5DatatypeId type{h5check(H5Tcopy(H5T_C_S1), "H5Tcopy")};
  h5check(H5Tset_size(type.get(), std::max<std::size_t>(length, 1)), "H5Tset_size");
  h5check(H5Tset_strpad(type.get(), H5T_STR_NULLPAD), "H5Tset_strpad");
  h5check(H5Tset_cset(type.get(), H5T_CSET_UTF8), "H5Tset_cset");
  return type;
}

void replace_attribute(hid_t object, const std::string& name, hid_t file_type, hid_t mem_type,
                       const void* value) {
  if (h5check(H5Aexists(object, name.c_str()), "H5Aexists") > 0) {
    h5check(H5Adelete(object, name.c_str()), "H5Adelete");
  }
  const H5DataspaceId scalar{h5check(H5Screate(H5S_SCALAR), "H5Screate")};
  const H5AttributeId attr{h5check(
      H5Acreate2(object, name.c_str(), file_type, scalar.get(), H5P_DEFAULT, H5P_DEFAULT),
      "H5Acreate2")};
  h5check(H5Awrite(attr.get(), mem_type, value), "H5Awrite");
}

void replace_string_attribute(hid_t object, const std::string& name, const std::string& value) {
  const H5DatatypeId type = string_type(value.size());
  replace_attribute(object, name, type.get(), type.get(), value.c_str());
}

// Chunk shape of a series (the reasons and the measurements are in h5_writer.hpp): rows of
// 4 KiB or more make one chunk per time step, split along their widest axes if over 1 MiB;
// narrower rows are grouped up to 4 KiB. A chunk left incomplete by a flush stays in the file
// uncompressed at full size once it is complete, so incomplete chunks must stay small.
std::vector<hsize_t> series_chunk(const std::vector<hsize_t>& row_dims) {
  constexpr hsize_t kMaxChunkBytes = 1024 * 1024;
  constexpr hsize_t kGroupBytes = 4 * 1024;
  std::vector<hsize_t> chunk(1 + row_dims.size(), 1);
  std::copy(row_dims.begin(), row_dims.end(), chunk.begin() + 1);
  const auto row_bytes = [&chunk] {
    hsize_t bytes = sizeof(double);
    for (std::size_t i = 1; i < chunk.size(); ++i) bytes *= chunk[i];
    return bytes;
  };
  while (row_bytes() > kMaxChunkBytes) {
    const auto widest = std::max_element(chunk.begin() + 1, chunk.end());
    *widest = (*widest + 1) / 2;
  }
  chunk[0] = std::max<hsize_t>(1, kGroupBytes / row_bytes());
  return chunk;
}

}  // namespace

// =============================================================================================
// H5Writer
// =============================================================================================

struct H5Writer::Series {
  std::string path;
  H5DatasetId dataset;
  std::vector<hsize_t> row_dims;
  std::size_t row_size = 1;     // doubles per row
  hsize_t chunk_rows = 1;       // rows per chunk along time
  hsize_t rows_in_file = 0;
  std::vector<double> tail;     // rows of the last, incomplete chunk, already in the file
  std::vector<double> pending;  // rows appended since the last flush, row-major
};

namespace {
// Filter mask of H5Dwrite_chunk: bit i set skips filter i; the pipeline is shuffle, deflate.
constexpr std::uint32_t kUnfiltered = 0x3;
}  // namespace

// Whole chunks go through the filters (shuffle, deflate) and are written once. The incomplete
// last chunk is written unfiltered at full chunk size (rows not yet there hold the NaN fill),
// so the next flush rewrites it in place -- same size, and the same bytes for the rows already
// there, so even a torn write cannot harm them -- instead of leaving a compressed copy behind
// at every flush (freed space is never reused, see the header).
void H5Writer::write_rows(Series& s) {
  if (s.pending.empty()) return;
  const std::size_t width = s.row_size;
  const hsize_t r = s.chunk_rows;
  const hsize_t tail_rows = s.tail.size() / width;
  const hsize_t new_rows = s.pending.size() / width;
  const hsize_t start = s.rows_in_file - tail_rows;  // first row of the incomplete chunk
  const hsize_t total = tail_rows + new_rows;
  const hsize_t whole = total / r * r;

  std::vector<double> rows = s.tail;
  rows.insert(rows.end(), s.pending.begin(), s.pending.end());
  std::vector<hsize_t> dims{s.rows_in_file + new_rows};
  dims.insert(dims.end(), s.row_dims.begin(), s.row_dims.end());
  h5check(H5Dset_extent(s.dataset.get(), dims.data()), "H5Dset_extent");

  std::vector<hsize_t> offset(dims.size(), 0);
  if (whole > 0) {
    std::vector<hsize_t> count{whole};
    count.insert(count.end(), s.row_dims.begin(), s.row_dims.end());
    offset[0] = start;
    const H5DataspaceId file_space{h5check(H5Dget_space(s.dataset.get()), "H5Dget_space")};
    h5check(H5Sselect_hyperslab(file_space.get(), H5S_SELECT_SET, offset.data(), nullptr,
                                count.data(), nullptr),
            "H5Sselect_hyperslab");
    const H5DataspaceId mem_space{h5check(
        H5Screate_simple(static_cast<int>(count.size()), count.data(), nullptr),
        "H5Screate_simple")};
    h5check(H5Dwrite(s.dataset.get(), H5T_NATIVE_DOUBLE, mem_space.get(), file_space.get(),
                     H5P_DEFAULT, rows.data()),
            "H5Dwrite");
  }
  if (total > whole) {
    std::vector<double> chunk(r * width, std::numeric_limits<double>::quiet_NaN());
    std::copy(rows.begin() + whole * width, rows.end(), chunk.begin());
    offset[0] = start + whole;
    h5check(H5Dwrite_chunk(s.dataset.get(), H5P_DEFAULT, kUnfiltered, offset.data(),
                           chunk.size() * sizeof(double), chunk.data()),
            "H5Dwrite_chunk");
  }
  s.tail.assign(rows.begin() + whole * width, rows.end());
  s.rows_in_file += new_rows;
  s.pending.clear();
}

H5Writer::H5Writer() = default;
H5Writer::H5Writer(H5Writer&&) noexcept = default;

H5Writer& H5Writer::operator=(H5Writer&& other) noexcept {
  if (this != &other) {
    try {
      close();
    } catch (...) {  // a failed close of the old file must not stop the move
    }
    series_ = std::move(other.series_);
    file_ = std::move(other.file_);
  }
  return *this;
}

H5Writer::~H5Writer() {
  try {
    close();
  } catch (...) {  // destructors must not throw; call close() to see the error
  }
}

H5Writer H5Writer::create(const std::string& path, Durability durability) {
  h5_silence_errors();
  H5PropListId fcpl = untimed(H5P_FILE_CREATE);
  // Never reuse freed space: committed bytes must stay as they are until nothing refers to them.
  h5check(H5Pset_file_space_strategy(fcpl.get(), H5F_FSPACE_STRATEGY_NONE, 0, 1),
          "H5Pset_file_space_strategy");
  const H5PropListId fapl = plist(H5P_FILE_ACCESS);
  const CommitDriverConfig config{durability == Durability::power_loss};
  h5check(H5Pset_driver(fapl.get(), commit_driver(), &config), "H5Pset_driver");

  H5Writer writer;
  writer.file_ = H5FileId{h5check(
      H5Fcreate(path.c_str(), H5F_ACC_TRUNC, fcpl.get(), fapl.get()), "H5Fcreate")};
  writer.flush();  // from here on the file is a valid HDF5 file for any reader

  if (durability == Durability::power_loss) {
    // The new directory entry must survive too.
    const std::size_t slash = path.find_last_of('/');
    const std::string dir = slash == std::string::npos ? "." : path.substr(0, slash + 1);
    const int fd = ::open(dir.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    const bool synced = fd >= 0 && ::fsync(fd) == 0;
    if (fd >= 0) ::close(fd);
    if (!synced) throw LibraryError(errno_text("fsync of directory", dir));
  }
  return writer;
}

void H5Writer::require_open(const char* what) const {
  if (!file_) throw std::logic_error(std::string("H5Writer::") + what + " on a closed file");
}

void H5Writer::write_fixed(const std::string& path, const std::vector<hsize_t>& dims,
                           const void* data, hid_t mem_type, hid_t file_type,
                           const std::string& units) {
  require_open("write_array");
  const auto parts = split_path(path);
  if (parts.empty()) throw std::invalid_argument("H5Writer::write_array: empty dataset path");
  make_groups(file_.get(), parts, parts.size() - 1);
  const H5DataspaceId space{h5check(
      dims.empty() ? H5Screate(H5S_SCALAR)
                   : H5Screate_simple(static_cast<int>(dims.size()), dims.data(), nullptr),
      "H5Screate_simple")};
  const H5PropListId dcpl = untimed(H5P_DATASET_CREATE);
  const H5DatasetId dataset{h5check(H5Dcreate2(file_.get(), join_path(parts, parts.size()).c_str(),
                                               file_type, space.get(), H5P_DEFAULT, dcpl.get(),
                                               H5P_DEFAULT),
                                    "H5Dcreate2")};
  hsize_t count = 1;
  for (const hsize_t d : dims) count *= d;
  if (count > 0) {
    h5check(H5Dwrite(dataset.get(), mem_type, H5S_ALL, H5S_ALL, H5P_DEFAULT, data), "H5Dwrite");
  }
  replace_string_attribute(dataset.get(), "units", units);
}

void H5Writer::write_array(const std::string& path, const std::vector<hsize_t>& dims,
                           const double* data, const std::string& units) {
  write_fixed(path, dims, data, H5T_NATIVE_DOUBLE, H5T_IEEE_F64LE, units);
}

void H5Writer::write_array(const std::string& path, const std::vector<hsize_t>& dims,
                           const long long* data, const std::string& units) {
  write_fixed(path, dims, data, H5T_NATIVE_LLONG, H5T_STD_I64LE, units);
}

void H5Writer::write_string(const std::string& path, const std::string& text) {
  require_open("write_string");
  const auto parts = split_path(path);
  if (parts.empty()) throw std::invalid_argument("H5Writer::write_string: empty dataset path");
  make_groups(file_.get(), parts, parts.size() - 1);
  const H5DatatypeId type = string_type(text.size());
  const H5DataspaceId scalar{h5check(H5Screate(H5S_SCALAR), "H5Screate")};
  const H5PropListId dcpl = untimed(H5P_DATASET_CREATE);
  const H5DatasetId dataset{h5check(H5Dcreate2(file_.get(), join_path(parts, parts.size()).c_str(),
                                               type.get(), scalar.get(), H5P_DEFAULT, dcpl.get(),
                                               H5P_DEFAULT),
                                    "H5Dcreate2")};
  h5check(H5Dwrite(dataset.get(), type.get(), H5S_ALL, H5S_ALL, H5P_DEFAULT, text.c_str()),
          "H5Dwrite");
}

namespace {
// Open the group or dataset at `object_path`, creating missing groups (the root is "/").
H5ObjectId open_object(hid_t file, const std::string& object_path) {
  const auto parts = split_path(object_path);
  make_groups(file, parts, parts.size());
  return H5ObjectId{h5check(H5Oopen(file, join_path(parts, parts.size()).c_str(), H5P_DEFAULT),
                            "H5Oopen")};
}
}  // namespace

void H5Writer::set_attribute(const std::string& object_path, const std::string& name,
                             double value) {
  require_open("set_attribute");
  const H5ObjectId object = open_object(file_.get(), object_path);
  replace_attribute(object.get(), name, H5T_IEEE_F64LE, H5T_NATIVE_DOUBLE, &value);
}

void H5Writer::set_integer_attribute(const std::string& object_path, const std::string& name,
                                     long long value) {
  require_open("set_attribute");
  const H5ObjectId object = open_object(file_.get(), object_path);
  replace_attribute(object.get(), name, H5T_STD_I64LE, H5T_NATIVE_LLONG, &value);
}

void H5Writer::set_attribute(const std::string& object_path, const std::string& name,
                             const std::string& value) {
  require_open("set_attribute");
  const H5ObjectId object = open_object(file_.get(), object_path);
  replace_string_attribute(object.get(), name, value);
}

H5Writer::SeriesId H5Writer::create_series(const std::string& path,
                                           const std::vector<hsize_t>& row_dims,
                                           const std::string& units) {
  require_open("create_series");
  const auto parts = split_path(path);
  if (parts.empty()) throw std::invalid_argument("H5Writer::create_series: empty path");
  Series series;
  series.path = join_path(parts, parts.size());
  series.row_dims = row_dims;
  for (const hsize_t d : row_dims) {
    if (d == 0) throw std::invalid_argument("H5Writer::create_series: zero row extent in " + path);
    series.row_size *= static_cast<std::size_t>(d);
  }
  make_groups(file_.get(), parts, parts.size() - 1);

  std::vector<hsize_t> dims{0}, max_dims{H5S_UNLIMITED};
  dims.insert(dims.end(), row_dims.begin(), row_dims.end());
  max_dims.insert(max_dims.end(), row_dims.begin(), row_dims.end());
  const H5DataspaceId space{h5check(
      H5Screate_simple(static_cast<int>(dims.size()), dims.data(), max_dims.data()),
      "H5Screate_simple")};

  const std::vector<hsize_t> chunk = series_chunk(row_dims);
  const H5PropListId dcpl = untimed(H5P_DATASET_CREATE);
  h5check(H5Pset_chunk(dcpl.get(), static_cast<int>(chunk.size()), chunk.data()), "H5Pset_chunk");
  h5check(H5Pset_shuffle(dcpl.get()), "H5Pset_shuffle");
  h5check(H5Pset_deflate(dcpl.get(), 4), "H5Pset_deflate");  // level 4: h5py's gzip default
  const double fill = std::numeric_limits<double>::quiet_NaN();  // unwritten rows read as NaN
  h5check(H5Pset_fill_value(dcpl.get(), H5T_NATIVE_DOUBLE, &fill), "H5Pset_fill_value");

  // Room for several chunks per series, fully written ones evicted first (w0 = 1).
  hsize_t chunk_bytes = sizeof(double);
  for (const hsize_t c : chunk) chunk_bytes *= c;
  const H5PropListId dapl = plist(H5P_DATASET_ACCESS);
  h5check(H5Pset_chunk_cache(dapl.get(), 521, std::max<hsize_t>(1024 * 1024, 4 * chunk_bytes), 1.0),
          "H5Pset_chunk_cache");

  // Stored as native doubles (IEEE little-endian here): the unfiltered tail chunk is written
  // with H5Dwrite_chunk, as raw bytes, so file and memory layout must agree.
  series.chunk_rows = chunk[0];
  series.dataset = H5DatasetId{h5check(H5Dcreate2(file_.get(), series.path.c_str(),
                                                  H5T_NATIVE_DOUBLE, space.get(), H5P_DEFAULT,
                                                  dcpl.get(), dapl.get()),
                                       "H5Dcreate2")};
  replace_string_attribute(series.dataset.get(), "units", units);
  series_.push_back(std::move(series));
  return SeriesId{series_.size() - 1};
}

void H5Writer::append(SeriesId id, const double* rows, std::size_t nrows) {
  require_open("append");
  Series& s = series_.at(id.index);
  s.pending.insert(s.pending.end(), rows, rows + nrows * s.row_size);
}

std::size_t H5Writer::length(SeriesId id) const {
  const Series& s = series_.at(id.index);
  return static_cast<std::size_t>(s.rows_in_file) + s.pending.size() / s.row_size;
}

void H5Writer::flush() {
  require_open("flush");
  for (Series& s : series_) write_rows(s);
  // Writes the library's dirty state; the driver's flush callback then commits it in order.
  h5check(H5Fflush(file_.get(), H5F_SCOPE_GLOBAL), "H5Fflush");
}

void H5Writer::close() {
  if (!file_) return;
  flush();
  for (Series& s : series_) s.dataset.close("H5Dclose");
  file_.close("H5Fclose");
}

}  // namespace hawser
