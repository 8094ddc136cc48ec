// A change_sink that writes IEEE Std 1364-2005 clause 18 value change dump (VCD) text.
#pragma once

#include <cstdint>
#include <cstdio>
#include <memory>
#include <span>
#include <string>
#include <vector>

#include "sim/kernel/run.hpp"
#include "sim/model/design.hpp"

namespace settle {

struct vcd_options {
  std::string top = "top";   ///< name of the top scope (sanitised by the writer)
  std::string version;       ///< text of $version, e.g. "settle 0.1.0"
  std::string date;          ///< text of $date; empty: now (SOURCE_DATE_EPOCH when set)
  std::vector<net_id> only;  ///< nets to dump; empty: every net but the two constants
  /// log10 of the timescale in femtoseconds (design_timescale); -1: the
  /// coarsest that represents every time the run wrote (chosen at the end).
  int timescale = -1;
};

/// log10, in femtoseconds, of the one VCD timescale of design `d` under every
/// corner: the largest k (0..17) such that 10^k fs divides every time that can
/// put an event at an instant: each min, typ and max of every gate edge and
/// reaction rule, every `at`, `after`, `run`, clock period and high time, and
/// the step time limit (`horizon`, 0 for the default of driver.hpp). A delay
/// range with min < max gives 0 (1 fs): random corners draw any whole number
/// of fs in it, gauss corners round to the fs, and a spread `@f` scales it to
/// any fs; a fixed delay stays fixed under every corner and spread. With no
/// time above 0 at all it is 0 (1 fs).
int design_timescale(const design& d, time_fs horizon = 0);

/// Turns a net or scope name into one VCD reference token: '.', '/', '[', ']',
/// whitespace and other non-printables become '_'. Empty names become "_".
std::string vcd_sanitise(std::string_view name);

/// The identifier code of the i-th variable: a bijective base-94 numeral over
/// the printable characters '!'..'~' (33..126), "!" for 0, "~" for 93, "!!" for 94.
std::string vcd_code(std::uint64_t index);

/// "1 ps", "10 ns", ...: the timescale of 10^k femtoseconds (k in 0..17).
std::string vcd_timescale(int k);

/// Collects a run's changes and writes a VCD file once the run has finished.
///
/// The timescale is vcd_options::timescale, a function of the design alone
/// (design_timescale), so every corner of a design writes the same one; should
/// a written time not be a multiple of it (a step cut at the end of
/// representable time) the writer falls back to the coarsest exact one. So the value
/// change section is formatted as it arrives, with times in femtoseconds, into
/// a memory buffer (spilled in large chunks to an anonymous temporary file past
/// 32 MiB); `write` then emits the header and copies the section, cutting the
/// k trailing zeros of every `#time` line (one memchr-driven pass). That keeps
/// formatting to one pass at memory speed and memory bounded on long runs.
/// Only the final value of a net per instant is written (no zero-width pulses);
/// changes at time 0 fold into $dumpvars.
class vcd_writer final : public change_sink {
 public:
  vcd_writer(const netlist& n, vcd_options opt);
  ~vcd_writer() override;
  vcd_writer(const vcd_writer&) = delete;
  vcd_writer& operator=(const vcd_writer&) = delete;

  void on_start(std::span<const logic> initial) override;
  void on_changes(std::span<const change> batch) override;
  void on_finish(time_fs end) override;

  /// Writes the whole VCD to `f` (after on_finish). On an I/O error returns
  /// false and sets *err.
  bool write(std::FILE* f, std::string* err);
  /// The whole VCD as a string (for tests and small designs).
  std::string str();

  /// log10 of the chosen timescale in femtoseconds (valid after on_finish).
  int timescale_exponent() const { return k_; }
  /// True when a written time forced a finer timescale than vcd_options::timescale.
  bool timescale_refined() const { return opt_.timescale >= 0 && k_ < opt_.timescale; }
  /// Value changes written after time 0.
  std::uint64_t changes_written() const { return changes_; }

 private:
  void flush_instant();
  void reserve(std::size_t bytes);
  void put_time(time_fs t);
  void put_value(net_id n, logic v);
  std::string header() const;
  bool emit(std::FILE* f, const char* p, std::size_t len, std::string& out, std::string* err);

  const netlist& n_;
  vcd_options opt_;
  std::vector<std::uint8_t> selected_;  // per net
  std::vector<std::uint32_t> code_at_;  // per net: offset into codes_
  std::vector<std::uint8_t> code_len_;  // per net
  std::string codes_;                   // every code back to back, then 8 bytes of padding
  std::size_t max_code_ = 1;            // longest code
  std::vector<logic> written_;          // per net: last value written
  std::vector<std::uint8_t> pending_;   // per net: value due at this instant, or 255
  std::vector<net_id> touched_;
  std::vector<logic> initial_;  // $dumpvars values (after time-0 changes)
  time_fs now_ = 0;
  bool started_ = false, finished_ = false, order_error_ = false;
  int k_ = 17;  // trailing decimal zeros shared by every time
  std::uint64_t changes_ = 0;

  std::unique_ptr<char[]> buf_;
  std::size_t pos_ = 0, cap_ = 0;
  std::FILE* spill_ = nullptr;
  std::vector<std::size_t> spilled_;  // sizes of the chunks in spill_
};

}  // namespace settle
