#!/usr/bin/python3
"""Bounded runs (issue 7): --max-events on run and sweep, the horizon, --max-states on explore,
the corner-count guard of exhaustive sweeps and --timeout on sweep (and margin when it has one).
Each ends quickly with a clear message, a finding (exit 1) or a refusal (exit 2, issue 3's
exhaustive rule) and a valid report; never a hang. The state count of n independent toggling
C-element stages grows as 2^n (combinatorics: each stage is in one of two states), so a
budget of 10 states must stop a four-stage explore."""
import functools
import json
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, run_bounded, write_file, scratch  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-harden-bounds-")


write = functools.partial(write_file, tmp)
# run(what, args, want, limit=60): (exit status, stdout, stderr, seconds), the status checked against `want`.
run = functools.partial(run_bounded, settle, limit=60)


def load(path, what):
    try:
        with open(path) as f:
            return json.load(f)
    except (OSError, ValueError) as e:
        check(False, f"{what}: valid JSON report ({e})")
        return None


def run_report(what, args, want, name, label, limit=60):
    """run() with `--json tmp/name` added; returns (exit status, stdout, stderr, seconds, the
    report loaded, or None after a failure named `label`)."""
    out = os.path.join(tmp, name)
    rc, so, se, el = run(what, [*args, "--json", out], want, limit=limit)
    return rc, so, se, el, load(out, label)


# A clocked strobe (demo scenario: a sensor sampling strobe) left running for a second of
# simulated time: about 2 x 10^12 edges, so only the event limit can stop it soon.
strobe = write("strobe.settle", "input clk\noutput s\nwire s_n\ns_n = not(clk) delay 20ps\ns = not(s_n) delay 20ps\n"
               "stimulus {\n  clock clk period 1ns\n  run 1000ms\n}\n")
*_, j = run_report("run --max-events 10000", ["run", strobe, "--max-events", "10000"], {1},
                   "run.json", "run --max-events")
if j:
    st = j["steps"][-1]
    check(st["status"] == "event_limit", f"run: the step ends at the event limit ({st['status']})")
    check(10000 <= j["events"] <= 10100, f"run: stopped at the limit ({j['events']} events)")
    check(j["result"] == "findings", "run: the event limit is a finding")
rc, so, se, _ = run("run --max-events, table", ["run", strobe, "--max-events", "10000"], {1})
check("event" in (so + se).lower() and "limit" in (so + se).lower(), f"run: says the event limit stopped it ({so[-300:]!r})")

*_, j = run_report("sweep --max-events 5000", ["sweep", strobe, "--corners", "extremes+random:50",
                                               "--max-events", "5000"], {1}, "sweep.json", "sweep --max-events")
if j:
    statuses = {o["status"] for s in j["steps"] for o in s["outcomes"]}
    check(statuses == {"event_limit"}, f"sweep: every corner stops at the event limit ({statuses})")
    # Both gates have fixed delays, so they are no corner variables (issue 16): extremes = 3 + 2 x 0.
    check(j["corners"] == 3 + 2 * 0 + 50, f"sweep: every corner ran (extremes = 3 + 2v, v = 0) ({j['corners']})")

# The horizon: the delay-monitor ring, enabled, never settles; a horizon shorter than one
# period (2 x (40 + 4 x 25)ps = 280ps at typ, common practice) ends the step as a timeout.
ring = os.path.join(src, "examples", "delay_ring.settle")
ring_free = write("ring_settle.settle", open(ring).read().split("stimulus")[0] +
                  "stimulus {\n  at 0ns enable = 0\n  settle\n  after 1ns enable = 1\n  settle\n}\n")
*_, j = run_report("run --horizon 100ps", ["run", ring_free, "--horizon", "100ps"], {1},
                   "horizon.json", "run --horizon")
if j:
    st = j["steps"][-1]
    check(st["status"] == "timeout", f"horizon: the enabled ring times out ({st['status']})")
    check(st["end_fs"] - st["start_fs"] == 100000, f"horizon: it stops at the horizon ({st['end_fs'] - st['start_fs']} fs)")
