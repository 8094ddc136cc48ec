#!/usr/bin/python3
"""settle mtbf: the analytic MTBF against the first-order formula evaluated here (from memory of
Veendrick 1980, IEEE JSSC 15(2); Kleeman and Cantoni 1987, IEEE Trans. Computers 36(10);
Ginosar 2011, IEEE Design & Test 28(5)), the simulated failure rate's 95% interval (checked
against scipy's chi-square quantiles, python3-scipy) containing the formula's rate where at
least 100 failures are counted, the gain of one more clock period of budget (a second flip-flop
stage), and the refusals."""
import json
import math
import os
import sys

from scipy.stats import chi2

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_settle, summary  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
data = os.path.join(src, "tests", "data", "meta")
sync, arb = os.path.join(data, "mtbf_sync.settle"), os.path.join(data, "mtbf_arb.settle")
for p in (sync, arb):
    if not os.path.exists(p):
        print(f"missing test data {p}")
        sys.exit(1)


def mtbf(design, element, budget, rates, *extra):
    args = ["mtbf", design, "--element", element, "--budget", budget, "--json", "-"]
    for r in rates:
        args += ["--rate", r]
    rc, out, err = run_settle(settle, *args, *extra)
    check(rc == 0, f"mtbf {design} {budget} {rates}: exit {rc}: {err[-300:]}")
    return json.loads(out) if rc == 0 else None


def close(a, b, rel=1e-9):
    return a == b or abs(a - b) <= rel * max(abs(a), abs(b))


# MTBF = e^(t/tau) / (W f_c f_d) for a synchronizer; e^(t/tau) / (2 W f_1 f_2) for a mutex.
def formula(mutex, tau_s, w_s, f1, f2, t_s):
    return math.exp(t_s / tau_s) / ((2 if mutex else 1) * w_s * f1 * f2)


# (budget, data rate, clock rate) for the synchronizer (tau 20ps, W 10ps), few events: the
# analytic figures do not depend on the simulation.
for budget_ps, fd, fc in ((100, 1e6, 1e8), (400, 1e7, 5e8), (1000, 1e8, 1e9)):
    j = mtbf(sync, "ready_sync", f"{budget_ps}ps", [f"ready={fd:g}Hz", f"clk={fc:g}Hz"],
             "--events", "1000")
    if j:
        want = formula(False, 20e-12, 10e-12, fd, fc, budget_ps * 1e-12)
        check(close(j["mtbf"]["typ_s"], want), f"sync {budget_ps}ps: {j['mtbf']['typ_s']} != {want}")
        check(close(j["mtbf"]["typ_years"], want / (365.25 * 86400)), "sync years")
        check(close(j["mtbf"]["worst_s"], want), "sync worst = typ without ranges")
# The mutex with ranges: typ at tau 22.5ps, W 11ps; the worst at the largest tau and W.
j = mtbf(arb, "gnt_host", "300ps", ["req_sensor=50MHz", "req_host=80MHz"], "--events", "1000")
if j:
    t = 300e-12
    check(close(j["mtbf"]["typ_s"], formula(True, 22.5e-12, 11e-12, 5e7, 8e7, t)), "mutex typ")
    check(close(j["mtbf"]["worst_s"], formula(True, 25e-12, 12e-12, 5e7, 8e7, t)), "mutex worst")
    check(j["element"] == "gnt_sensor" and j["kind"] == "mutex", f"element {j['element']}")

# A second flip-flop stage adds about one clock period T_c to the budget, so the MTBF grows by
# e^(T_c / tau) per stage (common practice): here T_c = 1ns at 1GHz, tau = 20ps.
one = mtbf(sync, "ready_sync", "200ps", ["ready=10MHz", "clk=1GHz"], "--events", "1000")
two = mtbf(sync, "ready_sync", "1200ps", ["ready=10MHz", "clk=1GHz"], "--events", "1000")
if one and two:
    check(close(two["mtbf"]["typ_s"] / one["mtbf"]["typ_s"], math.exp(1000 / 20), 1e-6),
          "two stages: MTBF ratio e^(T_c/tau)")


