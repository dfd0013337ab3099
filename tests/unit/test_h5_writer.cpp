// H5Writer: what is written is what an independent reader (the HDF5 C API with its default
// driver) reads back, with units, chunking and compression as documented in h5_writer.hpp.
// Crash and live-reader behaviour is checked in tests/cli/test_h5_live_read.py.
#include "catch_compat.hpp"

#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include "solver/h5_handles.hpp"
#include "solver/h5_writer.hpp"

using hawser::H5Writer;
using hawser::h5check;

namespace {

// A fresh path in a per-process scratch directory, removed with it.
class ScratchDir {
 public:
  ScratchDir()
      : dir_(std::filesystem::temp_directory_path() /
             ("hawser_h5_test_" + std::to_string(::getpid()))) {
    std::filesystem::create_directories(dir_);
  }
  ~ScratchDir() {
    std::error_code ignored;
    std::filesystem::remove_all(dir_, ignored);
  }
  std::string file(const std::string& name) const { return (dir_ / name).string(); }

 private:
  std::filesystem::path dir_;
};

// Read side: plain HDF5, default (sec2) driver, read-only, as any other program would.
hawser::H5FileId open_read(const std::string& path) {
  return hawser::H5FileId{h5check(H5Fopen(path.c_str(), H5F_ACC_RDONLY, H5P_DEFAULT), "H5Fopen")};
}

hawser::H5DatasetId open_dataset(hid_t file, const std::string& path) {
  return hawser::H5DatasetId{h5check(H5Dopen2(file, path.c_str(), H5P_DEFAULT), "H5Dopen2")};
}

std::vector<hsize_t> shape(hid_t dataset, std::vector<hsize_t>* max_dims = nullptr) {
  const hawser::H5DataspaceId space{h5check(H5Dget_space(dataset), "H5Dget_space")};
  const int rank = h5check(H5Sget_simple_extent_ndims(space.get()), "H5Sget_simple_extent_ndims");
  std::vector<hsize_t> dims(static_cast<std::size_t>(rank)), max(dims.size());
  h5check(H5Sget_simple_extent_dims(space.get(), dims.data(), max.data()),
          "H5Sget_simple_extent_dims");
  if (max_dims != nullptr) *max_dims = max;
  return dims;
}

std::vector<double> read_doubles(hid_t file, const std::string& path) {
  const auto dataset = open_dataset(file, path);
  std::size_t n = 1;
  for (const hsize_t d : shape(dataset.get())) n *= d;
  std::vector<double> values(n);
  if (n > 0) {
    h5check(H5Dread(dataset.get(), H5T_NATIVE_DOUBLE, H5S_ALL, H5S_ALL, H5P_DEFAULT,
                    values.data()),
            "H5Dread");
  }
  return values;
}

// Scalar string stored as a fixed-length or variable-length string.
std::string read_string_attribute(hid_t file, const std::string& object, const std::string& name) {
  const hawser::H5AttributeId attr{h5check(
      H5Aopen_by_name(file, object.c_str(), name.c_str(), H5P_DEFAULT, H5P_DEFAULT),
      "H5Aopen_by_name")};
  const hawser::H5DatatypeId type{h5check(H5Aget_type(attr.get()), "H5Aget_type")};
  REQUIRE(H5Tget_class(type.get()) == H5T_STRING);
  REQUIRE(H5Tis_variable_str(type.get()) == 0);
  std::string value(H5Tget_size(type.get()), '\0');
  h5check(H5Aread(attr.get(), type.get(), value.data()), "H5Aread");
  return value.substr(0, value.find('\0'));
}

template <class T>
T read_number_attribute(hid_t file, const std::string& object, const std::string& name,
                        hid_t mem_type) {
  const hawser::H5AttributeId attr{h5check(
      H5Aopen_by_name(file, object.c_str(), name.c_str(), H5P_DEFAULT, H5P_DEFAULT),
      "H5Aopen_by_name")};
  T value{};
  h5check(H5Aread(attr.get(), mem_type, &value), "H5Aread");
  return value;
}

int attribute_count(hid_t file, const std::string& object) {
  H5O_info_t info;
  h5check(H5Oget_info_by_name(file, object.c_str(), &info, H5P_DEFAULT), "H5Oget_info_by_name");
  return static_cast<int>(info.num_attrs);
}

}  // namespace

