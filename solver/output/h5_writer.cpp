// H5Writer: segments, an index published by rename(2), one final file (design: h5_writer.hpp).
#include "solver/output/h5_writer.hpp"

#include <dirent.h>
#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <limits>
#include <stdexcept>
#include <utility>

#include "solver/input/errors.hpp"
#include "solver/output/h5_handles.hpp"

namespace hawser {
namespace {

constexpr hsize_t kChunkBytes = 1024 * 1024;  // target chunk size of the final file
constexpr std::size_t kMergeFanIn = 8;         // segments of one level merged into one
constexpr double kRetireSeconds = 60.0;        // merged segments kept for older readers [s]

double steady_seconds() {
  return std::chrono::duration<double>(std::chrono::steady_clock::now().time_since_epoch())
      .count();
}

H5PropListId plist(hid_t cls) { return H5PropListId{h5check(H5Pcreate(cls), "H5Pcreate")}; }

H5PropListId untimed(hid_t cls) {
  H5PropListId p = plist(cls);
  h5check(H5Pset_obj_track_times(p.get(), 0), "H5Pset_obj_track_times");
  return p;
}

std::vector<hsize_t> shape(hsize_t rows, const std::vector<hsize_t>& row_dims) {
  std::vector<hsize_t> dims{rows};
  dims.insert(dims.end(), row_dims.begin(), row_dims.end());
  return dims;
}

H5DataspaceId simple_space(const std::vector<hsize_t>& dims, bool growable = false) {
  std::vector<hsize_t> max = dims;
  if (growable) max[0] = H5S_UNLIMITED;
  return H5DataspaceId{h5check(
      H5Screate_simple(static_cast<int>(dims.size()), dims.data(), max.data()),
      "H5Screate_simple")};
}

// Selects rows [first, first + count) of a (rows, row_dims...) dataspace.
void select_rows(hid_t space, hsize_t first, hsize_t count, const std::vector<hsize_t>& row_dims) {
  std::vector<hsize_t> start(row_dims.size() + 1, 0);
  start[0] = first;
  const std::vector<hsize_t> block = shape(count, row_dims);
  h5check(H5Sselect_hyperslab(space, H5S_SELECT_SET, start.data(), nullptr, block.data(), nullptr),
          "H5Sselect_hyperslab");
}

// Chunk shape of a final series: rows grouped up to about 1 MiB; a row larger than that is
// split along its widest axes.
std::vector<hsize_t> chunk_shape(hsize_t rows, const std::vector<hsize_t>& row_dims) {
  std::vector<hsize_t> chunk = shape(1, row_dims);
  const auto row_bytes = [&chunk] {
    hsize_t bytes = sizeof(double);
    for (std::size_t i = 1; i < chunk.size(); ++i) bytes *= chunk[i];
    return bytes;
  };
  while (row_bytes() > kChunkBytes) {
    const auto widest = std::max_element(chunk.begin() + 1, chunk.end());
    *widest = (*widest + 1) / 2;
  }
  chunk[0] = std::max<hsize_t>(1, std::min(rows, kChunkBytes / row_bytes()));
  return chunk;
}

H5FileId create_file(const std::string& path) {
  h5_silence_errors();
  const H5PropListId fcpl = untimed(H5P_FILE_CREATE);
  return H5FileId{
      h5check(H5Fcreate(path.c_str(), H5F_ACC_TRUNC, fcpl.get(), H5P_DEFAULT), "H5Fcreate")};
}

void sync_path(const std::string& path, bool directory) {
  const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC | (directory ? O_DIRECTORY : 0));
  const bool ok = fd >= 0 && ::fsync(fd) == 0;
  if (fd >= 0) ::close(fd);
  if (!ok) throw LibraryError(errno_text("fsync", path));
}

std::string folder_of(const std::string& path) {
  const std::size_t slash = path.find_last_of('/');
  return slash == std::string::npos ? "." : path.substr(0, slash + 1);
}

std::string name_of(const std::string& path) {
  const std::size_t slash = path.find_last_of('/');
  return slash == std::string::npos ? path : path.substr(slash + 1);
}

// Removes the regular files in `dir` and the folder itself; quiet when it does not exist.
void remove_folder(const std::string& dir) {
  DIR* d = ::opendir(dir.c_str());
  if (d == nullptr) return;
  while (const dirent* e = ::readdir(d)) {
    const std::string n = e->d_name;
    if (n != "." && n != "..") ::unlink((dir + "/" + n).c_str());
  }
  ::closedir(d);
  ::rmdir(dir.c_str());
}

// One mapping of a virtual dataset: its source file and the rows it supplies.
struct VirtualSource {
  hsize_t first_row;
  hsize_t rows;
  std::string file;
};

// The mappings of a virtual dataset's creation property list, in row order (none for a
// dataset of another layout).
std::vector<VirtualSource> virtual_sources(hid_t dcpl) {
  std::vector<VirtualSource> out;
  if (H5Pget_layout(dcpl) != H5D_VIRTUAL) return out;
  std::size_t count = 0;
  h5check(H5Pget_virtual_count(dcpl, &count), "H5Pget_virtual_count");
  for (std::size_t i = 0; i < count; ++i) {
    const ssize_t len = h5check(H5Pget_virtual_filename(dcpl, i, nullptr, 0),
                                "H5Pget_virtual_filename");
    std::string name(static_cast<std::size_t>(len) + 1, '\0');
    h5check(H5Pget_virtual_filename(dcpl, i, name.data(), name.size()), "H5Pget_virtual_filename");
    name.resize(static_cast<std::size_t>(len));
    const H5DataspaceId vspace{h5check(H5Pget_virtual_vspace(dcpl, i), "H5Pget_virtual_vspace")};
    hsize_t lo[H5S_MAX_RANK], hi[H5S_MAX_RANK];
    h5check(H5Sget_select_bounds(vspace.get(), lo, hi), "H5Sget_select_bounds");
    out.push_back({lo[0], hi[0] - lo[0] + 1, std::move(name)});
  }
  std::sort(out.begin(), out.end(),
            [](const VirtualSource& a, const VirtualSource& b) { return a.first_row < b.first_row; });
  return out;
}

}  // namespace