# The simulation: at budgets short enough for at least 100 failures the exact 95% interval of
# the observed rate contains the formula's rate.
def garwood(k, duration):
    lo = 0.0 if k == 0 else chi2.ppf(0.025, 2 * k) / 2 / duration
    return lo, chi2.ppf(0.975, 2 * k + 2) / 2 / duration


cases = [(sync, "ready_sync", "20ps", ["ready=100MHz", "clk=1GHz"], "400000"),
         (sync, "ready_sync", "50ps", ["ready=200MHz", "clk=1GHz"], "1500000"),
         (arb, "gnt_sensor", "10ps", ["req_sensor=200MHz", "req_host=300MHz"], "600000"),
         (arb, "gnt_sensor", "40ps", ["req_sensor=300MHz", "req_host=300MHz"], "800000")]
for design, element, budget, rates, events in cases:
    j = mtbf(design, element, budget, rates, "--events", events)
    if not j:
        continue
    s = j["simulation"]
    what = f"{os.path.basename(design)} {budget}"
    check(s["failures"] >= 100, f"{what}: {s['failures']} failures, the check needs 100")
    lo, hi = garwood(s["failures"], s["duration_s"])
    check(close(s["interval_hz"][0], lo, 1e-6) and close(s["interval_hz"][1], hi, 1e-6),
          f"{what}: interval {s['interval_hz']} against scipy {lo, hi}")
    check(lo <= s["formula_rate_hz"] <= hi and s["agrees"],
          f"{what}: formula {s['formula_rate_hz']} outside {lo}..{hi}")
    check(close(s["observed_rate_hz"], s["failures"] / s["duration_s"]), f"{what}: observed rate")

# The same seed replays the same count; another seed is another sample.
a = mtbf(sync, "ready_sync", "20ps", ["ready=100MHz", "clk=1GHz"], "--events", "50000")
b = mtbf(sync, "ready_sync", "20ps", ["ready=100MHz", "clk=1GHz"], "--events", "50000")
check(a and b and a["simulation"]["failures"] == b["simulation"]["failures"], "replay")

# --min-mtbf: exit 1 below it, 0 above.
rc, _, _ = run_settle(settle, "mtbf", sync, "--element", "ready_sync", "--budget", "100ps",
                      "--rate", "ready=10MHz", "--rate", "clk=1GHz", "--events", "100",
                      "--min-mtbf", "1y")
check(rc == 1, f"--min-mtbf 1y at 100ps: exit {rc}, want 1")
rc, _, _ = run_settle(settle, "mtbf", sync, "--element", "ready_sync", "--budget", "900ps",
                      "--rate", "ready=10MHz", "--rate", "clk=1GHz", "--events", "100",
                      "--min-mtbf", "1y")
check(rc == 0, f"--min-mtbf 1y at 900ps: exit {rc}, want 0")

# Refusals, exit 2 with a reason.
for args, words in (
        (["--element", "clk", "--budget", "1ns", "--rate", "ready=1MHz", "--rate", "clk=1GHz"],
         "is no output of a mutex or syncff"),
        (["--element", "ready_sync", "--budget", "1ns", "--rate", "ready=1MHz"],
         "--rate clk=FREQ is missing"),
        (["--element", "ready_sync", "--budget", "1ns", "--rate", "ready=fast", "--rate", "clk=1GHz"],
         "expected NET=FREQ"),
        (["--element", "ready_late", "--budget", "1ns", "--rate", "ready_sync=1MHz", "--rate",
          "clk=1GHz"], "is driven by a gate")):
    rc, out, err = run_settle(settle, "mtbf", sync, *args)
    check(rc == 2 and words in err, f"{args}: exit {rc}, {err[-300:]}")

sys.exit(summary())
