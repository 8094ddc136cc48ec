// VCD writer (IEEE Std 1364-2005 clause 18): buffered formatting, one timescale per design.
#include "waves/vcd.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <cstdlib>
#include <cstring>
#include <ctime>
#include <deque>
#include <string_view>
#include <unordered_set>

#include "sim/model/time.hpp"

namespace settle {
namespace {

constexpr std::uint8_t none = 255;
constexpr std::size_t first_chunk = 1024 * 1024;
constexpr std::size_t max_chunk = 32 * 1024 * 1024;  // memory kept before spilling
constexpr std::size_t out_chunk = 4 * 1024 * 1024;   // bytes per fwrite when trimming
constexpr int max_k = 17;                            // 100 s = 10^17 fs

constexpr time_fs pow10(int k) {
  time_fs p = 1;
  for (int i = 0; i < k; ++i) p *= 10;
  return p;
}
constexpr time_fs pow10_table[max_k + 1] = {pow10(0),  pow10(1),  pow10(2),  pow10(3),  pow10(4),
                                            pow10(5),  pow10(6),  pow10(7),  pow10(8),  pow10(9),
                                            pow10(10), pow10(11), pow10(12), pow10(13), pow10(14),
                                            pow10(15), pow10(16), pow10(17)};

std::string now_text() {
  std::time_t t = std::time(nullptr);
  bool utc = false;
  // Reproducible output when SOURCE_DATE_EPOCH is set (common practice of
  // reproducible builds, reproducible-builds.org specification).
  if (const char* e = std::getenv("SOURCE_DATE_EPOCH")) {
    char* end = nullptr;
    const long long v = std::strtoll(e, &end, 10);
    if (end != e && *end == '\0') t = static_cast<std::time_t>(v), utc = true;
  }
  std::tm tm{};
  if (utc)
    gmtime_r(&t, &tm);
  else
    localtime_r(&t, &tm);
  char text[64];
  std::strftime(text, sizeof text, "%Y-%m-%d %H:%M:%S", &tm);
  return text;
}

}  // namespace

std::string vcd_sanitise(std::string_view name) {
  std::string s(name);
  for (char& c : s) {
    const auto u = static_cast<unsigned char>(c);
    if (c == '.' || c == '/' || c == '[' || c == ']' || u <= 32 || u >= 127) c = '_';
  }
  if (s.empty()) s.push_back('_');
  return s;
}

std::string vcd_code(std::uint64_t i) {
  std::string s;
  for (;;) {
    s.push_back(static_cast<char>(33 + i % 94));
    i /= 94;
    if (i == 0) break;
    --i;
  }
  return s;
}

std::string vcd_timescale(int k) {
  static constexpr const char* units[] = {"fs", "ps", "ns", "us", "ms", "s"};
  static constexpr int numbers[] = {1, 10, 100};
  return fmt::format("{} {}", numbers[k % 3], units[k / 3]);
}

namespace {

// The largest k <= max_k with 10^k dividing t (t > 0); max_k for t = 0.
int trailing_zeros(time_fs t) {
  int k = 0;
  while (k < max_k && t != 0 && t % pow10_table[k + 1] == 0) ++k;
  return t == 0 ? max_k : k;
}

}  // namespace

int design_timescale(const design& d, time_fs horizon) {
  int k = max_k;
  bool any = false;
  auto take = [&](time_fs t) {
    if (t == 0) return;
    any = true;
    k = std::min(k, trailing_zeros(t));
  };
  auto range = [&](const delay_range& r) {
    // A corner may pick any fs in a true range (random, gauss, spread @f).
    if (r.min != r.max) k = 0, any = true;
    take(r.min), take(r.typ), take(r.max);
  };
  for (const auto& g : d.nets.delay.records()) range(g.rise), range(g.fall);
  for (const auto& r : d.stim.rules) range(r.delay);
  for (const auto& s : d.stim.steps) {
    take(s.run_for);
    for (const auto& a : s.actions) {
      take(a.time);
      if (a.what == stim_action::kind::clock) take(a.clock.period), take(a.clock.high);
    }
  }
  // The step time limit ends a timeout step; the default of driver.hpp is
  // 10,000 x the largest max delay, at least 1 ns.
  if (horizon)
    take(horizon);
  else
    take(std::max<time_fs>(checked_mul(d.nets.largest_max_delay(), 10000).value_or(1), 1'000'000));
  return any ? k : 0;
}

vcd_writer::vcd_writer(const netlist& n, vcd_options opt) : n_(n), opt_(std::move(opt)) {
  if (opt_.timescale > max_k) opt_.timescale = max_k;
  if (opt_.timescale >= 0) k_ = opt_.timescale;
  const auto nets = n_.net_count();
  selected_.assign(nets, 0);
  if (opt_.only.empty()) {
    for (net_id i = 2; i < nets; ++i) selected_[i] = 1;
  } else {
    for (net_id i : opt_.only)
      if (i >= 2 && i < nets) selected_[i] = 1;
  }
  code_at_.assign(nets, 0);
  code_len_.assign(nets, 0);
  // Every code, once, into one contiguous array (same numerals as vcd_code),
  // padded by 8 bytes for the fixed-size copies of flush_instant.
  codes_.reserve(static_cast<std::size_t>(nets) * 4 + 8);
  std::uint64_t next = 0;
  for (net_id i = 0; i < nets; ++i) {
    if (!selected_[i]) continue;
    code_at_[i] = static_cast<std::uint32_t>(codes_.size());
    std::uint8_t len = 0;
    for (std::uint64_t v = next++;; ++len) {
      codes_.push_back(static_cast<char>(33 + v % 94));
      v /= 94;
      if (v == 0) break;
      --v;
    }
    code_len_[i] = ++len;
    if (len > max_code_) max_code_ = len;
  }
  codes_.append(8, '\0');
  written_.assign(nets, logic::x);
  pending_.assign(nets, none);
  initial_.assign(nets, logic::x);
}

vcd_writer::~vcd_writer() {
  if (spill_) std::fclose(spill_);
}

void vcd_writer::on_start(std::span<const logic> initial) {
  for (std::size_t i = 0; i < initial.size() && i < written_.size(); ++i)
    written_[i] = initial_[i] = initial[i];
  started_ = true;
  now_ = 0;
}

void vcd_writer::on_changes(std::span<const change> batch) {
  for (const change& c : batch) {
    if (c.time != now_) {
      if (c.time < now_) {  // the kernel promises time order; never write time backwards
        order_error_ = true;
        continue;
      }
      flush_instant();
      now_ = c.time;
    }
    if (!selected_[c.net]) continue;
    if (pending_[c.net] == none) touched_.push_back(c.net);
    pending_[c.net] = static_cast<std::uint8_t>(c.value);
  }
}

void vcd_writer::flush_instant() {
  if (touched_.empty()) return;
  if (now_ == 0) {
    for (net_id n : touched_) {
      const auto v = static_cast<logic>(pending_[n]);
      pending_[n] = none;
      if (v != written_[n]) written_[n] = initial_[n] = v;
    }
    touched_.clear();
    return;
  }
  // One reservation per instant: the time line, every value line, and the
  // slack of the fixed 8-byte code copies (codes_ is padded by 8 bytes too).
  const std::size_t bound = 24 + touched_.size() * (max_code_ + 2) + 8;
  if (bound > max_chunk / 2) {  // a huge instant: line by line, each reserved alone
    bool stamped = false;
    for (net_id n : touched_) {
      const auto v = static_cast<logic>(pending_[n]);
      pending_[n] = none;
      if (v == written_[n]) continue;
      written_[n] = v;
      if (!stamped) put_time(now_), stamped = true;
      put_value(n, v);
      ++changes_;
    }
    touched_.clear();
    return;
  }
  reserve(bound);
  char* p = buf_.get() + pos_;
  *p++ = '#';
  p = std::to_chars(p, p + 21, now_).ptr;
  *p++ = '\n';
  std::uint64_t written = 0;
  const char* codes = codes_.data();
  for (net_id n : touched_) {
    const auto v = static_cast<logic>(pending_[n]);
    pending_[n] = none;
    if (v == written_[n]) continue;  // a pulse of zero width, or no change at all
    written_[n] = v;
    const std::size_t len = code_len_[n];
    *p = to_char(v);
    std::memcpy(p + 1, codes + code_at_[n], 8);
    p[len + 1] = '\n';
    p += len + 2;
    ++written;
  }
  touched_.clear();
  if (written == 0) return;  // nothing changed at this instant: no time line
  changes_ += written;
  pos_ = static_cast<std::size_t>(p - buf_.get());
  while (k_ > 0 && now_ % pow10_table[k_] != 0) --k_;
}

void vcd_writer::on_finish(time_fs end) {
  flush_instant();
  if (end > now_ || (end > 0 && pos_ == 0 && spilled_.empty())) put_time(end);
  // Nothing after time 0 and no timescale given: the kernel's resolution.
  if (pos_ == 0 && spilled_.empty() && opt_.timescale < 0) k_ = 0;
  finished_ = true;
}

void vcd_writer::reserve(std::size_t bytes) {
  if (pos_ + bytes <= cap_) return;
  if (cap_ < max_chunk) {
    const std::size_t cap = std::max(first_chunk, std::min(max_chunk, cap_ * 2));
    auto grown = std::make_unique_for_overwrite<char[]>(cap);
    if (pos_) std::memcpy(grown.get(), buf_.get(), pos_);
    buf_ = std::move(grown);
    cap_ = cap;
    if (pos_ + bytes <= cap_) return;
  }
  // Spill the chunk: it always ends at a line boundary.
  if (!spill_) spill_ = std::tmpfile();
  if (!spill_ || std::fwrite(buf_.get(), 1, pos_, spill_) != pos_) {
    order_error_ = true;  // reported by write()
  } else {
    spilled_.push_back(pos_);
  }
  pos_ = 0;
}

void vcd_writer::put_time(time_fs t) {
  reserve(24);
  char* p = buf_.get() + pos_;
  *p++ = '#';
  p = std::to_chars(p, p + 21, t).ptr;
  *p++ = '\n';
  pos_ = static_cast<std::size_t>(p - buf_.get());
  while (k_ > 0 && t % pow10_table[k_] != 0) --k_;
  now_ = t;
}

void vcd_writer::put_value(net_id n, logic v) {
  const std::size_t len = code_len_[n];
  reserve(len + 2);
  char* p = buf_.get() + pos_;
  *p = to_char(v);
  std::memcpy(p + 1, codes_.data() + code_at_[n], len);
  p[len + 1] = '\n';
  pos_ += len + 2;
}

namespace {

/// The full dotted path of each of `scopes` scopes ("" for the top one); a
/// parent chain that loops or leaves the table stops there.
std::vector<std::string> scope_paths(const netlist& n, std::size_t scopes) {
  std::vector<std::string> path(scopes);
  for (std::size_t s = 1; s < scopes; ++s) {
    std::vector<std::size_t> chain;
    for (std::size_t q = s; q != 0 && q < scopes && chain.size() <= scopes; q = n.scopes[q].parent)
      chain.push_back(q);
    for (auto it = chain.rbegin(); it != chain.rend(); ++it) {
      if (!path[s].empty()) path[s] += '.';
      path[s] += n.scopes[*it].name;
    }
  }
  return path;
}

/// A variable a scope declares: a net under a local name (a view into the
/// netlist, which outlives the header).
struct vcd_var {
  std::uint32_t scope;
  net_id net;
  std::string_view name;
};

/// The variables grouped by scope, in declaration order within a scope:
/// scope s declares vars[first[s]] up to vars[first[s + 1]].
struct scope_vars {
  std::vector<vcd_var> vars;
  std::vector<std::uint32_t> first;
};

/// The selected nets under their names local to their scopes, then the
/// aliases; the first of each (scope, name) wins.
scope_vars collect_vars(const netlist& n, const std::vector<std::uint8_t>& selected,
                        const std::vector<std::string>& path) {
  const std::size_t scopes = path.size();
  std::vector<vcd_var> cand;
  cand.reserve(n.net_count() + n.aliases.size());
  auto local_name = [&](std::size_t s, std::string_view full) {
    const std::string_view p = path[s];
    if (!p.empty() && full.size() > p.size() && full.compare(0, p.size(), p) == 0 &&
        full[p.size()] == '.')
      return full.substr(p.size() + 1);
    return full;
  };
  for (net_id i = 2; i < n.net_count(); ++i) {
    if (!selected[i]) continue;
    std::size_t s = i < n.net_scope.size() ? n.net_scope[i] : 0;
    if (s >= scopes) s = 0;
    cand.push_back({static_cast<std::uint32_t>(s), i, local_name(s, n.net_name[i])});
  }
  for (const auto& a : n.aliases) {
    if (a.net >= selected.size() || !selected[a.net] || a.scope >= scopes) continue;
    cand.push_back({a.scope, a.net, a.local});
  }
  // Open-addressing set of candidate indices keyed by (scope, name).
  std::size_t slots = 16;
  while (slots < 2 * cand.size()) slots *= 2;
  std::vector<std::uint32_t> table(slots, 0);  // candidate index + 1; 0 is empty
  std::vector<std::uint8_t> keep(cand.size(), 0);
  scope_vars out;
  out.first.assign(scopes + 1, 0);
  for (std::size_t c = 0; c < cand.size(); ++c) {
    const auto& v = cand[c];
    std::size_t at =
        (std::hash<std::string_view>{}(v.name) ^ (v.scope * 0x9E3779B97F4A7C15ull)) & (slots - 1);
    bool dup = false;
    for (; table[at] != 0; at = (at + 1) & (slots - 1)) {
      const auto& o = cand[table[at] - 1];
      if (o.scope == v.scope && o.name == v.name) {
        dup = true;
        break;
      }
    }
    if (dup) continue;
    table[at] = static_cast<std::uint32_t>(c + 1);
    keep[c] = 1;
    ++out.first[v.scope + 1];
  }
  // Group by scope, keeping declaration order within a scope (counting sort).
  for (std::size_t s = 0; s < scopes; ++s) out.first[s + 1] += out.first[s];
  out.vars.resize(out.first[scopes]);
  std::vector<std::uint32_t> fill(out.first.begin(), out.first.end() - 1);
  for (std::size_t c = 0; c < cand.size(); ++c)
    if (keep[c]) out.vars[fill[cand[c].scope]++] = cand[c];
  return out;
}

/// Names made fit for VCD (vcd_sanitise): each rewritten one is stored once
/// and listed, "shown = as written", for the header's comment.
class vcd_renamer {
 public:
  static bool needs_cleaning(std::string_view name) {
    bool bad = name.empty();
    for (char c : name) {
      const auto u = static_cast<unsigned char>(c);
      bad |= c == '.' || c == '/' || c == '[' || c == ']' || u <= 32 || u >= 127;
    }
    return bad;
  }

