// Delay corners: which concrete delay every gate gets in one run.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "sim/model/design.hpp"
#include "sim/model/netlist.hpp"

namespace settle {

/// The corner variables of one gate: the delays `extremes` and `exhaustive`
/// move between min and max. A fixed edge (min = max) is no variable. When
/// rise and fall share one range (a gate written with a single range) one
/// variable moves both; otherwise each edge whose range is not fixed is a
/// variable of its own, so rise-max with fall-min is a corner.
struct gate_variables {
  bool rise = false, fall = false;  ///< which edges are variables
  bool shared = false;              ///< rise and fall are one variable (counted once)
  std::uint32_t count() const { return shared ? 1u : unsigned(rise) + unsigned(fall); }
};
gate_variables variables_of(const gate_delay& d);

/// The delay variables a corner sets, numbered in this order: each gate's
/// (variables_of), then each reaction rule whose delay is a range (a fixed
/// `after` is no variable). What `extremes` and `exhaustive` enumerate.
std::size_t delay_variables(const design& d);
/// Gate g's corner variables: its delay's, or with arcs the sum of its arcs',
/// and for the first gate of a metastable element its tau and window ranges.
std::uint32_t gate_variable_count(const netlist& n, gate_id g);

struct fixed_delays;

/// A named corner. Names print and parse back exactly:
/// "min", "max", "typ", "random:S" (= "random:S#0"), "random:S#i",
/// "gauss:S#i", "extremes#k", "exhaustive#k", and explicit delays
/// "fixed:NAME=T,NAME=R/F,rule#K=T1/T2/...,..." (see fixed_delays).
struct corner {
  enum class kind : std::uint8_t {
    min,
    typ,
    max,
    random,
    gauss,
    extremes,
    exhaustive,
    fixed
  } what = kind::typ;
  std::uint64_t seed = 0;
  std::uint64_t index = 0;
  double spread = 1.0;  ///< ranges scaled about typ by this factor (1 = as written)
  /// The delays of a `fixed:` corner (null for every other kind). Shared and
  /// immutable, so copying a corner stays cheap.
  std::shared_ptr<const fixed_delays> fixed;

  std::string name() const;
};

/// Parses a corner name; on failure returns nullopt and sets *error.
std::optional<corner> parse_corner(std::string_view text, std::string* error);

/// Empty when corner `c` exists for a design of `variables` delay variables
/// (its gates and reaction rules, delay_variables); otherwise why not, with
/// the valid range ("this design has 11 extremes corners, numbered 0..10").
/// extremes#k exists for k < 3 + 2 x variables, exhaustive#k for
/// k < 2^variables; min, typ, max and the sampled corners always exist.
std::string corner_range_error(const corner& c, std::size_t variables);

/// The explicit delays of a `fixed:` corner. As written, entries are
/// `NAME=T` (gate NAME, the name netlist::gate_name gives, takes T on both
/// edges), `NAME=R/F` (rise R, fall F) and `rule#K=T1/.../Tm` (reaction rule
/// K, 1-based in the order of stimulus::rules: its firing i, 0-based, takes
/// T(i+1), and every firing past the list Tm). Times are literals with a
/// unit, as the language writes them. Gates and rules not listed take typ.
struct fixed_delays {
  struct gate_entry {
    std::string name;
    time_fs rise = 0, fall = 0;
  };
  struct rule_entry {
    std::uint32_t number = 0;  ///< K, 1-based
    std::vector<time_fs> firings;
  };
  std::vector<gate_entry> gates;  ///< in the order written
  std::vector<rule_entry> rules;  ///< in the order written
  /// Set by corner_design_error (or fixed_corner) for one design: every
  /// gate's rise and fall (listed or typ) and every rule's list (empty = typ).
  bool resolved = false;
  std::vector<time_fs> rise, fall;
  std::vector<std::vector<time_fs>> rule_firings;
};

/// Empty when every entry of corner `c` names a gate or reaction rule of `d`
/// once and gives it delays within its written ranges (rise and fall apart,
/// every firing of a rule); otherwise why not ("delay 90ps of gate 'x'
/// (rise) is outside its range 35ps..55ps"). For a `fixed:` corner it also
/// resolves the names, storing the delays per gate and rule in c.fixed; any
/// other corner is left as it is and gives "".
std::string corner_design_error(const design& d, corner& c);

/// A `fixed:` corner of design `d` with these delays: rise[g] and fall[g]
/// for every gate (gate_count entries each), rule_firings[k] for rule k's
/// firings in order (one list per rule; empty = typ). Its name() lists every
/// gate with a rise or fall range that is not fixed, then every rule with a
/// list, so `settle run --corner NAME` replays it exactly. The delays are not
/// checked against the ranges: corner_design_error does that.
corner fixed_corner(const design& d, std::span<const time_fs> rise, std::span<const time_fs> fall,
                    const std::vector<std::vector<time_fs>>& rule_firings);

/// For a `fixed:` corner, how many first firings of rule `rule` have a delay
/// of their own: from firing count - 1 on every firing takes the last listed
/// delay (0 when the rule is not listed). 0 for every other corner kind.
std::uint64_t fixed_rule_firings(const corner& c, std::uint32_t rule);

/// Concrete delays per gate, one table per run. It also records the corner,
/// which reaction rules' delays are drawn from (rule_delay), and each rule's
/// number among the corner variables (a fixed rule has none).
struct delay_table {
  std::vector<time_fs> rise, fall;
  /// Per arc (netlist::arcs), when the netlist has any; a gate with arcs
  /// then has in rise/fall the largest of its arcs' delays, which the kernel
  /// takes where no input change can be named (the first evaluation).
  std::vector<time_fs> arc_rise, arc_fall;
  /// Per metastable element (netlist::meta): this corner's tau and window.
  std::vector<time_fs> tau, window;
  /// The corner's counter-based stream for draws made during the run (the
  /// winner of a tie): mixed with what is drawn for, it replays exactly.
  std::uint64_t run_key = 0;
  corner which;
  std::uint64_t gate_vars = 0;          ///< corner variables of the gates
  std::vector<std::uint64_t> rule_var;  ///< per rule; none_var for a fixed delay
  static constexpr std::uint64_t none_var = ~std::uint64_t{0};
};

/// The delay of firing `firing` (0-based) of reaction rule `rule` whose range
/// is `r`, at the corner `t` was filled for. A rule with a range is one more
/// corner variable after the gates' (t.rule_var); `random:` and `gauss:` draw
/// afresh for every firing from the corner's counter-based stream, so the
/// corner replays exactly.
time_fs rule_delay(const delay_table& t, const delay_range& r, std::uint32_t rule,
                   std::uint64_t firing);

/// Fills `out` with the delays corner `c` gives every gate of `n`. Depends on
/// (corner, gate index) alone, so any thread computes the same table.
/// `random:` and `gauss:` draw each gate's rise and fall independently.
void fill_delays(const netlist& n, const corner& c, delay_table& out);
/// The same, and numbers the design's reaction rules among the variables.
void fill_delays(const design& d, const corner& c, delay_table& out);

/// The range of a gate edge after scaling about typ by `spread` (never below 0).
delay_range scaled(const delay_range& r, double spread);

}  // namespace settle