TEST_CASE("H5Writer round-trips fixed arrays with their units", "[h5]") {
  ScratchDir scratch;
  const std::string path = scratch.file("arrays.h5");
  // Check values: the inputs themselves (an exact round trip of IEEE doubles and int64).
  const std::vector<double> s0{0.0, 1.5e3, 2.5e6, 3.5786e7};
  const std::vector<double> position{1, 2, 3, 4, 5, 6};
  const std::vector<long long> ids{-7, 0, 9007199254740993LL};
  const double mass = 6.5e3;
  {
    auto writer = H5Writer::create(path);
    writer.write_array("/mesh/s0", {4}, s0.data(), "m");
    writer.write_array("/equilibrium/position", {2, 3}, position.data(), "m");
    writer.write_array("/mesh/ids", {3}, ids.data(), "1");
    writer.write_array("/counterweight_mass", {}, &mass, "kg");
    writer.close();
  }
  const auto file = open_read(path);
  CHECK(read_doubles(file.get(), "/mesh/s0") == s0);
  CHECK(read_doubles(file.get(), "/equilibrium/position") == position);
  CHECK(read_doubles(file.get(), "/counterweight_mass") == std::vector<double>{mass});
  CHECK(shape(open_dataset(file.get(), "/equilibrium/position").get()) ==
        std::vector<hsize_t>{2, 3});

  const auto id_set = open_dataset(file.get(), "/mesh/ids");
  const hawser::H5DatatypeId id_type{h5check(H5Dget_type(id_set.get()), "H5Dget_type")};
  CHECK(H5Tget_class(id_type.get()) == H5T_INTEGER);
  CHECK(H5Tget_size(id_type.get()) == 8);
  std::vector<long long> ids_back(3);
  h5check(H5Dread(id_set.get(), H5T_NATIVE_LLONG, H5S_ALL, H5S_ALL, H5P_DEFAULT, ids_back.data()),
          "H5Dread");
  CHECK(ids_back == ids);

  CHECK(read_string_attribute(file.get(), "/mesh/s0", "units") == "m");
  CHECK(read_string_attribute(file.get(), "/equilibrium/position", "units") == "m");
  CHECK(read_string_attribute(file.get(), "/mesh/ids", "units") == "1");
  CHECK(read_string_attribute(file.get(), "/counterweight_mass", "units") == "kg");
}

TEST_CASE("H5Writer attributes on root, groups and datasets can be replaced", "[h5]") {
  ScratchDir scratch;
  const std::string path = scratch.file("attributes.h5");
  const std::vector<double> t{0.0};
  {
    auto writer = H5Writer::create(path);
    writer.write_array("/time0", {1}, t.data(), "s");
    writer.set_attribute("/", "format", "hawser-timehistory");
    writer.set_attribute("/", "format_version", 1);
    writer.set_attribute("/", "status", "running");
    writer.set_attribute("/summary", "peak_tension", 2.25e9);  // creates /summary
    writer.set_attribute("/time0", "step", 12345678901LL);
    writer.flush();
    // Replace with a longer string, a number with a number of another type, a string with ""
    writer.set_attribute("/", "status", "complete");
    writer.set_attribute("/summary", "peak_tension", 3);
    writer.set_attribute("/time0", "note", "");
    writer.close();
  }
  const auto file = open_read(path);
  // Check values: the last value set above for each name (the replacement semantics).
  CHECK(read_string_attribute(file.get(), "/", "format") == "hawser-timehistory");
  CHECK(read_number_attribute<long long>(file.get(), "/", "format_version", H5T_NATIVE_LLONG) == 1);
  CHECK(read_string_attribute(file.get(), "/", "status") == "complete");
  CHECK(read_number_attribute<long long>(file.get(), "/summary", "peak_tension",
                                         H5T_NATIVE_LLONG) == 3);
  CHECK(read_number_attribute<long long>(file.get(), "/time0", "step", H5T_NATIVE_LLONG) ==
        12345678901LL);
  CHECK(read_string_attribute(file.get(), "/time0", "note").empty());
  CHECK(attribute_count(file.get(), "/") == 3);       // format, format_version, status
  CHECK(attribute_count(file.get(), "/summary") == 1);
  CHECK(attribute_count(file.get(), "/time0") == 3);  // units, step, note
}

