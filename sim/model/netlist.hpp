// The elaborated, flat, immutable netlist shared read-only by every run.
#pragma once

#include <algorithm>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <unordered_map>
#include <utility>
#include <vector>

#include "sim/model/id_table.hpp"
#include "sim/model/logic.hpp"
#include "sim/model/program.hpp"

namespace settle {

using net_id = std::uint32_t;
using gate_id = std::uint32_t;

/// Gate kinds. `expr` is a complex gate (one delay, any ~ & | ^ expression);
/// `celem` is the Muller C-element; `gc` the generalised C-element whose set
/// and reset functions are programs; `dff` an edge-triggered flip-flop
/// primitive (fan-in D, CK: Q takes D at each rising edge of CK), made only by
/// the .bench importer with `--dff primitive`. `mutex` and `syncff` are the
/// metastable elements (netlist::meta): a mutual-exclusion element is two
/// mutex gates, each granting its own request (fan-in: own request, the
/// other request, the other grant); a synchronizing flip-flop is one syncff
/// gate (fan-in D, CK).
enum class gate_kind : std::uint8_t {
  buf,
  inv,
  and_,
  nand,
  or_,
  nor,
  xor_,
  xnor,
  mux,
  maj,
  celem,
  gc,
  expr,
  dff,
  mutex,
  syncff,
};
inline constexpr int gate_kind_count = 16;

/// The name users write for a kind: "buf", "not", "and", ... "gc", "expr".
const char* kind_name(gate_kind k);

/// True for kinds whose next output depends on their present output.
constexpr bool holds_state(gate_kind k) {
  return k == gate_kind::celem || k == gate_kind::gc || k == gate_kind::dff ||
         k == gate_kind::mutex || k == gate_kind::syncff;
}

/// The kinds whose timing follows the metastability model (netlist::meta).
constexpr bool is_metastable(gate_kind k) {
  return k == gate_kind::mutex || k == gate_kind::syncff;
}

/// A delay range; typ lies in [min, max].
struct delay_range {
  time_fs min = 0, typ = 0, max = 0;
  friend bool operator==(const delay_range&, const delay_range&) = default;
};

/// A metastable element's parameters (from memory of Veendrick 1980, IEEE
/// JSSC 15(2), and Kleeman and Cantoni 1987, IEEE Trans. Computers 36(10)):
/// two events closer than the window W resolve tau x ln(W / gap) later than
/// the normal delay. A mutex's gates are `gates[0]` (the first grant
/// written) and `gates[1]`; a syncff has gates[1] = no_id.
struct meta_element {
  gate_id gates[2] = {no_id, no_id};
  delay_range tau, window;
};

/// A gate's delays: 0->1 output changes use `rise`, 1->0 use `fall`, any change
/// to or from x the smaller of the two.
struct gate_delay {
  delay_range rise, fall;
  bool transport = false;  ///< transport gates propagate every change
  friend bool operator==(const gate_delay&, const gate_delay&) = default;
};

/// Gates' delays, each distinct record stored once (designs have few):
/// `delay[g]` is gate g's record; a gate costs one index.
class gate_delays {
 public:
  const gate_delay& operator[](gate_id g) const { return records_[index_[g]]; }
  std::size_t size() const { return index_.size(); }
  bool empty() const { return index_.empty(); }
  void reserve(std::size_t gates) { index_.reserve(gates); }
  /// Appends the next gate's delay, sharing an equal record when there is one.
  void push_back(const gate_delay& d);
  /// Gives gate g the delay d (sharing an equal record when there is one).
  void assign(gate_id g, const gate_delay& d) { index_[g] = record_for(d); }
  /// The distinct records; changing one changes every gate that shares it.
  std::vector<gate_delay>& records() { return records_; }
  const std::vector<gate_delay>& records() const { return records_; }
  /// The record gate g uses.
  std::uint32_t record_of(gate_id g) const { return index_[g]; }

 private:
  static std::size_t hash(const gate_delay& d);
  std::uint32_t record_for(const gate_delay& d);
  std::vector<gate_delay> records_;
  std::vector<std::uint32_t> index_;
  id_table lookup_;
};

/// A block instance (or the top level, scope 0) for waveform hierarchy.
struct scope {
  std::string name;   ///< instance name; "" for the top
  std::string block;  ///< block definition name; "" for the top
  std::uint32_t parent = no_id;
};

/// A name visible in a scope. Port names of an instance alias the parent's net.
struct net_alias {
  std::uint32_t scope = 0;
  std::string local;  ///< the name inside its scope ("q_n")
  net_id net = 0;
};

/// Where something was written, for diagnostics after elaboration.
struct source_loc {
  std::uint32_t line = 0, col = 0;
};

/// The flat netlist. Nets 0 and 1 are the constants 0 and 1 (hidden: not
/// counted, not dumped). Every other net is driven by exactly one input or gate.
struct netlist {
  // ---- nets
  std::vector<std::string> net_name;  ///< full hierarchical name: "deb.x" or "clean"
  std::vector<gate_id> driver;        ///< gate driving the net; no_id for inputs and constants
  std::vector<logic> init;            ///< initial value (x unless `init` says otherwise)
  std::vector<std::uint32_t> fanout_begin;  ///< CSR over nets: size nets+1
  std::vector<gate_id> fanout;              ///< gates reading each net (each gate once per net)
  std::vector<net_id> inputs, outputs;      ///< in declaration order
  std::vector<net_alias> aliases;           ///< every (scope, name) -> net, ports included
  std::vector<scope> scopes;                ///< scopes[0] is the top level
  std::vector<std::uint32_t> net_scope;     ///< scope where each net was declared

