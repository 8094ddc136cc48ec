#!/usr/bin/python3
"""settle margin: the bisected spread margin against a hand-computed delay ratio, replay of the
witness with settle run, the settle-time margin, and race culprits in sweep and margin JSON."""
import json
import os
import sys
from fractions import Fraction

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, runner  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
race = os.path.join(src, "tests", "data", "margin_race.settle")
planted = os.path.join(src, "tests", "data", "margin_planted.settle")


run = runner(settle, 300)


# Hand arithmetic, stated in tests/data/margin_race.settle: at spread w the
# early chain (3 buffers of 50ps +- 10ps) arrives by 150 + 30w ps at the
# latest, the late chain (4 buffers of 40ps +- 4ps) by 160 - 16w ps at the
# earliest; the late chain can win once 160 - 16w < 150 + 30w, i.e.
# w > 10/46. Exhaustive corners include that extreme corner, so the margin
# is the largest point of the 1% grid below 10/46 (21%).
ratio = Fraction(10, 46)
rc, out, err = run("margin", race, "--corners", "exhaustive", "--json", "-", "--threads", "2")
check(rc == 1, f"margin below 100% is a finding (exit 1), got {rc}: {err}")
j = json.loads(out)
m = Fraction(j["margin_pct"]).limit_denominator(1000) / 100
check(m <= ratio and ratio - m <= Fraction(j["resolution_pct"]) / 100,
      f"margin {j['margin_pct']}% within 1 point below {float(ratio) * 100:.3f}%")
check(j["exact"] is True and "exact" in j["confidence"], "exhaustive is reported as exact")
f = j["failure"]
check(f["step"] == 2, f"first failure is at step 2: {f}")
check(f["spread_pct"] > float(ratio) * 100, "the failure lies above the ratio")
check(f["witness"].endswith("@0.22"), f"witness carries the spread: {f['witness']}")
check(j["corner_runs"] == j["corners_per_probe"] * len(j["probes"]), "corner runs = corners x probes")
check(all(s["at_least"] for s in j["steps"] if s["index"] != 2), "steps 1 and 3 pass at every spread")

# The witness replays: settle run at that corner shows the failing expectation.
rc, out, err = run("run", race, "--corner", f["witness"], "--json", "-")
check(rc == 1, f"replay of {f['witness']} exits 1, got {rc}")
r = json.loads(out)
step2 = r["steps"][1]
check(any(not e["pass"] for e in step2["expect"]), "the replayed step 2 fails an expectation")
check(r["corner"] == f["witness"], "run reports the same corner name")

# The culprits of the divergence just above the margin are the early chain's
# buffers (the late chain is all-min in both witnesses at that spread).
names = {c["gate"] for c in f.get("culprits", [])}
check(names and names <= {"e1", "e2", "req_early", "l1", "l2", "l3", "req_late"},
      f"culprits are chain buffers: {names}")
check(len(f.get("paths", [])) == 2 and all(p["nets"] for p in f["paths"]), "two competing paths")

# Settle-time margin of `settle within 300ps` under extremes at the written
# spread: all-max (extremes#1) lets the late chain win (176ps < 180ps) and
# releases it in 176 + 30 + 30 = 236ps, the slowest extremes corner.
rc, out, err = run("margin", race, "--corners", "extremes", "--json", "-", "--no-culprits")
j = json.loads(out)
w = j["settle_within"]
check(len(w) == 1 and w[0]["budget_fs"] == 300000 and w[0]["worst_fs"] == 236000, f"settle-time margin {w}")
check(w and w[0]["worst_corner"] == "extremes#1" and w[0]["margin_fs"] == 64000, f"worst corner {w}")
check("estimate" in j["confidence"] and not j["exact"], "extremes only: an estimate")

# A random spec says plainly it is a lower-confidence estimate.
rc, out, err = run("margin", race, "--corners", "random:50", "--resolution", "5")
check("lower-confidence estimate" in out, "random spec summary says lower-confidence")

# settle sweep reports the culprits of the planted race (the two NANDs of
# the cell; the rest of the design cannot change the grant).
rc, out, err = run("sweep", planted, "--corners", "extremes+random:100", "--json", "-")
j = json.loads(out)
s3 = j["steps"][2]
cul = {c["gate"] for c in s3.get("culprits", [])}
check(cul and cul <= {"arb.cell_a", "arb.cell_b"}, f"sweep culprits {cul}")
check(all(len(c["delay_fs"]) == 2 for c in s3.get("culprits", [])), "delay_fs holds both corners")
check(len(s3.get("paths", [])) == 2, "sweep paths")
rc, out, err = run("sweep", planted, "--corners", "extremes+random:100")
check("race culprits" in out and "arb.cell_" in out, "sweep summary lists culprits")

sys.exit(1 if failures else 0)
