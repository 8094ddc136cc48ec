#!/usr/bin/python3
# Corner variables: a gate with separate rise and fall ranges is two variables, a single range is
# one, a fixed delay none, and a reaction rule with a range one more. `extremes` and `exhaustive`
# enumerate exactly those, so `exhaustive` finds the worst case of a pulse generator, which
# needs the AND gate's rise at max and its fall at min together.
#
# Called by ctest as: corner_variables.py <settle binary> <source dir>. Exit 77 = skipped.
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_cases, write_file  # noqa: E402
from closed_loop import by_name, report  # noqa: E402

INV_LO, INV_HI = 18, 28                   # ps, each of the three inverters
RISE_LO, RISE_HI, FALL_LO, FALL_HI = 30, 40, 22, 32  # ps, the AND gate's two edges

# A strobe shaper: `arm` rising starts a pulse on `strobe` that lasts as long as the inverted
# copy of `arm` takes to come round.
PULSE = f"""input  arm
output strobe
wire   d1, d2, d3
d1 = not(arm) delay {INV_LO}ps..{INV_HI}ps
d2 = not(d1)  delay {INV_LO}ps..{INV_HI}ps
d3 = not(d2)  delay {INV_LO}ps..{INV_HI}ps
strobe = and(arm, d3) rise {RISE_LO}ps..{RISE_HI}ps fall {FALL_LO}ps..{FALL_HI}ps
stimulus {{
    at 0ns arm = 0
    settle
    gauge width = pulse of strobe high
    at 1ns arm = 1
    settle
    expect strobe = 0
}}
"""


def pulse_width(binary, tmp):
    path = write_file(tmp, "strobe.settle", PULSE)
    # Common practice: pulse width = path delay + fall delay - rise delay. The shortest pulse has
    # the three inverters at min, the fall at min and the rise at max: 3 x 18 + 22 - 40 = 36 ps;
    # the longest 3 x 28 + 32 - 30 = 86 ps.
    shortest = 3 * INV_LO + FALL_LO - RISE_HI
    longest = 3 * INV_HI + FALL_HI - RISE_LO
    check(shortest == 36, "the hand figure of the issue is 36 ps")
    for spec in ("exhaustive", "extremes"):
        rc, doc = report(binary, ["sweep", path, "--corners", spec], f"sweep --corners {spec}", want_rc=0)
        g = by_name((doc or {}).get("gauges"), "name", "width")
        check(g.get("min_fs") == shortest * 1000,
              f"{spec}: shortest pulse {g.get('min_fs')} fs, want {shortest} ps (rise-max with fall-min)")
        check(g.get("max_fs") == longest * 1000, f"{spec}: longest pulse {g.get('max_fs')} fs, want {longest} ps")
        # The witness replays the shortest pulse.
        rc, one = report(binary, ["run", path, "--corner", g.get("witness_min", "typ")], f"{spec} witness")
        w = by_name((one or {}).get("gauges"), "name", "width")
        check(w.get("min_fs") == shortest * 1000, f"{spec} witness {g.get('witness_min')}: {w.get('min_fs')} fs")
    # Three inverters (one variable each) and the AND gate (two): v = 5, so 2^5 = 32 corners.
    rc, doc = report(binary, ["sweep", path, "--corners", "exhaustive"], "corner count", want_rc=0)
    check((doc or {}).get("corners") == 32, f"exhaustive ran {(doc or {}).get('corners')} corners, want 2^5 = 32")


# Counted by hand: two fixed gates (0), one single range (1), one gate with a fixed rise and a
# ranged fall (1), one with two ranges (2), one written rise/fall with the same range twice (1:
# one range moves both edges), a fixed rule (0) and a ranged rule (1): v = 6.
MIXED = """input  a
output y
wire   p, q, r, s, t
p = buf(a)    delay 10ps
q = not(p)    delay 12ps
r = buf(q)    delay 5ps..9ps
s = not(r)    rise 7ps fall 3ps..8ps
t = buf(s)    rise 4ps..6ps fall 5ps..11ps
y = buf(t)    rise 2ps..3ps fall 2ps..3ps
stimulus {
    at 0ns a = 0
    settle
    when y after 100ps : a = 0 times 1
    when ~y & ~a after 20ps..30ps : a = 1 times 1
    settle
}
"""
MIXED_VARIABLES = 0 + 0 + 1 + 1 + 2 + 1 + 0 + 1


def counts(binary, tmp):
    path = write_file(tmp, "mixed.settle", MIXED)
    v = MIXED_VARIABLES
    rc, doc = report(binary, ["sweep", path, "--corners", "exhaustive"], "exhaustive on the mixed design")
    check((doc or {}).get("corners") == 2**v, f"exhaustive: {(doc or {}).get('corners')} corners, want 2^{v}")
    rc, doc = report(binary, ["sweep", path, "--corners", "extremes"], "extremes on the mixed design")
    check((doc or {}).get("corners") == 3 + 2 * v, f"extremes: {(doc or {}).get('corners')}, want 3 + 2 x {v}")
    # The last corner of each exists and the next one is refused with the range (exit 2).
    rc, _ = report(binary, ["run", path, "--corner", f"exhaustive#{2**v - 1}"], "last exhaustive corner")
    check(rc in (0, 1), f"exhaustive#{2**v - 1} exists (rc {rc})")
    p = subprocess.run([binary, "run", path, "--corner", f"exhaustive#{2**v}"], capture_output=True, text=True)
    check(p.returncode == 2 and f"{v} delay variables give {2**v} exhaustive corners" in p.stderr,
          f"exhaustive#{2**v} is refused with the range: rc {p.returncode}, {p.stderr.strip()}")


if __name__ == "__main__":
    sys.exit(run_cases([pulse_width, counts], "settle-corner-vars-"))
