// The Catch2 main of the unit-test executable.
#define CATCH_CONFIG_MAIN
#include <catch2/catch.hpp>
