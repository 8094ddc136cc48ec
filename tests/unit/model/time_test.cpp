// Time literals and time formatting: exact femtosecond arithmetic on SI prefixes.
#include <catch2/catch.hpp>

#include "sim/model/logic.hpp"
#include "sim/model/time_parse.hpp"

using namespace settle;

// SI prefixes: milli 1e-3, micro 1e-6, nano 1e-9, pico 1e-12, femto 1e-15
// (BIPM SI Brochure, 9th edition, Table 7).
TEST_CASE("time literals are exact femtosecond counts", "[sim][time]") {
  CHECK(parse_time("40ps") == 40'000u);
  CHECK(parse_time("1.5ns") == 1'500'000u);
  CHECK(parse_time("2us") == 2'000'000'000u);
  CHECK(parse_time("0.000001ms") == 1'000'000u);
  CHECK(parse_time("7fs") == 7u);
  CHECK(parse_time("18446744073709551615fs") == UINT64_MAX);
  std::string err;
  CHECK_FALSE(parse_time("0.5fs", &err));
  CHECK(err.find("whole number of femtoseconds") != std::string::npos);
  CHECK_FALSE(parse_time("18446744073709551616fs", &err));
  CHECK(err.find("64 bits") != std::string::npos);
  CHECK_FALSE(parse_time("10", &err));
  CHECK(err.find("unit") != std::string::npos);
  CHECK_FALSE(parse_time("3 hours", &err));
  CHECK_FALSE(parse_time("ns", &err));
  CHECK_FALSE(parse_time("1.ns", &err));
}

TEST_CASE("delay ranges on the command line", "[sim][time]") {
  CHECK(parse_delay_range("40ps..60ps") == delay_range{40'000, 50'000, 60'000});
  CHECK(parse_delay_range("35ps..45ps..55ps") == delay_range{35'000, 45'000, 55'000});
  CHECK(parse_delay_range("40ps") == delay_range{40'000, 40'000, 40'000});
  CHECK(parse_delay_range("1fs..2fs") == delay_range{1, 1, 2});  // midpoint rounded down
  CHECK_FALSE(parse_delay_range("60ps..40ps"));
  CHECK_FALSE(parse_delay_range("10ps..5ps..20ps"));
  CHECK_FALSE(parse_delay_range("1ps..2ps..3ps..4ps"));
}

TEST_CASE("format_time uses the largest exact unit with at most three decimals", "[sim][time]") {
  CHECK(format_time(0) == "0");
  CHECK(format_time(35'000) == "35ps");
  CHECK(format_time(1'500'000) == "1.5ns");
  CHECK(format_time(100'000) == "100ps");
  CHECK(format_time(12'345'678) == "12345.678ps");
  CHECK(format_time(500) == "500fs");
  CHECK(format_time(1'000'005'000'000) == "1000.005us");
  CHECK(format_time(2'000'000'000'000) == "2ms");
  CHECK(format_time(1'234'567) == "1234.567ps");
  CHECK(format_time(1'000'001) ==
        "1000.001ps");  // every count of 1ps or more fits ps with 3 decimals
  CHECK(format_time(999) == "999fs");
  // Whatever it prints parses back to the same count.
  for (time_fs t : {1ull, 999ull, 1'000ull, 1'001ull, 45'500ull, 10'375'000ull, 123'456'789'000ull})
    CHECK(parse_time(format_time(t)) == t);
}
