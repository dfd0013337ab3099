// The ordered-commit file driver under H5Writer (solver/h5_commit_driver.hpp; the reasons and
// the commit order are in solver/h5_writer.hpp). Written against the HDF5 1.10 virtual file
// layer.
#include "solver/h5_commit_driver.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdint>
#include <cstdlib>
#include <cstring>
#include <limits>
#include <map>
#include <new>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "solver/h5_handles.hpp"

namespace hawser {
namespace {

// =============================================================================================
// Ordered-commit file driver (HDF5 1.10 virtual file layer).
//
// Bytes at or past `committed_end` (the end of the file as of the last commit) are written to
// disk at once: no committed metadata refers to them. Writes below it overwrite something the
// committed file uses; they are held in `held` and written by commit() in dependency order.
// The end of allocation never drops below `committed_end`, so the library cannot hand out
// committed space again.
// =============================================================================================

struct HeldWrite {
  std::vector<unsigned char> bytes;
  H5FD_mem_t type;  // what the library says it is writing (superblock, B-tree, heap, header)
};

struct CommitState {
  std::string name;
  int fd = -1;
  dev_t device = 0;
  ino_t inode = 0;
  bool writable = false;
  bool sync = false;
  haddr_t eoa = 0;            // end of allocated space, as the library sets it (bytes)
  haddr_t physical_end = 0;   // size of the file on disk (bytes)
  haddr_t committed_end = 0;  // end of the file as of the last commit (bytes)
  haddr_t reserve = 0;        // end of allocation the superblock on disk claims while running
  std::map<haddr_t, HeldWrite> held;  // non-overlapping, keyed by address
  // Node images that drop entries (a B-tree split moved them to a new sibling), kept off the
  // disk until close: see commit().
  std::map<haddr_t, HeldWrite> deferred;
  std::vector<unsigned char> superblock;          // latest v2 superblock from the library
  std::vector<unsigned char> superblock_on_disk;  // what commit() last wrote at address 0
};

// HDF5 hands us back the H5FD_t it got from open(); it sits at offset 0 of this
// standard-layout struct, so the two pointers convert.
struct CommitFile {
  H5FD_t pub;
  CommitState* state;
};

CommitState& state_of(const H5FD_t* file) {
  return *reinterpret_cast<const CommitFile*>(file)->state;
}

herr_t push_error(const char* func, hid_t minor, const std::string& what) {
  H5Epush2(H5E_DEFAULT, __FILE__, func, __LINE__, H5E_ERR_CLS, H5E_VFL, minor, "%s",
           what.c_str());
  return -1;
}

// Bob Jenkins' lookup3 hash ("hashlittle", public domain, 2006), byte by byte: the checksum of
// HDF5 metadata (HDF5 file format specification, section "Checksums").
std::uint32_t lookup3(const unsigned char* k, std::size_t length) {
  const auto rot = [](std::uint32_t x, int r) { return (x << r) | (x >> (32 - r)); };
  std::uint32_t a, b, c;
  a = b = c = 0xdeadbeefu + static_cast<std::uint32_t>(length);
  const auto word = [k](std::size_t i, std::size_t n) {  // n little-endian bytes from k[i]
    std::uint32_t w = 0;
    for (std::size_t j = 0; j < n; ++j) w |= static_cast<std::uint32_t>(k[i + j]) << (8 * j);
    return w;
  };
  std::size_t i = 0;
  for (; length - i > 12; i += 12) {
    a += word(i, 4);
    b += word(i + 4, 4);
    c += word(i + 8, 4);
    a -= c; a ^= rot(c, 4);  c += b;
    b -= a; b ^= rot(a, 6);  a += c;
    c -= b; c ^= rot(b, 8);  b += a;
    a -= c; a ^= rot(c, 16); c += b;
    b -= a; b ^= rot(a, 19); a += c;
    c -= b; c ^= rot(b, 4);  b += a;
  }
  const std::size_t rest = length - i;
  if (rest == 0) return c;
  a += word(i, std::min<std::size_t>(rest, 4));
  if (rest > 4) b += word(i + 4, std::min<std::size_t>(rest - 4, 4));
  if (rest > 8) c += word(i + 8, rest - 8);
  c ^= b; c -= rot(b, 14);
  a ^= c; a -= rot(c, 11);
  b ^= a; b -= rot(a, 25);
  c ^= b; c -= rot(b, 16);
  a ^= c; a -= rot(c, 4);
  b ^= a; b -= rot(a, 14);
  c ^= b; c -= rot(b, 24);
  return c;
}

// Superblock version 2 (HDF5 file format specification, "Version 2 Superblock"): signature (8),
// version, offset size, length size, flags, base address, extension address, end-of-file
// address (the end of allocation) at byte 28, root header address, checksum at byte 44.
constexpr std::size_t kSuperblockSize = 48;
constexpr std::size_t kSuperblockEoa = 28;
constexpr std::size_t kSuperblockChecksum = 44;

bool is_superblock_v2(const unsigned char* b, std::size_t size) {
  static const unsigned char signature[8] = {0x89, 'H', 'D', 'F', '\r', '\n', 0x1a, '\n'};
  return size == kSuperblockSize && std::memcmp(b, signature, 8) == 0 && b[8] == 2 &&
         b[9] == 8 && std::memcmp(b + 12, "\0\0\0\0\0\0\0\0", 8) == 0;  // 8-byte addresses, base 0
}

std::vector<unsigned char> superblock_claiming(std::vector<unsigned char> image, haddr_t eoa) {
  for (std::size_t i = 0; i < 8; ++i) image[kSuperblockEoa + i] = (eoa >> (8 * i)) & 0xff;
  const std::uint32_t sum = lookup3(image.data(), kSuperblockChecksum);
  for (std::size_t i = 0; i < 4; ++i) image[kSuperblockChecksum + i] = (sum >> (8 * i)) & 0xff;
  return image;
}

// While running, the superblock on disk claims an end of allocation well past the real one
// (the file is grown sparsely to match): a reader keeps the end it read at open, and must not
// find newer metadata pointing past it. Doubling keeps the number of moves logarithmic.
haddr_t reserve_for(haddr_t eoa) {
  constexpr haddr_t kMinAhead = 16u << 20, kRound = 1u << 20;
  const haddr_t want = std::max(2 * eoa, eoa + kMinAhead);
  return (want + kRound - 1) / kRound * kRound;
}

bool pwrite_all(int fd, const unsigned char* data, std::size_t size, haddr_t addr) {
  while (size > 0) {
    const ssize_t n = ::pwrite(fd, data, size, static_cast<off_t>(addr));
    if (n < 0) {
      if (errno == EINTR) continue;
      return false;
    }
    data += n;
    size -= static_cast<std::size_t>(n);
    addr += static_cast<haddr_t>(n);
  }
  return true;
}

// Reads up to `size` bytes; bytes past the end of the file read as zero.
bool pread_all(int fd, unsigned char* data, std::size_t size, haddr_t addr) {
  while (size > 0) {
    const ssize_t n = ::pread(fd, data, size, static_cast<off_t>(addr));
    if (n < 0) {
      if (errno == EINTR) continue;
      return false;
    }
    if (n == 0) {
      std::memset(data, 0, size);
      return true;
    }
    data += n;
    size -= static_cast<std::size_t>(n);
    addr += static_cast<haddr_t>(n);
  }
  return true;
}

// Keep the newest bytes for [addr, addr + size): trim or split every held write it overlaps.
void hold(CommitState& s, haddr_t addr, const unsigned char* data, std::size_t size,
          H5FD_mem_t type) {
  const haddr_t end = addr + size;
  auto it = s.held.lower_bound(addr);
  if (it != s.held.begin()) {
    const auto prev = std::prev(it);
    if (prev->first + prev->second.bytes.size() > addr) it = prev;
  }
  while (it != s.held.end() && it->first < end) {
    const haddr_t old_start = it->first;
    const haddr_t old_end = old_start + it->second.bytes.size();
    HeldWrite old = std::move(it->second);
    it = s.held.erase(it);
    if (old_start < addr) {
      s.held.emplace(old_start,
                     HeldWrite{{old.bytes.begin(), old.bytes.begin() + (addr - old_start)},
                               old.type});
    }
    if (old_end > end) {
      s.held.emplace(end, HeldWrite{{old.bytes.begin() + (end - old_start), old.bytes.end()},
                                    old.type});
    }
  }
  s.held.emplace(addr, HeldWrite{{data, data + size}, type});
}

// Copy the bytes of `writes` that fall in [addr, addr + size) over `out`.
void overlay(const std::map<haddr_t, HeldWrite>& writes, haddr_t addr, std::size_t size,
             unsigned char* out) {
  const haddr_t end = addr + size;
  auto it = writes.lower_bound(addr);
  if (it != writes.begin()) --it;
  for (; it != writes.end() && it->first < end; ++it) {
    const haddr_t lo = std::max(addr, it->first);
    const haddr_t hi = std::min<haddr_t>(end, it->first + it->second.bytes.size());
    if (lo < hi) {
      std::memcpy(out + (lo - addr), it->second.bytes.data() + (lo - it->first), hi - lo);
    }
  }
}

// What the library wrote last: disk bytes under deferred images under held writes.
void overlay_held(const CommitState& s, haddr_t addr, std::size_t size, unsigned char* out) {
  overlay(s.deferred, addr, size, out);
  overlay(s.held, addr, size, out);
  if (addr < s.superblock.size()) {  // the library reads its own superblock, not the claim
    const std::size_t n = std::min<std::size_t>(size, s.superblock.size() - addr);
    std::memcpy(out, s.superblock.data() + addr, n);
  }
}

// Commit order of a held overwrite: pointees before pointers, lengths last.
struct CommitRank {
  int step;  // 0 superblock, 1 local heaps, 2 B-tree nodes, 3 symbol nodes, 4 other, 5 headers
  int sub;   // within a step: heap data before heap prefix; B-tree parents before children
};

CommitRank commit_rank(const HeldWrite& w) {
  const auto& b = w.bytes;
  const auto signature = [&b](const char* sig) {
    return b.size() >= 4 && std::memcmp(b.data(), sig, 4) == 0;
  };
  switch (w.type) {
    case H5FD_MEM_SUPER:
      return {0, 0};
    case H5FD_MEM_LHEAP:
      return {1, signature("HEAP") ? 1 : 0};
    case H5FD_MEM_BTREE:
      // v1 B-tree node: "TREE", node type, level (byte 5); higher levels first.
      if (signature("TREE") && b.size() > 5) return {2, 255 - static_cast<int>(b[5])};
      return {3, 0};
    case H5FD_MEM_OHDR:
      return {5, 0};
    default:
      return {4, 0};
  }
}

bool barrier(const CommitState& s) { return !s.sync || ::fdatasync(s.fd) == 0; }

// Does `w` overwrite a v1 B-tree node ("TREE") or symbol table node ("SNOD") with fewer
// entries at the same level (entry count: bytes 6-7, little-endian)? That is a split: the
// entries moved to a new sibling that the parent now lists. A reader that read the parent
// before the commit and reads this node after it would lose them, so the shrunken image is
// not written while the file is open; the old, longer one stays valid beside the new parent,
// which routes those keys to the sibling.
bool drops_entries(const CommitState& s, haddr_t addr, const HeldWrite& w) {
  const auto& b = w.bytes;
  if (w.type != H5FD_MEM_BTREE || b.size() < 8) return false;
  const bool tree = std::memcmp(b.data(), "TREE", 4) == 0;
  if (!tree && std::memcmp(b.data(), "SNOD", 4) != 0) return false;
  unsigned char disk[8];
  if (!pread_all(s.fd, disk, sizeof disk, addr) || std::memcmp(disk, b.data(), 4) != 0) {
    return false;
  }
  if (tree && (disk[4] != b[4] || disk[5] != b[5])) return false;  // a root that grew a level
  const unsigned on_disk = disk[6] | (disk[7] << 8);
  const unsigned now = b[6] | (b[7] << 8);
  return now < on_disk;
}

// Make the file on disk the library's current view, one readable state after another.
// `closing`: the last commit; the superblock then claims the true end and the file is cut to it.
herr_t commit(CommitState& s, bool closing) {
  static const char* const func = "hawser commit";
  if (!s.writable) return 0;
  const auto io_error = [&s](const char* op) {
    return push_error(func, H5E_WRITEERROR, errno_text(op, s.name));
  };

  // End of allocation the superblock will claim, and the size the file must have for it.
  haddr_t claimed = s.eoa;
  std::vector<unsigned char> superblock;
  if (!s.superblock.empty()) {
    if (!closing && s.reserve < s.eoa) s.reserve = reserve_for(s.eoa);
    if (!closing) claimed = s.reserve;
    superblock = superblock_claiming(s.superblock, claimed);
  }
  const bool new_superblock = !superblock.empty() && superblock != s.superblock_on_disk;
  const bool pending = !s.held.empty() || (closing && !s.deferred.empty());
  if (!pending && !new_superblock && s.physical_end == claimed) {
    s.committed_end = s.eoa;
    return 0;
  }

  // 1. New bytes are on disk already; grow the file so that no superblock claims more than
  //    it holds, and make them durable before anything points at them.
  if (s.physical_end < claimed) {
    if (::ftruncate(s.fd, static_cast<off_t>(claimed)) != 0) return io_error("ftruncate");
    s.physical_end = claimed;
  }
  if (!barrier(s)) return io_error("fdatasync");

  // 2. The superblock, then the held overwrites in dependency order, object headers (the
  //    dataset lengths) last and among them the highest address first, so that the series
  //    created first grows last.
  if (new_superblock) {
    if (!pwrite_all(s.fd, superblock.data(), superblock.size(), 0)) return io_error("pwrite");
  }
  struct Step {
    CommitRank rank;
    haddr_t addr;
    const HeldWrite* write;
  };
  std::vector<Step> steps;
  std::vector<haddr_t> to_defer;
  steps.reserve(s.held.size() + (closing ? s.deferred.size() : 0));
  for (const auto& [addr, w] : s.held) {
    if (!closing && drops_entries(s, addr, w)) {
      to_defer.push_back(addr);
    } else {
      steps.push_back({commit_rank(w), addr, &w});
    }
  }
  if (closing) {  // no reader will walk down from an old parent any more
    for (const auto& [addr, w] : s.deferred) {
      if (s.held.count(addr) == 0) steps.push_back({commit_rank(w), addr, &w});
    }
  }
  std::stable_sort(steps.begin(), steps.end(), [](const Step& a, const Step& b) {
    if (a.rank.step != b.rank.step) return a.rank.step < b.rank.step;
    if (a.rank.sub != b.rank.sub) return a.rank.sub < b.rank.sub;
    return a.rank.step == 5 ? a.addr > b.addr : a.addr < b.addr;
  });
  for (std::size_t i = 0; i < steps.size(); ++i) {
    const bool new_group = i == 0 ? new_superblock
                                  : (steps[i].rank.step != steps[i - 1].rank.step ||
                                     steps[i].rank.sub != steps[i - 1].rank.sub);
    if (new_group && !barrier(s)) return io_error("fdatasync");
    const auto& bytes = steps[i].write->bytes;
    if (!pwrite_all(s.fd, bytes.data(), bytes.size(), steps[i].addr)) return io_error("pwrite");
  }
  if (!barrier(s)) return io_error("fdatasync");

  // 3. Only now may the file shrink to what the superblock claims (when closing).
  if (s.physical_end > claimed) {
    if (::ftruncate(s.fd, static_cast<off_t>(claimed)) != 0) return io_error("ftruncate");
    s.physical_end = claimed;
    if (!barrier(s)) return io_error("fdatasync");
  }
  for (const auto& entry : s.held) {  // to_defer is sorted: it was filled in address order
    if (!std::binary_search(to_defer.begin(), to_defer.end(), entry.first)) {
      s.deferred.erase(entry.first);  // a newer image went to disk
    }
  }
  for (const haddr_t addr : to_defer) s.deferred[addr] = std::move(s.held[addr]);
  if (closing) s.deferred.clear();
  s.held.clear();
  if (!superblock.empty()) s.superblock_on_disk = std::move(superblock);
  s.committed_end = s.eoa;
  return 0;
}

// ---- H5FD_class_t callbacks -----------------------------------------------------------------

void* cf_fapl_copy(const void* info) {
  auto* copy = static_cast<CommitDriverConfig*>(std::malloc(sizeof(CommitDriverConfig)));
  if (copy != nullptr) *copy = *static_cast<const CommitDriverConfig*>(info);
  return copy;
}

herr_t cf_fapl_free(void* info) {
  std::free(info);
  return 0;
}

void* cf_fapl_get(H5FD_t* file) {
  const CommitDriverConfig config{state_of(file).sync};
  return cf_fapl_copy(&config);
}

H5FD_t* cf_open(const char* name, unsigned flags, hid_t fapl, haddr_t /*maxaddr*/) {
  if (name == nullptr || *name == '\0') {
    push_error("hawser open", H5E_BADVALUE, "empty file name");
    return nullptr;
  }
  int oflags = (flags & H5F_ACC_RDWR) ? O_RDWR : O_RDONLY;
  if (flags & H5F_ACC_TRUNC) oflags |= O_TRUNC;
  if (flags & H5F_ACC_CREAT) oflags |= O_CREAT;
  if (flags & H5F_ACC_EXCL) oflags |= O_EXCL;
  const int fd = ::open(name, oflags | O_CLOEXEC, 0666);
  if (fd < 0) {
    push_error("hawser open", H5E_CANTOPENFILE, errno_text("open", name));
    return nullptr;
  }
  struct stat info {};
  if (::fstat(fd, &info) != 0) {
    push_error("hawser open", H5E_CANTOPENFILE, errno_text("fstat", name));
    ::close(fd);
    return nullptr;
  }
  auto* state = new (std::nothrow) CommitState;
  auto* file = new (std::nothrow) CommitFile{};
  if (state == nullptr || file == nullptr) {
    delete state;
    delete file;
    ::close(fd);
    push_error("hawser open", H5E_CANTALLOC, "out of memory");
    return nullptr;
  }
  const auto* config = static_cast<const CommitDriverConfig*>(H5Pget_driver_info(fapl));
  state->name = name;
  state->fd = fd;
  state->device = info.st_dev;
  state->inode = info.st_ino;
  state->writable = (flags & H5F_ACC_RDWR) != 0;
  state->sync = config != nullptr && config->sync;
  state->physical_end = static_cast<haddr_t>(info.st_size);
  state->committed_end = state->physical_end;
  file->state = state;
  return &file->pub;
}

// commit() for the C callbacks: no exception may cross the library.
herr_t commit_noexcept(CommitState& s, bool closing) {
  try {
    return commit(s, closing);
  } catch (const std::exception& e) {
    return push_error("hawser commit", H5E_CANTFLUSH, e.what());
  }
}

herr_t cf_close(H5FD_t* file) {
  auto* cf = reinterpret_cast<CommitFile*>(file);
  herr_t status = commit_noexcept(*cf->state, true);
  if (::close(cf->state->fd) != 0) {
    status = push_error("hawser close", H5E_CANTCLOSEFILE, errno_text("close", cf->state->name));
  }
  delete cf->state;
  delete cf;
  return status;
}

int cf_cmp(const H5FD_t* a, const H5FD_t* b) {
  const auto ka = std::make_pair(state_of(a).device, state_of(a).inode);
  const auto kb = std::make_pair(state_of(b).device, state_of(b).inode);
  return ka < kb ? -1 : (kb < ka ? 1 : 0);
}

herr_t cf_query(const H5FD_t* /*file*/, unsigned long* flags) {
  // No metadata accumulator and no aggregation blocks: every metadata object arrives as its
  // own write, typed, which the commit order needs.
  *flags = H5FD_FEAT_DATA_SIEVE | H5FD_FEAT_DEFAULT_VFD_COMPATIBLE;
  return 0;
}

// Metadata that commit() may overwrite later is placed so that it never straddles a page: a
// killed process's write() stops only between pages (Linux copies a buffered write page by
// page and checks for a fatal signal before each), so a one-page overwrite is all or nothing.
constexpr haddr_t kPage = 4096;

haddr_t cf_alloc(H5FD_t* file, H5FD_mem_t type, hid_t /*dxpl*/, hsize_t size) {
  CommitState& s = state_of(file);
  haddr_t addr = s.eoa;
  const bool overwritable = type == H5FD_MEM_SUPER || type == H5FD_MEM_BTREE ||
                            type == H5FD_MEM_LHEAP || type == H5FD_MEM_OHDR;
  if (overwritable && size > 0 && size <= kPage && addr / kPage != (addr + size - 1) / kPage) {
    addr = (addr / kPage + 1) * kPage;  // the gap stays unused and reads as zeros
  }
  s.eoa = addr + size;
  return addr;
}

haddr_t cf_get_eoa(const H5FD_t* file, H5FD_mem_t /*type*/) { return state_of(file).eoa; }

herr_t cf_set_eoa(H5FD_t* file, H5FD_mem_t /*type*/, haddr_t addr) {
  CommitState& s = state_of(file);
  // Freeing space at the end of the file would let the library allocate committed bytes again.
  s.eoa = s.writable ? std::max(addr, s.committed_end) : addr;
  return 0;
}

haddr_t cf_get_eof(const H5FD_t* file, H5FD_mem_t /*type*/) {
  return state_of(file).physical_end;
}

herr_t cf_get_handle(H5FD_t* file, hid_t /*fapl*/, void** handle) {
  *handle = &state_of(file).fd;
  return 0;
}

herr_t cf_read(H5FD_t* file, H5FD_mem_t /*type*/, hid_t /*dxpl*/, haddr_t addr, size_t size,
               void* buf) {
  const CommitState& s = state_of(file);
  auto* out = static_cast<unsigned char*>(buf);
  const std::size_t on_disk =
      addr < s.physical_end
          ? static_cast<std::size_t>(std::min<haddr_t>(size, s.physical_end - addr))
          : 0;
  if (on_disk > 0 && !pread_all(s.fd, out, on_disk, addr)) {
    return push_error("hawser read", H5E_READERROR, errno_text("pread", s.name));
  }
  std::memset(out + on_disk, 0, size - on_disk);
  overlay_held(s, addr, size, out);
  return 0;
}

herr_t cf_write(H5FD_t* file, H5FD_mem_t type, hid_t /*dxpl*/, haddr_t addr, size_t size,
                const void* buf) {
  CommitState& s = state_of(file);
  const auto* in = static_cast<const unsigned char*>(buf);
  try {
    if (s.writable && addr == 0 && type == H5FD_MEM_SUPER && is_superblock_v2(in, size)) {
      s.superblock.assign(in, in + size);  // commit() writes it, claiming the reserve
      return 0;
    }
    if (addr < s.committed_end) {
      const auto n = static_cast<std::size_t>(std::min<haddr_t>(size, s.committed_end - addr));
      hold(s, addr, in, n, type);
      addr += n;
      in += n;
      size -= n;
    }
  } catch (const std::bad_alloc&) {
    return push_error("hawser write", H5E_CANTALLOC, "out of memory holding an overwrite");
  }
  if (size > 0) {
    if (!pwrite_all(s.fd, in, size, addr)) {
      return push_error("hawser write", H5E_WRITEERROR, errno_text("pwrite", s.name));
    }
    s.physical_end = std::max(s.physical_end, addr + size);
  }
  return 0;
}

herr_t cf_flush(H5FD_t* file, hid_t /*dxpl*/, hbool_t closing) {
  return commit_noexcept(state_of(file), closing);
}

// The file is sized by commit(), in its place in the order.
herr_t cf_truncate(H5FD_t* /*file*/, hid_t /*dxpl*/, hbool_t /*closing*/) { return 0; }

H5FD_class_t make_commit_class() {
  H5FD_class_t c{};
  c.name = "hawser_ordered_commit";
  c.maxaddr = (static_cast<haddr_t>(1) << (8 * sizeof(off_t) - 1)) - 1;
  c.fc_degree = H5F_CLOSE_WEAK;
  c.fapl_size = sizeof(CommitDriverConfig);
  c.fapl_get = cf_fapl_get;
  c.fapl_copy = cf_fapl_copy;
  c.fapl_free = cf_fapl_free;
  c.open = cf_open;
  c.close = cf_close;
  c.cmp = cf_cmp;
  c.query = cf_query;
  c.alloc = cf_alloc;
  c.get_eoa = cf_get_eoa;
  c.set_eoa = cf_set_eoa;
  c.get_eof = cf_get_eof;
  c.get_handle = cf_get_handle;
  c.read = cf_read;
  c.write = cf_write;
  c.flush = cf_flush;
  c.truncate = cf_truncate;
  const H5FD_mem_t map[H5FD_MEM_NTYPES] = H5FD_FLMAP_DICHOTOMY;
  std::copy(std::begin(map), std::end(map), std::begin(c.fl_map));
  return c;  // lock/unlock stay null: no flock, so readers can open the file while we write
}

}  // namespace

hid_t commit_driver() {
  static const H5FD_class_t cls = make_commit_class();
  static hid_t id = H5I_INVALID_HID;
  if (id < 0 || H5Iis_valid(id) <= 0) id = h5check(H5FDregister(&cls), "H5FDregister");
  return id;
}

}  // namespace hawser
