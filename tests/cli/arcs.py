#!/usr/bin/python3
# Pin-to-pin delays (`from NET DELAY` in .settle, `specify` module paths in Verilog): a ring
# oscillator's period follows the arcs on its loop, a latch's outputs follow the arc of the input
# that changed, the arcs are corner variables, and misplaced arcs are refused at their place.
#
# Called by ctest as: arcs.py <settle binary> <source dir>. Exit 77 = skipped (no sigrok-cli).
# Data (scenarios of our own): tests/data/arcs_ring.settle, arcs_ring.v, arcs_ring.stim,
# arcs_latch.settle.
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, failures, run_settle, scratch, write_file  # noqa: E402
from closed_loop import edges, have_sigrok, report, sigrok_changes  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
data, tmp = os.path.join(src, "tests", "data"), scratch("settle-arcs-")
ring_s, ring_v = os.path.join(data, "arcs_ring.settle"), os.path.join(data, "arcs_ring.v")
ring_stim, latch = os.path.join(data, "arcs_ring.stim"), os.path.join(data, "arcs_latch.settle")
for p in (ring_s, ring_v, ring_stim, latch):
    if not os.path.exists(p):
        fail(f"missing test data {p}")
        sys.exit(1)

# The ring's arcs as written in arcs_ring.settle and arcs_ring.v, (rise, fall) in ps per corner.
LOOP = {  # on the loop: n0 from tap, n1 from n0, tap from n1
    "min": [(20, 28), (14, 16), (11, 9)],
    "typ": [(25, 35), (18, 21), (13, 12)],
    "max": [(32, 44), (23, 27), (16, 15)],
}
OFF = {"min": [5, 6], "typ": [350, 500], "max": [400, 600]}  # from en, from trim

ring_periods = {}
for corner in ("min", "typ", "max"):
    # Common practice: a ring of an odd number of inverting stages oscillates with period twice
    # its loop delay; with separate rise and fall delays each stage adds its rise plus its fall
    # once per period (the output of each stage rises once and falls once in a period).
    want = sum(r + f for r, f in LOOP[corner]) * 1000
    # What the arcs off the loop (which also set each gate's envelope at every corner) would
    # give: the test fails if arcs were ignored or taken from the wrong input.
    envelope = 2 * (OFF[corner][0] + OFF[corner][1]) * 1000 + sum(LOOP[corner][2]) * 1000
    check(want != envelope, f"{corner}: the loop period differs from the envelope's")
    for path in (ring_s, ring_v):
        what = f"{os.path.basename(path)} at {corner}"
        rc, doc = report(settle, ["run", path, "--stim", ring_stim, "--corner", corner, "-q"], what, want_rc=1)
        steps = (doc or {}).get("steps", [])
        if len(steps) != 2:
            fail(f"{what}: {len(steps)} steps, want 2")
            continue
        check(steps[0]["status"] == "settled", f"{what}: the stopped ring {steps[0]['status']}")
        s = steps[1]
        check(s["status"] == "oscillating" and s.get("period_fs") == want,
              f"{what}: {s['status']} with period {s.get('period_fs')} fs, want {want} fs (2 x loop arcs)")
        ring_periods.setdefault(corner, []).append(s.get("period_fs"))
    got = ring_periods.get(corner, [])
    check(len(got) == 2 and got[0] == got[1], f"{corner}: .settle and Verilog periods {got} differ")

# Corner variables: each arc's rise and fall count as the gate delays' do (a rise/fall pair of
# ranges 2, one range 1, a fixed delay 0): from tap 2, from en 1, from n0 2, from trim 1, from
# n1 2: v = 8, and `extremes` runs 3 + 2 x v corners (README, "Corner variables"). Counted by
# hand from arcs_ring.settle; the gates' envelopes alone would give 2 + 2 + 2 = 6.
V = 2 + 1 + 2 + 1 + 2
for path in (ring_s, ring_v):
    rc, doc = report(settle, ["sweep", path, "--stim", ring_stim, "--corners", "extremes"],
                     f"sweep {os.path.basename(path)}")
    check((doc or {}).get("corners") == 3 + 2 * V,
          f"{os.path.basename(path)}: extremes ran {(doc or {}).get('corners')} corners, want 3 + 2 x {V}")

# The latch: set_n falling makes q rise through arc set_n (30 ps); q rising makes q_n fall
# through arc q (70 ps); reset_n falling makes q_n rise through arc reset_n (55 ps); q_n rising
# makes q fall through arc q_n (45 ps). The times are read from the VCD by sigrok-cli's VCD
# reader (Debian package sigrok-cli; the VCD format is IEEE 1364-2005 clause 18).
if have_sigrok():
    vcd = os.path.join(tmp, "latch.vcd")
    rc, out, err = run_settle(settle, "run", latch, "--vcd", vcd, "-q")
    check(rc == 0, f"latch: exit {rc}: {err[-300:]}")
    ch = sigrok_changes(vcd) if os.path.exists(vcd) else None
    if ch is not None:
        set_fall, reset_fall = edges(ch, "set_n", "0"), edges(ch, "reset_n", "0")
        q_rise, q_fall = edges(ch, "q", "1"), edges(ch, "q", "0")
        qn_rise, qn_fall = edges(ch, "q_n", "1"), edges(ch, "q_n", "0")
        if not (set_fall and reset_fall and q_rise and q_fall and qn_rise and qn_fall):
            fail(f"latch: missing edges in the VCD: {ch}")
        else:
            check(q_rise[0] - set_fall[0] == 30000, f"q rises {q_rise[0] - set_fall[0]} fs after set_n, want arc set_n 30 ps")
            check(qn_fall[0] - q_rise[0] == 70000, f"q_n falls {qn_fall[0] - q_rise[0]} fs after q, want arc q 70 ps")
            check(qn_rise[-1] - reset_fall[0] == 55000,
                  f"q_n rises {qn_rise[-1] - reset_fall[0]} fs after reset_n, want arc reset_n 55 ps")
            check(q_fall[-1] - qn_rise[-1] == 45000, f"q falls {q_fall[-1] - qn_rise[-1]} fs after q_n, want arc q_n 45 ps")
else:
    print("sigrok-cli not found: the latch's VCD times are not checked")

# Errors: exit 2 with FILE:LINE:COL (the bad-input corpus, tests/bad, checks the same messages
# in-process).
BAD = {
    "not_fanin.settle": ("input a, b\noutput q\nq = not(a) from b 20ps\n", "3:17", "is not an input of gate 'q'"),
    "twice.settle": ("input a, b\noutput q\nq = nand(a, b) from b 20ps, from b 30ps\n", "3:34",
                     "already has an arc from 'b'"),
}
for name, (text, at, msg) in BAD.items():
    path = write_file(tmp, name, text)
    rc, out, err = run_settle(settle, "check", path)
    check(rc == 2 and f"{name}:{at}: error: " in err and msg in err, f"{name}: exit {rc}, {err.strip()[:300]}")
bad_v = os.path.join(src, "tests", "bad", "verilog", "specify_no_gate.v")
rc, out, err = run_settle(settle, "check", bad_v)
check(rc == 2 and "specify_no_gate.v:9:5: error: " in err and "'b' reaches the gate driving 'y' through no gate" in err,
      f"specify_no_gate.v: exit {rc}, {err.strip()[:300]}")

print(f"{len(failures)} failures")
sys.exit(1 if failures else 0)
