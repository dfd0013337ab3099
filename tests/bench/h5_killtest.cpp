// h5_killtest FILE NROWS [process_kill|power_loss]
//
// Helper for tests/cli/test_h5_live_read.py: writes a result-like file with H5Writer, appending
// rows whose every value is the row index, and flushes after blocks of 1, 2, 3, 4, 5, 1, 2, ...
// rows (uneven). After each flush it prints
// "flushed K" (K = rows now durable in every series); the test may SIGKILL it at any moment and
// then expects all K rows. Ends with status "complete" and "closed K" after NROWS rows.
//
// Series: /time and /energy/kinetic (scalars, s and J), /elements/tension (200, N),
// /nodes/position (201 x 3, m) and /nodes/velocity (341 x 3, m/s). Each flush makes a segment
// file; every 8 of one level are merged (h5_writer.hpp), so a run of a few hundred flushes
// exercises merges of two levels.
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <exception>
#include <stdexcept>
#include <string>
#include <vector>

#include "solver/output/h5_writer.hpp"

namespace {
// One unbuffered write(2) per line: the line has left the process before the next flush starts
// (and the test's write recorder sees it between the file writes it separates).
void report(const char* word, long long rows) {
  char line[64];
  const int n = std::snprintf(line, sizeof line, "%s %lld\n", word, rows);
  if (::write(STDOUT_FILENO, line, static_cast<std::size_t>(n)) != n) {
    throw std::runtime_error("cannot write to stdout");
  }
}
}  // namespace

int main(int argc, char** argv) {
  if (argc < 3 || argc > 4) {
    std::fprintf(stderr, "usage: h5_killtest FILE NROWS [process_kill|power_loss]\n");
    return 2;
  }
  const std::string path = argv[1];
  const long long nrows = std::atoll(argv[2]);
  auto durability = hawser::H5Writer::Durability::process_kill;
  if (argc == 4) {
    if (std::strcmp(argv[3], "power_loss") == 0) {
      durability = hawser::H5Writer::Durability::power_loss;
    } else if (std::strcmp(argv[3], "process_kill") != 0) {
      std::fprintf(stderr, "h5_killtest: unknown durability '%s'\n", argv[3]);
      return 2;
    }
  }
  try {
    auto writer = hawser::H5Writer::create(path, hawser::H5Writer::Options{durability, 0});
    writer.set_attribute("/", "status", "running");
    struct Spec {
      const char* path;
      std::vector<hsize_t> row_dims;
      const char* units;
    };
    const std::vector<Spec> specs{{"/time", {}, "s"},
                                  {"/energy/kinetic", {}, "J"},
                                  {"/elements/tension", {200}, "N"},
                                  {"/nodes/position", {201, 3}, "m"},
                                  {"/nodes/velocity", {341, 3}, "m/s"}};
    std::vector<hawser::H5Writer::SeriesId> ids;
    std::vector<std::size_t> row_sizes;
    for (const Spec& s : specs) {
      ids.push_back(writer.create_series(s.path, s.row_dims, s.units));
      std::size_t n = 1;
      for (const hsize_t d : s.row_dims) n *= d;
      row_sizes.push_back(n);
    }
    writer.flush();
    report("flushed", 0);

    std::vector<double> row;
    long long written = 0;
    for (int block = 1; written < nrows; block = block % 5 + 1) {
      for (int b = 0; b < block && written < nrows; ++b, ++written) {
        for (std::size_t k = 0; k < ids.size(); ++k) {
          row.assign(row_sizes[k], static_cast<double>(written));
          writer.append(ids[k], row.data(), 1);
        }
      }
      writer.flush();
      report("flushed", written);
    }
    writer.set_attribute("/", "status", "complete");
    writer.close();
    report("closed", written);
    return 0;
  } catch (const std::exception& e) {
    std::fprintf(stderr, "h5_killtest: %s\n", e.what());
    return 1;
  }
}