TEST_CASE("H5Writer stores a 100 kB scenario text byte for byte", "[h5]") {
  ScratchDir scratch;
  const std::string path = scratch.file("string.h5");
  // Check value: the text itself, built with newlines, quotes and multi-byte UTF-8 ("µ").
  std::string text;
  for (int i = 0; text.size() < 100 * 1024; ++i) {
    text += "key_" + std::to_string(i) + ": \"" + std::to_string(i * 7 % 1000) + " µm\"\n";
  }
  {
    auto writer = H5Writer::create(path);
    writer.write_string("/input/scenario", text);
    writer.write_string("/input/empty", "");
    writer.close();
  }
  const auto file = open_read(path);
  for (const auto& [name, expected] :
       std::vector<std::pair<std::string, std::string>>{{"/input/scenario", text},
                                                        {"/input/empty", ""}}) {
    const auto dataset = open_dataset(file.get(), name);
    const hawser::H5DatatypeId type{h5check(H5Dget_type(dataset.get()), "H5Dget_type")};
    REQUIRE(H5Tget_class(type.get()) == H5T_STRING);
    CHECK(H5Tget_cset(type.get()) == H5T_CSET_UTF8);
    std::string back(H5Tget_size(type.get()), '\0');
    h5check(H5Dread(dataset.get(), type.get(), H5S_ALL, H5S_ALL, H5P_DEFAULT, back.data()),
            "H5Dread");
    CHECK(back.substr(0, back.find('\0')) == expected);
  }
}

TEST_CASE("H5Writer series grow along time and are readable by another open after flush",
          "[h5]") {
  ScratchDir scratch;
  const std::string path = scratch.file("series.h5");
  // Rows of series k at row r hold r + 0.001 * element index (check values: this formula).
  const auto row_of = [](std::size_t r, std::size_t width) {
    std::vector<double> row(width);
    for (std::size_t j = 0; j < width; ++j) row[j] = static_cast<double>(r) + 0.001 * j;
    return row;
  };
  auto writer = H5Writer::create(path);
  const auto time = writer.create_series("/time", {}, "s");
  const auto pos = writer.create_series("/nodes/position", {5, 3}, "m");
  std::size_t rows = 0;
  const auto add = [&](std::size_t n) {
    for (std::size_t i = 0; i < n; ++i, ++rows) {
      const double t = static_cast<double>(rows);
      writer.append(time, &t, 1);
      writer.append(pos, row_of(rows, 15).data(), 1);
    }
  };
  add(1);
  writer.flush();
  add(3);
  CHECK(writer.length(time) == 4);  // appended, not yet flushed, still counted
  CHECK(writer.length(pos) == 4);
  writer.flush();
  add(7);
  writer.flush();
  add(2);  // never flushed before the second open below

  {  // A second, independent open with the default driver while the writer is still open.
    const auto file = open_read(path);
    std::vector<hsize_t> max_dims;
    CHECK(shape(open_dataset(file.get(), "/nodes/position").get(), &max_dims) ==
          std::vector<hsize_t>{11, 5, 3});
    CHECK(max_dims == std::vector<hsize_t>{H5S_UNLIMITED, 5, 3});
    const auto t = read_doubles(file.get(), "/time");
    REQUIRE(t.size() == 11);
    for (std::size_t r = 0; r < t.size(); ++r) CHECK(t[r] == static_cast<double>(r));
    CHECK(read_string_attribute(file.get(), "/time", "units") == "s");
    CHECK(read_string_attribute(file.get(), "/nodes/position", "units") == "m");
  }
  writer.close();
  CHECK(writer.length(pos) == 13);

  const auto file = open_read(path);
  const auto p = read_doubles(file.get(), "/nodes/position");
  REQUIRE(p.size() == 13 * 15);
  for (std::size_t r = 0; r < 13; ++r) {
    const auto expected = row_of(r, 15);
    CHECK(std::vector<double>(p.begin() + r * 15, p.begin() + (r + 1) * 15) == expected);
  }
}

