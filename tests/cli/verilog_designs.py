#!/usr/bin/python3
# Designs of our own written in structural Verilog: a delay-monitor ring and a push-button latch.
#
# Called by ctest as: verilog_designs.py <settle binary> <source dir>.
# Data: tests/data/verilog_ring.v, verilog_latch.v (IEEE 1364-2005 gate primitives with
# min:typ:max delays, clause 7.14), verilog_latch.settle (the same latch in .settle).
import json
import os
import shutil
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, failures, run_settle  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
data = os.path.join(src, "tests", "data")
ring, ring_stim = os.path.join(data, "verilog_ring.v"), os.path.join(data, "verilog_ring.stim")
latch_v, latch_s = os.path.join(data, "verilog_latch.v"), os.path.join(data, "verilog_latch.settle")
latch_stim = os.path.join(data, "verilog_latch.stim")
for p in (ring, ring_stim, latch_v, latch_s, latch_stim):
    if not os.path.exists(p):
        fail(f"missing test data {p}")
        sys.exit(1)

# The ring: a NAND (15/25/35ps), two inverter cells (10/20/30ps each) and an output buffer
# with rise 5ps and fall 7ps, the delays as written in verilog_ring.v. A loop of an odd number
# of inverting stages oscillates with period 2 x the sum of its stage delays (common practice);
# a stage with different rise and fall delays adds rise + fall once per period instead.
for corner, period_ps in (("min", 2 * (15 + 10 + 10) + 5 + 7), ("typ", 2 * (25 + 20 + 20) + 5 + 7),
                          ("max", 2 * (35 + 30 + 30) + 5 + 7)):
    rc, out, err = run_settle(settle, "run", ring, "--stim", ring_stim, "--corner", corner, "--json", "-", "-q")
    # An oscillating step is a finding: exit 1 (the README's exit codes).
    check(rc == 1, f"ring {corner}: exit {rc}, want 1: {err[-300:]}")
    if rc not in (0, 1):
        continue
    steps = json.loads(out)["steps"]
    check(steps[0]["status"] == "settled" and steps[0]["values"].get("tap") == "1",
          f"ring {corner}: stopped step {steps[0]}")
    s = steps[1]
    check(s["status"] == "oscillating" and s.get("period_fs") == period_ps * 1000,
          f"ring {corner}: {s['status']} with period {s.get('period_fs')} fs, want {period_ps * 1000} fs")
    check({"tap", "n0", "n1", "n2"} <= set(s.get("toggling", [])),
          f"ring {corner}: toggling {s.get('toggling')}")

# The latch: the Verilog and the .settle readings give the same steps at every fixed corner.
for corner in ("min", "typ", "max"):
    runs = []
    for path in (latch_v, latch_s):
        rc, out, err = run_settle(settle, "run", path, "--stim", latch_stim, "--corner", corner, "--json", "-",
                                  "-q")
        runs.append(json.loads(out)["steps"] if rc in (0, 1) else None)
        check(rc == 1, f"latch {os.path.basename(path)} {corner}: exit {rc}: {err[-300:]}")
    if None in runs:
        continue
    keys = ("status", "values", "transitions", "settle_fs", "period_fs", "toggling")
    for k, (a, b) in enumerate(zip(*runs)):
        va, vb = {x: a.get(x) for x in keys}, {x: b.get(x) for x in keys}
        check(va == vb, f"latch {corner} step {k + 1}: Verilog {va}, .settle {vb}")
    v = runs[0]
    # A NAND set/reset latch (common practice): both inputs 0 force both outputs to 1; releasing
    # both at once with equal gate delays leaves the pair toggling together with period
    # 2 x the NAND delay; set_n = 0 sets it, and it holds when set_n returns to 1; clr_n clears.
    nand = {"min": 35, "typ": 45, "max": 55}[corner]
    check(v[0]["values"] == {"held": "1", "lamp": "1", "held_n": "1"}, f"latch {corner}: step 1 {v[0]['values']}")
    check(v[1]["status"] == "oscillating" and v[1].get("period_fs") == 2 * nand * 1000,
          f"latch {corner}: release {v[1]['status']} period {v[1].get('period_fs')}, want {2 * nand * 1000}")
    check(v[2]["values"]["held"] == "1" and v[3]["values"]["held"] == "1", f"latch {corner}: set/hold {v[2:4]}")
    check(v[4]["values"]["held"] == "0" and v[5]["values"]["held"] == "0", f"latch {corner}: clear/hold {v[4:6]}")

# A .v file is read as Verilog under --format auto; --format verilog reads any name.
with tempfile.TemporaryDirectory() as tmp:
    other = os.path.join(tmp, "latch.netlist")
    shutil.copy(latch_v, other)
    rc, out, err = run_settle(settle, "check", other, "--format", "verilog", "--json", "-")
    check(rc == 0 and json.loads(out)["source"]["format"] == "verilog", f"--format verilog: exit {rc} {err}")
    rc, out, err = run_settle(settle, "check", other)
    check(rc == 2, f"a Verilog file without .v read as .settle: exit {rc}")
    # Two modules that nobody instantiates: an error naming both, and --top chooses one.
    two = os.path.join(tmp, "two.v")
    with open(two, "w") as f:
        f.write("module a (input x, output y);\n  not (y, x);\nendmodule\n"
                "module b (input x, output y);\n  buf (y, x);\nendmodule\n")
    rc, out, err = run_settle(settle, "check", two)
    check(rc == 2 and "'a', 'b'" in err and "--top" in err, f"two tops: exit {rc} {err!r}")
    rc, out, err = run_settle(settle, "check", two, "--top", "b", "--json", "-")
    check(rc == 0 and json.loads(out)["by_kind"] == {"buf": 1}, f"--top b: exit {rc} {out} {err}")

print(f"{len(failures)} failures")
sys.exit(1 if failures else 0)
