// Mean time between failures of a metastable element (netlist::meta): the
// first-order formula, and a check of it by simulation under random events.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "sim/model/corner.hpp"
#include "sim/model/design.hpp"

namespace settle {

/// What `settle mtbf` is asked: the element (by one of its outputs), the
/// budget t beyond its normal delay D, and the event rate of each input.
struct mtbf_options {
  std::string element;
  time_fs budget = 0;
  /// Hz per input net. A syncff's CK is a periodic clock of that frequency,
  /// its D toggles at random; a mutex's requests arrive at random.
  std::vector<std::pair<net_id, double>> rates;
  corner at;                         ///< the corner of the simulation (typ by default)
  std::uint64_t events = 1'000'000;  ///< clock edges (syncff) or request arrivals (mutex) simulated
  std::uint64_t seed = 1;            ///< of the random event streams
};

/// The formula (from memory of Veendrick 1980, IEEE JSSC 15(2); Kleeman and
/// Cantoni 1987, IEEE Trans. Computers 36(10); Ginosar 2011, IEEE Design &
/// Test 28(5)): a synchronizer fails at f_c x f_d x W x e^(-t/tau); a mutex
/// with independent request streams at 2 x f_1 x f_2 x W x e^(-t/tau).
double failure_rate(bool mutex, double f1, double f2, double tau_s, double window_s,
                    double budget_s);

struct mtbf_result {
  gate_id first_gate = 0;  ///< the element's first output
  bool mutex = false;
  net_id inputs[2] = {0, 0};  ///< syncff: D, CK; mutex: the two requests
  double rate_hz[2] = {0, 0};
  time_fs delay = 0;  ///< D at the simulated corner (the rise of the output)
  delay_range tau, window;
  /// The formula at typ, and its worst over the ranges (largest tau and W).
  double mtbf_typ_s = 0, mtbf_worst_s = 0;
  // The simulation at `corner`:
  std::string corner;
  time_fs sim_tau = 0, sim_window = 0;
  std::uint64_t events = 0;       ///< edges or arrivals simulated
  std::uint64_t resolutions = 0;  ///< resolutions the element made
  std::uint64_t failures = 0;     ///< of them, longer than D + budget
  double duration_s = 0;
  double observed_hz = 0, low_hz = 0, high_hz = 0;  ///< the failure rate and its 95% interval
  double formula_hz = 0;  ///< the formula's rate at the simulated tau, W and input rates
  bool agrees() const { return formula_hz >= low_hz && formula_hz <= high_hz; }
};

/// Computes the formula and runs the simulation; nullopt with the reason in
/// `error` for an element or rates the design does not have.
std::optional<mtbf_result> mtbf(const design& d, const mtbf_options& o, std::string& error);

/// Seconds in a year (365.25 days), for the report.
inline constexpr double seconds_per_year = 365.25 * 24 * 3600;

}  // namespace settle
