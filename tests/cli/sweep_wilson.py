#!/usr/bin/env python3
# Every outcome's share_ci95 in `settle sweep` JSON agrees with statsmodels'
# proportion_confint(count, nobs, alpha=0.05, method="wilson") (Debian package
# python3-statsmodels; Wilson 1927), over a table of (count, corners) pairs
# from real sweeps; unseen_outcome_bound is 3/N, the rule of three (Hanley and
# Lippman-Hand 1983), N the random and gauss corners.
#
# Called by ctest as: sweep_wilson.py <settle binary> <source dir>. Exit 77 = skipped.
import json
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, summary  # noqa: E402

try:
    from statsmodels.stats.proportion import proportion_confint
except ImportError:
    print("SKIP: python3-statsmodels is not installed (scripts/deps installs it)")
    sys.exit(77)


def main():
    if len(sys.argv) < 3:
        return 2
    binary, src = sys.argv[1], sys.argv[2]
    ex = os.path.join(src, "examples")
    runs = []
    for n, seed in ((1, 1), (7, 2), (40, 3), (333, 4), (1000, 5)):
        runs.append(([os.path.join(ex, "arbiter.settle")], f"random:{n}", seed, n))
    runs.append(([os.path.join(ex, "arbiter.settle")], "extremes+gauss:250", 6, 250))
    runs.append(([os.path.join(ex, "debounce.settle"), "--stim", os.path.join(ex, "debounce_chatter.stim")],
                 "extremes+random:120", 7, 120))
    pairs = set()
    for args, spec, seed, sampled in runs:
        p = subprocess.run([binary, "sweep", *args, "--corners", spec, "--seed", str(seed), "--json", "-"],
                           capture_output=True, text=True, timeout=600)
        try:
            doc = json.loads(p.stdout)
        except json.JSONDecodeError:
            fail(f"sweep {args} {spec}: no JSON (rc={p.returncode}): {p.stderr[:300]}")
            continue
        nobs = doc["corners"]
        for step in doc["steps"]:
            for o in step["outcomes"]:
                lo, hi = proportion_confint(o["count"], nobs, alpha=0.05, method="wilson")
                got = o["share_ci95"]
                pairs.add((o["count"], nobs))
                if abs(got[0] - lo) > 1e-9 or abs(got[1] - hi) > 1e-9:
                    fail(f"{spec} step {step['index']}: ({o['count']}, {nobs}) gives {got}, statsmodels [{lo}, {hi}]")
                if abs(o["share"] - o["count"] / nobs) > 1e-12:
                    fail(f"{spec} step {step['index']}: share {o['share']} != {o['count']}/{nobs}")
            if "unseen_outcome_bound" in step and abs(step["unseen_outcome_bound"] - min(1.0, 3 / sampled)) > 1e-12:
                fail(f"{spec} step {step['index']}: unseen_outcome_bound {step['unseen_outcome_bound']}, "
                     f"expected 3/{sampled}")
    # The table must hold proportions strictly inside (0, 1) as well as whole ones.
    inner = [p for p in pairs if 0 < p[0] < p[1]]
    if len(pairs) < 10 or len(inner) < 4:
        fail(f"too few (count, corners) pairs to be a table: {sorted(pairs)}")
    else:
        print(f"{len(pairs)} (count, corners) pairs compared, {len(inner)} strictly inside (0, 1)")
    return summary()


if __name__ == "__main__":
    sys.exit(main())
