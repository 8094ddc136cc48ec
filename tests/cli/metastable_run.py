#!/usr/bin/python3
"""The metastable elements of the .settle language through `settle run` and `settle sweep`:
a sensor FIFO's two-requester mutual-exclusion element and a panel button's synchronizing
flip-flop (tests/data/meta/, scenarios of our own), with stimulus variants written here.

The resolution model, from memory of Veendrick 1980 (IEEE JSSC 15(2)), Kleeman and Cantoni
1987 (IEEE Trans. Computers 36(10)) and Ginosar 2011 (IEEE Design & Test 28(5)): two events a
gap apart inside the window W resolve tau x ln(W / gap) later than the element's delay D; a
synchronizing flip-flop's window is centred on the clock edge, so its reach is W/2 on each side.
Every expected time is computed here with math.log and rounded to the nearest femtosecond.

Statistics by scipy.stats (Debian package python3-scipy): binomtest for the fair coin of a tie,
kstest for the drawn gaps. Exit 77 (skipped) without scipy."""
import json
import math
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, run_settle, scratch, summary, write_file  # noqa: E402

try:
    from scipy.stats import binomtest, kstest
except ImportError:
    print("SKIP: python3-scipy is not installed (scripts/deps --test installs it)")
    sys.exit(77)

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-metastable-")
data = os.path.join(src, "tests", "data", "meta")
arbiter, button = (os.path.join(data, n) for n in ("fifo_arbiter.settle", "button_sync.settle"))
for p in (arbiter, button):
    if not os.path.exists(p):
        print(f"missing test data {p}")
        sys.exit(1)

PS = 1000                                 # fs per ps
D, TAU, W = 50 * PS, 20 * PS, 10 * PS     # both elements: delay 50ps tau 20ps window 10ps
ALPHA = 0.001                             # significance of the statistical checks


def extra(reach, gap):
    """tau x ln(reach / gap) in fs, rounded to the nearest fs; 0 outside the reach (the model)."""
    return round(TAU * math.log(reach / gap)) if 0 < gap < reach else 0


def run_json(design, *args, want=0, what=""):
    """`settle run design args --json -`: the parsed report, after checking the exit status."""
    rc, out, err = run_settle(settle, "run", design, "--json", "-", *args, timeout=60)
    check(rc == want, f"{what}: exit {rc}, want {want}: {err[-400:]}")
    try:
        return json.loads(out)
    except json.JSONDecodeError:
        fail(f"{what}: no JSON on stdout: {err[-300:]}")
        return None


def resolutions(report):
    """Every resolution of the run, each with the 1-based step it came in."""
    return [dict(r, step=s["index"]) for s in report["steps"] for r in s.get("resolutions", [])]


# --- Mutex, two requests delta apart ----------------------------------------------------------

def arbiter_stim(first, second, delta_fs):
    """The FIFO arbiter's stimulus: `first` requests at 1ns, `second` delta_fs later; the first
    releases at 2ns (both requests are low again at 3ns)."""
    t1 = 1_000_000 + delta_fs
    return write_file(tmp, f"arb_{first}_{delta_fs}.stim", f"""stimulus {{
    never wr_gnt & rd_gnt
    at 0ns       wr_req = 0, rd_req = 0
    settle
    at 1ns       {first} = 1
    at {t1}fs    {second} = 1
    settle
    at 2ns       {first} = 0
    settle
    at 3ns       {second} = 0
    settle
}}
""")