H5Writer::H5Writer(H5Writer&& o) noexcept
    : path_(std::move(o.path_)),
      parts_dir_(std::move(o.parts_dir_)),
      parts_name_(std::move(o.parts_name_)),
      options_(o.options_),
      open_(std::exchange(o.open_, false)),
      tree_(std::move(o.tree_)),
      series_(std::move(o.series_)),
      segments_(std::move(o.segments_)),
      retired_(std::move(o.retired_)),
      next_segment_(o.next_segment_),
      resumed_from_(std::move(o.resumed_from_)) {}

H5Writer& H5Writer::operator=(H5Writer&& o) noexcept {
  if (this != &o) {  // the old file is left as the destructor leaves it
    path_ = std::move(o.path_);
    parts_dir_ = std::move(o.parts_dir_);
    parts_name_ = std::move(o.parts_name_);
    options_ = o.options_;
    open_ = std::exchange(o.open_, false);
    tree_ = std::move(o.tree_);
    series_ = std::move(o.series_);
    segments_ = std::move(o.segments_);
    next_segment_ = o.next_segment_;
    retired_ = std::move(o.retired_);
    resumed_from_ = std::move(o.resumed_from_);
  }
  return *this;
}

// Not closed: the owner failed before finishing. The file stays as the last flush left it, as
// after a kill (resumable, never looking finished); rows since then are dropped.
H5Writer::~H5Writer() = default;

H5Writer H5Writer::create(const std::string& path, Options options) {
  if (options.deflate_level < 0 || options.deflate_level > 9)
    throw std::invalid_argument("H5Writer: deflate level must be 0..9");
  H5Writer w;
  w.path_ = path;
  w.parts_dir_ = path + ".parts";
  w.parts_name_ = name_of(path) + ".parts";
  w.options_ = options;
  remove_folder(w.parts_dir_);
  if (::mkdir(w.parts_dir_.c_str(), 0777) != 0)
    throw LibraryError(errno_text("mkdir", w.parts_dir_));
  w.open_ = true;
  w.publish_index();  // from here on `path` is a valid HDF5 file for any reader
  return w;
}

