// The lowered form of a .settle file: per-scope declarations, gates and stimulus statements (no
// X3).
#pragma once

#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <unordered_set>
#include <vector>

#include "sim/model/diagnostic.hpp"
#include "sim/model/netlist.hpp"
#include "sim/model/stimulus.hpp"

namespace settle::ir {

/// A name as written (a view into the source text, which outlives the IR), with its position.
struct ref {
  std::string_view name;
  source_loc loc;
  bool quoted = false;  ///< written in double quotes: a net's full name, never a constant
};

/// A pin-to-pin delay: `from NET DELAY` times the output changes a change of NET causes.
struct arc {
  ref from;
  gate_delay delay;
};

/// A gate. Its reads (the fan-in: arguments in order for primitives, distinct
/// nets for expr/gc; the names "0" and "1" are the constants) and its program
/// are ranges of its scope's pools, so a gate costs no heap block of its own.
struct gate {
  ref out;
  gate_kind kind = gate_kind::buf;
  std::uint32_t reads_begin = 0, reads_end = 0;
  std::uint32_t code_begin = 0, code_end = 0;
  std::uint32_t arcs_begin = 0, arcs_end = 0;  ///< its arcs, a range of the scope's arc pool
  bool has_delay = false;
  gate_delay delay;
  /// A metastable element (netlist::meta): the first or second grant of a
  /// mutex (the two stand next to each other) or a syncff, with its tau and window.
  enum class meta_role : std::uint8_t {
    none,
    first_grant,
    second_grant,
    syncff
  } meta = meta_role::none;
  delay_range tau, window;
};

struct binding {
  ref port, target;
  /// Bit `part` of a list `port: {a, b, ...}` of `parts` nets (MSB first) for
  /// a vector port, whose bits are ports `port[i]`; parts is 0 for one net.
  std::uint32_t part = 0, parts = 0;
};
struct inst {
  ref id, block;
  std::vector<binding> binds;
};
struct init {
  ref net;
  logic value = logic::x;
};

class reporter;

/// A block definition, or the top level (then ins/outs are inputs/outputs).
struct scope_def {
  ref id;
  /// The reporter of the file the scope is written in, when that is not the
  /// elaborated file's own (a module of an imported or included Verilog file).
  reporter* rep = nullptr;
  std::vector<ref> ins, outs, wires;
  std::vector<gate> gates;
  std::vector<ref> read_pool;            ///< every gate's reads, back to back
  std::vector<std::uint32_t> code_pool;  ///< every gate's program, back to back
  std::vector<arc> arc_pool;             ///< every gate's arcs, back to back
  std::vector<inst> insts;
  std::vector<init> inits;
  std::optional<gate_delay> default_delay;
};

/// One statement of a stimulus block, times already in fs.
struct stim_stmt {
  enum class kind : std::uint8_t {
    at,
    after,
    clock,
    settle,
    run,
    watch,
    expect_value,
    expect_stable,
    expect_oscillating,
    expect_within,
    expect_no_glitch,
    expect_deterministic,
    when,
    property,
    gauge,
    expect_gauge,
    expect_resolves,
  } what = kind::settle;
  time_fs time = 0, time2 = 0;  ///< at/after/run/within time; clock period+high; oscillating lo+hi
  bool has_time = false, has_time2 = false;
  std::uint64_t cycles = 0;
  std::vector<ref> nets;
  std::vector<logic> values;
  source_loc time_loc, time2_loc;  ///< where the time literals are written (at/after/run/clock)
  std::string text;                ///< the statement as written, trimmed
  source_loc loc;
  source_loc at_loc;    ///< clock: its `at` literal (has_at)
  bool has_at = false;  ///< clock ... at T
  time_fs at = 0;       ///< clock ... at T
  // Closed-loop statements.
  std::vector<std::uint32_t>
      code;                 ///< when/property: the expression in postfix (operands index reads)
  std::vector<ref> reads;   ///< the distinct nets the expression reads
  std::string expr_text;    ///< the expression as written
  delay_range range;        ///< when: the delay; expect_gauge: the range
  std::uint64_t count = 0;  ///< when: times N (0: none)
  std::string word;         ///< property: always/never/rises/falls; gauge: its kind name
  ref name;                 ///< gauge / expect_gauge: the gauge's name
  bool from_rises = true, to_rises = true;  ///< gauge latency edges
};

struct stim_block {
  bool present = false;
  source_loc loc, close_loc;
  std::vector<stim_stmt> stmts;
};

/// Where a top-level gate statement stands in the text: the bulk of a large
/// file, kept as offsets and parsed again straight into the netlist.
struct piece {
  std::uint32_t begin = 0, size = 0;
};

/// `import "PATH"`: the path as written, and where its opening quote stands.
struct import_stmt {
  std::string path;
  source_loc loc;
};

struct file {
  std::string_view text;  ///< the source text the pieces and refs point into
  std::vector<import_stmt> imports;
  scope_def top;  ///< top-level gates are in top_gates, not top.gates
  std::vector<piece> top_gates;
  std::size_t top_reads = 0;  ///< an upper bound of the top-level gates' reads
  std::vector<scope_def> blocks;
  stim_block stim;
  /// When set, may drop the resident pages of the text before an offset (a
  /// mapped file reads them again if a diagnostic needs them).
  std::function<void(std::size_t)> release_text;
};

/// Source text with a line index: turns positions into diagnostics.
class reporter {
 public:
  reporter(std::string_view text, std::string file, diagnostics& out);
  /// The 1-based line and column of a pointer into the text.
  source_loc loc_of(const char* p) const;
  /// Adds a diagnostic once per (position, message).
  void report(diagnostic::level lv, source_loc at, const std::string& msg);
  void error(source_loc at, const std::string& msg) { report(diagnostic::level::error, at, msg); }
  /// The text of a 1-based line, without its newline ("" when out of range).
  std::string line_text(std::uint32_t line) const;
  void warning(source_loc at, const std::string& msg) {
    report(diagnostic::level::warning, at, msg);
  }
  /// An error with a note at a second place (the other half of a conflict).
  void error_with_note(source_loc at, const std::string& msg, source_loc note_at,
                       const std::string& note);
  std::size_t errors() const { return errors_; }
  const std::string& file() const { return file_; }
  /// While holding, diagnostics wait aside (and do not count) until release() or drop().
  void hold(bool on) { holding_ = on; }
  void release();
  void drop() { held_.clear(); }

