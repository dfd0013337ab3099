#pragma once
// H5Writer: writes one HDF5 result file (fixed arrays, strings, attributes, and time series
// that grow along their first axis) that other processes can read while it is written, that
// survives the writer being killed, and that a later process can continue (resume). It uses
// the HDF5 library's public API only, and nothing of the file format's internals.
//
// The guarantee
//   At every moment the file at `path` is a complete, closed HDF5 file: a plain reader
//   (h5py.File(path, "r"), h5dump, any HDF5 >= 1.10 with its default driver; no SWMR mode, no
//   h5clear) opens it and reads everything up to the last flush(). After flush() returns, the
//   rows appended so far are in it; rows appended since may or may not be. This holds while
//   the writer runs, after SIGKILL at any instant, and (with Durability::power_loss) after the
//   machine stops.
//
// The design: segments, a published index file, one file at the end
//   * Rows appended between two flushes are kept in memory. flush() writes them to a new
//     segment file `<path>.parts/seg-NNNNNN.h5` (one contiguous dataset per series, at the
//     series' path) and closes it: once closed, a segment is never written again.
//   * flush() then publishes the index: a new file written beside the old one
//     (`<path>.parts/index.tmp`), holding the fixed objects and, for each series, an HDF5
//     virtual dataset (VDS, HDF5 >= 1.10) that maps the segments' rows into one dataset of the
//     contract's name and shape; rename(2) puts it at `path` in one atomic step. A reader
//     sees the old index or the new one, never a mixture; one that keeps the old index open
//     keeps reading it (the segments it names stay until close()).
//   * close() writes the final file: every series as one ordinary chunked dataset (compressed
//     if asked), the fixed objects, the attributes; renames it over the index and deletes the
//     segments. The finished file needs no other file.
//   Source file names in the index are relative ("run.h5.parts/seg-000001.h5"): HDF5 resolves
//   them against the directory of the index file, so a killed run's file and its .parts folder
//   can be moved together.
//
// Why this design (its tests pass with HDF5 1.10.8 and h5py 3.7, HDF5 1.14.5 and h5py 3.13)
//   * Stock HDF5 writing in place is consistent only between flushes: a reader during a write,
//     or a file killed in one, may find metadata pointing at bytes not yet written. Plain
//     HDF5 also holds a lock on a file open for writing, so live readers fail.
//   * SWMR (single writer, multiple readers; HDF5 1.10 user guide, recalled from memory) sets a
//     flag in the superblock while the writer runs and after a kill: every reader must open in
//     SWMR mode, a plain h5py.File(path) fails until `h5clear -s`, and continuing the file
//     after a kill needs that flag cleared, which the public API cannot do; attributes (the
//     run's status) cannot be created while in SWMR mode.
//   * Closed files and rename(2) need nothing of the library but its public API and give
//     plain readers a consistent file at every instant, also across HDF5 versions.
//   The previous design, a custom virtual-file driver ordering commits under HDF5 1.10,
//   depended on one release's driver struct and failed at run time on HDF5 1.14.
//
// Segments stay few: each flush adds one, and whenever the last kMergeFanIn (8) segments are
// of one level they are merged into one of the next level (tiered, as log-structured stores
// do). So a run of F flushes has at most 7 log8(F) + 1 segments (about 30 for a week of
// flushes every 10 s), a reader opens that many files at most, and each row is copied
// log8(F) times at most. Merged segments leave the index at once but stay on disk for
// kRetireSeconds (60 s), so that a reader holding an older index open can finish reading it.
//
// Costs: a flush writes the new rows once, uncompressed, plus an index of a few kB per series
// and segment; close() copies every row once more into the final file. Flushes are the
// caller's policy (the run driver flushes by wall-time interval). Measured figures: README,
// "Results".
//
// Residual risk, accepted: a reader holding an index that close() then replaces reads NaN (the
// fill value of a virtual dataset whose source file is gone) for rows it had not read before
// the segments were removed: it sees status "running" and NaN rows, and on reopening finds the
// finished file. Readers of a live run should reopen when they find NaN rows. The same holds
// for an index held open for more than 60 s across merges.
//
// Strings (attributes, write_string) are fixed-length UTF-8; h5py returns them as bytes.
// Every dataset made by write_array or create_series carries a `units` attribute.
#include <hdf5.h>

#include <cstddef>
#include <string>
#include <type_traits>
#include <vector>

#include "solver/output/h5_tree.hpp"

namespace hawser {

class H5Writer {
 public:
  /// Handle of a time series made by create_series.
  struct SeriesId {
    std::size_t index;
  };

  /// What a flush must survive: the writer process being killed (the kernel keeps what was
  /// written), or the machine stopping (fsync of each file and folder before the rename).
  enum class Durability { process_kill, power_loss };

  struct Options {
    Durability durability = Durability::process_kill;
    /// Compression of the series in the final file: 0 none, 1..9 shuffle + deflate level.
    int deflate_level = 0;
  };