H5Writer H5Writer::resume(const std::string& path, Options options,
                          const std::string& reference_series) {
  h5_silence_errors();
  H5Writer w;
  w.path_ = path;
  w.parts_dir_ = path + ".parts";
  w.parts_name_ = name_of(path) + ".parts";
  w.options_ = options;
  const auto refuse = [&path](const std::string& why) {
    return InputError("error: " + path + ": cannot resume: " + why + "\n");
  };
  struct stat st {};
  if (::stat(w.parts_dir_.c_str(), &st) != 0 || !S_ISDIR(st.st_mode))
    throw refuse("no folder " + w.parts_dir_ + " beside it (a finished run's file has none)");
  const hid_t raw = H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT);
  if (raw < 0) throw refuse("not an HDF5 file");
  const H5FileId file{raw};
  const auto open_series = [&](const std::string& p) {
    if (H5Lexists(file.get(), p.c_str(), H5P_DEFAULT) <= 0) throw refuse("no series " + p);
    return H5DatasetId{h5check(H5Dopen2(file.get(), p.c_str(), H5P_DEFAULT), "H5Dopen2")};
  };
  // The segments, in order, from the reference series' virtual mapping.
  {
    const H5DatasetId ds = open_series(reference_series);
    const H5PropListId dcpl{h5check(H5Dget_create_plist(ds.get()), "H5Dget_create_plist")};
    for (VirtualSource& v : virtual_sources(dcpl.get())) {
      const std::string prefix = w.parts_name_ + "/";
      if (v.file.compare(0, prefix.size(), prefix) != 0)
        throw refuse("segment " + v.file + " is not in " + w.parts_dir_);
      const std::string name = v.file.substr(prefix.size());
      unsigned number = 0;
      if (std::sscanf(name.c_str(), "seg-%u.h5", &number) == 1)
        w.next_segment_ = std::max(w.next_segment_, number + 1);
      w.segments_.push_back(Segment{name, v.rows, 0});
    }
  }
  const H5DatasetId ds = open_series(reference_series);
  const H5DataspaceId space{h5check(H5Dget_space(ds.get()), "H5Dget_space")};
  hsize_t dims[H5S_MAX_RANK];
  const int rank = h5check(H5Sget_simple_extent_dims(space.get(), dims, nullptr),
                           "H5Sget_simple_extent_dims");
  if (rank < 1 || dims[0] != w.published_rows())
    throw refuse(reference_series + " does not match its segments");
  w.resumed_from_ = path;
  w.open_ = true;
  return w;
}

void H5Writer::require_open(const char* what) const {
  if (!open_) throw std::logic_error(std::string("H5Writer::") + what + " on a closed file");
}

std::string H5Writer::part(const std::string& name) const { return parts_dir_ + "/" + name; }

hsize_t H5Writer::published_rows() const {
  hsize_t rows = 0;
  for (const Segment& s : segments_) rows += s.rows;
  return rows;
}

void H5Writer::write_array(const std::string& path, const std::vector<hsize_t>& dims,
                           const double* data, const std::string& units) {
  require_open("write_array");
  tree_.put_array(path, dims, data, units);
}

void H5Writer::write_array(const std::string& path, const std::vector<hsize_t>& dims,
                           const long long* data, const std::string& units) {
  require_open("write_array");
  tree_.put_array(path, dims, data, units);
}

void H5Writer::write_string(const std::string& path, const std::string& text) {
  require_open("write_string");
  tree_.put_string(path, text);
}

void H5Writer::erase(const std::string& path) {
  require_open("erase");
  tree_.erase(path);
}

void H5Writer::set_attribute(const std::string& object_path, const std::string& name,
                             double value) {
  require_open("set_attribute");
  tree_.put_attribute(object_path, name, value);
}

void H5Writer::set_attribute(const std::string& object_path, const std::string& name,
                             const std::string& value) {
  require_open("set_attribute");
  tree_.put_attribute(object_path, name, value);
}

