// Static stimulus checks: times past the end of representable time, conflicts in a step.
#include <fmt/format.h>

#include <algorithm>
#include <map>
#include <tuple>

#include "parser/ir.hpp"
#include "sim/model/time.hpp"

namespace settle::ir {
namespace {

// Wide enough for any sum of a few 64-bit times, so the checks never wrap.
using wide = unsigned __int128;
constexpr wide last = time_last;

std::string shown(wide v) {
  if (v > std::numeric_limits<std::uint64_t>::max()) return "more than 18446744073709551615fs";
  return fmt::format("{}fs", static_cast<std::uint64_t>(v));
}

// The instant of an action within its step, as far as the text fixes it:
// relative to the step's reference time until the first `at`, absolute after.
struct instant {
  bool absolute = false;
  wide value = 0;
  auto key() const { return std::pair(absolute, value); }
};

class checker {
 public:
  checker(const netlist& nl, reporter& rep)
      : nl_(nl), rep_(rep), longest_(nl.largest_max_delay()) {}

  void statement(const stim_stmt& s) {
    using k = stim_stmt::kind;
    switch (s.what) {
      case k::at:
        at_ = {true, s.time};
        lower_ = std::max<wide>(lower_, s.time);
        change(s, lower_);
        break;
      case k::after:
        at_.value += s.time;
        lower_ += s.time;
        change(s, lower_);
        break;
      case k::clock:
        clock(s);
        break;
      case k::run:
        if (!past_end_ && lower_ + s.time > last) {
          past_end_ = true;
          rep_.error(s.time_loc,
                     fmt::format("a run window of {}fs from {} or later passes the end of "
                                 "representable time ({}fs)",
                                 s.time, shown(lower_), time_last));
        }
        next_step();
        break;
      case k::settle:
        next_step();
        break;
      default:
        break;
    }
  }

 private:
  // A step's start is at or after every action time before it, so lower_
  // stays a lower bound of the time of every later action.
  void next_step() {
    at_ = {};
    assigned_.clear();
    clocked_.clear();
  }

  net_id input(const ref& r) const {
    const net_id n = nl_.find(r.name);
    return n == no_id || n <= netlist::const1 || nl_.driver[n] != no_id ? no_id : n;
  }

  // An input change at `t` (or later): what it sets off must end by time_last.
  void reach(wide t, source_loc at, const char* what) {
    if (past_end_ || t + longest_ <= last) return;
    past_end_ = true;
    if (t > last)
      rep_.error(at, fmt::format("{} at {} passes the end of representable time ({}fs)", what,
                                 shown(t), time_last));
    else
      rep_.error(
          at, fmt::format(
                  "{} at {} or later, followed by the design's longest delay of {}fs, passes the "
                  "end of representable time ({}fs)",
                  what, shown(t), longest_, time_last));
  }

  void change(const stim_stmt& s, wide t) {
    reach(t, s.time_loc, "an input change");
    for (const auto& r : s.nets) {
      const net_id n = input(r);
      if (n == no_id) continue;
      auto [it, fresh] = assigned_.try_emplace(std::tuple(n, at_.absolute, at_.value), r.loc);
      if (!fresh)
        rep_.error_with_note(
            r.loc, fmt::format("input '{}' is assigned twice at one instant of this step", r.name),
            it->second, fmt::format("the other assignment to '{}' at that instant", r.name));
    }
  }

  void clock(const stim_stmt& s) {
    const ref& r = s.nets[0];
    const net_id n = input(r);
    if (n != no_id) {
      auto [it, fresh] = clocked_.try_emplace(n, r.loc);
      if (!fresh)
        rep_.error_with_note(r.loc,
                             fmt::format("input '{}' already has a clock in this step", r.name),
                             it->second, fmt::format("the other clock on '{}'", r.name));
    }
    const wide period = s.time, high = s.has_time2 ? s.time2 : s.time / 2;
    reach(lower_, s.time_loc, "a clock's first rise");
    reach(lower_ + high, s.time2_loc, "a clock's first fall");
    if (s.cycles != 1) reach(lower_ + period, s.time_loc, "a clock's second rise");
    // (cycles - 1) x period, clamped just past the end so the sum cannot wrap.
    const wide cycles_span = std::min<wide>(static_cast<wide>(s.cycles - 1) * period, last + 1);
    if (s.cycles > 1) reach(lower_ + cycles_span + high, s.time_loc, "a clock's last fall");
  }

  const netlist& nl_;
  reporter& rep_;
  wide longest_;
  wide lower_ = 0;         // a lower bound of the time of the actions so far
  instant at_;             // the cursor of the present step
  bool past_end_ = false;  // reported once: every later time is past it too
  std::map<std::tuple<net_id, bool, wide>, source_loc> assigned_;
  std::map<net_id, source_loc> clocked_;
};

}  // namespace

void check_stimulus(const stim_block& sb, const netlist& nl, reporter& rep) {
  checker c(nl, rep);
  for (const auto& s : sb.stmts) c.statement(s);
}

}  // namespace settle::ir