  /// Start the file at `path` (an existing file there is replaced at the first flush; a
  /// left-over `<path>.parts` folder is cleared). The file exists when create returns.
  static H5Writer create(const std::string& path, Options options);
  static H5Writer create(const std::string& path) { return create(path, Options{}); }

  /// Continue a file left by a killed writer: its series' rows so far stay, new rows are
  /// appended. The caller then rewrites the fixed objects and creates the same series (by
  /// path) as the first writer did; `reference_series` names one of them ("/time").
  /// Throws InputError when `path` is not such a file.
  static H5Writer resume(const std::string& path, Options options,
                         const std::string& reference_series);

  H5Writer(H5Writer&&) noexcept;
  H5Writer& operator=(H5Writer&&) noexcept;
  H5Writer(const H5Writer&) = delete;
  H5Writer& operator=(const H5Writer&) = delete;
  /// Without close(): the file stays as the last flush left it, as after a kill (resumable,
  /// never looking finished); rows appended since are dropped.
  ~H5Writer();

  /// Fixed dataset of shape `dims` (row-major `data`); replaces one of the same path.
  /// `units` is stored as attribute "units" ("1": dimensionless).
  void write_array(const std::string& path, const std::vector<hsize_t>& dims, const double* data,
                   const std::string& units);
  void write_array(const std::string& path, const std::vector<hsize_t>& dims,
                   const long long* data, const std::string& units);
  /// Scalar fixed-length UTF-8 string dataset (e.g. the scenario text as run).
  void write_string(const std::string& path, const std::string& text);
  /// Removes a fixed dataset or group and everything below it (not series).
  void erase(const std::string& path);

  /// Attribute `name` on the group or dataset at `object_path` ("/" is the root); a missing
  /// object is made a group. An existing attribute of that name is replaced.
  void set_attribute(const std::string& object_path, const std::string& name, double value);
  void set_attribute(const std::string& object_path, const std::string& name,
                     const std::string& value);
  void set_attribute(const std::string& object_path, const std::string& name,
                     const char* value) {
    set_attribute(object_path, name, std::string(value));
  }
  template <class Int, std::enable_if_t<std::is_integral<Int>::value, int> = 0>
  void set_attribute(const std::string& object_path, const std::string& name, Int value) {
    static_assert(!std::is_same<Int, bool>::value, "store flags as integers 0/1 explicitly");
    tree_.put_attribute(object_path, name, static_cast<long long>(value));
  }

  /// Series of shape (rows, row_dims...), time as first axis, with attribute `units`. Every
  /// entry of row_dims must be >= 1; empty row_dims gives a 1-D series of scalars. After
  /// resume(), the series must exist in the file with the same row shape.
  SeriesId create_series(const std::string& path, const std::vector<hsize_t>& row_dims,
                         const std::string& units);
  /// Append `nrows` rows (each prod(row_dims) doubles, row-major). They are held in memory
  /// and reach the file at the next flush().
  void append(SeriesId series, const double* rows, std::size_t nrows);
  /// Rows appended so far (resumed, flushed or not).
  std::size_t length(SeriesId series) const;
  /// Bytes of rows held in memory, waiting for the next flush.
  std::size_t pending_bytes() const;

  /// Write the rows appended so far to a new segment and publish the index: on return they
  /// are in the file at `path` for any reader. Every series must be equally long.
  void flush();
  /// Write the final, self-contained file and remove the segments; throws LibraryError on
  /// failure (the last published index stays readable). Idempotent.
  void close();
  /// After a failed close: sets the root attributes `status` and `failure` of the published
  /// index in place, so the file says why it is not complete. Throws LibraryError when even
  /// that cannot be written.
  void mark_published(const std::string& status, const std::string& message);

 private:
  struct Series {
    std::string path;
    std::vector<hsize_t> row_dims;
    std::size_t row_size = 1;      // doubles per row
    std::vector<double> pending;   // rows appended since the last flush, row-major
  };
  struct Segment {
    std::string name;   // file name inside the parts folder
    hsize_t rows = 0;   // rows of every series it holds
    int level = 0;      // 0: written by a flush; k + 1: merged from kMergeFanIn of level k
  };
  struct Retired {
    std::string name;
    double since_s;     // steady-clock time it left the index [s]
  };
  H5Writer() = default;
  void require_open(const char* what) const;
  hsize_t published_rows() const;
  std::string part(const std::string& name) const;
  void write_segment();
  void merge_tail();
  void delete_retired(bool all);
  std::string next_segment_name();
  void publish_index();
  void write_final();
  void write_final_to(const std::string& tmp);
  void replace_published(const std::string& tmp) const;

  std::string path_;
  std::string parts_dir_;     // "<path>.parts"
  std::string parts_name_;    // its name relative to the folder of `path`
  Options options_;
  bool open_ = false;
  H5Tree tree_;
  std::vector<Series> series_;
  std::vector<Segment> segments_;
  std::vector<Retired> retired_;  // merged away, deleted once no reader can still need them
  unsigned next_segment_ = 1;
  std::string resumed_from_;  // after resume(): the index create_series checks against
};

}  // namespace hawser
