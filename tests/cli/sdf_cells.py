#!/usr/bin/python3
"""SDF (IEEE 1497-2001) IOPATH delays on a cell of several gates: an and-or-invert cell of
two primitives in a delay-monitor ring of our own (tests/data/sdf/aoi_ring.*). The cell's
module path is its whole delay, so the gate between (the and) takes none, the output gate
(the nor) takes the path's delay on its arc from the net the path runs through, and two
paths meeting at that arc give it their widest range, with a warning at the SDF line:col.
The SDF file is written from memory of IEEE 1497-2001."""
import json
import os
import re
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_settle, scratch, summary  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-sdf-cells-")
data = os.path.join(src, "tests", "data", "sdf")
ring, stim, sdf = (os.path.join(data, "aoi_ring" + x) for x in (".v", ".stim", ".sdf"))
for p in (ring, stim, sdf):
    if not os.path.exists(p):
        print(f"missing test data {p}")
        sys.exit(1)


def period(design, corner, *extra):
    rc, out, err = run_settle(settle, "run", design, "--stim", stim, "--corner", corner,
                              "--json", "-", *extra)
    # an oscillating step is a finding: exit 1 (README, exit codes)
    check(rc == 1, f"{design} {corner}: exit {rc}: {err[-400:]}")
    if rc != 1:
        return None
    s = json.loads(out)["steps"][1]
    check(s["status"] == "oscillating", f"{design} {corner}: {s['status']}")
    return s.get("period_fs")


# A ring of an odd number of inverting stages oscillates with period 2 x the sum of its stage
# delays; with rise and fall apart, each stage adds its rise plus its fall once per period
# (common practice). Stage delays in ps, from aoi_ring.sdf: each inverter rise 20, fall 25;
# the cell, entered at a, takes the widest of its a and b paths (both reach the nor through
# the and gate): rise min(30, 25) : max(40, 45) : max(50, 48), fall min(20, 22) : max(30, 28)
# : max(40, 44). The and gate between adds nothing.
cell = {"min": (25, 20), "typ": (45, 30), "max": (50, 44)}
for corner, (r, f) in cell.items():
    want = (r + f + 2 * (20 + 25)) * 1000
    got = period(ring, corner, "--sdf", sdf)
    check(got == want, f"aoi ring {corner}: period {got} fs, want {want} fs")

# Without the SDF file every primitive takes the --delay default (40ps..60ps, typ 50ps) and
# the inverters their #(0.040): 2 x (50 + 50 + 40 + 40) ps at typ.
got = period(ring, "typ")
check(got == 360000, f"aoi ring without SDF: period {got} fs, want 360000 fs")

# The warning names the second path that met the first, at its SDF line:col.
rc, out, err = run_settle(settle, "check", ring, "--sdf", sdf, "--json", "-")
check(rc == 0, f"check: exit {rc}: {err[-400:]}")
check(re.search(r"aoi_ring\.sdf:13:7: warning: 1 arc inside cells of several gates is timed by "
                r"more than one IOPATH", err) is not None, f"check warning: {err[-400:]}")
if rc == 0:
    counts = json.loads(out)["sdf"]
    # 2 arcs of the and, 2 of the nor, 1 of each inverter
    check(counts["arcs_annotated"] == 6 and counts["gates_kept"] == 0, f"sdf counts {counts}")

# The emitted design times the c path on the nor's own arc from c, and runs as the original.
emitted = os.path.join(tmp, "aoi_ring.settle")
rc, out, err = run_settle(settle, "check", ring, "--sdf", sdf, "--emit", emitted)
check(rc == 0, f"check --emit: exit {rc}: {err[-400:]}")
if rc == 0:
    text = open(emitted).read()
    check("ab = and(a, b) from a 0fs, from b 0fs" in text, f"and arcs in {text}")
    check("from c rise 10ps..20ps fall 12ps..16ps..22ps" in text, f"c arc in {text}")
    for corner, (r, f) in cell.items():
        want = (r + f + 2 * (20 + 25)) * 1000
        got = period(emitted, corner)
        check(got == want, f"emitted aoi ring {corner}: period {got} fs, want {want} fs")

# The same cell timed by a specify block (IEEE 1364-2005 14.2, simple module paths) in place
# of the SDF file: the same rule, so the same cell delays (the inverters keep their #(0.040)).
specify = ("  specify\n"
           "    (a => y) = (0.030:0.040:0.050, 0.020:0.030:0.040);\n"
           "    (b => y) = (0.025:0.045:0.048, 0.022:0.028:0.044);\n"
           "    (c => y) = (0.010:0.015:0.020, 0.012:0.016:0.022);\n"
           "  endspecify\n")
text = open(ring).read()
body_end = text.index("endmodule")  # the first module is the cell
timed = os.path.join(tmp, "aoi_ring_specify.v")
with open(timed, "w") as f:
    f.write(text[:body_end] + specify + text[body_end:])
rc, out, err = run_settle(settle, "check", timed)
check(rc == 0 and re.search(r"aoi_ring_specify\.v:\d+:\d+: warning: module paths of module "
                            r"'mon_aoi21' meet before the gate driving their output", err)
      is not None, f"specify check: exit {rc}: {err[-400:]}")
for corner, (r, f) in cell.items():
    want = (r + f + 2 * (40 + 40)) * 1000
    got = period(timed, corner)
    check(got == want, f"specify aoi ring {corner}: period {got} fs, want {want} fs")

sys.exit(summary())