H5Writer::SeriesId H5Writer::create_series(const std::string& path,
                                           const std::vector<hsize_t>& row_dims,
                                           const std::string& units) {
  require_open("create_series");
  Series s;
  s.path = path;
  s.row_dims = row_dims;
  for (const hsize_t d : row_dims) {
    if (d < 1) throw std::invalid_argument("H5Writer::create_series: empty row dimension");
    s.row_size *= d;
  }
  for (const Series& other : series_)
    if (other.path == path) throw std::invalid_argument("H5Writer: series " + path + " twice");
  if (!resumed_from_.empty()) {
    // A resumed file must hold this series with this row shape and the common length.
    const std::string& file_path = resumed_from_;
    const H5FileId file{h5check(H5Fopen(file_path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT),
                                "H5Fopen")};
    const auto mismatch = [&](const std::string& why) {
      return InputError("error: " + file_path + ": cannot resume: series " + path + " " + why +
                        " (not the same run)\n");
    };
    if (H5Lexists(file.get(), path.c_str(), H5P_DEFAULT) <= 0) throw mismatch("is missing");
    const H5DatasetId ds{h5check(H5Dopen2(file.get(), path.c_str(), H5P_DEFAULT), "H5Dopen2")};
    const H5DataspaceId space{h5check(H5Dget_space(ds.get()), "H5Dget_space")};
    hsize_t dims[H5S_MAX_RANK];
    const int rank = h5check(H5Sget_simple_extent_dims(space.get(), dims, nullptr),
                             "H5Sget_simple_extent_dims");
    if (std::vector<hsize_t>(dims, dims + rank) != shape(published_rows(), row_dims))
      throw mismatch("has another shape");
  }
  series_.push_back(std::move(s));
  tree_.put_attribute(path, "units", units);
  return SeriesId{series_.size() - 1};
}

void H5Writer::append(SeriesId id, const double* rows, std::size_t nrows) {
  require_open("append");
  Series& s = series_.at(id.index);
  s.pending.insert(s.pending.end(), rows, rows + nrows * s.row_size);
}

std::size_t H5Writer::length(SeriesId id) const {
  const Series& s = series_.at(id.index);
  return published_rows() + s.pending.size() / s.row_size;
}

std::size_t H5Writer::pending_bytes() const {
  std::size_t bytes = 0;
  for (const Series& s : series_) bytes += s.pending.size() * sizeof(double);
  return bytes;
}

std::string H5Writer::next_segment_name() {
  char name[32];
  std::snprintf(name, sizeof name, "seg-%06u.h5", next_segment_++);
  return name;
}

namespace {
// Writes one segment file: each series' rows (row-major, `rows` of them) as a contiguous
// dataset at the series' path; closed before returning.
template <class Series, class RowsOf>
void write_segment_file(const std::string& file_path, const std::vector<Series>& series,
                        hsize_t rows, RowsOf rows_of) {
  H5FileId file = create_file(file_path);
  const H5PropListId dcpl = untimed(H5P_DATASET_CREATE);
  for (std::size_t i = 0; i < series.size(); ++i) {
    const Series& s = series[i];
    h5_make_parents(file.get(), s.path);
    const H5DataspaceId space = simple_space(shape(rows, s.row_dims));
    const H5DatasetId ds{h5check(H5Dcreate2(file.get(), s.path.c_str(), H5T_IEEE_F64LE,
                                            space.get(), H5P_DEFAULT, dcpl.get(), H5P_DEFAULT),
                                 "H5Dcreate2")};
    h5check(H5Dwrite(ds.get(), H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, rows_of(i)),
            "H5Dwrite");
  }
  file.close("H5Fclose");
}

// Reads all rows of `dataset` in the segment file `file` into `out`.
void read_segment(hid_t file, const std::string& dataset, std::vector<double>& out) {
  const H5DatasetId src{h5check(H5Dopen2(file, dataset.c_str(), H5P_DEFAULT), "H5Dopen2")};
  const H5DataspaceId space{h5check(H5Dget_space(src.get()), "H5Dget_space")};
  out.resize(static_cast<std::size_t>(
      h5check(H5Sget_simple_extent_npoints(space.get()), "H5Sget_simple_extent_npoints")));
  if (!out.empty())
    h5check(H5Dread(src.get(), H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT, out.data()),
            "H5Dread");
}
}  // namespace

void H5Writer::write_segment() {
  if (series_.empty()) return;
  const hsize_t rows = series_.front().pending.size() / series_.front().row_size;
  for (const Series& s : series_)
    if (s.pending.size() / s.row_size != rows)
      throw std::logic_error("H5Writer::flush: series " + s.path + " is not as long as " +
                             series_.front().path);
  if (rows == 0) return;
  const std::string name = next_segment_name();
  write_segment_file(part(name), series_, rows,
                     [this](std::size_t i) { return series_[i].pending.data(); });
  if (options_.durability == Durability::power_loss) sync_path(part(name), false);
  segments_.push_back(Segment{name, rows, 0});
  for (Series& s : series_) s.pending.clear();
  merge_tail();
}

