// Builds small designs in C++ for kernel tests, without the parser.
#pragma once

#include <initializer_list>
#include <string>
#include <utility>
#include <vector>

#include "sim/model/design.hpp"

namespace settle::testing {

inline constexpr time_fs ps = 1000;

class builder {
 public:
  builder() { d_.nets.begin(); }

  net_id net(const std::string& name) {
    auto id = d_.nets.find(name);
    return id != no_id ? id : d_.nets.add_net(name, 0);
  }
  net_id input(const std::string& name) {
    auto id = net(name);
    d_.nets.inputs.push_back(id);
    return id;
  }
  void output(const std::string& name) { d_.nets.outputs.push_back(net(name)); }
  void init(const std::string& name, logic v) { d_.nets.init[net(name)] = v; }

  /// A gate with the same delay range for rise and fall.
  gate_id gate(gate_kind k, const std::string& out, std::initializer_list<std::string> in,
               delay_range r, bool transport = false, std::vector<std::uint32_t> program = {}) {
    return gate_rf(k, out, in, r, r, transport, std::move(program));
  }
  gate_id gate_rf(gate_kind k, const std::string& out, std::initializer_list<std::string> in,
                  delay_range rise, delay_range fall, bool transport = false,
                  std::vector<std::uint32_t> program = {}) {
    std::vector<net_id> fanin;
    for (const auto& s : in)
      fanin.push_back(s == "0" ? netlist::const0 : s == "1" ? netlist::const1 : net(s));
    gate_delay gd{rise, fall, transport};
    return d_.nets.add_gate(k, net(out), fanin, program, gd);
  }

  /// Starts a step whose first action assigns inputs at absolute time t.
  builder& at(time_fs t, std::initializer_list<std::pair<std::string, logic>> as) {
    return action(stim_action::kind::at, t, as);
  }
  builder& after(time_fs t, std::initializer_list<std::pair<std::string, logic>> as) {
    return action(stim_action::kind::after, t, as);
  }
  builder& clock(const std::string& name, time_fs period, time_fs high, std::uint64_t cycles) {
    stim_action a;
    a.what = stim_action::kind::clock;
    a.clock = {net(name), period, high, cycles};
    open_.actions.push_back(a);
    return *this;
  }
  builder& settle() { return end(step_spec::end_kind::settle, 0); }
  builder& run(time_fs t) { return end(step_spec::end_kind::run, t); }
  builder& expect(const std::string& name, logic v) {
    expectation e;
    e.net = net(name);
    e.ref = name;
    e.want = v;
    d_.stim.steps.back().expects.push_back(e);
    return *this;
  }
  builder& watch(const std::string& name) {
    d_.stim.watch.push_back(net(name));
    return *this;
  }

  design finish() {
    d_.nets.finish();
    return std::move(d_);
  }

 private:
  builder& action(stim_action::kind k, time_fs t,
                  std::initializer_list<std::pair<std::string, logic>> as) {
    stim_action a;
    a.what = k;
    a.time = t;
    for (const auto& [n, v] : as) a.assigns.push_back({net(n), v});
    open_.actions.push_back(a);
    return *this;
  }
  builder& end(step_spec::end_kind k, time_fs t) {
    open_.end = k;
    open_.run_for = t;
    open_.label = "step " + std::to_string(d_.stim.steps.size() + 1);
    d_.stim.steps.push_back(std::move(open_));
    open_ = {};
    return *this;
  }

  design d_;
  step_spec open_;
};

inline delay_range fixed(time_fs t) { return {t, t, t}; }
inline delay_range range(time_fs lo, time_fs hi) { return {lo, lo + (hi - lo) / 2, hi}; }

}  // namespace settle::testing
