#pragma once
// Stable names for a study's variants: a readable slug of what the variant changes and a short
// hash of its overrides, e.g. "brisk_cruise_speed-150kmh-3f9a0c12". The hash is 64-bit FNV-1a
// over "path=value" lines (fixed arithmetic, so the same on every machine and every run); the
// slug is for people and may be cut short.
#include <cstdint>
#include <string>
#include <vector>

#include "solver/input/study.hpp"

namespace hawser {

/// FNV-1a, 64 bit (Fowler, Noll, Vo; the published offset basis and prime).
std::uint64_t fnv1a64(const std::string& text);

/// Eight lowercase hex digits of the hash of `text`.
std::string short_hash(const std::string& text);

/// The id of a variant with this name and these overrides.
std::string variant_id(const std::string& name, const std::vector<Override>& overrides);

}  // namespace hawser
