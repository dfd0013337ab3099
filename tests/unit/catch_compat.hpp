#pragma once
// The one Catch2 include of the unit tests, for Catch2 2 and 3 alike.
//
// Covers Catch2 2.13 (Debian 12) and Catch2 3.x (Debian 13, 3.7.1). tests/CMakeLists.txt
// defines HAWSER_CATCH2_MAJOR from the Catch2 that find_package() found, so the header picked
// here is always the one of the library the tests link against. The tests are written with
// Catch2 3's names; each shim below supplies one of them on the other version.
#if HAWSER_CATCH2_MAJOR == 3
#include <catch2/catch_all.hpp>

// Catch2 3 moved Approx into namespace Catch; the tests name it unqualified, as Catch2 2 did.
using Catch::Approx;

#elif HAWSER_CATCH2_MAJOR == 2
#include <catch2/catch.hpp>

#include <string>

namespace Catch::Matchers {
// Catch2 3 renamed the substring matcher Contains to ContainsSubstring (its Contains now
// matches an element of a range); this gives Catch2 2 the new name.
inline StdString::ContainsMatcher ContainsSubstring(
    const std::string& text, CaseSensitive::Choice case_sensitivity = CaseSensitive::Yes) {
  return Contains(text, case_sensitivity);
}
}  // namespace Catch::Matchers

#else
#error "HAWSER_CATCH2_MAJOR must be 2 or 3 (tests/CMakeLists.txt sets it)"
#endif

// Short for the tests' message checks: CHECK_THAT(e.what(), ContainsSubstring("key")).
using Catch::Matchers::ContainsSubstring;
