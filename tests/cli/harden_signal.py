#!/usr/bin/python3
"""SIGINT and SIGTERM during a long sweep: workers stop within a second, the report so far is
written marked "interrupted": true, the exit status is 130 (issue 7). 130 = 128 + SIGINT is the
shell convention for a process ended by Ctrl-C (common practice)."""
import json
import os
import signal
import subprocess
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, scratch, wait_until_caught  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]


tmp = scratch("settle-harden-signal-")
# A bank of delay-monitor rings (demo scenario): every corner runs each ring for 20ns, so a
# sweep of a million corners takes far longer than the test waits.
rings = 40
lines = ["# bank of delay-monitor rings, enabled together", "input enable", "output " +
         ", ".join(f"tap{r}" for r in range(rings))]
for r in range(rings):
    lines.append("wire " + ", ".join(f"r{r}_{k}" for k in range(5)))
    lines.append(f"r{r}_0 = nand(enable, r{r}_4) delay 30ps..50ps")
    for k in range(1, 5):
        lines.append(f"r{r}_{k} = not(r{r}_{k-1}) delay 20ps..30ps")
    lines.append(f"tap{r} = buf(r{r}_4) delay 25ps..35ps")
lines += ["stimulus {", "  at 0ns enable = 0", "  settle", "  after 1ns enable = 1", "  run 20ns",
          "  after 100ps enable = 0", "  settle", "}"]
design = os.path.join(tmp, "ring_bank.settle")
with open(design, "w") as f:
    f.write("\n".join(lines) + "\n")

for sig in (signal.SIGINT, signal.SIGTERM):
    name = signal.Signals(sig).name
    out = os.path.join(tmp, f"report_{name}.json")
    p = subprocess.Popen([settle, "sweep", design, "--corners", "random:1000000", "--threads", "2",
                          "--json", out, "-q"], stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    check(wait_until_caught(p, sig), f"{name}: settle installs its handler before the sweep")
    t0 = time.monotonic()
    time.sleep(1.0)
    check(p.poll() is None, f"{name}: the sweep is still running after 1 s")
    sent = time.monotonic()
    p.send_signal(sig)
    try:
        so, se = p.communicate(timeout=30)
    except subprocess.TimeoutExpired:
        p.kill()
        so, se = p.communicate()
        check(False, f"{name}: settle did not stop within 30 s of the signal")
    stopped = time.monotonic()
    print(f"{name}: exit {p.returncode}, {stopped - sent:.2f} s after the signal, {stopped - t0:.2f} s in all")
    check(p.returncode == 130, f"{name}: exit status 130 (got {p.returncode}; stderr {se[-400:]!r})")
    # Workers poll the flag between instants; the report is written right after they join.
    check(stopped - sent < 1.5, f"{name}: stopped {stopped - sent:.2f} s after the signal (want < 1 s + slack)")
    check(stopped - t0 < 5, f"{name}: from the handler's install to the end took {stopped - t0:.2f} s (< 5 s)")
    check(name in se and "interrupted" in se, f"{name}: stderr says it was interrupted by {name} ({se[-300:]!r})")
    try:
        with open(out) as f:
            j = json.load(f)
    except (OSError, ValueError) as e:
        check(False, f"{name}: the report is valid JSON ({e})")
        continue
    check(j.get("interrupted") is True, f"{name}: \"interrupted\": true")
    check(j.get("stop_reason") == "signal", f"{name}: stop_reason signal ({j.get('stop_reason')})")
    check(j.get("corners_planned") == 1000000, f"{name}: corners_planned 1000000")
    done = j.get("corners", -1)
    check(0 < done < 1000000, f"{name}: some corners finished, not all ({done})")
    check(j.get("result") == "findings", f"{name}: an interrupted sweep is not a pass")
    for st in j.get("steps", []):
        total = sum(o["count"] for o in st["outcomes"])
        check(total == done, f"{name}: step {st['index']} groups exactly the finished corners ({total} vs {done})")
    left = [n for n in os.listdir(tmp) if ".tmp." in n]
    check(not left, f"{name}: no temporary file left behind ({left})")

sys.exit(1 if failures else 0)
