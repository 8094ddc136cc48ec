#!/usr/bin/python3
"""A NAND latch in Verilog with its delays in an SDF file releases as the `.settle` original with
the same delays written as arcs does (tests/data/sdf/panel_latch.*): the same steps (status,
values, settle times) at every corner, and settle times that are the sums of the arcs the change
travels through. The SDF file is written from memory of IEEE 1497-2001."""
import json
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_settle, summary  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
data = os.path.join(src, "tests", "data", "sdf")
verilog, sdf = os.path.join(data, "panel_latch.v"), os.path.join(data, "panel_latch.sdf")
original, stim = os.path.join(data, "panel_latch.settle"), os.path.join(data, "panel_latch.stim")
for p in (verilog, sdf, original, stim):
    if not os.path.exists(p):
        print(f"missing test data {p}")
        sys.exit(1)


def steps(*args):
    rc, out, err = run_settle(settle, "run", *args, "--stim", stim, "--json", "-")
    check(rc == 0, f"run {args}: exit {rc}: {err[-300:]}")
    if rc != 0:
        return None
    return [(s["status"], s["settle_fs"], s["values"]) for s in json.loads(out)["steps"]]


for corner in ("min", "typ", "max", "random:5"):
    annotated = steps(verilog, "--sdf", sdf, "--corner", corner)
    written = steps(original, "--corner", corner)
    check(annotated is not None and annotated == written,
          f"{corner}: the annotated latch {annotated} differs from the .settle original {written}")

# Common practice (cross-coupled NAND latch): set_n low raises q through the set_n arc of q's
# gate (30ps), and q then lowers q_n through the q arc of q_n's gate (80ps); reset_n low raises
# q_n through its reset_n arc (55ps), and q falls through its q_n arc (45ps).
got = steps(verilog, "--sdf", sdf)
if got:
    check(got[2][1] == 110_000 and got[2][2] == {"q": "1", "q_n": "0"}, f"press: {got[2]}")
    check(got[4][1] == 100_000 and got[4][2] == {"q": "0", "q_n": "1"}, f"reset: {got[4]}")
    check(got[0][1] == 100_000, f"first reset from x: {got[0]}")
# Without the SDF file every gate keeps the 10ps written in the Verilog: the check above is
# about the annotation, not the file's own delays.
plain = steps(verilog)
check(plain is not None and plain[2][1] == 20_000, f"without --sdf: {plain and plain[2]}")
sys.exit(summary())