  /// `name` (in the scope whose path is `where`) as VCD shows it. `taken`:
  /// the names already used in the scope; a sanitised name that meets one
  /// (nets a.b and a_b) gets the first free suffix _2, _3, ...
  std::string_view clean(std::string_view name, std::string_view where,
                         std::unordered_set<std::string_view>* taken = nullptr) {
    if (!needs_cleaning(name)) return name;
    std::string fresh = vcd_sanitise(name);
    if (taken)
      for (std::size_t k = 2; taken->count(fresh); ++k)
        fresh = vcd_sanitise(name) + "_" + std::to_string(k);
    const std::string_view s = cleaned_.emplace_back(std::move(fresh));
    if (taken) taken->insert(s);
    renamed_ += '\t';
    if (!where.empty()) renamed_.append(where), renamed_ += '.';
    renamed_.append(s), renamed_ += " = ";
    if (!where.empty()) renamed_.append(where), renamed_ += '.';
    renamed_.append(name), renamed_ += '\n';
    return s;
  }

  /// The lines of the renamed names ("" when none was).
  const std::string& listing() const { return renamed_; }

 private:
  std::string renamed_;
  std::deque<std::string> cleaned_;  // stable storage for rewritten names
};

/// The names of the scopes as VCD shows them (the top one is `top`), and
/// those of the variables, rewritten in place.
std::vector<std::string_view> clean_names(const netlist& n, std::string_view top,
                                          const std::vector<std::string>& path, scope_vars& sv,
                                          vcd_renamer& ren) {
  const std::size_t scopes = path.size();
  std::vector<std::string_view> scope_name(scopes);
  scope_name[0] = ren.clean(top, "");
  for (std::size_t s = 1; s < scopes; ++s)
    scope_name[s] =
        ren.clean(n.scopes[s].name, path[n.scopes[s].parent < scopes ? n.scopes[s].parent : 0]);
  for (std::size_t s = 0; s < scopes; ++s) {
    bool any = false;  // most scopes need no renaming, and then no set
    for (auto j = sv.first[s]; j < sv.first[s + 1] && !any; ++j)
      any = vcd_renamer::needs_cleaning(sv.vars[j].name);
    if (!any) continue;
    std::unordered_set<std::string_view> taken;
    for (auto j = sv.first[s]; j < sv.first[s + 1]; ++j)
      if (!vcd_renamer::needs_cleaning(sv.vars[j].name)) taken.insert(sv.vars[j].name);
    for (auto j = sv.first[s]; j < sv.first[s + 1]; ++j)
      sv.vars[j].name = ren.clean(sv.vars[j].name, path[s], &taken);
  }
  return scope_name;
}

/// The scopes the header opens: the top one, every scope that declares a
/// variable, and their ancestors; children[s] lists those under s in order.
struct scope_tree {
  std::vector<std::uint8_t> live;
  std::vector<std::vector<std::size_t>> children;
};

scope_tree live_scopes(const netlist& n, const scope_vars& sv, std::size_t scopes) {
  scope_tree t;
  t.live.assign(scopes, 0);
  for (std::size_t s = 0; s < scopes; ++s) {
    if (sv.first[s] == sv.first[s + 1]) continue;
    for (std::size_t q = s, guard = 0; guard <= scopes; q = n.scopes[q].parent, ++guard) {
      if (t.live[q]) break;
      t.live[q] = 1;
      if (q == 0 || q >= scopes) break;
    }
  }
  t.live[0] = 1;
  t.children.resize(scopes);
  for (std::size_t s = 1; s < scopes; ++s)
    if (t.live[s] && n.scopes[s].parent < scopes) t.children[n.scopes[s].parent].push_back(s);
  return t;
}

}  // namespace

std::string vcd_writer::header() const {
  std::string h;
  h.reserve(4096);
  auto put = [&h](std::string_view a) { h.append(a.data(), a.size()); };
  put("$date\n\t"), put(opt_.date.empty() ? now_text() : opt_.date), put("\n$end\n");
  put("$version\n\t"),
      put(opt_.version.empty() ? std::string_view("settle") : std::string_view(opt_.version)),
      put("\n$end\n");

  const auto scopes = n_.scopes.empty() ? std::size_t{1} : n_.scopes.size();
  const auto path = scope_paths(n_, scopes);
  auto sv = collect_vars(n_, selected_, path);
  vcd_renamer ren;
  const auto scope_name = clean_names(
      n_, opt_.top.empty() ? std::string_view("top") : std::string_view(opt_.top), path, sv, ren);
  const auto tree = live_scopes(n_, sv, scopes);

  // Room for everything still to come, so the appends below never reallocate.
  std::size_t room = h.size() + ren.listing().size() + 256 + codes_.size();
  for (const auto& v : sv.vars) room += v.name.size() + code_len_[v.net] + 20;
  for (std::size_t s = 0; s < scopes; ++s) room += tree.live[s] ? scope_name[s].size() + 40 : 0;
  room += 3 * n_.net_count();
  h.reserve(room);

  if (!ren.listing().empty())
    put("$comment\n\tnames changed for VCD (as shown = as written):\n"), put(ren.listing()),
        put("$end\n");
  put("$timescale "), put(vcd_timescale(k_)), put(" $end\n");
  // Depth-first with an explicit stack: (scope, next child index).
  std::vector<std::pair<std::size_t, std::size_t>> stack{{0, 0}};
  auto open = [&](std::size_t s) {
    put("$scope module "), put(scope_name[s]), put(" $end\n");
    for (auto j = sv.first[s]; j < sv.first[s + 1]; ++j) {
      const auto& v = sv.vars[j];
      put("$var wire 1 "), put(std::string_view(codes_.data() + code_at_[v.net], code_len_[v.net]));
      h += ' ', put(v.name), put(" $end\n");
    }
  };
  open(0);
  while (!stack.empty()) {
    auto& [s, next] = stack.back();
    if (next < tree.children[s].size()) {
      const auto c = tree.children[s][next++];
      open(c);
      stack.emplace_back(c, 0);
    } else {
      put("$upscope $end\n");
      stack.pop_back();
    }
  }
  put("$enddefinitions $end\n#0\n$dumpvars\n");
  for (net_id i = 2; i < n_.net_count(); ++i) {
    if (!selected_[i]) continue;
    h += to_char(initial_[i]);
    h.append(codes_.data() + code_at_[i], code_len_[i]);
    h += '\n';
  }
  put("$end\n");
  return h;
}

bool vcd_writer::emit(std::FILE* f, const char* p, std::size_t len, std::string& out,
                      std::string* err) {
  auto put = [&](const char* d, std::size_t n) {
    if (std::fwrite(d, 1, n, f) == n) return true;
    if (err) *err = std::strerror(errno);
    return false;
  };
  if (k_ == 0) return put(p, len);
  // Cut k digits before the newline of every "#time" line. A '#' starts a
  // time line only at the start of a line (identifier codes may contain '#').
  const char* end = p + len;
  const char* from = p;  // start of text not yet copied
  const char* q = p;     // always at the start of a line
  while (q < end) {
    if (*q == '#') {
      const char* nl =
          static_cast<const char*>(std::memchr(q, '\n', static_cast<std::size_t>(end - q)));
      out.append(from, static_cast<std::size_t>(nl - k_ - from));
      from = nl;
      q = nl + 1;
      if (out.size() >= out_chunk) {
        if (!put(out.data(), out.size())) return false;
        out.clear();
      }
      continue;
    }
    const char* h = q;
    for (;;) {
      h = static_cast<const char*>(std::memchr(h, '#', static_cast<std::size_t>(end - h)));
      if (!h || h[-1] == '\n') break;
      ++h;
    }
    q = h ? h : end;
  }
  out.append(from, static_cast<std::size_t>(end - from));
  if (out.size() >= out_chunk) {
    if (!put(out.data(), out.size())) return false;
    out.clear();
  }
  return true;
}

bool vcd_writer::write(std::FILE* f, std::string* err) {
  if (!finished_ || order_error_) {
    if (err)
      *err = !finished_ ? "the run did not finish"
                        : "value changes out of time order or a failed temporary file";
    return false;
  }
  const auto h = header();
  if (std::fwrite(h.data(), 1, h.size(), f) != h.size()) {
    if (err) *err = std::strerror(errno);
    return false;
  }
  std::string out;
  if (k_ > 0) out.reserve(out_chunk + max_chunk / 8);
  if (spill_ && !spilled_.empty()) {
    std::rewind(spill_);
    auto chunk = std::make_unique_for_overwrite<char[]>(max_chunk);
    for (auto size : spilled_) {
      if (std::fread(chunk.get(), 1, size, spill_) != size) {
        if (err) *err = "cannot read back the temporary value-change file";
        return false;
      }
      if (!emit(f, chunk.get(), size, out, err)) return false;
    }
    std::fseek(spill_, 0, SEEK_END);
  }
  if (pos_ && !emit(f, buf_.get(), pos_, out, err)) return false;
  if (!out.empty() && std::fwrite(out.data(), 1, out.size(), f) != out.size()) {
    if (err) *err = std::strerror(errno);
    return false;
  }
  return true;
}

std::string vcd_writer::str() {
  char* data = nullptr;
  std::size_t size = 0;
  std::FILE* f = open_memstream(&data, &size);
  std::string s;
  if (f) {
    std::string err;
    const bool ok = write(f, &err);
    std::fclose(f);
    if (ok) s.assign(data, size);
    std::free(data);
  }
  return s;
}

}  // namespace settle