void H5Writer::merge_tail() {
  while (segments_.size() >= kMergeFanIn) {
    const std::size_t first = segments_.size() - kMergeFanIn;
    const int level = segments_.back().level;
    bool same = true;
    for (std::size_t k = first; k < segments_.size(); ++k) same = same && segments_[k].level == level;
    if (!same) return;
    hsize_t rows = 0;
    std::vector<H5FileId> sources;
    for (std::size_t k = first; k < segments_.size(); ++k) {
      rows += segments_[k].rows;
      sources.emplace_back(h5check(
          H5Fopen(part(segments_[k].name).c_str(), H5F_ACC_RDONLY, H5P_DEFAULT), "H5Fopen"));
    }
    std::vector<std::vector<double>> joined(series_.size());
    std::vector<double> buffer;
    for (std::size_t i = 0; i < series_.size(); ++i)
      for (const H5FileId& f : sources) {
        read_segment(f.get(), series_[i].path, buffer);
        joined[i].insert(joined[i].end(), buffer.begin(), buffer.end());
      }
    sources.clear();
    const std::string name = next_segment_name();
    write_segment_file(part(name), series_, rows,
                       [&joined](std::size_t i) { return joined[i].data(); });
    if (options_.durability == Durability::power_loss) sync_path(part(name), false);
    const double now = steady_seconds();
    for (std::size_t k = first; k < segments_.size(); ++k) retired_.push_back({segments_[k].name, now});
    segments_.resize(first);
    segments_.push_back(Segment{name, rows, level + 1});
  }
}

void H5Writer::delete_retired(bool all) {
  const double now = steady_seconds();
  auto keep = retired_.begin();
  for (const Retired& r : retired_) {
    if (all || now - r.since_s >= kRetireSeconds)
      ::unlink(part(r.name).c_str());
    else
      *keep++ = r;
  }
  retired_.erase(keep, retired_.end());
}

void H5Writer::publish_index() {
  const std::string tmp = part("index.tmp");
  {
    H5FileId file = create_file(tmp);
    tree_.write_datasets(file.get());
    const hsize_t rows = published_rows();
    for (const Series& s : series_) {
      h5_make_parents(file.get(), s.path);
      const H5PropListId dcpl = untimed(H5P_DATASET_CREATE);
      const double nan = std::numeric_limits<double>::quiet_NaN();
      h5check(H5Pset_fill_value(dcpl.get(), H5T_NATIVE_DOUBLE, &nan), "H5Pset_fill_value");
      const std::vector<hsize_t> dims = shape(rows, s.row_dims);
      if (rows == 0) {
        // No rows yet: an empty, growable dataset of the right shape (a VDS needs a source).
        h5check(H5Pset_chunk(dcpl.get(), static_cast<int>(dims.size()),
                             chunk_shape(1, s.row_dims).data()),
                "H5Pset_chunk");
      } else {
        hsize_t first = 0;
        for (const Segment& seg : segments_) {
          const H5DataspaceId vspace = simple_space(dims);
          select_rows(vspace.get(), first, seg.rows, s.row_dims);
          const H5DataspaceId sspace = simple_space(shape(seg.rows, s.row_dims));
          const std::string source = parts_name_ + "/" + seg.name;
          h5check(H5Pset_virtual(dcpl.get(), vspace.get(), source.c_str(), s.path.c_str(),
                                 sspace.get()),
                  "H5Pset_virtual");
          first += seg.rows;
        }
      }
      const H5DataspaceId space = simple_space(dims, rows == 0);
      const H5DatasetId ds{h5check(H5Dcreate2(file.get(), s.path.c_str(), H5T_IEEE_F64LE,
                                              space.get(), H5P_DEFAULT, dcpl.get(), H5P_DEFAULT),
                                   "H5Dcreate2")};
    }
    tree_.write_attributes(file.get());
    file.close("H5Fclose");
  }
  replace_published(tmp);
}

// The one step that changes what readers of `path` see: a closed file renamed over it.
void H5Writer::replace_published(const std::string& tmp) const {
  if (options_.durability == Durability::power_loss) sync_path(tmp, false);
  if (std::rename(tmp.c_str(), path_.c_str()) != 0)
    throw LibraryError(errno_text("rename to", path_));
  if (options_.durability == Durability::power_loss) sync_path(folder_of(path_), true);
}

void H5Writer::flush() {
  require_open("flush");
  write_segment();
  publish_index();
  delete_retired(false);
}

