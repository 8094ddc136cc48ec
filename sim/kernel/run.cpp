// Running a stimulus on the timed kernel; step and run verdicts.
#include <algorithm>

#include "sim/kernel/driver.hpp"
#include "sim/model/enum_names.hpp"

namespace settle {

time_fs default_horizon(const netlist& n) {
  const time_fs m = n.largest_max_delay();
  return std::max<time_fs>(checked_mul(m, 10000).value_or(time_last), detail::one_ns);
}

const char* status_name(step_status s) {
  static constexpr const char* names[] = {"settled", "oscillating", "timeout",
                                          "running", "event_limit", "deadlock"};
  return enum_name<step_status::deadlock>(s, names);
}

std::vector<net_id> unknown_at_end(const step_spec* spec, std::span<const net_id> reported,
                                   std::span<const logic> values) {
  std::vector<net_id> out;
  for (std::size_t i = 0; i < reported.size() && i < values.size(); ++i) {
    if (values[i] != logic::x) continue;
    const bool expected =
        spec && std::any_of(spec->expects.begin(), spec->expects.end(), [&](const expectation& e) {
          return e.what == expectation::kind::value && e.net == reported[i] && e.want == logic::x;
        });
    if (!expected) out.push_back(reported[i]);
  }
  return out;
}

bool step_result::pass() const {
  if (!unknown.empty()) return false;
  bool expected_oscillation = false;
  for (const auto& e : expects) {
    if (!e.pass) return false;
    if (e.spec && e.spec->what == expectation::kind::oscillating) expected_oscillation = true;
  }
  switch (status) {
    case step_status::settled:
    case step_status::running:
      return true;
    case step_status::oscillating:
      return expected_oscillation;
    default:
      return false;
  }
}

bool run_result::pass() const {
  return !error &&
         std::all_of(steps.begin(), steps.end(), [](const step_result& s) { return s.pass(); }) &&
         std::all_of(properties.begin(), properties.end(),
                     [](const property_result& p) { return p.holds; });
}

run_context::run_context(const netlist& n) : sim_(std::make_unique<simulator>(n)) {}
run_context::~run_context() = default;

run_result run_stimulus(run_context& ctx, const design& d, const delay_table& delays,
                        const run_options& opt, change_sink* trace) {
  simulator& sim = ctx.sim();
  sim.set_trace(trace);
  sim.reset(delays);
  return detail::driver<simulator>(sim, d, opt, &delays).run();
}

run_result run_stimulus(const design& d, const delay_table& delays, const run_options& opt,
                        change_sink* trace) {
  run_context ctx(d.nets);
  return run_stimulus(ctx, d, delays, opt, trace);
}

std::uint32_t glitches(const netlist& n, const run_result& r, const step_result& s, std::size_t i) {
  const net_id net = r.reported[i];
  if (n.driver[net] == no_id && s.start_values[i] != logic::x && s.values[i] != logic::x) return 0;
  const std::uint32_t needed = s.start_values[i] != s.values[i] ? 1 : 0;
  return s.transitions[i] > needed ? s.transitions[i] - needed : 0;
}

}  // namespace settle
