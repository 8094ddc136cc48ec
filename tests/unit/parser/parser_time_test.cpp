// Time literals: exact conversion to femtoseconds, errors at the literal's position.
#include <catch2/catch.hpp>

#include "parser/load.hpp"
#include "sim/model/time_parse.hpp"

using namespace settle;

namespace {

time_fs fs_of(const char* number, int exponent) {
  time_fs v = 0;
  std::string why;
  INFO(number);
  REQUIRE(time_to_fs(number, exponent, v, why));
  return v;
}

std::string why_not(const char* number, int exponent) {
  time_fs v = 0;
  std::string why;
  REQUIRE_FALSE(time_to_fs(number, exponent, v, why));
  return why;
}

}  // namespace

// The unit prefixes are the SI ones (BIPM, The International System of Units, 9th ed., table 7).
TEST_CASE("time literals convert exactly on the digit string", "[parser][time]") {
  CHECK(fs_of("1.5", 6) == 1'500'000);
  CHECK(fs_of("0", 0) == 0);
  CHECK(fs_of("40", 3) == 40'000);
  CHECK(fs_of("1.000", 0) == 1);  // trailing zeros of the fraction are exact
  CHECK(fs_of("0.001", 3) == 1);  // 1 fs written in ps
  CHECK(fs_of("2.5", 12) == 2'500'000'000'000);
  CHECK(fs_of("007", 6) == 7'000'000);
  CHECK(fs_of("18446744073709551615", 0) == UINT64_MAX);
  CHECK(fs_of("18446744073.709551615", 9) == UINT64_MAX);
  CHECK(fs_of("18446744.073709551615", 12) == UINT64_MAX);  // ms
}

TEST_CASE("time literals that are not whole femtoseconds or overflow are rejected",
          "[parser][time]") {
  CHECK(why_not("0.5", 0) == "time 0.5fs is not a whole number of femtoseconds");
  CHECK(why_not("1.0005", 3) == "time 1.0005ps is not a whole number of femtoseconds");
  CHECK(why_not("18446744.073709551615", 9) ==
        "time 18446744.073709551615us is not a whole number of femtoseconds");
  CHECK(why_not("18446744073709551616", 0) ==
        "time 18446744073709551616fs does not fit in 64 bits of femtoseconds");
  CHECK(why_not("18446744073.709551616", 9) ==
        "time 18446744073.709551616us does not fit in 64 bits of femtoseconds");
  CHECK(why_not("18446745", 12) == "time 18446745ms does not fit in 64 bits of femtoseconds");
}

TEST_CASE("a bad time literal is reported at its own column, with the '..' of ranges intact",
          "[parser][time]") {
  diagnostics diags;
  auto d =
      load_design_text("input a\noutput q\nq = buf(a) delay 35ps..0.5fs\n", "t.settle", {}, diags);
  CHECK_FALSE(d);
  REQUIRE(diags.items.size() == 1);
  CHECK(format_diagnostic(diags.items[0]) ==
        "t.settle:3:24: error: time 0.5fs is not a whole number of femtoseconds\n"
        "q = buf(a) delay 35ps..0.5fs\n"
        "                       ^\n");
}

TEST_CASE("decimal times parse next to '..'", "[parser][time]") {
  diagnostics diags;
  auto d = load_design_text("input a\noutput q\nq = buf(a) delay 1.5ns..2.25ns\n", "t.settle", {},
                            diags);
  REQUIRE(d);
  CHECK(d->nets.delay[0].rise == delay_range{1'500'000, 1'875'000, 2'250'000});
}
