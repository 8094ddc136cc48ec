#!/usr/bin/python3
"""A margin search stopped by --timeout or by SIGINT/SIGTERM (issue 7): it ends quickly, writes a
valid report marked "interrupted": true with the margins its finished probes bracketed, writes no
baseline, and exits 1 (timeout, a finding) or 130 (a signal; 128 + SIGINT is the shell convention
for a process ended by Ctrl-C, common practice)."""
import json
import os
import signal
import subprocess
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, summary, scratch, wait_until_caught  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
design = os.path.join(src, "examples", "sensor_watchdog.settle")
# Sized to run for well over ten seconds on a fast machine (about 17 s of two cores here), so the
# stop always lands mid-search; the per-corner results it keeps cost about 0.4 GB.
slow = ["--corners", "random:6000000", "--threads", "2", "-q"]
tmp = scratch("settle-margin-stop-")

# --timeout: the search stops itself.
out, base = os.path.join(tmp, "t.json"), os.path.join(tmp, "t.baseline.json")
t0 = time.monotonic()
p = subprocess.run([settle, "margin", design, *slow, "--timeout", "1", "--json", out,
                    "--baseline", base, "--update-baseline"], capture_output=True, text=True, timeout=120)
took = time.monotonic() - t0
check(p.returncode == 1, f"--timeout exits 1, got {p.returncode}: {p.stderr}")
check(took < 10, f"--timeout 1 ends within 10 s (took {took:.1f} s)")
check("stopped by --timeout" in p.stderr, "stderr says the search was stopped")
check(not os.path.exists(base), "no baseline is written from a partial search")
d = json.load(open(out))
check(d["interrupted"] is True and d["stop_reason"] == "timeout", "the JSON says interrupted, by the timeout")
check(0 <= d["margin_pct"] <= 100, "a margin (a lower bound) is still reported")

# A signal: the workers stop within a second and the command exits 130.
for sig in (signal.SIGINT, signal.SIGTERM):
    out = os.path.join(tmp, f"s{int(sig)}.json")
    proc = subprocess.Popen([settle, "margin", design, *slow, "--json", out],
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
    check(wait_until_caught(proc, sig), f"{sig.name}: settle installs its handler before the search")
    time.sleep(0.5)
    check(proc.poll() is None, f"{sig.name}: the search is still running when the signal is sent")
    t0 = time.monotonic()
    proc.send_signal(sig)
    _, err = proc.communicate(timeout=60)
    took = time.monotonic() - t0
    check(proc.returncode == 130, f"{sig.name} exits 130, got {proc.returncode}: {err}")
    check(took < 5, f"{sig.name}: stops within 5 s (took {took:.2f} s)")
    d = json.load(open(out))
    check(d["interrupted"] is True and d["stop_reason"] == "signal", f"{sig.name}: the JSON says interrupted")

sys.exit(summary())
