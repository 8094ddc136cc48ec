#!/usr/bin/python3
"""The CI example: examples/sensor_watchdog.settle against its committed baseline gives exit 0,
and its margin matches the hand arithmetic in the design file."""
import json
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]


# Run from the source dir: baseline entries are keyed by the path as given.
p = subprocess.run([settle, "margin", "examples/sensor_watchdog.settle", "--corners", "exhaustive", "--up-to", "400",
                    "--baseline", "examples/sensor_watchdog.margins.json", "--json", "-"],
                   capture_output=True, text=True, cwd=src, timeout=300)
check(p.returncode == 0, f"the CI command exits 0 against the committed baseline: {p.returncode} {p.stderr}")
j = json.loads(p.stdout)
# Hand arithmetic (the design's header), in ps: the read arrives by at most
# 2 x (35 + 5w), the watchdog by at least 3 x (45 - 5w); the read wins while
# 70 + 10w < 135 - 15w, i.e. w < 65/25 = 2.6. At w = 2.6 they tie (an
# oscillation), so the largest passing point of the 1% grid is 259%.
check(j["margin_pct"] == 259, f"margin {j['margin_pct']}% (hand: just below 260%)")
check(j["baseline"]["regressions"] == [], "no regression")
# Settle-time margin at the written spread: the watchdog chain's last buffer
# still changes at 3 x 50ps = 150ps when it loses, the read's side ends by
# 2 x 40 + 25 + 30 = 135ps: worst 150ps of a 300ps budget.
w = j["settle_within"][0]
check(w["worst_fs"] == 150000 and w["margin_fs"] == 150000, f"settle-time margin {w}")
sys.exit(1 if failures else 0)
