#include "solver/input/variant_id.hpp"

#include <cctype>
#include <cstdio>

namespace hawser {

std::uint64_t fnv1a64(const std::string& text) {
  std::uint64_t h = 14695981039346656037ULL;
  for (const unsigned char c : text) {
    h ^= c;
    h *= 1099511628211ULL;
  }
  return h;
}

std::string short_hash(const std::string& text) {
  char buf[17];
  std::snprintf(buf, sizeof buf, "%016llx", static_cast<unsigned long long>(fnv1a64(text)));
  return std::string(buf, 8);
}

namespace {
// Letters and digits kept, '.' kept between digits, everything else dropped or made '_'.
std::string slug_part(const std::string& s) {
  std::string out;
  for (std::size_t i = 0; i < s.size(); ++i) {
    const char c = s[i];
    if ((c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '-')
      out += c;
    else if (c == '.' && i > 0 && i + 1 < s.size() &&
             std::isdigit(static_cast<unsigned char>(s[i - 1])) &&
             std::isdigit(static_cast<unsigned char>(s[i + 1])))
      out += 'p';  // 0.5 -> 0p5: no dots in file names but the extension's
    else if (c == '_' && !out.empty() && out.back() != '_')
      out += '_';
  }
  return out;
}

std::string leaf(const std::string& path) {
  const auto dot = path.rfind('.');
  return dot == std::string::npos ? path : path.substr(dot + 1);
}
}  // namespace

std::string variant_id(const std::string& name, const std::vector<Override>& overrides) {
  std::string key = "name=" + name + "\n", slug = slug_part(name);
  for (const Override& o : overrides) {
    key += o.set_argument() + "\n";
    if (o.named) continue;  // known by the variant's name
    const std::string part = slug_part(leaf(o.path)) + "-" + slug_part(o.value);
    slug += (slug.empty() ? "" : "_") + part;
  }
  constexpr std::size_t kMaxSlug = 48;
  if (slug.size() > kMaxSlug) slug.resize(kMaxSlug);
  if (slug.empty()) slug = "base";
  return slug + "-" + short_hash(key);
}

}  // namespace hawser