def check_pair(first, second, delta_fs, want_res):
    """The first requester wins, resolving want_res after its request; the loser's grant stays 0
    while the winner holds and rises D after the winner's grant falls."""
    g1, g2 = first.replace("req", "gnt"), second.replace("req", "gnt")
    what = f"mutex {first} first, {second} {delta_fs} fs later"
    r = run_json(arbiter, "--stim", arbiter_stim(first, second, delta_fs), what=what)
    if r is None:
        return
    step2, step3 = r["steps"][1], r["steps"][2]
    check(step2["values"] == {g1: "1", g2: "0"}, f"{what}: grants at the end of step 2 {step2['values']}")
    # while the winner holds, the loser's grant never moves
    check(step2["transitions"][g2] == 0, f"{what}: {g2} changed in step 2")
    res = step2.get("resolutions", [])
    check(len(res) == 1, f"{what}: step 2 resolutions {res}")
    if res:
        x = res[0]
        check(x["kind"] == "mutex" and x["output"] == g1 and x["value"] == "1" and not x["drawn"],
              f"{what}: resolution {x}")
        check(x["first_fs"] == 1_000_000, f"{what}: first_fs {x['first_fs']}")
        check(x["resolution_fs"] == want_res and x["resolved_fs"] == 1_000_000 + want_res,
              f"{what}: resolution {x['resolution_fs']} fs, want {want_res} fs")
        # the gap is reported inside the window, null at and beyond it
        want_delta = delta_fs if delta_fs < W else None
        check(x["delta_fs"] == want_delta, f"{what}: delta_fs {x['delta_fs']}, want {want_delta}")
    # the winner's request falls at 2ns, its grant D later; the loser is let through D after that
    res3 = step3.get("resolutions", [])
    check(len(res3) == 1, f"{what}: step 3 resolutions {res3}")
    if res3:
        x = res3[0]
        check(x["output"] == g2 and x["value"] == "1" and x["delta_fs"] is None,
              f"{what}: loser's resolution {x}")
        check(x["first_fs"] == 2_000_000 + D and x["resolved_fs"] == 2_000_000 + 2 * D,
              f"{what}: loser granted at {x['resolved_fs']} fs after release at {x['first_fs']} fs, "
              f"want {2_000_000 + 2 * D} after {2_000_000 + D}")
    check(step3["values"] == {g1: "0", g2: "1"} and step3["settle_fs"] == 2 * D,
          f"{what}: step 3 {step3['values']} settle {step3['settle_fs']}")
    # mutual exclusion, the element's purpose (common practice): the property holds
    check(all(p.get("holds") for p in r.get("properties", [])) and r.get("properties"),
          f"{what}: never wr_gnt & rd_gnt: {r.get('properties')}")


# Delta = 1 ps inside W = 10 ps: D + tau ln(W / delta) = 50 + 20 ln 10 ps (the model, from memory)
want_1ps = D + extra(W, 1 * PS)
check(want_1ps == 96052, f"expected value {want_1ps} fs (50 + 20 ln 10 ps is 96.0517 ps)")
check_pair("wr_req", "rd_req", 1 * PS, want_1ps)
check_pair("rd_req", "wr_req", 1 * PS, want_1ps)      # the same, the drain asking first
check_pair("wr_req", "rd_req", 3 * PS, D + extra(W, 3 * PS))
# Delta = W and beyond: outside the window, exactly D
check_pair("wr_req", "rd_req", 10 * PS, D)
check_pair("wr_req", "rd_req", 20 * PS, D)

# The design's own stimulus, and its text report line.
rc, out, err = run_settle(settle, "run", arbiter)
check(rc == 0, f"fifo_arbiter.settle: exit {rc}: {err[-400:]}")
check("resolve mutex wr_gnt at 1ns: delta 1ps, granted 1, resolved after 96.052ps" in out,
      f"fifo_arbiter.settle: text report {out[-800:]!r}")


# Separate rise and fall delays: the winner's grant falls after the fall delay, and the loser's
# rises the rise delay after that release (the model: a released grant lets the waiting
# request through D after the release; D of a grant rising is its rise delay).
rise_fall = write_file(tmp, "arb_rise_fall.settle", open(arbiter).read().replace(
    "delay 50ps tau", "delay rise 50ps fall 30ps tau"))
r = run_json(rise_fall, want=0, what="rise 50ps fall 30ps")
if r:
    x = r["steps"][2].get("resolutions", [{}])[0]
    check(x.get("output") == "rd_gnt" and x.get("first_fs") == 2_000_000 + 30 * PS
          and x.get("resolved_fs") == 2_000_000 + 80 * PS, f"rise 50ps fall 30ps: loser {x}")
    check(r["steps"][1]["resolutions"][0]["resolution_fs"] == want_1ps,
          f"rise 50ps fall 30ps: winner {r['steps'][1]['resolutions']}")

# A range of tau: the min and max corners take its ends, so 50 + 10 ln 10 and 50 + 30 ln 10 ps.
tau_range = write_file(tmp, "arb_tau_range.settle", open(arbiter).read().replace(
    "tau 20ps", "tau 10ps..30ps").replace("within 100ps", "within 200ps"))
for corner, tau in (("min", 10 * PS), ("typ", 20 * PS), ("max", 30 * PS)):
    r = run_json(tau_range, "--corner", corner, want=0, what=f"tau 10ps..30ps at {corner}")
    if r:
        got = r["steps"][1]["resolutions"][0]["resolution_fs"]
        want = D + round(tau * math.log(W / PS))
        check(got == want, f"tau 10ps..30ps at {corner}: {got} fs, want {want} fs")

