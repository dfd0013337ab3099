#pragma once
// H5Writer: writes one HDF5 result file (fixed arrays, strings, attributes, and time series that
// grow along their first axis) that other processes can read while it is written and that
// survives the writer being killed.
//
// The guarantee
//   After flush() returns, everything written so far is in the file, and at every later moment
//   (writer running, writer inside the next flush, writer killed by SIGKILL anywhere) a plain
//   reader -- h5py.File(path, "r"), or any HDF5 >= 1.8 with its default driver, no SWMR, no
//   h5clear -- opens the file and reads all of it. Rows appended after the last flush may or
//   may not be there yet.
//
// Why not the obvious designs (measured with HDF5 1.10.8 and h5py 3.7)
//   * Plain HDF5 holds an flock on a file open for writing: live readers fail ("unable to lock
//     file"). We take no lock; there is one writer.
//   * SWMR needs superblock v3, whose "open for write" flag blocks plain opens while the writer
//     runs and after a kill ("file is already open for write ... h5clear").
//   * Plain non-SWMR HDF5 is consistent only between flushes. Recording every write(2) of such a
//     run and rebuilding the file before each one, 107 of 177 crash points were unreadable:
//     the library rewrites a grown compressed chunk into space it freed a moment before
//     ("inflate() failed"), and writes B-tree nodes before the superblock's end of allocation
//     ("addr overflow", "truncated file"). Live readers fail the same way.
//
// The design: an ordered commit under the library (the driver in h5_commit_driver.cpp)
//   1. No reuse: freed space is dropped (file space strategy NONE) and the end of allocation
//      never drops below the last commit, so bytes a committed state (or a reader's cached copy
//      of it) refers to are never overwritten with other data.
//   2. Bytes past the committed end go to disk at once (nothing committed points there); every
//      overwrite of committed bytes is held in memory until flush().
//   3. flush() commits so that each step leaves a readable file: the new bytes are made durable;
//      then the superblock; then local heaps (names before the nodes using them); B-tree nodes,
//      parents before children (a split adds the new sibling to the parent before the old node
//      drops the moved entries); raw-data overwrites; object headers last, which is where a
//      dataset's new length appears. Object headers go in descending address order, so the
//      series created first (/time, by convention) is committed last: after any crash its
//      length is <= every other series' length, and it is the safe number of rows to read.
//   4. Metadata that may be overwritten is placed within one 4 KiB page (the driver's allocator):
//      a killed process's write(2) stops only between pages, so no overwrite is torn.
//   5. The superblock on disk claims an end of allocation well past the real one (twice it, at
//      least 16 MiB more; the file is grown sparsely to match, and cut to the true end at
//      close). A reader keeps the end it read at open; without the reserve, a reader that keeps
//      the file open across a commit finds newer metadata pointing past it (measured: every
//      such read failed). With it, only a reader open across a doubling of the file can.
//   6. A B-tree split moves the last entries of a full node to a new sibling: the parent gains
//      the sibling, the old node loses the entries. A live reader that read the parent before
//      the commit and the node after it would lose committed rows (measured: 10 of 272 reads of
//      the newest rows did). So a node image with fewer entries at the same level is kept in
//      memory (a few kB per split) and written only at close: the old, longer node stays valid
//      beside either parent. A killed file therefore lists those chunks twice in its chunk
//      index (h5py's get_num_chunks counts them); reads are right, and a copy (h5py's copy,
//      h5repack) is clean.
//   7. Durability::process_kill (the default) is all a killed process needs: the kernel keeps
//      its writes, in order. Durability::power_loss adds fdatasync between those steps (4 to 6
//      a flush), so the same holds if the machine stops.
//   The driver is written against the HDF5 1.10 virtual file layer (H5FD_class_t changed in
//   1.12 and later). Checked by tests/cli/test_h5_live_read.py: live reads (also of a file
//   held open across commits, and back-to-back reads of the newest rows), random SIGKILLs, and
//   every crash point of a recorded run rebuilt and opened with h5py.
//
// Chunks
//   Series are chunked along time, shuffled and deflated (level 4). A chunk that a flush leaves
//   incomplete is written unfiltered at full size, so that later flushes rewrite it in place
//   (same size; the bytes of rows already there unchanged, so even a torn write is harmless);
//   once complete it is written compressed, once, elsewhere -- its unfiltered copy stays behind
//   (point 1). Hence small chunks: rows of 4 KiB or more get one chunk per time step (never
//   incomplete), narrower rows chunks of about 4 KiB. The file then exceeds the compressed data
//   by at most the raw size of the narrow series plus metadata. Measured (1000 or 100 nodes,
//   positions, velocities, tensions, 7 scalar series, 2000 outputs): 0-19% over a compact copy
//   with flushes every 1 or 10 outputs, where chunks of several rows sized 64 KiB (the usual
//   advice) gave 6-1778% (rewritten compressed) or 11-128% (unfiltered). Reading a whole series
//   took as long at 1000 nodes and twice as long at 100 nodes (43 against 20 ms for 2000 rows);
//   a snapshot is one chunk.
//
// What a live reader sees: each dataset as of its first access; rows past a dataset's length
// as seen by another dataset may read as NaN (the fill value) until the reader reopens.
//
// Residual risks, accepted: a reader that reads a page at the very instant the writer rewrites
// it may see half of it (reopen and read again); a file that grows past its reserve while a
// reader keeps it open fails for that reader (reopen); after a crash the file keeps its sparse
// reserve (the apparent size is larger than the data on disk).
//
// Costs (1000 nodes, load as above, flush every 4 outputs, on a busy 2-core VM): 9-10 ms per
// flush with process_kill, against 14.5 ms for stock HDF5 writing the same chunks unsafely (it
// compresses incomplete chunks too); power_loss took 26-41 ms, the fdatasync calls dominating.
//
// Strings (attributes, write_string) are fixed-length UTF-8, stored inline, so that replacing
// one (the `status` attribute) is one overwrite; h5py returns them as bytes (decode("utf-8")).
// Every dataset made by write_array or create_series carries a `units` attribute.
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

  /// What flush() must survive: the writer process being killed, or the machine stopping
  /// (fdatasync between commit steps: much slower flushes).
  enum class Durability { process_kill, power_loss };

  /// Create (or truncate) the file at `path`; throws LibraryError naming the failed call.
  static H5Writer create(const std::string& path,
                         Durability durability = Durability::process_kill);

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
  static void write_rows(Series& s);
  void set_integer_attribute(const std::string& object_path, const std::string& name,
                             long long value);
  void write_fixed(const std::string& path, const std::vector<hsize_t>& dims, const void* data,
                   hid_t mem_type, hid_t file_type, const std::string& units);
  void require_open(const char* what) const;

  H5FileId file_;                 // declared first: closed after every dataset below
  std::vector<Series> series_;
};

}  // namespace hawser
