// `settle mtbf`: the first-order MTBF formula of a metastable element, and
// its check by simulation under independent random event streams.
#include "sim/analysis/mtbf.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <boost/math/distributions/chi_squared.hpp>
#include <cmath>

#include "sim/kernel/simulator.hpp"
#include "sim/model/mix.hpp"
#include "sim/model/time.hpp"

namespace settle {
namespace {

// The event streams are counter-based, so a seed replays the same events.
// An exponential gap of mean 1/rate seconds, in fs, at least 1 fs: draw i of stream s.
time_fs exponential_gap(std::uint64_t seed, std::uint64_t s, std::uint64_t i, double rate_hz) {
  const std::uint64_t h = mix(mix(seed ^ mix(s)) ^ i);
  const double u = open_unit(h);
  const double fs = -std::log(u) / rate_hz * 1e15;
  return static_cast<time_fs>(std::max(1.0, std::llround(fs) * 1.0));
}

// One input's events in time order, made as the simulation reaches them so
// that memory does not grow with the number of events.
class event_stream {
 public:
  // Random requests of `rate_hz` (stream `s` of the seed) on `net` until
  // `end`: each holds for `hold`; an arrival while a request stands, or
  // within `rest` after it, joins it.
  static event_stream requests(net_id net, std::uint64_t seed, std::uint64_t s, double rate_hz,
                               time_fs end, time_fs hold, time_fs rest) {
    event_stream e(kind::requests, net);
    e.seed_ = seed, e.s_ = s, e.rate_ = rate_hz, e.end_ = end, e.hold_ = hold, e.rest_ = rest;
    e.arrive();
    return e;
  }
  // A clock of `period`, low in the first half, for `edges` rising edges.
  static event_stream clock(net_id net, time_fs period, std::uint64_t edges) {
    event_stream e(kind::clock, net);
    e.hold_ = period, e.edges_ = edges;
    e.at_ = period / 2, e.value_ = logic::one;
    e.done_ = edges == 0;
    return e;
  }
  // Toggles of `net` at random times of `rate_hz` (stream `s`) until `end`.
  static event_stream toggles(net_id net, std::uint64_t seed, std::uint64_t s, double rate_hz,
                              time_fs end) {
    event_stream e(kind::toggles, net);
    e.seed_ = seed, e.s_ = s, e.rate_ = rate_hz, e.end_ = end;
    e.value_ = logic::zero;
    e.toggle();
    return e;
  }

  bool done() const { return done_; }
  time_fs time() const { return at_; }
  assignment event() const { return {net_, value_}; }
  std::uint64_t made() const { return made_; }  // requests made, or edges, or toggles

  void advance() {
    switch (kind_) {
      case kind::requests:
        if (value_ == logic::one) {
          value_ = logic::zero;
          at_ = arrival_ + hold_;
          free_ = at_ + rest_;
        } else {
          arrive();
        }
        break;
      case kind::clock:
        if (value_ == logic::one) {
          value_ = logic::zero;
          at_ += hold_ - hold_ / 2;
        } else if (++made_ == edges_) {
          done_ = true;
        } else {
          value_ = logic::one;
          at_ += hold_ / 2;
        }
        break;
      case kind::toggles:
        toggle();
        break;
    }
  }

 private:
  enum class kind { requests, clock, toggles };
  event_stream(kind k, net_id net) : kind_(k), net_(net) {}

  time_fs gap() { return exponential_gap(seed_, s_, i_++, rate_); }
  void arrive() {
    do {
      arrival_ += gap();
      if (arrival_ >= end_) {
        done_ = true;
        return;
      }
    } while (arrival_ < free_);
    at_ = arrival_, value_ = logic::one;
    ++made_;
  }
  void toggle() {
    arrival_ += gap();
    if (arrival_ >= end_) {
      done_ = true;
      return;
    }
    at_ = arrival_;
    value_ = value_ == logic::zero ? logic::one : logic::zero;
    ++made_;
  }

