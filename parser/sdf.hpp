// SDF (IEEE 1497-2001) back-annotation: what an SDF file holds, read into
// plain data, and its annotation onto the flat netlist (no X3 here).
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "sim/model/diagnostic.hpp"
#include "sim/model/netlist.hpp"

namespace settle {

/// Where something was written in the SDF file (1-based).
struct sdf_pos {
  std::uint32_t line = 0, col = 0;
};

/// One (min:typ:max) value in femtoseconds, exact. A part left out of the
/// triple (`(1::3)`) is empty. Values are signed: INCREMENT may subtract.
struct sdf_triple {
  std::optional<std::int64_t> min, typ, max;
  sdf_pos pos;
};

/// One delay entry of a DELAY block.
struct sdf_entry {
  enum class kind : std::uint8_t { iopath, interconnect, port } what = kind::iopath;
  bool increment = false;  ///< inside (INCREMENT ...) rather than (ABSOLUTE ...)
  std::string from;        ///< IOPATH input port; INTERCONNECT driver; PORT: the port
  std::string to;          ///< IOPATH output port; INTERCONNECT load; PORT: empty
  std::string edge;        ///< IOPATH input edge qualifier ("posedge", "negedge", "01", ...)
  std::string cond;        ///< COND expression as written (empty: none)
  bool condelse = false;   ///< under CONDELSE
  /// The values as written, in order: the first times rising outputs, the
  /// second falling ones; an empty `()` is an empty optional.
  std::vector<std::optional<sdf_triple>> values;
  sdf_pos pos;
};

/// One CELL.
struct sdf_cell {
  std::string celltype;
  std::string instance;               ///< the path as written ("" for the top)
  std::vector<std::string> segments;  ///< the path split at the DIVIDER, escapes removed
  bool wildcard = false;              ///< `(INSTANCE *)` or a `*` segment
  std::vector<sdf_entry> entries;
  sdf_pos pos;
};

/// An SDF file as read.
struct sdf_file {
  std::string path;  ///< as given, for diagnostics
  std::string text;  ///< the file's text, for the source lines of diagnostics
  std::string version, design, date, vendor, program, program_version, process;
  char divider = '.';
  int timescale_exponent = 6;     ///< the TIMESCALE as a power of ten of fs (6: 1ns)
  std::string timescale = "1ns";  ///< as written (normalised)
  std::vector<sdf_cell> cells;
};

/// Reads an SDF file. Errors and warnings (constructs skipped) go to `diags`
/// with the file's line:col; returns nullopt on an error.
std::optional<sdf_file> read_sdf(const std::string& path, diagnostics& diags);
/// The same from text in memory; `name` is used in diagnostics.
std::optional<sdf_file> read_sdf_text(std::string text, const std::string& name,
                                      diagnostics& diags);

/// What the SDF files applied to a netlist did, for `settle check`.
struct sdf_report {
  std::uint32_t files = 0;
  std::uint64_t arcs_annotated = 0;              ///< distinct arcs (gate, fan-in) an SDF entry set
  std::uint64_t gates_kept = 0;                  ///< gates none of whose arcs was set
  std::vector<std::string> unmatched_instances;  ///< CELL INSTANCE paths that named nothing

  // ---- state across files (per fan-in position, netlist::fanin order)
  std::vector<std::uint8_t> touched;
  std::vector<gate_delay> path;                   ///< the gate's own part of each arc
  std::vector<delay_range> wire_rise, wire_fall;  ///< INTERCONNECT/PORT added on each arc
};

/// Applies `f` to `n`: IOPATH entries set arcs of the gate driving the
/// cell's output (the gates between, in a cell of several, take zero);
/// INTERCONNECT and PORT entries add to the load gate's arc from that net. Files applied one after
/// the other share `report`. Warnings name the SDF file's line:col; returns false on an error.
bool annotate_sdf(netlist& n, const sdf_file& f, diagnostics& diags, sdf_report& report);

/// An INSTANCE or port path split at `divider`; a backslash escapes the next byte.
std::vector<std::string> split_sdf_path(std::string_view p, char divider);

/// A diagnostic at `at` of SDF file `f`, with its source line for the caret.
diagnostic sdf_diagnostic(const sdf_file& f, diagnostic::level lv, sdf_pos at, std::string msg);

}  // namespace settle
