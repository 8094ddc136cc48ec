// Untimed analysis of a design's stimulus: every interleaving under unbounded gate delays.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "sim/analysis/state_graph.hpp"
#include "sim/model/design.hpp"

namespace settle {

/// Which engine answers: state-graph exploration (gmw or single) or ternary alone.
enum class explore_model : std::uint8_t { gmw, single, ternary };
const char* model_name(explore_model m);

struct explore_options {
  explore_model model = explore_model::gmw;
  std::uint64_t max_states = 2'000'000;  ///< per step
  /// The memory guard over the stored state graphs (--max-memory); 0: default_memory_guard().
  std::uint64_t max_bytes = 0;
  int max_excited = 20;      ///< gmw: excited gates allowed in one state
  int max_unknown = 12;      ///< x gate outputs enumerated over 0/1 at the start
  bool keep_graphs = false;  ///< keep every step's graph (for --dot)
};

/// One firing of a closed system's path: a gate taking a value, or a
/// reaction rule's pending firing applying its assignments.
struct closed_event {
  enum class kind : std::uint8_t { gate, rule } what = kind::gate;
  std::uint32_t id = 0;    ///< gate id, or index in stimulus::rules
  std::uint8_t value = 0;  ///< gate: the value it takes
  friend bool operator==(const closed_event&, const closed_event&) = default;
};
/// Firings in instants: the events of one instant happen together.
using closed_path = std::vector<std::vector<closed_event>>;

/// Whether some delays within the written ranges make the timed kernel follow
/// a path (difference constraints over its firing times, solved by
/// Bellman-Ford), and the corner that does.
struct timed_check {
  bool feasible = false;
  bool exact = true;       ///< infeasible: proved (false: the check did not decide)
  bool confirmed = false;  ///< feasible: a run at `corner` followed the path to the finding
  bool sampled = false;    ///< feasible: found by running sampled corners, not by the constraints
  std::string corner;      ///< feasible: a `fixed:` corner name for `run --corner`
  std::string why;         ///< infeasible or not decided: why
};

/// One reachable stable state: every gate output, and a shortest firing
/// sequence from a start state of the step that reaches it.
struct stable_state {
  std::vector<std::uint8_t> gates;         ///< per gate, 0 or 1
  std::vector<std::vector<gate_id>> path;  ///< gates fired together, step by step
  /// Closed systems: the inputs' values (per netlist::inputs) and the path
  /// with the environment's firings; empty otherwise.
  std::vector<logic> inputs;
  closed_path events;
};

/// A closed system's state with no excited gate and no pending firing while
/// some `times N` rule has fired fewer than N times.
struct closed_deadlock {
  std::vector<std::uint8_t> gates;  ///< per gate
  std::vector<logic> inputs;        ///< per netlist::inputs
  struct owed {
    std::uint32_t rule = 0;
    std::uint64_t fired = 0, times = 0;
  };
  std::vector<owed> owed_rules;
  closed_path path;
  timed_check timed;
};

/// A property checked on every reachable state and transition of the step.
struct closed_property {
  std::uint32_t index = 0;  ///< in stimulus::properties
  bool holds = true;
  closed_path path;  ///< violated: to the first violating instant
  timed_check timed;
};

/// A gate excited in one state and no longer excited in a successor without
/// having fired (non-persistence; Muller and Bartky 1959).
struct closed_hazard {
  gate_id gate = 0;
  bool output = false;  ///< the gate drives a reported net
  closed_path path;     ///< its last instant disables the gate
  timed_check timed;
};

/// A tri-state answer: unknown when the exploration did not finish.
enum class answer : std::uint8_t { no, yes, unknown };

struct explore_expect {
  const expectation* spec = nullptr;
  bool checked = true;  ///< false: explore cannot judge this kind (timing)
  bool pass = false;
  logic got = logic::x;  ///< value: the net's value when all stable states agree
  std::string detail;
};

struct explore_step {
  std::size_t index = 0;  ///< 1-based
  std::string label;
  bool explored = false;  ///< the state graph was built (possibly partially)
  bool complete = false;  ///< the whole state graph was explored
  bool exact = false;     ///< the answers are exact: complete, or a binary ternary outcome
  std::string stop;       ///< why exploration stopped or did not run
  std::uint64_t states = 0, edges = 0, start_states = 0;
  std::vector<stable_state> stable;
  answer critical_race = answer::unknown, noncritical_race = answer::unknown;
  answer may_oscillate = answer::unknown, must_oscillate = answer::unknown;
  std::vector<net_id>
      hazards;  ///< from the graph when complete, else possible static hazards from ternary
  std::uint32_t sccs = 0, nontrivial_sccs = 0, terminal_sccs = 0, oscillating_sccs = 0,
                largest_scc = 0;
  std::vector<logic> ternary_a, ternary;  ///< per net
  std::vector<logic> inputs;              ///< per net: input values during the step
  std::vector<explore_expect> expects;
  std::shared_ptr<const state_graph> graph;  ///< kept when explore_options::keep_graphs
  /// Closed systems (reaction rules or properties): the findings below.
  bool closed = false;
  std::vector<closed_deadlock> deadlocks;
  std::vector<closed_property> properties;  ///< the properties active in the step
  std::vector<closed_hazard> nonpersistent;
  bool pass() const;
};

/// The value of `net` in stable state `st` of step `s`: its driver's output,
/// or for an input the step's input value.
logic stable_value(const netlist& n, const explore_step& s, const stable_state& st, net_id net);

struct explore_result {
  explore_model model = explore_model::gmw;
  std::vector<net_id> reported;  ///< outputs, then watched nets
  std::vector<explore_step> steps;
  std::vector<std::string> notes;  ///< how the start state was resolved, fallbacks
  bool pass() const;
};

/// Explores the design's stimulus in fundamental mode: each step applies its
/// input changes to every state the previous step can rest in (its stable
/// states and terminal oscillations), then explores. Step 1 starts from the
/// init values; see the definition for how x gate outputs are resolved.
/// Returns nullopt and sets *error for what explore cannot analyse (clocks,
/// inputs left x).
std::optional<explore_result> explore_design(const design& d, const explore_options& o,
                                             std::string* error);

/// The default --max-memory in MiB.
inline constexpr std::uint64_t default_max_memory_mib = 2048;
/// Bytes the memory guard allows by default: 2048 MiB, or half of
/// MemAvailable (/proc/meminfo) when that is less.
std::uint64_t default_memory_guard();

}  // namespace settle