TEST_CASE("H5Writer series are chunked along time, shuffled and deflated", "[h5]") {
  ScratchDir scratch;
  const std::string path = scratch.file("chunks.h5");
  {
    auto writer = H5Writer::create(path);
    writer.create_series("/time", {}, "s");
    writer.create_series("/elements/tension", {100}, "N");
    const auto position = writer.create_series("/nodes/position", {201, 3}, "m");
    writer.create_series("/nodes/huge", {50000, 3}, "m");
    // 40 identical rows compress well; storage far below the raw size proves deflate ran.
    const std::vector<double> rows(40 * 201 * 3, 1.25);
    writer.append(position, rows.data(), 40);
    writer.close();
  }
  const auto file = open_read(path);
  // Expected chunk shapes: the rule of series_chunk in h5_writer.cpp (this project's design):
  // rows under 4 KiB grouped up to 4096 bytes (8 B -> 512 rows, 800 B -> 5 rows), wider rows
  // one per chunk (4824 B), rows over 1 MiB halved along their widest axis (50000 -> 25000).
  struct Expect {
    const char* path;
    std::vector<hsize_t> chunk;
  };
  for (const Expect& e : {Expect{"/time", {512}}, Expect{"/elements/tension", {5, 100}},
                          Expect{"/nodes/position", {1, 201, 3}},
                          Expect{"/nodes/huge", {1, 25000, 3}}}) {
    INFO(e.path);
    const auto dataset = open_dataset(file.get(), e.path);
    const hawser::H5PropListId dcpl{
        h5check(H5Dget_create_plist(dataset.get()), "H5Dget_create_plist")};
    CHECK(H5Pget_layout(dcpl.get()) == H5D_CHUNKED);
    std::vector<hsize_t> chunk(e.chunk.size());
    CHECK(H5Pget_chunk(dcpl.get(), static_cast<int>(chunk.size()), chunk.data()) ==
          static_cast<int>(chunk.size()));
    CHECK(chunk == e.chunk);

    // Shuffle first, then deflate at level 4 (h5py's default gzip level: common practice).
    REQUIRE(H5Pget_nfilters(dcpl.get()) == 2);
    unsigned flags = 0, level = 0;
    std::size_t n_values = 1;
    char name[64];
    CHECK(H5Pget_filter2(dcpl.get(), 0, &flags, &n_values, &level, sizeof name, name, nullptr) ==
          H5Z_FILTER_SHUFFLE);
    n_values = 1;
    CHECK(H5Pget_filter2(dcpl.get(), 1, &flags, &n_values, &level, sizeof name, name, nullptr) ==
          H5Z_FILTER_DEFLATE);
    CHECK(level == 4);
  }
  const auto position = open_dataset(file.get(), "/nodes/position");
  const hsize_t raw_bytes = 40 * 201 * 3 * sizeof(double);
  CHECK(H5Dget_storage_size(position.get()) < raw_bytes / 10);
  CHECK(read_doubles(file.get(), "/nodes/position") == std::vector<double>(40 * 201 * 3, 1.25));
}

TEST_CASE("H5Writer keeps the chunk a flush leaves incomplete unfiltered until it is complete",
          "[h5]") {
  ScratchDir scratch;
  const std::string path = scratch.file("tail.h5");
  auto writer = H5Writer::create(path);
  const auto tension = writer.create_series("/elements/tension", {100}, "N");  // 5 rows a chunk
  const std::vector<double> row(100, 7.5);
  struct Chunk {
    unsigned mask;
    haddr_t addr;
    hsize_t size;
  };
  // Read through a second, independent open (default driver) after each flush.
  const auto chunk_at = [&path](hsize_t first_row) {
    const auto file = open_read(path);
    const auto dataset = open_dataset(file.get(), "/elements/tension");
    const hsize_t offset[2] = {first_row, 0};
    Chunk c{};
    h5check(H5Dget_chunk_info_by_coord(dataset.get(), offset, &c.mask, &c.addr, &c.size),
            "H5Dget_chunk_info_by_coord");
    return c;
  };
  // Check values: the filter mask bit i marks filter i as skipped (HDF5 reference manual,
  // H5Dwrite_chunk); the pipeline is shuffle (bit 0), deflate (bit 1). An unfiltered chunk
  // holds all 5 rows of 100 doubles: 4000 bytes.
  const unsigned unfiltered = 0x3;
  for (int i = 0; i < 3; ++i) writer.append(tension, row.data(), 1);
  writer.flush();
  const Chunk first = chunk_at(0);
  CHECK(first.mask == unfiltered);
  CHECK(first.size == 5 * 100 * sizeof(double));

  writer.append(tension, row.data(), 1);  // still incomplete: rewritten in place
  writer.flush();
  const Chunk second = chunk_at(0);
  CHECK(second.mask == unfiltered);
  CHECK(second.addr == first.addr);
  CHECK(second.size == first.size);

  for (int i = 0; i < 2; ++i) writer.append(tension, row.data(), 1);  // completes chunk 0
  writer.flush();
  const Chunk done = chunk_at(0);
  CHECK(done.mask == 0);                 // shuffled and deflated
  CHECK(done.size < first.size / 10);    // 500 equal doubles deflate far below 4000 bytes
  CHECK(chunk_at(5).mask == unfiltered);  // row 5 starts the next incomplete chunk
  writer.close();
  const auto file = open_read(path);
  CHECK(read_doubles(file.get(), "/elements/tension") == std::vector<double>(6 * 100, 7.5));
}

