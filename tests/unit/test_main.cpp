// main() of the unit tests on Catch2 2; with Catch2 3 the Catch2WithMain library has it instead
// and tests/CMakeLists.txt leaves this file out.
#define CATCH_CONFIG_MAIN
#include "catch_compat.hpp"
