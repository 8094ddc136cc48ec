#!/usr/bin/python3
"""settle sweep over a mutex whose requests tie: per element the resolutions, the longest with
its witness corner, and per `expect resolves` budget the share of corners exceeding it with its
Wilson interval beside the model's share. From memory of the first-order model (Veendrick 1980,
IEEE JSSC 15(2); Kleeman and Cantoni 1987, IEEE Trans. Computers 36(10)): a tie draws the gap
uniformly in (0, W), so a resolution exceeds D + x with probability e^(-x/tau). The shares are
checked with scipy's binomial test (python3-scipy), the winners' split against one half."""
import json
import math
import os
import sys

from scipy.stats import binomtest

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_settle, summary  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
design = os.path.join(src, "tests", "data", "meta", "tie_arbiter.settle")
if not os.path.exists(design):
    print(f"missing test data {design}")
    sys.exit(1)

N = 3000
reports = []
for threads in ("1", "2"):
    rc, out, err = run_settle(settle, "sweep", design, "--corners", f"random:{N}", "--threads",
                              threads, "--json", "-")
    # expectations fail in some corners: findings, exit 1 (README, exit codes)
    check(rc == 1, f"sweep --threads {threads}: exit {rc}: {err[-300:]}")
    if rc != 1:
        sys.exit(summary())
    j = json.loads(out)
    j.pop("wall_s", None)
    j.pop("threads", None)
    reports.append(j)
check(reports[0] == reports[1], "the same answer on one and two threads")
j = reports[0]
el = j["elements"]
check(len(el) == 1 and el[0]["element"] == "gnt_sensor" and el[0]["kind"] == "mutex", f"{el}")
e = el[0]
check(e["resolutions"] == N and e["drawn"] == N and e["inside_window"] == N, f"counts {e}")
# D + tau ln(W / gap), the drawn gap a 53-bit fraction of W: at most 50ps + 20ps x 53 ln 2
check(50000 < e["longest_fs"] <= 50000 + round(20000 * 53 * math.log(2)), f"longest {e['longest_fs']}")
rc, out, err = run_settle(settle, "run", design, "--corner", e["witness"], "--json", "-")
if out:
    got = max(r["resolution_fs"] for r in json.loads(out)["steps"][1]["resolutions"])
    check(got == e["longest_fs"], f"witness {e['witness']} replays {got}, want {e['longest_fs']}")
budgets = {b["within_fs"]: b for b in e["budgets"]}
check(sorted(budgets) == [60000, 80000, 110000], f"budgets {sorted(budgets)}")
for within, b in budgets.items():
    model = math.exp(-(within - 50000) / 20000)
    check(abs(b["model_share"] - model) < 1e-6, f"{within}: model share {b['model_share']} != {model}")
    p = binomtest(b["exceeded"], N, model).pvalue
    check(p > 0.001, f"{within}: {b['exceeded']} of {N} against the model's {model:.4f}: p = {p:.2g}")
    lo, hi = b["share_ci95"]
    check(lo <= b["share"] <= hi, f"{within}: interval {lo}..{hi}")
# The winners: the two outcomes of the racing step split about evenly.
outcomes = j["steps"][1]["outcomes"]
check(len(outcomes) == 2, f"two outcomes, got {len(outcomes)}")
if len(outcomes) == 2:
    p = binomtest(outcomes[0]["count"], N, 0.5).pvalue
    check(p > 0.001, f"winners {outcomes[0]['count']} / {outcomes[1]['count']}: p = {p:.2g}")
sys.exit(summary())