  kind kind_;
  net_id net_;
  logic value_ = logic::zero;
  bool done_ = false;
  time_fs at_ = 0, arrival_ = 0, free_ = 0, end_ = 0, hold_ = 0, rest_ = 0;
  std::uint64_t seed_ = 0, s_ = 0, i_ = 0, edges_ = 0, made_ = 0;
  double rate_ = 0;
};

// The exact (Garwood) 95% interval of a Poisson count k, as rates over `duration_s`.
void poisson_interval(std::uint64_t k, double duration_s, double& low, double& high) {
  using boost::math::chi_squared_distribution;
  const double n = static_cast<double>(k);
  low = k == 0 ? 0.0 : quantile(chi_squared_distribution<double>(2 * n), 0.025) / 2 / duration_s;
  high = quantile(chi_squared_distribution<double>(2 * n + 2), 0.975) / 2 / duration_s;
}

}  // namespace

double failure_rate(bool mutex, double f1, double f2, double tau_s, double window_s,
                    double budget_s) {
  return (mutex ? 2.0 : 1.0) * f1 * f2 * window_s * std::exp(-budget_s / tau_s);
}

std::optional<mtbf_result> mtbf(const design& d, const mtbf_options& o, std::string& error) {
  const netlist& n = d.nets;
  const net_id out = n.find(o.element);
  const gate_id g = out == no_id ? no_id : n.driver[out];
  const meta_element* m = g == no_id ? nullptr : n.meta_of(g);
  if (!m) {
    error = fmt::format("'{}' is no output of a mutex or syncff of this design", o.element);
    return std::nullopt;
  }
  mtbf_result r;
  r.first_gate = m->gates[0];
  r.mutex = n.kind[r.first_gate] == gate_kind::mutex;
  const auto b = n.fanin_begin[r.first_gate];
  r.inputs[0] = n.fanin[b];
  r.inputs[1] = n.fanin[b + 1];
  const char* roles[2] = {r.mutex ? "the first request" : "the data input",
                          r.mutex ? "the second request" : "the clock"};
  for (int k = 0; k < 2; ++k) {
    const net_id in = r.inputs[k];
    auto it =
        std::find_if(o.rates.begin(), o.rates.end(), [&](const auto& p) { return p.first == in; });
    if (it == o.rates.end()) {
      error = fmt::format("--rate {}=FREQ is missing ({} of '{}')", n.net_name[in], roles[k],
                          o.element);
      return std::nullopt;
    }
    if (in <= netlist::const1 || n.driver[in] != no_id) {
      error = fmt::format(
          "--rate {}: '{}' is driven by a gate; the check drives inputs of the "
          "design with its random events",
          n.net_name[in], n.net_name[in]);
      return std::nullopt;
    }
    r.rate_hz[k] = it->second;
    if (!(r.rate_hz[k] >= 1.0 && r.rate_hz[k] <= 1e13)) {
      error =
          fmt::format("--rate {}: {:g} Hz is outside 1 Hz .. 10 THz", n.net_name[in], r.rate_hz[k]);
      return std::nullopt;
    }
  }
  // The simulated span must stay well inside representable time (2^64 fs).
  const double span_fs =
      static_cast<double>(o.events) / (r.mutex ? r.rate_hz[0] + r.rate_hz[1] : r.rate_hz[1]) * 1e15;
  if (!(span_fs < 1e18)) {
    error = fmt::format(
        "{} {} at these rates span {:.3g} s of simulated time, past what settle "
        "represents (about 1000 s here); lower --events or raise the rates",
        o.events, r.mutex ? "requests" : "clock edges", span_fs * 1e-15);
    return std::nullopt;
  }
  for (const auto& [net, hz] : o.rates)
    if (net != r.inputs[0] && net != r.inputs[1]) {
      error = fmt::format("--rate {}: '{}' is no input of '{}'", n.net_name[net], n.net_name[net],
                          o.element);
      return std::nullopt;
    }
  r.tau = m->tau;
  r.window = m->window;
  const double t = static_cast<double>(o.budget) * 1e-15;
  const double f1 = r.rate_hz[0], f2 = r.rate_hz[1];
  auto mtbf_at = [&](time_fs tau, time_fs window) {
    if (tau == 0) return static_cast<double>(INFINITY);  // no metastability: nothing lasts past D
    return 1.0 / failure_rate(r.mutex, f1, f2, static_cast<double>(tau) * 1e-15,
                              static_cast<double>(window) * 1e-15, t);
  };
  r.mtbf_typ_s = mtbf_at(r.tau.typ, r.window.typ);
  r.mtbf_worst_s = mtbf_at(r.tau.max, r.window.max);

  // The simulation at the chosen corner.
  delay_table delays;
  fill_delays(d, o.at, delays);
  const std::uint32_t e = n.meta_at[r.first_gate];
  r.corner = o.at.name();
  r.sim_tau = delays.tau[e];
  r.sim_window = delays.window[e];
  r.delay = delays.rise[r.first_gate];
  const double tau_s = static_cast<double>(r.sim_tau) * 1e-15;
  const double window_s = static_cast<double>(r.sim_window) * 1e-15;
  // The longest resolution the model gives (a gap of 1 fs), so that a
  // request pulse outlasts its grant's resolution.
  const time_fs longest =
      r.delay + static_cast<time_fs>(
                    std::llround(static_cast<double>(r.sim_tau) *
                                 std::log(std::max(2.0, static_cast<double>(r.sim_window)))));
  std::vector<event_stream> streams;
  if (r.mutex) {
    // Independent random request streams; a request holds until its grant
    // must have come and gone, and an arrival while its request still stands
    // (or just after) joins it.
    const time_fs hold = 2 * longest + r.delay;
    const time_fs end = static_cast<time_fs>(static_cast<double>(o.events) / (f1 + f2) * 1e15);
    for (std::uint64_t k = 0; k < 2; ++k)
      streams.push_back(
          event_stream::requests(r.inputs[k], o.seed, k, r.rate_hz[k], end, hold, 2 * r.delay));
    r.duration_s = static_cast<double>(end) * 1e-15;
  } else {
    // A periodic clock (low, then high for the second half) and data
    // toggling at random times.
    const time_fs period = static_cast<time_fs>(std::llround(1e15 / f2));
    streams.push_back(event_stream::clock(r.inputs[1], period, o.events));
    streams.push_back(event_stream::toggles(r.inputs[0], o.seed, 7, f1, period * o.events));
    r.events = o.events;
    r.duration_s = static_cast<double>(period * o.events) * 1e-15;
  }

  simulator sim(n);
  sim.reset(delays);
  std::vector<assignment> now;
  for (net_id in : n.inputs) now.push_back({in, logic::zero});
  sim.process_instant(0, now);
  const time_fs limit = r.delay + o.budget;
  // Counts the first k resolutions and forgets them.
  auto count = [&](std::size_t k) {
    const auto& log = sim.resolutions();
    for (std::size_t i = 0; i < k; ++i) {
      if (n.meta_of(log[i].gate) != m) continue;
      ++r.resolutions;
      if (log[i].time() > limit) ++r.failures;
    }
    sim.drop_resolutions(k);
  };
  // The streams merged in time order; events of one instant are applied
  // together, in stream order.
  auto earliest = [&] {
    time_fs at = time_last;
    for (const event_stream& s : streams)
      if (!s.done()) at = std::min(at, std::max<time_fs>(s.time(), 1));
    return at;
  };
  for (time_fs at = earliest(); at != time_last; at = earliest()) {
    sim.run_quiet(at - 1, 0, 0);
    now.clear();
    for (event_stream& s : streams)
      while (!s.done() && std::max<time_fs>(s.time(), 1) == at) {
        now.push_back(s.event());
        s.advance();
      }
    sim.process_instant(at, now);
    if (sim.resolutions().size() >= 4096) count(sim.final_resolutions());
  }
  sim.run_quiet(time_last, 0, 0);
  count(sim.resolutions().size());
  if (r.mutex) r.events = streams[0].made() + streams[1].made();
  r.observed_hz = static_cast<double>(r.failures) / r.duration_s;
  poisson_interval(r.failures, r.duration_s, r.low_hz, r.high_hz);
  // A mutex's requests that joined a standing one were never made: the
  // formula takes the rates of those made.
  const double g1 = r.mutex ? static_cast<double>(streams[0].made()) / r.duration_s : f1;
  const double g2 = r.mutex ? static_cast<double>(streams[1].made()) / r.duration_s : f2;
  r.formula_hz = tau_s == 0 ? 0.0 : failure_rate(r.mutex, g1, g2, tau_s, window_s, t);
  return r;
}

}  // namespace settle
