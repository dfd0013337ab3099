// H5Writer: what is written is what an independent reader (the HDF5 C API with its default
// driver) reads back, with units, chunking, compression, segments and resumption as documented
// in h5_writer.hpp. Crash and live-reader behaviour is checked in tests/cli/test_h5_live_read.py.
#include "catch_compat.hpp"

#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <string>
#include <vector>

#include "solver/output/h5_handles.hpp"
#include "solver/output/h5_writer.hpp"

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

// Counted by iterating (H5Aiterate2 is the same in HDF5 1.10 and 1.14; H5Oget_info_by_name
// changed its signature in 1.12).
herr_t count_one(hid_t, const char*, const H5A_info_t*, void* count) {
  ++*static_cast<int*>(count);
  return 0;
}

int attribute_count(hid_t file, const std::string& object) {
  const hawser::H5ObjectId o{h5check(H5Oopen(file, object.c_str(), H5P_DEFAULT), "H5Oopen")};
  int count = 0;
  hsize_t index = 0;
  h5check(H5Aiterate2(o.get(), H5_INDEX_NAME, H5_ITER_NATIVE, &index, count_one, &count),
          "H5Aiterate2");
  return count;
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
    CHECK(shape(open_dataset(file.get(), "/nodes/position").get()) ==
          std::vector<hsize_t>{11, 5, 3});
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

namespace {
// Chunk shape and filters of a dataset's creation property list.
struct Layout {
  std::vector<hsize_t> chunk;
  std::vector<H5Z_filter_t> filters;
  H5D_layout_t kind;
};

Layout layout_of(hid_t dataset) {
  const hawser::H5PropListId dcpl{h5check(H5Dget_create_plist(dataset), "H5Dget_create_plist")};
  Layout l;
  l.kind = H5Pget_layout(dcpl.get());
  if (l.kind == H5D_CHUNKED) {
    l.chunk.resize(H5S_MAX_RANK);
    const int rank = h5check(H5Pget_chunk(dcpl.get(), H5S_MAX_RANK, l.chunk.data()), "H5Pget_chunk");
    l.chunk.resize(static_cast<std::size_t>(rank));
  }
  const int n = h5check(H5Pget_nfilters(dcpl.get()), "H5Pget_nfilters");
  for (int i = 0; i < n; ++i) {
    unsigned flags = 0;
    std::size_t nelem = 0;
    l.filters.push_back(H5Pget_filter2(dcpl.get(), static_cast<unsigned>(i), &flags, &nelem,
                                       nullptr, 0, nullptr, nullptr));
  }
  return l;
}

std::size_t files_in(const std::string& dir) {
  std::size_t n = 0;
  for (const auto& e : std::filesystem::directory_iterator(dir)) n += e.is_regular_file();
  return n;
}
}  // namespace

TEST_CASE("H5Writer's finished file holds ordinary chunked series, compressed on request",
          "[h5]") {
  ScratchDir scratch;
  for (const int level : {0, 4}) {
    const std::string path = scratch.file("final" + std::to_string(level) + ".h5");
    auto writer = H5Writer::create(path, H5Writer::Options{H5Writer::Durability::process_kill, level});
    const auto wide = writer.create_series("/nodes/position", {201, 3}, "m");  // 4824 B a row
    const auto narrow = writer.create_series("/time", {}, "s");
    std::vector<double> row(603);
    for (int r = 0; r < 300; ++r) {
      for (std::size_t j = 0; j < row.size(); ++j) row[j] = 6.4e6 + r + 1e-3 * static_cast<double>(j);
      const double t = r;
      writer.append(wide, row.data(), 1);
      writer.append(narrow, &t, 1);
      if (r % 50 == 49) writer.flush();
    }
    writer.close();
    // The parts folder is gone: the file stands alone.
    CHECK_FALSE(std::filesystem::exists(path + ".parts"));
    const auto file = open_read(path);
    const auto ds = open_dataset(file.get(), "/nodes/position");
    const Layout l = layout_of(ds.get());
    CHECK(l.kind == H5D_CHUNKED);
    // Design (h5_writer.cpp chunk_shape): rows grouped up to 1 MiB: 1 MiB / 4824 B = 217 rows.
    CHECK(l.chunk == std::vector<hsize_t>{217, 201, 3});
    if (level == 0) {
      CHECK(l.filters.empty());
    } else {
      CHECK(l.filters == std::vector<H5Z_filter_t>{H5Z_FILTER_SHUFFLE, H5Z_FILTER_DEFLATE});
    }
    const auto p = read_doubles(file.get(), "/nodes/position");
    REQUIRE(p.size() == 300 * 603);
    CHECK(p[299 * 603 + 602] == 6.4e6 + 299 + 1e-3 * 602);
    CHECK(layout_of(open_dataset(file.get(), "/time").get()).chunk == std::vector<hsize_t>{300});
  }
}

TEST_CASE("H5Writer publishes each flush as an index over segment files, merged eight at a time",
          "[h5]") {
  ScratchDir scratch;
  const std::string path = scratch.file("segments.h5");
  auto writer = H5Writer::create(path);
  const auto time = writer.create_series("/time", {}, "s");
  for (int r = 0; r < 100; ++r) {
    const double t = r;
    writer.append(time, &t, 1);
    writer.flush();
    // Tiered merging (h5_writer.hpp): with k flushes of one row, the segments are the digits
    // of k in base 8, so at most 7 per level: here at most 7 + 7 + 1.
    std::size_t live = 0;
    {
      const auto file = open_read(path);
      const auto ds = open_dataset(file.get(), "/time");
      const hawser::H5PropListId dcpl{h5check(H5Dget_create_plist(ds.get()), "H5Dget_create_plist")};
      REQUIRE(H5Pget_layout(dcpl.get()) == H5D_VIRTUAL);
      h5check(H5Pget_virtual_count(dcpl.get(), &live), "H5Pget_virtual_count");
      const auto t = read_doubles(file.get(), "/time");
      REQUIRE(t.size() == static_cast<std::size_t>(r + 1));
      CHECK(t.back() == r);
      CHECK(t.front() == 0.0);
    }
    std::size_t digits = 0;
    for (int k = r + 1; k > 0; k /= 8) digits += static_cast<std::size_t>(k % 8);
    CHECK(live == digits);
  }
  // Merged segments stay on disk for readers of older indexes (60 s), so more files than live
  // segments remain; close() removes them all.
  CHECK(files_in(path + ".parts") > 3);
  writer.close();
  CHECK_FALSE(std::filesystem::exists(path + ".parts"));
}

TEST_CASE("H5Writer resumes a file its writer left without closing", "[h5]") {
  ScratchDir scratch;
  const std::string path = scratch.file("resume.h5");
  const auto fill = [](H5Writer& w, H5Writer::SeriesId t, H5Writer::SeriesId x, int from, int to) {
    for (int r = from; r < to; ++r) {
      const double tr = r;
      const double xr[2] = {10.0 * r, 10.0 * r + 1};
      w.append(t, &tr, 1);
      w.append(x, xr, 1);
    }
  };
  {
    auto first = H5Writer::create(path);
    first.set_attribute("/", "status", "running");
    const auto t = first.create_series("/time", {}, "s");
    const auto x = first.create_series("/x", {2}, "m");
    fill(first, t, x, 0, 12);
    first.flush();
    fill(first, t, x, 12, 15);  // never flushed: the writer "dies" unclosed, as if killed
  }
  {
    const auto file = open_read(path);
    CHECK(read_string_attribute(file.get(), "/", "status") == "running");
    CHECK(read_doubles(file.get(), "/time").size() == 12);
  }
  // A series of another shape is refused with the file named.
  {
    auto wrong = H5Writer::resume(path, {}, "/time");
    wrong.create_series("/time", {}, "s");
    CHECK_THROWS_AS(wrong.create_series("/x", {3}, "m"), hawser::InputError);
  }
  auto again = H5Writer::resume(path, {}, "/time");
  const auto t = again.create_series("/time", {}, "s");
  const auto x = again.create_series("/x", {2}, "m");
  CHECK(again.length(t) == 12);
  fill(again, t, x, 12, 40);
  again.set_attribute("/", "status", "complete");
  again.close();
  const auto file = open_read(path);
  CHECK(read_string_attribute(file.get(), "/", "status") == "complete");
  const auto tv = read_doubles(file.get(), "/time");
  const auto xv = read_doubles(file.get(), "/x");
  REQUIRE(tv.size() == 40);
  REQUIRE(xv.size() == 80);
  for (int r = 0; r < 40; ++r) {
    CHECK(tv[r] == r);
    CHECK(xv[2 * r + 1] == 10.0 * r + 1);
  }
  // A finished file has no segments to continue.
  CHECK_THROWS_AS(H5Writer::resume(path, {}, "/time"), hawser::InputError);
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
    CHECK(what.find("mkdir") != std::string::npos);  // the parts folder comes first
    CHECK(what.find("No such file or directory") != std::string::npos);  // strerror(ENOENT)
  }

  auto writer = H5Writer::create(scratch.file("twice.h5"));
  const double x = 1.0;
  writer.write_array("/x", {1}, &x, "1");
  // A dataset and a group of one name cannot both be: the library's refusal names its call.
  writer.set_attribute("/x/y", "a", 1.0);
  try {
    writer.flush();
    FAIL("a group below a dataset did not throw");
  } catch (const hawser::LibraryError& e) {
    INFO(e.what());
    CHECK(std::string(e.what()).find("HDF5 call H5") != std::string::npos);
  }
  writer.erase("/x");
  writer.write_array("/y", {1}, &x, "1");  // the writer stays usable after a failed call
  writer.close();
  CHECK_THROWS_AS(writer.flush(), std::logic_error);
  CHECK_THROWS_AS(H5Writer::create(scratch.file("zero.h5")).create_series("/z", {0}, "1"),
                  std::invalid_argument);
}