TEST_CASE("H5Writer file stays near the size of its data when flushed after every row", "[h5]") {
  ScratchDir scratch;
  const std::string path = scratch.file("size.h5");
  const std::size_t nodes = 101, rows = 600;
  {
    auto writer = H5Writer::create(path, H5Writer::Durability::process_kill);
    const auto time = writer.create_series("/time", {}, "s");
    const auto position = writer.create_series("/nodes/position", {nodes, 3}, "m");
    const auto tension = writer.create_series("/elements/tension", {nodes - 1}, "N");
    std::vector<double> p(nodes * 3), t(nodes - 1);
    for (std::size_t k = 0; k < rows; ++k) {
      const double tk = 10.0 * k;
      for (std::size_t i = 0; i < p.size(); ++i) p[i] = 1e5 * i + std::sin(1e-3 * tk + i);
      for (std::size_t e = 0; e < t.size(); ++e) t[e] = 1e9 + 1e6 * std::sin(1e-3 * tk + e);
      writer.append(time, &tk, 1);
      writer.append(position, p.data(), 1);
      writer.append(tension, t.data(), 1);
      writer.flush();
    }
    writer.close();
  }
  hsize_t stored = 0;
  {
    const auto file = open_read(path);
    for (const char* name : {"/time", "/nodes/position", "/elements/tension"}) {
      stored += H5Dget_storage_size(open_dataset(file.get(), name).get());
    }
  }
  // Design bound (h5_writer.hpp): besides the chunks, the file keeps at most one unfiltered
  // copy of each chunk that a flush left incomplete -- here every chunk of the series with
  // several rows per chunk, /time and /elements/tension, i.e. their raw size -- plus metadata,
  // allowed 128 KiB (one to two 4 KiB pages per chunk B-tree node of up to 64 entries: the 600
  // chunks of /nodes/position and 120 of /elements/tension take about 14 nodes). Rewriting the
  // incomplete chunk compressed at every flush instead gives 2.38 MB here against 2.13 MB.
  const std::uintmax_t narrow_raw = rows * (1 + (nodes - 1)) * sizeof(double);
  const std::uintmax_t size = std::filesystem::file_size(path);
  INFO("file " << size << " B, chunks " << stored << " B, narrow raw " << narrow_raw << " B");
  CHECK(size <= stored + narrow_raw + 128 * 1024);
}

TEST_CASE("H5Writer reports failures as LibraryError naming the HDF5 call", "[h5]") {
  ScratchDir scratch;
  const std::string missing_dir = scratch.file("no-such-dir") + "/result.h5";
  try {
    H5Writer::create(missing_dir);
    FAIL("create in a missing directory did not throw");
  } catch (const hawser::LibraryError& e) {
    const std::string what = e.what();
    INFO(what);
    CHECK(what.find("H5Fcreate") != std::string::npos);
    CHECK(what.find("No such file or directory") != std::string::npos);  // strerror(ENOENT)
  }

  auto writer = H5Writer::create(scratch.file("twice.h5"));
  const double x = 1.0;
  writer.write_array("/x", {1}, &x, "1");
  try {
    writer.write_array("/x", {1}, &x, "1");
    FAIL("second dataset at the same path did not throw");
  } catch (const hawser::LibraryError& e) {
    INFO(e.what());
    CHECK(std::string(e.what()).find("H5Dcreate2") != std::string::npos);
  }
  // The writer stays usable after a failed call.
  writer.write_array("/y", {1}, &x, "1");
  writer.close();
  CHECK_THROWS_AS(writer.flush(), std::logic_error);
  CHECK_THROWS_AS(H5Writer::create(scratch.file("zero.h5")).create_series("/z", {0}, "1"),
                  std::invalid_argument);
}
