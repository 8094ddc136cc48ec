// Min-max ambiguity simulation: one conservative run that covers every delay
// assignment within the ranges (Breuer and Friedman 1976; Abramovici, Breuer
// and Friedman 1990, ch. 3).
#pragma once

#include <string>
#include <vector>

#include "sim/kernel/run.hpp"
#include "sim/model/design.hpp"

namespace settle {

struct interval_step {
  std::vector<logic> values;  ///< per reported net at the end of the step
  step_status status = step_status::settled;
  /// Every reported net ended binary: the step's outcome is the same for all
  /// delays in range. Otherwise the run is inconclusive (x is pessimistic).
  bool proven = false;
  /// The step's expectations judged on the ambiguity run's values: a pass
  /// holds in every corner; a failure may be x pessimism (`deterministic`
  /// always passes here; sweeps judge it by `proven`).
  std::vector<expect_result> expects;
};

struct interval_result {
  std::vector<net_id> reported;  ///< outputs, then watched nets (as run_stimulus)
  std::vector<interval_step> steps;
};

/// Why the min-max run cannot judge this design's stimulus, or "" when it
/// can. Reaction rules (`when`) are refused: a rule whose condition is x in
/// the ambiguity run may or may not fire, and its firing time spans the
/// condition's whole ambiguity, so the environment itself would branch; the
/// run would be sound only by giving up (x on every input it drives).
std::string interval_refusal(const design& d);

/// Runs the stimulus once with every gate change ambiguous (x) from t + min
/// until t + max before it takes its new value.
interval_result run_interval(const design& d, const run_options& opt);

}  // namespace settle
