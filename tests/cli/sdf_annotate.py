#!/usr/bin/python3
"""SDF (IEEE 1497-2001) back-annotation of a delay-monitor ring of our own (tests/data/sdf):
the annotated delays set the ring's period at every corner, INCREMENT adds to ABSOLUTE, a
wildcard instance annotates every match, COND paths take the widest range, `check --json`
counts, and malformed SDF text is refused at its file:line:col. The SDF files are written
from memory of IEEE 1497-2001."""
import json
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_settle, scratch, summary  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-sdf-")
data = os.path.join(src, "tests", "data", "sdf")
ring, stim = os.path.join(data, "monitor_ring.v"), os.path.join(data, "monitor_ring.stim")
sdf1, sdf2 = os.path.join(data, "monitor_ring.sdf"), os.path.join(data, "monitor_ring_more.sdf")
for p in (ring, stim, sdf1, sdf2):
    if not os.path.exists(p):
        print(f"missing test data {p}")
        sys.exit(1)


def period(*sdf, corner):
    args = ["run", ring, "--stim", stim, "--corner", corner, "--json", "-"]
    for f in sdf:
        args += ["--sdf", f]
    rc, out, err = run_settle(settle, *args)
    # an oscillating step is a finding: exit 1 (README, exit codes)
    check(rc == 1, f"{sdf} {corner}: exit {rc}: {err[-400:]}")
    if rc != 1:
        return None
    s = json.loads(out)["steps"][1]
    check(s["status"] == "oscillating", f"{sdf} {corner}: {s['status']}")
    return s.get("period_fs")


# A ring of an odd number of inverting stages oscillates with period 2 x the sum of its stage
# delays; with rise and fall apart, each stage adds its rise plus its fall once per period
# (common practice). Each stage's (rise, fall) in ps from monitor_ring.sdf (TIMESCALE 10ps):
# st0 b->y (30:40:50, 40:50:60); st1 (15:20:25, 20:25:30); st2 (20, 30); st3 (10:20:30 both);
# st4 (10:20:30 both) plus the INTERCONNECT st3/y -> st4/a (5:10:15 both).
stages = {"min": [(30, 40), (15, 20), (20, 30), (10, 10), (15, 15)],
          "typ": [(40, 50), (20, 25), (20, 30), (20, 20), (30, 30)],
          "max": [(50, 60), (25, 30), (20, 30), (30, 30), (45, 45)]}
for corner, st in stages.items():
    want = sum(r + f for r, f in st) * 1000
    got = period(sdf1, corner=corner)
    check(got == want, f"ring {corner}: period {got} fs, want {want} fs")

# The second file (TIMESCALE 1ps, DIVIDER .): (INSTANCE *) of CELLTYPE mon_inv adds rise 1ps
# and fall 2ps to each of the four inverters (INCREMENT on top of ABSOLUTE), and the NAND's
# b->y arc becomes the widest range over its two COND paths: rise 20:45:70, fall 10:50:60
# (min of the mins, the largest typ, max of the maxes).
for corner, nand in (("min", (20, 10)), ("typ", (45, 50)), ("max", (70, 60))):
    st = [nand] + [(r + 1, f + 2) for r, f in stages[corner][1:]]
    want = sum(r + f for r, f in st) * 1000
    got = period(sdf1, sdf2, corner=corner)
    check(got == want, f"ring with both files {corner}: period {got} fs, want {want} fs")

# check --json: 6 arcs (two of the NAND, one per inverter, st4's arc counted once) set, no gate
# kept its netlist delay, and the CELL for st9 named nothing.
rc, out, err = run_settle(settle, "check", ring, "--sdf", sdf1, "--json", "-")
check(rc == 0, f"check: exit {rc}: {err[-300:]}")
if rc == 0:
    s = json.loads(out).get("sdf", {})
    check(s == {"files": 1, "arcs_annotated": 6, "gates_kept": 0, "unmatched_instances": ["st9"]},
          f"check sdf: {s}")
check("INSTANCE 'st9' matches no instance" in err and "monitor_ring.sdf:24:3" in err,
      f"unmatched warning: {err[-400:]}")