  // ---- gates (structure of arrays)
  std::vector<gate_kind> kind;
  std::vector<net_id> gate_out;
  std::vector<std::uint32_t> fanin_begin;  ///< CSR over gates: size gates+1
  std::vector<net_id> fanin;
  std::vector<std::uint32_t> code_begin;  ///< CSR over gates: programs of expr/gc gates
  std::vector<std::uint32_t> code;
  gate_delays delay;  ///< delay[g]: gate g's delays
  /// Pin-to-pin delays: a gate with arcs has one delay per fan-in, arc k
  /// timing the output changes that a change of fan-in k causes. Gate g's
  /// arcs are arcs[arc_at[g] ..] when arc_at reaches g and arc_at[g] is not
  /// no_id; its `delay` is then their envelope (each edge from the
  /// smallest min to the largest max), for whatever needs one range.
  std::vector<std::uint32_t> arc_at;
  std::vector<gate_delay> arcs;
  /// Metastable elements; gate g belongs to meta[meta_at[g]] when meta_at
  /// reaches g and is not no_id.
  std::vector<meta_element> meta;
  std::vector<std::uint32_t> meta_at;
  std::vector<source_loc> gate_loc;  ///< where each gate was written
  /// The scope (instance) each gate was written in; empty when every gate is
  /// at the top level (the .bench importer). Read by SDF back-annotation.
  std::vector<std::uint32_t> gate_scope;
  /// Set by finish(): gates whose exact ternary value needs enumeration of
  /// their x inputs (complex gates, and primitives that read a net twice or
  /// read their own output where that matters).
  std::vector<std::uint8_t> enumerate;

  // ---- what the source held, for `check`
  std::uint32_t blocks = 0;     ///< block definitions
  std::uint32_t instances = 0;  ///< block instances placed (all levels)

  static constexpr net_id const0 = 0, const1 = 1;

  std::size_t net_count() const { return net_name.size(); }
  std::size_t gate_count() const { return kind.size(); }
  /// A gate's name is its output net's name.
  const std::string& gate_name(gate_id g) const { return net_name[gate_out[g]]; }
  /// The net for a full or hierarchical name (a net's own or an added name), or no_id.
  net_id find(std::string_view name) const;
  /// Also finds net `id` under `full_name` ("deb.q" for a port of instance
  /// deb); a name already known keeps its net. False when it was known.
  bool add_name(std::string full_name, net_id id);
  /// Sizes the name index (and the net arrays) for `nets` nets.
  void reserve_nets(std::size_t nets);
  bool has_arcs(gate_id g) const { return g < arc_at.size() && arc_at[g] != no_id; }
  /// Gate g's arcs, in fan-in order (empty when it has none).
  std::span<const gate_delay> arcs_of(gate_id g) const {
    if (!has_arcs(g)) return {};
    return {arcs.data() + arc_at[g], fanin_begin[g + 1] - fanin_begin[g]};
  }
  /// The element gate g belongs to, or null.
  const meta_element* meta_of(gate_id g) const {
    return g < meta_at.size() && meta_at[g] != no_id ? &meta[meta_at[g]] : nullptr;
  }
  /// Records element `e` (its gates added already); returns its index.
  std::uint32_t add_meta(const meta_element& e);
  /// Gives gate g one delay per fan-in (`a` has its fan-in count of them) and
  /// sets its delay to their envelope; transport follows the gate's own.
  void set_arcs(gate_id g, std::span<const gate_delay> a);
  /// Largest max delay over all gates and edges (0 for an empty netlist).
  time_fs largest_max_delay() const;
  /// Smallest nonzero min delay over all gates and edges (0 when there is none).
  time_fs smallest_min_delay() const;
  /// The names of `nets` joined by ", " ("ack, req").
  std::string names_of(const std::vector<net_id>& nets) const;

  /// Creates the two constant nets (ids 0 and 1) and the top scope; call first.
  void begin();
  /// Adds a net with its full name in `scope`; registers the name (unless it is
  /// already known: then find() keeps the earlier net). Returns its id.
  net_id add_net(std::string full_name, std::uint32_t scope_index);
  /// Adds a gate (fan-in, program) and records it as the driver of `out`.
  gate_id add_gate(gate_kind k, net_id out, const std::vector<net_id>& fanin,
                   const std::vector<std::uint32_t>& program, const gate_delay& d,
                   source_loc loc = {});
  /// Builds the fan-out lists from the fan-in lists; call once after the last gate.
  void finish();

 private:
  void mark_enumerated_gates();
  /// The name index: net ids (keyed by net_name) and, with the top bit set,
  /// indexes into extra_names_ (names that are not a net's own).
  std::string_view key_of(std::uint32_t v) const {
    return v & extra_bit ? std::string_view(extra_names_[v & ~extra_bit].first)
                         : std::string_view(net_name[v]);
  }
  static constexpr std::uint32_t extra_bit = 0x80000000u;
  id_table names_;
  std::vector<std::pair<std::string, net_id>> extra_names_;
};

}  // namespace settle
