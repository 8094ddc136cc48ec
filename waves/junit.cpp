// JUnit-style XML: escaping, the document writer, and suites built from run, sweep and margin
// results.
#include "waves/junit.hpp"

#include <fmt/format.h>

namespace settle {
namespace {

constexpr const char* replacement = "\xEF\xBF\xBD";  // U+FFFD

// Length of the UTF-8 sequence at s[i] and its code point, or 0 when invalid.
std::size_t utf8_at(std::string_view s, std::size_t i, std::uint32_t& cp) {
  const auto b = static_cast<unsigned char>(s[i]);
  std::size_t len = b < 0x80           ? 1
                    : (b >> 5) == 0x6  ? 2
                    : (b >> 4) == 0xE  ? 3
                    : (b >> 3) == 0x1E ? 4
                                       : 0;
  if (len == 0 || i + len > s.size()) return 0;
  cp = len == 1 ? b : len == 2 ? (b & 0x1F) : len == 3 ? (b & 0x0F) : (b & 0x07);
  for (std::size_t k = 1; k < len; ++k) {
    const auto c = static_cast<unsigned char>(s[i + k]);
    if ((c >> 6) != 0x2) return 0;
    cp = cp << 6 | (c & 0x3F);
  }
  static constexpr std::uint32_t least[] = {0, 0, 0x80, 0x800, 0x10000};
  if (cp < least[len] || cp > 0x10FFFF || (cp >= 0xD800 && cp <= 0xDFFF)) return 0;
  return len;
}

// XML 1.0 section 2.2 Char production.
bool xml_char(std::uint32_t cp) {
  return cp == 0x9 || cp == 0xA || cp == 0xD || (cp >= 0x20 && cp <= 0xD7FF) ||
         (cp >= 0xE000 && cp <= 0xFFFD) || (cp >= 0x10000 && cp <= 0x10FFFF);
}

std::string seconds(double s) { return fmt::format("{:.6f}", s < 0 ? 0.0 : s); }

junit_case make_case(std::string classname, std::string name) {
  junit_case c;
  c.classname = std::move(classname);
  c.name = std::move(name);
  return c;
}

std::string suite_name(const design& d) { return d.path.empty() ? std::string("design") : d.path; }

// The owed rules of a deadlocked step, one a line: "owed: when ack after 1ns : req = 0 (fired 0 of
// 5; condition 0)".
std::string owed_text(const design& d, const std::vector<owed_rule>& owed) {
  std::string out;
  for (const auto& w : owed)
    out += fmt::format("owed: {} (fired {} of {}; condition {})\n",
                       w.rule < d.stim.rules.size() ? d.stim.rules[w.rule].text : std::string("?"),
                       w.fired, w.times, to_char(w.condition));
  return out;
}

std::string owed_list(const design& d, const std::vector<owed_rule>& owed) {
  std::string out;
  for (const auto& w : owed)
    out += (out.empty() ? "" : "; ") +
           (w.rule < d.stim.rules.size() ? d.stim.rules[w.rule].text : std::string("?"));
  return out;
}

}  // namespace

std::string xml_escape(std::string_view text, bool attribute) {
  std::string out;
  out.reserve(text.size());
  for (std::size_t i = 0; i < text.size();) {
    std::uint32_t cp = 0;
    const std::size_t len = utf8_at(text, i, cp);
    if (len == 0) {
      out += replacement;
      ++i;
      continue;
    }
    if (!xml_char(cp))
      out += replacement;
    else if (cp == '&')
      out += "&amp;";
    else if (cp == '<')
      out += "&lt;";
    else if (cp == '>')
      out += "&gt;";
    else if (attribute && cp == '"')
      out += "&quot;";
    else if (attribute && cp == '\'')
      out += "&apos;";
    else if (attribute && cp == '\n')
      out += "&#10;";
    else if (attribute && cp == '\r')
      out += "&#13;";
    else if (attribute && cp == '\t')
      out += "&#9;";
    else if (cp == '\r')
      out += "&#13;";  // would be normalised away in content too
    else
      out.append(text.substr(i, len));
    i += len;
  }
  return out;
}

std::string junit_xml(const std::vector<junit_suite>& suites) {
  std::size_t tests = 0, failures = 0;
  double time = 0;
  for (const auto& s : suites) {
    tests += s.cases.size();
    for (const auto& c : s.cases) failures += c.failures.empty() ? 0 : 1;
    time += s.time_s;
  }
  std::string out = "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n";
  out += fmt::format(
      "<testsuites name=\"settle\" tests=\"{}\" failures=\"{}\" errors=\"0\" time=\"{}\">\n", tests,
      failures, seconds(time));
  for (std::size_t k = 0; k < suites.size(); ++k) {
    const auto& s = suites[k];
    std::size_t f = 0;
    for (const auto& c : s.cases) f += c.failures.empty() ? 0 : 1;
    out += fmt::format(
        "  <testsuite name=\"{}\" id=\"{}\" tests=\"{}\" failures=\"{}\" errors=\"0\" "
        "skipped=\"0\" time=\"{}\">\n",
        xml_escape(s.name, true), k, s.cases.size(), f, seconds(s.time_s));
    if (!s.properties.empty()) {
      out += "    <properties>\n";
      for (const auto& [name, value] : s.properties)
        out += fmt::format("      <property name=\"{}\" value=\"{}\"/>\n", xml_escape(name, true),
                           xml_escape(value, true));
      out += "    </properties>\n";
    }
    for (const auto& c : s.cases) {
      out +=
          fmt::format("    <testcase name=\"{}\" classname=\"{}\" time=\"{}\"",
                      xml_escape(c.name, true), xml_escape(c.classname, true), seconds(c.time_s));
      if (c.failures.empty()) {
        out += "/>\n";
        continue;
      }
      out += ">\n";
      for (const auto& fl : c.failures)
        out += fmt::format("      <failure message=\"{}\" type=\"{}\">{}</failure>\n",
                           xml_escape(fl.message, true), xml_escape(fl.type, true),
                           xml_escape(fl.text, false));
      out += "    </testcase>\n";
    }
    out += "  </testsuite>\n";
  }
  out += "</testsuites>\n";
  return out;
}

junit_suite junit_of_run(const design& d, const run_result& r, const std::string& corner,
                         const replay_fn& replay, double wall_s) {
  junit_suite s;
  s.name = suite_name(d);
  s.time_s = wall_s;
  s.properties = {{"command", "run"}, {"corner", corner}};
  const std::string cls = suite_name(d) + "." + corner;
  for (const auto& st : r.steps) {
    auto c = make_case(cls, step_title(st.index, st.label));
    bool bad_status = st.status == step_status::timeout || st.status == step_status::event_limit ||
                      st.status == step_status::deadlock;
    if (st.status == step_status::oscillating) {
      bool expected = false;
      for (const auto& x : st.expects)
        expected = expected || (x.spec && x.spec->what == expectation::kind::oscillating);
      bad_status = !expected;
    }
    if (bad_status && st.status == step_status::deadlock)
      c.failures.push_back({fmt::format("step {} deadlocks at corner {}: quiet with {} owed",
                                        st.index, corner, owed_list(d, st.owed)),
                            "deadlock",
                            fmt::format("corner: {}\n{}replay: {}\n", corner, owed_text(d, st.owed),
                                        replay(corner))});
    else if (bad_status)
      c.failures.push_back(
          {fmt::format("step {} is {} at corner {}", st.index, status_name(st.status), corner),
           "status", fmt::format("corner: {}\nreplay: {}\n", corner, replay(corner))});
    if (!st.unknown.empty())
      c.failures.push_back({fmt::format("step {} ends with {} at x at corner {}", st.index,
                                        d.nets.names_of(st.unknown), corner),
                            "unknown",
                            fmt::format("corner: {}\nreplay: {}\n", corner, replay(corner))});
    s.cases.push_back(std::move(c));
    for (const auto& x : st.expects) {
      auto e =
          make_case(cls, fmt::format("step {}: {}", st.index, expectation_words(d.nets, *x.spec)));
      if (!x.pass)
        e.failures.push_back({fmt::format("{} fails at corner {}: {}",
                                          expectation_words(d.nets, *x.spec), corner, x.detail),
                              "expectation",
                              fmt::format("corner: {}\ndetail: {}\nreplay: {}\n", corner, x.detail,
                                          replay(corner))});
      s.cases.push_back(std::move(e));
    }
  }
  for (const auto& p : r.properties) {
    const std::string& text =
        p.property < d.stim.properties.size() ? d.stim.properties[p.property].text : "?";
    auto c = make_case(cls, "property: " + text);
    if (!p.holds) {
      std::string vals;
      for (const auto& [net, v] : p.values)
        vals += fmt::format("{}{}={}", vals.empty() ? "" : " ", d.nets.net_name[net], to_char(v));
      c.failures.push_back(
          {fmt::format("{} is violated at {} (step {}) at corner {}", text,
                       format_time(p.first_violation), p.step, corner),
           "property",
           fmt::format("corner: {}\nfirst violation: {} in step {}\nvalues: {}\nreplay: {}\n",
                       corner, format_time(p.first_violation), p.step, vals, replay(corner))});
    }
    s.cases.push_back(std::move(c));
  }
  return s;
}

junit_suite junit_of_sweep(const design& d, const sweep_result& r, const replay_fn& replay) {
  junit_suite s;
  s.name = suite_name(d);
  s.time_s = r.wall_s;
  s.properties = {{"command", "sweep"}, {"corners", std::to_string(r.corners)}};
  const std::string cls = suite_name(d) + ".sweep";
  for (const auto& st : r.steps) {
    auto c = make_case(cls, step_title(st.index, st.label));
    // The step's own case carries the verdict; expectations have their own cases.
    bool expected_oscillation = false;
    for (const auto& x : st.expects)
      expected_oscillation =
          expected_oscillation || (x.spec && x.spec->what == expectation::kind::oscillating);
    const bool verdict_bad = st.verdict == sweep_verdict::nondeterministic ? !st.run_step
                             : st.verdict == sweep_verdict::oscillating
                                 ? !expected_oscillation
                                 : st.verdict != sweep_verdict::deterministic;
    if (verdict_bad) {
      std::string text;
      for (const auto& o : st.outcomes)
        text += fmt::format("outcome {} x{} witness {}\nreplay: {}\n", status_name(o.status),
                            o.count, o.witness_name, replay(o.witness_name));
      if (st.verdict == sweep_verdict::inconclusive)  // `interval` alone: no corner ran
        c.failures.push_back(
            {fmt::format("step {} is inconclusive: the interval run does not prove it", st.index),
             "verdict", ""});
      else if (st.verdict == sweep_verdict::deadlock || st.verdict == sweep_verdict::mixed) {
        std::uint64_t dead = 0;
        const sweep_outcome* first = nullptr;
        for (const auto& o : st.outcomes)
          if (o.status == step_status::deadlock) {
            dead += o.count;
            if (!first || o.witness < first->witness) first = &o;
          }
        if (first)
          text += fmt::format("deadlock witness {}:\n{}", first->witness_name,
                              owed_text(d, first->owed));
        c.failures.push_back(
            {dead ? fmt::format("step {} deadlocks in {} of {} corners (verdict {}); first at {} "
                                "with {} owed",
                                st.index, dead, r.corners, verdict_name(st.verdict),
                                first->witness_name, owed_list(d, first->owed))
                  : fmt::format("step {} is {} over {} corners", st.index, verdict_name(st.verdict),
                                r.corners),
             dead ? "deadlock" : "verdict", text});
      } else
        c.failures.push_back({fmt::format("step {} is {} over {} corners", st.index,
                                          verdict_name(st.verdict), r.corners),
                              "verdict", text});
    }
    for (const auto& o : st.outcomes)
      if (!o.unknown.empty())
        c.failures.push_back(
            {fmt::format("step {} ends with {} at x in {} of {} corners; first at {}", st.index,
                         d.nets.names_of(o.unknown), o.count, r.corners, o.witness_name),
             "unknown",
             fmt::format("witness: {}\nreplay: {}\n", o.witness_name, replay(o.witness_name))});
    s.cases.push_back(std::move(c));
    for (const auto& x : st.expects) {
      const std::string words =
          x.spec ? expectation_words(d.nets, *x.spec) : std::string("expectation");
      auto e = make_case(cls, fmt::format("step {}: {}", st.index, words));
      if (!x.pass() && x.by_interval)
        e.failures.push_back({fmt::format("{} is not proven by the interval run", words),
                              "expectation", fmt::format("detail: {}\n", x.detail)});
      else if (!x.pass())
        e.failures.push_back({fmt::format("{} fails in {} of {} corners; first at {}", words,
                                          x.failing, r.corners, x.witness_name),
                              "expectation",
                              fmt::format("witness: {}\ndetail: {}\nreplay: {}\n", x.witness_name,
                                          x.detail, replay(x.witness_name))});
      s.cases.push_back(std::move(e));
    }
  }
  for (const auto& p : r.properties) {
    const std::string& text =
        p.index < d.stim.properties.size() ? d.stim.properties[p.index].text : "?";
    auto c = make_case(cls, "property: " + text);
    if (!p.holds())
      c.failures.push_back(
          {fmt::format("{} is violated in {} of {} corners; first at {}", text, p.violating,
                       r.corners, p.witness_name),
           "property",
           fmt::format("witness: {}\nfirst violation: {} in step {}\nreplay: {}\n", p.witness_name,
                       format_time(p.first_violation), p.step, replay(p.witness_name))});
    s.cases.push_back(std::move(c));
  }
  return s;
}

junit_suite junit_of_margin(
    const design& d, const margin_result& r, const replay_fn& replay,
    const std::vector<std::pair<std::string, std::string>>& baseline_failures) {
  junit_suite s;
  s.name = suite_name(d);
  s.time_s = r.wall_s;
  s.properties = {{"command", "margin"},
                  {"margin", (r.at_ceiling ? ">= " : "") + spread_percent(r.margin)},
                  {"confidence", r.confidence_note()}};
  const std::string cls = suite_name(d) + ".margin";
  for (std::size_t k = 0; k < r.steps.size(); ++k) {
    const auto& sm = r.steps[k];
    auto c = make_case(cls, step_title(sm.index, sm.label));
    if (!sm.at_ceiling && sm.margin < 1.0 && sm.failure) {
      const auto& f = *sm.failure;
      std::string text =
          fmt::format("margin: {} of the written spread\nfirst failure at {}: {}\nwitness: {}\n",
                      spread_percent(sm.margin), spread_percent(f.spread), f.detail, f.witness);
      if (!f.other_witness.empty()) text += fmt::format("other outcome: {}\n", f.other_witness);
      text += fmt::format("replay: {}\n", replay(f.witness));
      c.failures.push_back(
          {fmt::format("step {} margin {} is below the written spread; fails at {} ({})", sm.index,
                       spread_percent(sm.margin), f.witness, verdict_name(f.verdict)),
           "margin", text});
    }
    s.cases.push_back(std::move(c));
    if (k >= d.stim.steps.size() || k >= r.written.steps.size()) continue;
    const auto& spec = d.stim.steps[k];
    const auto& st = r.written.steps[k];
    for (std::size_t e = 0; e < spec.expects.size() && e < st.expects.size(); ++e) {
      const std::string words = expectation_words(d.nets, spec.expects[e]);
      auto ec = make_case(cls, fmt::format("step {}: {}", sm.index, words));
      const auto& x = st.expects[e];
      if (!x.pass())
        ec.failures.push_back(
            {fmt::format("{} fails in {} of {} corners at the written spread; first at {}", words,
                         x.failing, r.written.corners, x.witness_name),
             "expectation",
             fmt::format("witness: {}\ndetail: {}\nreplay: {}\n", x.witness_name, x.detail,
                         replay(x.witness_name))});
      s.cases.push_back(std::move(ec));
    }
  }
  for (const auto& p : r.properties) {
    const std::string& text =
        p.index < d.stim.properties.size() ? d.stim.properties[p.index].text : "?";
    auto c = make_case(cls, "property: " + text);
    if (!p.at_ceiling && p.margin < 1.0 && p.failure) {
      const auto& f = *p.failure;
      c.failures.push_back(
          {fmt::format("{} margin {} is below the written spread; violated at {}", text,
                       spread_percent(p.margin), f.witness),
           "property",
           fmt::format("margin: {} of the written spread\nfirst violation at {}: {}\nwitness: {}\n"
                       "replay: {}\n",
                       spread_percent(p.margin), spread_percent(f.spread), f.detail, f.witness,
                       replay(f.witness))});
    }
    s.cases.push_back(std::move(c));
  }
  for (const auto& w : r.within) {
    auto c = make_case(
        cls, fmt::format("step {}: settle-time margin of {}", w.step, format_time(w.budget)));
    if (w.margin_fs < 0 || w.unsettled > 0)
      c.failures.push_back(
          {w.unsettled ? fmt::format("{} corners do not settle", w.unsettled)
                       : fmt::format("worst settle time {} exceeds the budget {} at {}",
                                     format_time(w.worst), format_time(w.budget), w.worst_corner),
           "settle-time",
           fmt::format("worst corner: {}\nreplay: {}\n", w.worst_corner, replay(w.worst_corner))});
    s.cases.push_back(std::move(c));
  }
  for (const auto& [name, message] : baseline_failures) {
    auto c = make_case(cls, "baseline: " + name);
    c.failures.push_back({message, "baseline", message + "\n"});
    s.cases.push_back(std::move(c));
  }
  return s;
}

}  // namespace settle