# --- expect resolves ... within T: a finding is exit 1 (README, exit codes) ---------------------

def budget_design(budget):
    text = open(arbiter).read().replace("expect resolves wr_gnt within 100ps",
                                        f"expect resolves wr_gnt within {budget}")
    check(f"within {budget}" in text, "the arbiter design carries its resolves expectation")
    return write_file(tmp, f"arb_budget_{budget}.settle", text)


for budget, want_rc in (("90ps", 1), ("100ps", 0), ("96.051ps", 1), ("96.052ps", 0)):
    r = run_json(budget_design(budget), want=want_rc, what=f"expect resolves within {budget}")
    if r:
        e = [x for x in r["steps"][1]["expect"] if x["kind"] == "resolves"]
        check(len(e) == 1 and e[0]["pass"] == (want_rc == 0) and e[0]["net"] == "wr_gnt",
              f"within {budget}: expectation {e}")


# --- Requests at the same instant --------------------------------------------------------------

tie = write_file(tmp, "arb_tie.stim", """stimulus {
    never wr_gnt & rd_gnt
    at 0ns   wr_req = 0, rd_req = 0
    settle
    at 1ns   wr_req = 1, rd_req = 1
    settle
}
""")

# Over 400 random corners: two outcomes, one grant each, shares consistent with one half.
rc, out, err = run_settle(settle, "sweep", arbiter, "--stim", tie, "--corners", "random:400",
                          "--seed", "5", "--json", "-", timeout=120)
check(rc == 1, f"tie sweep: exit {rc} (a nondeterministic step is a finding): {err[-400:]}")
try:
    sw = json.loads(out)
except json.JSONDecodeError:
    sw = None
    fail(f"tie sweep: no JSON: {err[-300:]}")
if sw:
    step = sw["steps"][1]
    outs = {(o["values"]["wr_gnt"], o["values"]["rd_gnt"]): o for o in step["outcomes"]}
    check(set(outs) == {("1", "0"), ("0", "1")}, f"tie sweep outcomes {sorted(outs)}")
    check(sum(o["count"] for o in step["outcomes"]) == 400, "tie sweep: 400 corners counted")
    if ("1", "0") in outs and ("0", "1") in outs:
        k = outs[("1", "0")]["count"]
        p = binomtest(k, 400, 0.5).pvalue  # scipy.stats.binomtest, two-sided exact test
        print(f"tie sweep: wr wins {k} of 400, binomial p = {p:.3g}")
        check(p > ALPHA, f"tie sweep: wr wins {k} of 400, p = {p:.3g}")
        for key, o in outs.items():
            # a drawn gap is inside (0, W), so every tie resolves later than D (the model)
            check(o["settle_fs"]["min"] > D, f"tie sweep {key}: settle min {o['settle_fs']}")
            # the witness corner replays its outcome
            w = run_json(arbiter, "--stim", tie, "--corner", o["witness"], what=f"witness {o['witness']}")
            if w:
                check((w["steps"][1]["values"]["wr_gnt"], w["steps"][1]["values"]["rd_gnt"]) == key,
                      f"witness {o['witness']} gives {w['steps'][1]['values']}, want {key}")

# Many ties in one run: each instant draws afresh from the corner's stream.
ROUNDS = 300
lines = ["stimulus {", "    never wr_gnt & rd_gnt", "    at 0ns wr_req = 0, rd_req = 0", "    settle"]
for k in range(ROUNDS):
    lines += [f"    at {4 * k + 1}ns wr_req = 1, rd_req = 1", "    settle",
              f"    at {4 * k + 3}ns wr_req = 0, rd_req = 0", "    settle"]
many = write_file(tmp, "arb_ties.stim", "\n".join(lines + ["}", ""]))


def tie_draws(corner):
    r = run_json(arbiter, "--stim", many, "--corner", corner, what=f"ties at {corner}")
    if r is None:
        return None
    return [x for x in resolutions(r) if x["step"] % 2 == 0]   # the tie steps: 2, 4, ...