 private:
  diagnostic make(diagnostic::level lv, source_loc at, const std::string& msg) const;
  void add(diagnostic d);

  std::string_view text_;
  std::string file_;
  diagnostics& out_;
  std::vector<std::uint32_t> line_start_;
  std::unordered_set<std::string> seen_;
  std::size_t errors_ = 0;
  bool holding_ = false;
  std::vector<diagnostic> held_;
};

/// What the file may hold: a design (with an optional embedded stimulus), or
/// only one `stimulus { }` block (a --stim file).
enum class file_mode : std::uint8_t { design, stimulus_only };

/// Parses the whole text statement by statement into `out`; reports syntax and
/// structure errors and keeps going on the next statement. Top-level gate
/// statements are only located (out.top_gates): elaborate() parses them.
void parse_file(std::string_view text, file_mode mode, file& out, reporter& rep);

/// Calls `each` with every statement of `text` in order, as parse_file splits
/// them: comments, terminators and surrounding blanks removed.
void for_each_statement(std::string_view text, const std::function<void(std::string_view)>& each);

/// Parses and lowers one top-level gate statement located by parse_file, its
/// reads and program into `pools`; false (after reporting) when malformed.
/// It tries lower_simple_gate first and parse_gate_by_grammar on the forms
/// the fast path declines: the two must agree wherever the fast path succeeds.
bool parse_top_gate(const file& f, piece p, gate& out, scope_def& pools, reporter& rep);

/// Lowers a gate of the plain form `NAME = KIND(NET|0|1, ...)` (no delay, no
/// expression) straight from its text, a statement of the source that starts
/// at `at`, without the grammar. False, with nothing reported and the pools
/// as they were, for any other form.
bool lower_simple_gate(std::string_view text, source_loc at, gate& out, scope_def& pools);

/// Parses a gate statement (a view into the reporter's text) with the grammar
/// and lowers it; false (after reporting) when malformed or not a gate.
bool parse_gate_by_grammar(std::string_view text, gate& out, scope_def& pools, reporter& rep);

/// Reports the syntax errors of the top-level gate statements (when the file
/// has other errors and is not elaborated).
void check_top_gates(const file& f, reporter& rep);

/// Builds the flat netlist from the lowered file, parsing the top-level gate
/// statements on the way; reports their syntax errors and, when there are
/// none, elaboration errors. Releases the file's top-level lists as it goes.
void elaborate(file& f, netlist& nl, reporter& rep);

/// Reports stimulus times whose use passes the end of representable time
/// (given the design's longest delay), two assignments to one input at one
/// instant of a step and two clocks on one net in one step.
void check_stimulus(const stim_block& sb, const netlist& nl, reporter& rep);

/// Turns stimulus statements into steps against an elaborated netlist.
void build_stimulus(const stim_block& sb, const netlist& nl, stimulus& out, reporter& rep);

}  // namespace settle::ir