void H5Writer::write_final() {
  const std::string tmp = part("final.tmp");
  try {
    write_final_to(tmp);
  } catch (...) {
    // A full disk, most often: the half-written file goes, giving back its space, and the
    // published index stays the file.
    std::remove(tmp.c_str());
    throw;
  }
  replace_published(tmp);
}

void H5Writer::mark_published(const std::string& status, const std::string& message) {
  const H5FileId file{h5check(H5Fopen(path_.c_str(), H5F_ACC_RDWR, H5P_DEFAULT), "H5Fopen")};
  for (const auto& [name, text] : {std::pair<const char*, const std::string&>{"status", status},
                                   {"failure", message}}) {
    const H5DataspaceId space{h5check(H5Screate(H5S_SCALAR), "H5Screate")};
    const H5Id<H5Tclose> type{h5check(H5Tcopy(H5T_C_S1), "H5Tcopy")};
    h5check(H5Tset_size(type.get(), std::max<std::size_t>(text.size(), 1)), "H5Tset_size");
    h5check(H5Tset_cset(type.get(), H5T_CSET_UTF8), "H5Tset_cset");
    if (H5Aexists(file.get(), name) > 0) h5check(H5Adelete(file.get(), name), "H5Adelete");
    const H5Id<H5Aclose> attr{h5check(
        H5Acreate2(file.get(), name, type.get(), space.get(), H5P_DEFAULT, H5P_DEFAULT),
        "H5Acreate2")};
    h5check(H5Awrite(attr.get(), type.get(), text.c_str()), "H5Awrite");
  }
}

void H5Writer::write_final_to(const std::string& tmp) {
  H5FileId file = create_file(tmp);
  tree_.write_datasets(file.get());
  const hsize_t flushed = published_rows();
  std::vector<H5FileId> sources;
  for (const Segment& seg : segments_)
    sources.emplace_back(
        h5check(H5Fopen(part(seg.name).c_str(), H5F_ACC_RDONLY, H5P_DEFAULT), "H5Fopen"));
  std::vector<double> buffer;
  for (const Series& s : series_) {
    const hsize_t rows = flushed + s.pending.size() / s.row_size;
    h5_make_parents(file.get(), s.path);
    const H5PropListId dcpl = untimed(H5P_DATASET_CREATE);
    const std::vector<hsize_t> chunk = chunk_shape(std::max<hsize_t>(rows, 1), s.row_dims);
    h5check(H5Pset_chunk(dcpl.get(), static_cast<int>(chunk.size()), chunk.data()),
            "H5Pset_chunk");
    if (options_.deflate_level > 0) {
      h5check(H5Pset_shuffle(dcpl.get()), "H5Pset_shuffle");
      h5check(H5Pset_deflate(dcpl.get(), static_cast<unsigned>(options_.deflate_level)),
              "H5Pset_deflate");
    }
    const H5DataspaceId space = simple_space(shape(rows, s.row_dims), true);
    const H5DatasetId ds{h5check(H5Dcreate2(file.get(), s.path.c_str(), H5T_IEEE_F64LE,
                                            space.get(), H5P_DEFAULT, dcpl.get(), H5P_DEFAULT),
                                 "H5Dcreate2")};
    hsize_t first = 0;
    const auto put = [&](const double* data, hsize_t n) {
      if (n == 0) return;
      const H5DataspaceId file_space{h5check(H5Dget_space(ds.get()), "H5Dget_space")};
      select_rows(file_space.get(), first, n, s.row_dims);
      const H5DataspaceId mem = simple_space(shape(n, s.row_dims));
      h5check(H5Dwrite(ds.get(), H5T_NATIVE_DOUBLE, mem.get(), file_space.get(), H5P_DEFAULT,
                       data),
              "H5Dwrite");
      first += n;
    };
    for (std::size_t k = 0; k < segments_.size(); ++k) {
      read_segment(sources[k].get(), s.path, buffer);
      put(buffer.data(), segments_[k].rows);
    }
    put(s.pending.data(), s.pending.size() / s.row_size);
  }
  tree_.write_attributes(file.get());
  file.close("H5Fclose");
}

void H5Writer::close() {
  if (!open_) return;
  open_ = false;  // a failure below leaves the last published index as the file
  write_final();
  remove_folder(parts_dir_);
}

}  // namespace hawser