draws = tie_draws("random:7#0")
if draws is not None:
    check(len(draws) == ROUNDS, f"ties: {len(draws)} resolutions, want {ROUNDS}")
    wins = sum(x["output"] == "wr_gnt" for x in draws)
    p = binomtest(wins, len(draws), 0.5).pvalue
    print(f"ties in one run: wr wins {wins} of {len(draws)}, binomial p = {p:.3g}")
    check(p > ALPHA, f"ties in one run: wr wins {wins} of {len(draws)}, p = {p:.3g}")
    extras = []
    for x in draws:
        ok = x["drawn"] and x["value"] == "1" and x["delta_fs"] is not None
        check(ok, f"tie resolution {x}")
        if not ok:
            continue
        d, res = x["delta_fs"], x["resolution_fs"]
        check(0 <= d <= W, f"drawn delta {d} fs outside (0, W)")
        # exact arithmetic gives res > D; rounding to the fs may give D when delta is within
        # a few parts in 10^5 of W
        check(res > D or (res == D and d >= W - 1), f"tie resolved after {res} fs, not beyond D")
        # delta_fs is the drawn gap rounded to the fs: the time lies between the formula's values
        # at delta + 0.5 and delta - 0.5 fs (and is unbounded above for delta 0)
        lo = D + TAU * math.log(W / (d + 0.5)) - 1
        hi = D + TAU * math.log(W / (d - 0.5)) + 1 if d > 0.5 else math.inf
        check(lo <= res <= hi, f"tie: delta {d} fs resolved after {res} fs, want {lo:.0f}..{hi:.0f}")
        extras.append(res - D)
    if len(extras) == len(draws):
        # Delta uniform in (0, W) makes tau ln(W / Delta) exponential with mean tau: -ln U of a
        # uniform U is exponential with rate 1 (a fact of probability, common practice)
        ks = kstest([e / TAU for e in extras], "expon")
        print(f"ties: resolution beyond D against exponential(mean tau): KS p = {ks.pvalue:.3g}")
        check(ks.pvalue > ALPHA, f"ties: extra times not exponential(mean tau), p = {ks.pvalue:.3g}")
        ks = kstest([x["delta_fs"] / W for x in draws], "uniform")
        check(ks.pvalue > ALPHA, f"ties: drawn delta not uniform in (0, W), p = {ks.pvalue:.3g}")

# Replay: a corner gives the same winners and times twice; different corners draw differently.
seqs = set()
for i in range(12):
    a, b = tie_draws(f"random:7#{i}"), tie_draws(f"random:7#{i}")
    if a is None or b is None:
        continue
    key = lambda rs: [(x["output"], x["resolution_fs"], x["delta_fs"]) for x in rs]  # noqa: E731
    check(key(a) == key(b), f"random:7#{i}: the replay drew differently")
    seqs.add(tuple(x["output"] for x in a))
check(len(seqs) > 1, "every corner drew the same winners: the draw ignores the corner")


# --- syncff ------------------------------------------------------------------------------------

def button_stim(lead_fs):
    """The button changes lead_fs before the clock's rising edge at 1ns (lead < 0: after it).
    Before the edge the button closes (0 -> 1); after it, a button closed long before opens
    again (1 -> 0), so the value taken at the edge (1) differs from the output held (0)."""
    if lead_fs > 0:
        change = f"    at {1_000_000 - lead_fs}fs button = 1\n    at 1ns clk = 1\n"
    elif lead_fs < 0:
        change = f"    at 500ps button = 1\n    at 1ns clk = 1\n    at {1_000_000 - lead_fs}fs button = 0\n"
    else:
        change = "    at 1ns button = 1, clk = 1\n"
    return write_file(tmp, f"button_{lead_fs}.stim", f"""stimulus {{
    at 0ns button = 0, clk = 0
    settle
{change}    settle
}}
""")


def sync_case(lead_fs, corner="typ"):
    r = run_json(button, "--stim", button_stim(lead_fs), "--corner", corner, what=f"syncff lead {lead_fs} fs")
    if r is None:
        return None, None
    res = r["steps"][1].get("resolutions", [])
    check(len(res) == 1, f"syncff lead {lead_fs} fs at {corner}: resolutions {res}")
    return (res[0] if res else None), r["steps"][1]


