// Checked and saturating time arithmetic near 0 and 2^64 fs; escaped diagnostics of damaged bytes.
#include <catch2/catch.hpp>
#include <string>

#include "sim/model/diagnostic.hpp"
#include "sim/model/time.hpp"

using namespace settle;

// The reference is unsigned __int128 arithmetic, which holds any sum of two
// 64-bit values exactly (GCC manual, "128-bit Integers"); the last instant is
// 2^64 - 2 fs and 2^64 - 1 fs means never (README, "Time at its edges").
TEST_CASE("checked_add refuses exactly the sums past the last instant", "[sim][time]") {
  const time_fs probe[] = {
      0,         1,         2, 15000, 1ull << 32, 1ull << 63, time_last - 15000, time_last - 1,
      time_last, time_never};
  for (time_fs a : probe)
    for (time_fs b : probe) {
      const unsigned __int128 sum = static_cast<unsigned __int128>(a) + b;
      const auto got = checked_add(a, b);
      INFO(a << " + " << b);
      CHECK(got.has_value() == (sum <= time_last));
      if (got) CHECK(*got == static_cast<time_fs>(sum));
      CHECK(saturating_add(a, b) == (sum <= time_last ? static_cast<time_fs>(sum) : time_last));
      CHECK(saturating_add(a, b) != time_never);
      const unsigned __int128 product = static_cast<unsigned __int128>(a) * b;
      const auto p = checked_mul(a, b);
      CHECK(p.has_value() == (product <= time_last));
      if (p) CHECK(*p == static_cast<time_fs>(product));
    }
  CHECK(last_safe_instant(15000) == time_last - 15000);
  CHECK(last_safe_instant(time_last) == 0);
}

TEST_CASE("a horizon is greater than 0 and at most the last instant", "[sim][time]") {
  std::string why;
  CHECK_FALSE(horizon_ok(0, why));
  CHECK(why == "must be greater than 0");
  CHECK(horizon_ok(1, why));
  CHECK(horizon_ok(time_last, why));
  CHECK_FALSE(horizon_ok(time_never, why));
  CHECK(why.find("passes the end of representable time") != std::string::npos);
}

TEST_CASE("control bytes are shown escaped and the caret stays under its byte", "[parser][diag]") {
  diagnostic d;
  d.file = "panel.settle";
  d.line = 1;
  d.col = 8;  // the NUL
  d.message = std::string("unexpected '\0b'", 15);
  set_source_line(d, std::string_view("input a\0b", 9));
  // The caret column counts the escape's width: "input a" is 7 columns, then "\0".
  CHECK(format_diagnostic(d) ==
        "panel.settle:1:8: error: unexpected '\\0b'\ninput a\\0b\n       ^\n");
  d.col = 9;  // the byte after the NUL: two columns further, not one
  CHECK(format_diagnostic(d).substr(
            format_diagnostic(d).rfind('\n', format_diagnostic(d).size() - 2) + 1) ==
        "         ^\n");
  CHECK(escape_controls(std::string_view("a\x01\x7f\tb", 5)) == "a\\x01\\x7f\\x09b");
  CHECK(escape_controls(std::string_view("a\tb", 3), true) == "a\tb");
}

TEST_CASE("a note prints right after its error", "[parser][diag]") {
  diagnostic e;
  e.file = "lamp.settle";
  e.line = 5, e.col = 19;
  e.message = "input 'a' is assigned twice at one instant of this step";
  set_source_line(e, "    at 0ns a = 1, a = 0");
  diagnostic n = e;
  n.severity = diagnostic::level::note;
  n.col = 12;
  n.message = "the other assignment to 'a' at that instant";
  e.notes.push_back(n);
  CHECK(format_diagnostic(e) ==
        "lamp.settle:5:19: error: input 'a' is assigned twice at one instant of this step\n"
        "    at 0ns a = 1, a = 0\n"
        "                  ^\n"
        "lamp.settle:5:12: note: the other assignment to 'a' at that instant\n"
        "    at 0ns a = 1, a = 0\n"
        "           ^\n");
}