rc, so, se, _ = run("run, default horizon", ["run", ring_free, "--json", "-"], {1})
if rc == 1:
    st = json.loads(so)["steps"][-1]
    check(st["status"] == "oscillating", f"default horizon: the ring is found oscillating ({st['status']})")

# --max-states on explore: a bank of four C-element toggles whose inputs change together.
lines = ["input go", "output " + ", ".join(f"q{k}" for k in range(4)), "wire " + ", ".join(f"m{k}" for k in range(4))]
for k in range(4):
    lines += [f"m{k} = not(q{k}) delay 10ps..90ps", f"q{k} = c(go, m{k}) delay 10ps..90ps"]
lines += ["init " + ", ".join(f"q{k} = 0, m{k} = 1" for k in range(4)),
          "stimulus {", "  at 0ns go = 0", "  settle", "  after 1ns go = 1", "  settle", "}"]
bank = write("toggle_bank.settle", "\n".join(lines) + "\n")
rc, so, se, _, j = run_report("explore --max-states 10", ["explore", bank, "--max-states", "10"], {1},
                              "explore.json", "explore --max-states")
if j:
    st = j["steps"][-1]
    check(st["complete"] is False and "stopped" in st, f"explore: the step is incomplete and says why ({st.get('stopped')})")
    check(st["states"] <= 10 + 16, f"explore: the budget bounds the states ({st['states']})")
check("stopped" in so or "state" in so, "explore: the table says it stopped")

# The exhaustive guard: 2^g corners are refused above 2^20 with a hint at random:N (issue 3).
lines = ["input a", "output y", "wire " + ", ".join(f"w{k}" for k in range(24)), "w0 = not(a) delay 10ps..20ps"]
lines += [f"w{k} = not(w{k-1}) delay 10ps..20ps" for k in range(1, 24)]
lines += ["y = buf(w23) delay 10ps..20ps", "stimulus {", "  at 0ns a = 0", "  settle", "}"]
wide = write("chain25.settle", "\n".join(lines) + "\n")
rc, so, se, el = run("sweep --corners exhaustive on 25 gates", ["sweep", wide, "--corners", "exhaustive"], {2})
check("random:" in se, f"exhaustive: the refusal suggests random:N ({se[-300:]!r})")
check(el < 10, "exhaustive: refused at once, not after trying")
rc, so, se, el = run("sweep --corners random:100000000", ["sweep", wide, "--corners", "random:100000000"], {2})
check(el < 10, "a sweep beyond the corner limit is refused at once")

# --timeout on sweep: a wall-clock budget ends the sweep with a finding and the report so far.
out = os.path.join(tmp, "timeout.json")
rc, so, se, el = run("sweep --timeout 1", ["sweep", strobe, "--corners", "random:1000000", "--max-events", "200000",
                                           "--timeout", "1", "--threads", "2", "--json", out], {1}, limit=30)
check(el < 5, f"sweep --timeout 1 ends within 5 s ({el:.2f} s)")
check("timeout" in se, f"sweep --timeout: says so on stderr ({se[-300:]!r})")
j = load(out, "sweep --timeout")
if j:
    check(j.get("interrupted") is True and j.get("stop_reason") == "timeout", "sweep --timeout: marked interrupted by timeout")
    check(0 < j["corners"] < 1000000 and j.get("corners_planned") == 1000000, f"sweep --timeout: partial ({j['corners']})")
    check(j["result"] == "findings", "sweep --timeout: not a pass")
rc, so, se, _ = run("sweep --timeout -1", ["sweep", strobe, "--timeout", "-1"], {2})

if "--timeout" in subprocess.run([settle, "margin", "--help"], capture_output=True, text=True).stdout:
    out = os.path.join(tmp, "margin.json")
    rc, so, se, el = run("margin --timeout 1", ["margin", strobe, "--corners", "random:1000000", "--timeout", "1",
                                                "--threads", "2", "--json", out], {1}, limit=30)
    check(el < 5, f"margin --timeout 1 ends within 5 s ({el:.2f} s)")
    j = load(out, "margin --timeout")
    if j:
        check(j.get("interrupted") is True, "margin --timeout: marked interrupted")
else:
    print("note: margin has no --timeout; not checked")

sys.exit(1 if failures else 0)