HALF = W / 2
for lead_ps, want_value in ((1, "1"), (-1, "1"), (3, "1"), (5, "1"), (-5, "1"), (20, "1")):
    lead = lead_ps * PS
    x, step = sync_case(lead)
    if x is None:
        continue
    what = f"syncff lead {lead_ps} ps"
    # inside half the window: D + tau ln((W/2) / |lead|); at W/2 and beyond exactly D (the model)
    want = D + extra(HALF, abs(lead))
    check(x["kind"] == "syncff" and x["output"] == "button_s" and not x["drawn"], f"{what}: {x}")
    check(x["first_fs"] == 1_000_000, f"{what}: edge at {x['first_fs']} fs")
    check(x["resolution_fs"] == want, f"{what}: resolution {x['resolution_fs']} fs, want {want} fs")
    check(x["lead_fs"] == (lead if abs(lead) < HALF else None), f"{what}: lead_fs {x['lead_fs']}")
    # lead > 0 takes the new level (1); lead < 0 the level before the late change (also 1 here)
    check(x["value"] == want_value and step["values"]["button_s"] == want_value,
          f"{what}: took {x['value']}, output {step['values']['button_s']}")
want_sync = D + extra(HALF, 1 * PS)
check(want_sync == 82189, f"expected value {want_sync} fs (50 + 20 ln 5 ps is 82.1888 ps)")

# delta = -1 ps where the value held is the level before the change: the old value (0) stays,
# resolved as late; the change after the edge reaches the output only at the next edge.
late = write_file(tmp, "button_late.stim", """stimulus {
    at 0ns button = 0, clk = 0
    settle
    at 1ns clk = 1
    at 1.001ns button = 1
    settle
    at 2ns clk = 0
    settle
    at 3ns clk = 1
    settle
}
""")
r = run_json(button, "--stim", late, what="syncff late change")
if r:
    x = r["steps"][1].get("resolutions", [{}])[0]
    check(x.get("value") == "0" and x.get("lead_fs") == -1 * PS and x.get("resolution_fs") == want_sync,
          f"syncff late change: {x}")
    check(r["steps"][1]["values"]["button_s"] == "0", f"late change: output {r['steps'][1]['values']}")
    y = r["steps"][3].get("resolutions", [{}])[0]
    check(y.get("value") == "1" and y.get("lead_fs") is None and y.get("resolution_fs") == D,
          f"syncff next edge: {y}")

# The design's own stimulus (lead 1 ps, within 100ps) passes, and its text line.
rc, out, err = run_settle(settle, "run", button)
check(rc == 0, f"button_sync.settle: exit {rc}: {err[-400:]}")
check("resolve syncff button_s at 1ns: lead 1ps, took 1, resolved after 82.189ps" in out,
      f"button_sync.settle: text report {out[-600:]!r}")

# A change at the edge itself: the sign and |lead| in (0, W/2) are drawn. A drawn lead > 0
# takes the new level (1), < 0 the old one (0); either way the time is past D.
signs = []
for i in range(60):
    corner = f"random:11#{i}"
    x, step = sync_case(0, corner)
    if x is None:
        continue
    lead, res = x["lead_fs"], x["resolution_fs"]
    if not (x["drawn"] and lead is not None):
        fail(f"syncff tie at {corner}: {x}")
        continue
    check(abs(lead) <= HALF, f"syncff tie at {corner}: lead {lead} fs outside (-W/2, W/2)")
    check(x["value"] == ("1" if lead > 0 else "0"), f"syncff tie at {corner}: lead {lead} took {x['value']}")
    check(step["values"]["button_s"] == x["value"], f"syncff tie at {corner}: output {step['values']}")
    check(res > D or (res == D and abs(lead) >= HALF - 1), f"syncff tie at {corner}: resolution {res} fs")
    a = abs(lead)
    lo = D + TAU * math.log(HALF / (a + 0.5)) - 1
    hi = D + TAU * math.log(HALF / (a - 0.5)) + 1 if a > 0.5 else math.inf
    check(lo <= res <= hi, f"syncff tie at {corner}: lead {lead} fs resolved after {res} fs")
    signs.append(lead > 0)
    if i < 5:   # replay
        y, _ = sync_case(0, corner)
        check(y == x, f"syncff tie at {corner}: the replay gave {y}, first {x}")
if signs:
    p = binomtest(sum(signs), len(signs), 0.5).pvalue
    check(p > ALPHA and 0 < sum(signs) < len(signs),
          f"syncff ties: {sum(signs)} of {len(signs)} took the new level, p = {p:.3g}")


# --- Malformed elements: exit 2 with file:line:col (messages of parser/lower.cpp,
# parser/lower_stimulus.cpp) ---------------------------------------------------------------------

