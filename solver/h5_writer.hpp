#pragma once
// H5Writer: writes one HDF5 result file (fixed arrays, strings, attributes, and time series that
// grow along their first axis), such that the file can be read while the run goes and survives
// the writer being killed.
//
// The guarantee
//   After flush() returns, everything written so far is in the file, and at every later moment
//   (writer running, writer inside the next flush, writer killed by SIGKILL at any instruction)
//   a plain reader -- h5py.File(path, "r"), any HDF5 >= 1.10 with the default driver -- opens the
//   file and reads all of it. Rows appended after the last flush may or may not be there.
//
// Why not the obvious designs (measured with HDF5 1.10.8, see tests/cli/test_h5_live_read.py)
//   * Plain HDF5 holds an exclusive flock on a file open for writing: live readers fail with
//     "unable to lock file". The writer therefore opens without locking (no lock is needed,
//     there is one writer).
//   * SWMR needs the 1.10 file format (superblock v3), whose "open for write" flag is set while
//     the writer runs and stays set after a crash: plain opens fail ("file is already open for
//     write ... h5clear") both live and after a kill. Readers would need SWMR mode or h5clear.
//   * Plain non-SWMR HDF5 is only consistent *between* flushes. Killed inside H5Fflush it leaves
//     an unreadable file at most crash points: the library rewrites a grown compressed chunk
//     into space it freed moments before (old B-tree still points there -> "inflate() failed"),
//     and it writes chunk B-tree nodes before the superblock's end-of-allocation, so they point
//     past the end ("addr overflow", "truncated file"). Recording every write of such a run and
//     replaying each prefix gave 107 unreadable crash points out of 177.
//
// The design: an ordered commit under the library
//   1. Freed file space is never reused (file space strategy NONE, and the driver below never
//      lets the end of allocation drop under the last committed end), so bytes that the last
//      committed state refers to are never overwritten with other data.
//   2. A small file driver (in h5_writer.cpp) writes bytes past the committed end of file
//      straight away (nothing committed points there), but holds every overwrite of existing
//      bytes -- superblock, B-tree nodes, heaps, object headers -- in memory until flush().
//   3. flush() commits in an order where each step leaves a readable file: new bytes first and
//      the file grown to the new end of allocation; then the superblock (new end); then heaps
//      (names before the nodes that use them); then B-tree nodes, parents before children (a
//      split adds the new sibling to the parent before the old node drops the moved entries);
//      then object headers last, which is where each dataset's new length becomes visible.
//      Object headers go in descending address order, so the series created first (/time, by
//      convention) is committed last: at every moment its length is <= every other series'.
//   4. With Durability::power_loss (the default) fdatasync separates those steps, so the same
//      holds if the machine stops, not just the process.
//   The file format is ordinary HDF5 (superblock v2 because of the file space setting; objects
//   in the earliest format), readable with any HDF5 >= 1.8 and the default driver.
//
// Residual risks, accepted: the kernel may stop a single write() between two pages when the
// process is killed (each overwrite is one object of at most a few kB, written in one call, so
// the window is a microsecond); a reader that reads a page at the very instant the writer
// overwrites it can see half of it. After a kill inside a flush, series may differ in length by
// that one flush block (the first-created series is never the longer one).
//
// Costs
//   * Appended rows are kept in memory until flush(), then written with one H5Dwrite per series.
//   * Series are chunked along time (about 64 KiB per chunk, at most 512 rows), shuffled and
//     deflated (level 4). A chunk left partly filled by a flush is rewritten, compressed, at a
//     new place by the next flush and its old copy is not reused (that is the price of never
//     overwriting committed data). Flushing at least one chunk of rows at a time keeps this
//     overhead small; flushing every row of a wide series can double the file.
//   * A flush writes each grown dataset's last chunk, a few metadata blocks, and with
//     power_loss durability issues a handful of fdatasync calls.
//
// Strings (attributes, write_string) are fixed-length UTF-8, stored inline, so that overwriting
// one (the `status` attribute) is a single write; h5py returns them as bytes (decode("utf-8")).
// Every dataset written by write_array or create_series carries a `units` attribute.
#include <hdf5.h>

#include <cstddef>
#include <string>
#include <type_traits>
#include <vector>

#include "solver/h5_handles.hpp"

namespace hawser {

class H5Writer {
 public:
  /// Handle of a time series made by create_series.
  struct SeriesId {
    std::size_t index;
  };

  /// What flush() must survive: the writer process being killed, or the machine stopping.
  enum class Durability { process_kill, power_loss };

  /// Create (or truncate) the file at `path`; throws LibraryError naming the failed call.
  static H5Writer create(const std::string& path, Durability durability = Durability::power_loss);

  H5Writer(H5Writer&&) noexcept;
  H5Writer& operator=(H5Writer&&) noexcept;
  H5Writer(const H5Writer&) = delete;
  H5Writer& operator=(const H5Writer&) = delete;
  /// Flushes and closes; errors are swallowed here, so call close() to see them.
  ~H5Writer();

  /// Fixed dataset of shape `dims` (row-major `data`), creating missing groups on the way
  /// ("/mesh/s0" creates "/mesh"). `units` is stored as attribute "units" ("1": dimensionless).
  void write_array(const std::string& path, const std::vector<hsize_t>& dims, const double* data,
                   const std::string& units);
  void write_array(const std::string& path, const std::vector<hsize_t>& dims,
                   const long long* data, const std::string& units);
  /// Scalar fixed-length UTF-8 string dataset (e.g. the scenario text as run).
  void write_string(const std::string& path, const std::string& text);

  /// Attribute `name` on the group or dataset at `object_path` ("/" is the root); a missing
  /// object is created as a group. An existing attribute of that name is replaced.
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
    set_integer_attribute(object_path, name, static_cast<long long>(value));
  }

  /// Extendible dataset of shape (0, row_dims...), time as first axis (unlimited), chunked
  /// along time, shuffled and deflated, with attribute `units`. Every entry of row_dims must be
  /// >= 1; empty row_dims gives a 1-D series of scalars.
  SeriesId create_series(const std::string& path, const std::vector<hsize_t>& row_dims,
                         const std::string& units);
  /// Append `nrows` rows (each prod(row_dims) doubles, row-major) to the series. The rows are
  /// held in memory and reach the file at the next flush().
  void append(SeriesId series, const double* rows, std::size_t nrows);
  /// Rows appended so far, flushed or not. Keeping all series equally long is the caller's job.
  std::size_t length(SeriesId series) const;

  /// Write everything appended so far and commit it (see the header comment): on return it is
  /// durable and readable by other processes.
  void flush();
  /// flush(), then close the file; throws LibraryError on failure. Idempotent.
  void close();

 private:
  struct Series;
  H5Writer();
  void set_integer_attribute(const std::string& object_path, const std::string& name,
                             long long value);
  void write_fixed(const std::string& path, const std::vector<hsize_t>& dims, const void* data,
                   hid_t mem_type, hid_t file_type, const std::string& units);
  void require_open(const char* what) const;

  H5FileId file_;                 // declared first: closed after every dataset below
  std::vector<Series> series_;
};

}  // namespace hawser