check("monitor_ring.sdf:27:6: warning: SDF construct 'TIMINGCHECK'" in err, "TIMINGCHECK warning")
check("third value (the change to z) is ignored" in err, "to-z warning")
rc, out, err = run_settle(settle, "check", ring, "--sdf", sdf2, "--json", "-")
if rc == 0:
    s = json.loads(out).get("sdf", {})
    # the wildcard names the four inverters, the COND entries the NAND's b arc: one gate
    # input (the NAND's a arc) is not named, but its gate has an annotated arc
    check(s.get("arcs_annotated") == 5 and s.get("gates_kept") == 0, f"check sdf2: {s}")
check("COND" in err and "widest range" in err, f"COND warning: {err[-300:]}")
rc, out, err = run_settle(settle, "check", ring, "--sdf", sdf1)
check(rc == 0 and "sdf        1 file: 6 arcs annotated, 0 gates kept" in out, f"check text: {out}")

# Malformed SDF: each refused (exit 2, README exit codes) at its file:line:col.
HEAD = '(DELAYFILE (SDFVERSION "3.0") (TIMESCALE 1ns)\n'
CELL = '  (CELL (CELLTYPE "mon_inv") (INSTANCE st1)\n'
BAD = [
    # the innermost list left open is named (the CELL)
    ("unclosed", HEAD + CELL + "    (DELAY (ABSOLUTE (IOPATH a y (1))))\n", "2:3", "this list is not closed"),
    ("no_delayfile", "(DELAYFIL (SDFVERSION \"3.0\"))\n", "1:2", "expected 'DELAYFILE'"),
    ("before_paren", "DELAYFILE\n", "1:1", "expected '(DELAYFILE'"),
    ("trailing", HEAD + ")\n)\n", "3:1", "text after the end"),
    ("timescale", '(DELAYFILE\n  (TIMESCALE 5ns))\n', "2:14", "TIMESCALE '5ns'"),
    ("divider", '(DELAYFILE\n  (DIVIDER :))\n', "2:12", "DIVIDER takes"),
    ("bad_number", HEAD + CELL + "    (DELAY (ABSOLUTE (IOPATH a y (1.x:2:3)))))\n)\n", "3:35",
     "'1.x' is not a number"),
    ("fraction_fs", '(DELAYFILE (TIMESCALE 1ps)\n' + CELL + "    (DELAY (ABSOLUTE (IOPATH a y (0.0005)))))\n)\n",
     "3:35", "not a whole number of femtoseconds"),
    ("min_gt_max", HEAD + CELL + "    (DELAY (ABSOLUTE (IOPATH a y (3:2:1)))))\n)\n", "3:35", "min is larger than typ"),
    ("four_values", HEAD + CELL + "    (DELAY (ABSOLUTE (IOPATH a y (1) (1) (1) (1)))))\n)\n", "3:46",
     "IOPATH takes 1, 2, 3, 6 or 12"),
    ("unknown_entry", HEAD + CELL + "    (DELAY (ABSOLUTE (IOPATHS a y (1)))))\n)\n", "3:23",
     "unknown SDF construct 'IOPATHS'"),
    ("no_values", HEAD + CELL + "    (DELAY (ABSOLUTE (IOPATH a y))))\n)\n", "3:23", "IOPATH needs"),
    ("bare_value", HEAD + CELL + "    (DELAY (ABSOLUTE (IOPATH a y 1))))\n)\n", "3:34",
     "expected a delay value in parentheses"),
    ("string", HEAD + '  (CELL (CELLTYPE "mon_inv\n', "2:19", "unterminated string"),
    ("comment", HEAD + "/* never closed\n", "2:1", "unterminated comment"),
    ("no_instance", HEAD + '  (CELL (CELLTYPE "mon_inv") (DELAY (ABSOLUTE (IOPATH a y (1)))))\n)\n', "2:31",
     "needs its INSTANCE before DELAY"),
    ("celltype_late", HEAD + '  (CELL (INSTANCE st1) (CELLTYPE "mon_inv"))\n)\n', "2:10",
     "INSTANCE must follow CELLTYPE"),
    ("triple_two", HEAD + CELL + "    (DELAY (ABSOLUTE (IOPATH a y (1:2)))))\n)\n", "3:35",
     "is not a number or MIN:TYP:MAX"),
]
for name, text, at, words in BAD:
    path = os.path.join(tmp, name + ".sdf")
    with open(path, "w") as f:
        f.write(text)
    rc, out, err = run_settle(settle, "check", ring, "--sdf", path)
    check(rc == 2, f"{name}: exit {rc}, want 2")
    want = f"{path}:{at}: error: "
    check(want in err and words in err, f"{name}: want '{want}... {words}', got: {err[-400:]}")
sys.exit(summary())
