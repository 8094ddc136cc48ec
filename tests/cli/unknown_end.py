#!/usr/bin/python3
# A step that ends with an output or watched net at x is a finding (exit 1) that names the nets
# (`unknown` in JSON, an UNKNOWN line in text), unless the step says `expect NET = x` or the
# command has --allow-x; `check` warns about a feedback loop whose gates all have zero delay.
#
# The three-valued facts used (common practice, ternary simulation as in Eichelberger 1965 and
# Brzozowski and Seger's book, from memory): not(x) = x, and a gate whose inputs are all at the
# values they had leaves its output where it is, so an inverter ring that starts at x stays at x.
#
# Called by ctest as: unknown_end.py <settle binary> <source dir>. Exit 77 = skipped.
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_cases, write_file  # noqa: E402
from closed_loop import report  # noqa: E402

# A delay-monitor ring with no reset: three inverters closed on themselves and nothing to give
# them a first value, so the ring never leaves x.
RING = """input  enable
output tap
wire   r1, r2
r1  = nand(enable, tap) delay 20ps..30ps
r2  = not(r1)           delay 20ps..30ps
tap = not(r2)           delay 20ps..30ps
stimulus {{
    at 0ns enable = 0
    settle
    expect r1 = 1
    at 1ns enable = 1
    settle
{expect}}}
"""


def plain(binary, tmp):
    # enable = 0 forces r1 = 1, so the first step settles with tap = 1; the ring then runs.
    # Without the reset the first step cannot be known: start with enable at x.
    path = write_file(tmp, "ring_x.settle", RING.format(expect="").replace("at 0ns enable = 0", "at 0ns enable = x")
                      .replace("    expect r1 = 1\n", ""))
    rc, doc = report(binary, ["run", path], "run of the ring left at x", want_rc=1)
    steps = (doc or {}).get("steps", [])
    check(steps and steps[0].get("status") == "settled", f"the step settles at x: {steps[:1]}")
    check(steps and steps[0].get("unknown") == ["tap"], f"unknown names the output: {steps[0].get('unknown') if steps else None}")
    check((doc or {}).get("result") == "findings", "an output left at x is a finding")
    p = subprocess.run([binary, "run", path], capture_output=True, text=True, env={**os.environ, "NO_COLOR": "1"})
    check(p.returncode == 1 and "UNKNOWN  tap at x at the end of the step" in p.stdout,
          f"text names it on an UNKNOWN line: {p.stdout[-600:]}")
    rc, _ = report(binary, ["run", path, "--allow-x"], "run --allow-x", want_rc=0)
    rc, doc = report(binary, ["sweep", path, "--corners", "extremes"], "sweep of the ring left at x", want_rc=1)
    outs = [o for s in (doc or {}).get("steps", [])[:1] for o in s.get("outcomes", [])]
    check(outs and all(o.get("unknown") == ["tap"] for o in outs), f"every sweep outcome names tap: {outs}")
    rc, _ = report(binary, ["sweep", path, "--corners", "extremes", "--allow-x"], "sweep --allow-x", want_rc=0)


def expected_x(binary, tmp):
    # Both steps leave tap at x (nand(1, x) = x), and both say so.
    text = RING.format(expect="    expect tap = x\n").replace("at 0ns enable = 0", "at 0ns enable = x").replace(
        "    expect r1 = 1\n", "    expect tap = x\n")
    path = write_file(tmp, "ring_x_expected.settle", text)
    rc, doc = report(binary, ["run", path], "run with expect tap = x", want_rc=0)
    steps = (doc or {}).get("steps", [])
    check(len(steps) == 2 and all(s.get("unknown") == [] for s in steps), f"an expected x is not listed: {steps}")


def known(binary, tmp):
    # With the reset the ring starts known and oscillates: no step ends at x (an oscillating step
    # is judged by its period, never by where it stopped).
    path = write_file(tmp, "ring_known.settle", RING.format(expect="    expect oscillating\n"))
    rc, doc = report(binary, ["run", path], "run of the reset ring", want_rc=0)
    check(all(s.get("unknown") == [] for s in (doc or {}).get("steps", [])), "no unknown nets")


def zero_delay_loop(binary, tmp):
    path = write_file(tmp, "zero_loop.settle", "input a\noutput y\nwire w\nw = nand(a, y) delay 0ps\n"
                      "y = not(w) delay 0ps\n")
    p = subprocess.run([binary, "check", path], capture_output=True, text=True)
    check(p.returncode == 0 and "has zero delay on every gate" in p.stderr, f"check warns: {p.stderr}")
    rc, doc = report(binary, ["check", path], "check --json")
    check([l.get("zero_delay") for l in (doc or {}).get("loops", [])] == [True], f"loops: {(doc or {}).get('loops')}")
    # One delay in the loop is enough: no warning.
    path = write_file(tmp, "loop.settle", "input a\noutput y\nwire w\nw = nand(a, y) delay 0ps\ny = not(w) delay 5ps\n")
    p = subprocess.run([binary, "check", path], capture_output=True, text=True)
    check("zero delay" not in p.stderr, f"no warning for a loop with a delay: {p.stderr}")


if __name__ == "__main__":
    sys.exit(run_cases([plain, expected_x, known, zero_delay_loop], "settle-unknown-"))