HEAD = "# a sensor FIFO's arbiter, written wrongly\ninput wr_req, rd_req\noutput wr_gnt, rd_gnt\n"
bad = [
    ("one_output", HEAD.replace("wr_gnt, rd_gnt\n", "wr_gnt\n")
     + "wr_gnt = mutex(wr_req, rd_req) delay 50ps tau 20ps window 10ps\n",
     "4:1", "'mutex' has 2 outputs, found 1: ga, gb = mutex(ra, rb) delay D tau T window W"),
    ("no_tau", HEAD + "wr_gnt, rd_gnt = mutex(wr_req, rd_req) delay 50ps window 10ps\n",
     "4:18", "'mutex' needs its resolution time constant and window"),
    ("no_window", HEAD + "wr_gnt, rd_gnt = mutex(wr_req, rd_req) delay 50ps tau 20ps\n",
     "4:18", "'mutex' needs its resolution time constant and window"),
    ("zero_window", HEAD + "wr_gnt, rd_gnt = mutex(wr_req, rd_req) delay 50ps tau 20ps window 0ps\n",
     "4:67", "a window must be longer than 0fs"),
    ("three_inputs", HEAD.replace("rd_req\n", "rd_req, spare\n")
     + "wr_gnt, rd_gnt = mutex(wr_req, rd_req, spare) delay 50ps tau 20ps window 10ps\n",
     "4:18", "'mutex' takes exactly 2 inputs (ra, rb), found 3"),
    ("sync_two_outputs", "input button, clk\noutput button_s, spare\n"
     "button_s, spare = syncff(button, clk) delay 50ps tau 20ps window 10ps\n",
     "3:1", "'syncff' has 1 output, found 2"),
    ("sync_zero_window", "input button, clk\noutput button_s\n"
     "button_s = syncff(button, clk) delay 50ps tau 20ps window 0ps\n",
     "3:59", "a window must be longer than 0fs"),
    ("resolves_plain_net", HEAD.replace("rd_gnt\n", "rd_gnt, busy\n")
     + "wr_gnt, rd_gnt = mutex(wr_req, rd_req) delay 50ps tau 20ps window 10ps\n"
     + "busy = wr_gnt | rd_gnt delay 10ps\n"
     + "stimulus {\n    at 0ns wr_req = 0, rd_req = 0\n    settle\n    expect resolves busy within 90ps\n}\n",
     "9:21", "'busy' is no output of a mutex or syncff; 'expect resolves' names a metastable element by an output"),
]
for name, text, at, message in bad:
    path = write_file(tmp, f"bad_{name}.settle", text)
    for cmd in ("check", "run"):
        rc, out, err = run_settle(settle, cmd, path)
        check(rc == 2, f"{name}: {cmd} exit {rc}, want 2: {err[-300:]}")
        check(f"bad_{name}.settle:{at}: error: {message}" in err,
              f"{name}: {cmd} says {err.strip()[:300]!r}, want {at}: {message}")


# --- syncff, a change at the edge's instant reaching D or CK through a gate of zero delay -------
# An instant may evaluate the flip-flop twice: the change is still at the edge, so a tie drawn
# from the corner's stream, the same whichever of D and CK arrives later in the instant.
def late_design(name, late):
    """A syncff whose `late` input (d or clk) comes through a buffer of zero delay."""
    other = "clk" if late == "d" else "d"
    return write_file(tmp, name, f"""input x, {other}
output q
wire {late}
{late} = buf(x) delay 0ps
q = syncff(d, clk) delay 50ps tau 20ps window 10ps
init q = 0
stimulus {{
  at 0ns x = 0, {other} = 0
  settle
  at 1ns x = 1, {other} = 1
  settle
}}
""")


late_clock, late_data = late_design("late_clock.settle", "clk"), late_design("late_data.settle", "d")
for i in range(20):
    got = []
    for design in (late_clock, late_data):
        rep = run_json(design, "--corner", f"random:5#{i}", what=f"{design} random:5#{i}")
        edge = [r for r in resolutions(rep) if r["first_fs"] == 1_000_000] if rep else []
        check(len(edge) == 1 and edge[0]["drawn"], f"{design} random:5#{i}: {edge}")
        if len(edge) == 1:
            r = edge[0]
            # a drawn lead > 0 takes the new value, < 0 keeps the old (the model above)
            check(r["value"] == ("1" if r["lead_fs"] > 0 else "0"), f"{design}: {r}")
            check(r["resolution_fs"] > 50000, f"{design}: {r}")
            got.append((r["lead_fs"], r["value"], r["resolution_fs"]))
    check(len(got) == 2 and got[0] == got[1], f"random:5#{i}: late clock and late data differ: {got}")

sys.exit(summary())
