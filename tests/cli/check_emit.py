#!/usr/bin/python3
# `settle check --emit PATH`: the elaborated design written as .settle reads back to the same
# netlist, and runs to the same steps and waveforms, for every design of examples/ and
# tests/data/ (.settle and structural Verilog, with the stimulus files the test data pairs them
# with) and for ISCAS circuits (the ISCAS benchmark format, tests/data/iscas/SOURCE.md).
#
# Called by ctest as: check_emit.py <settle binary> <source dir>.
import glob
import json
import os
import re
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, failures, run_settle, scratch  # noqa: E402
from vcd_rules import UNITS  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
data, tmp = os.path.join(src, "tests", "data"), scratch("check_emit")

# Design -> the stimulus files the test data pairs it with (None: its own stimulus, if any).
STIMS = {
    "examples/debounce.settle": [None, "examples/debounce_chatter.stim"],
    "examples/delay_ring.settle": [None, "examples/delay_ring_free.stim"],
    "tests/data/explore_contacts.settle": [None, "tests/data/explore_contacts_one.stim"],
    "tests/data/lamp_panel.settle": [None, "tests/data/lamp_panel_blink.stim",
                                     "tests/data/lamp_panel_wrong.stim"],
    "tests/data/verilog_latch.v": ["tests/data/verilog_latch.stim"],
    "tests/data/verilog_ring.v": ["tests/data/verilog_ring.stim"],
    "tests/data/arcs_ring.settle": ["tests/data/arcs_ring.stim"],
    "tests/data/arcs_ring.v": ["tests/data/arcs_ring.stim"],
}
# Designs with pin-to-pin delays: their emitted text must keep one `from NET` per arc.
ARCS = {"tests/data/arcs_ring.settle": 5, "tests/data/arcs_ring.v": 5, "tests/data/arcs_latch.settle": 4}
designs = sorted(glob.glob(os.path.join(src, "examples", "*.settle")) +
                 glob.glob(os.path.join(data, "*.settle")) + glob.glob(os.path.join(data, "*.v")))
rel = [os.path.relpath(d, src) for d in designs]
# Designs that do not load (bad on purpose) have nothing to write back.
ISCAS = ["c17.bench", "c432.bench", "s27.bench", "s298.bench"]
for c in ISCAS:
    if not os.path.exists(os.path.join(data, "iscas", c)):
        fail(f"missing ISCAS circuit tests/data/iscas/{c}")
        sys.exit(1)


def vcd_changes(path):
    """Value changes per hierarchical net name in a VCD file (IEEE 1364-2005 clause 18:
    $scope/$upscope nest the $var names; #T advances time in the $timescale unit)."""
    text = open(path).read()
    scale, names, changes, now, scope = 1, {}, {}, 0, []
    m = re.search(r"\$timescale\s+(\d+)\s*(\w+)\s+\$end", text)
    if m:
        scale = int(m.group(1)) * UNITS[m.group(2)]
    head, body = text.split("$enddefinitions", 1)
    for tok in re.findall(r"\$scope\s+\w+\s+(\S+)\s+\$end|(\$upscope)|\$var\s+\w+\s+1\s+(\S+)\s+(\S+)",
                          head):
        if tok[0]:
            scope.append(tok[0])
        elif tok[1]:
            scope.pop()
        else:
            # The outermost scope is named after the design file, which differs: left out.
            names.setdefault(tok[2], []).append(".".join(scope[1:] + [tok[3]]))
    for tok in body.split()[2:]:
        if tok.startswith("#"):
            now = int(tok[1:]) * scale
        elif tok[0] in "01xXzZ" and tok[1:] in names:
            for n in names[tok[1:]]:
                changes.setdefault(n, []).append((now, tok[0]))
    return changes


def check_json(args):
    rc, out, err = run_settle(settle, "check", *args, "--json", "-")
    return json.loads(out) if rc == 0 else None


def strip_check(j):
    # Excluded: `design` is the path of the file read, and `source` the counts of an imported
    # file's format (.bench, .v); the emitted file is .settle, so it has no `source`.
    # Everything else (blocks, instances, gates, nets, inputs, outputs, by_kind, loops with
    # their nets) must be equal.
    return {k: v for k, v in j.items() if k not in ("design", "source", "tool", "version")}


def strip_run(j):
    # Excluded: `design` (the path), `wall_s` (wall time) and `version`; every step (label,
    # status, times, values, transitions, glitches, expectations), the result and the event
    # count must be equal.
    return {k: v for k, v in j.items() if k not in ("design", "wall_s", "tool", "version")}


emitted = 0
for design in rel + [os.path.join("tests", "data", "iscas", c) for c in ISCAS]:
    path = os.path.join(src, design)
    for stim in STIMS.get(design, [None]):
        extra = ["--stim", os.path.join(src, stim)] if stim else []
        what = design + (f" with {stim}" if stim else "")
        want = check_json([path, *extra])
        if want is None:
            continue  # a design of the test data that is bad on purpose
        out = os.path.join(tmp, f"e{emitted}.settle")
        rc, _, err = run_settle(settle, "check", path, *extra, "--emit", out)
        check(rc == 0 and os.path.exists(out), f"{what}: check --emit exits {rc}: {err}")
        if rc != 0:
            continue
        emitted += 1
        if design in ARCS:
            n = len(re.findall(r"\bfrom \S+ ", open(out).read()))
            check(n == ARCS[design], f"{what}: the emitted file writes {n} arcs, want {ARCS[design]}")
        got = check_json([out])
        check(got is not None and strip_check(got) == strip_check(want),
              f"{what}: check of the emitted file differs:\n{got}\n{want}")
        if "stimulus {" not in open(out).read():
            continue
        for corner in ("min", "typ", "max", "random:7"):
            runs = []
            for i, a in enumerate(([path, *extra], [out])):
                vcd = os.path.join(tmp, f"r{i}.vcd")
                rc, o, err = run_settle(settle, "run", *a, "--corner", corner, "--json", "-",
                                        "--vcd", vcd)
                runs.append((rc, strip_run(json.loads(o)) if o.strip() else None,
                             vcd_changes(vcd) if os.path.exists(vcd) else None))
            check(runs[0][:2] == runs[1][:2], f"{what} at {corner}: run --json differs")
            check(runs[0][2] == runs[1][2], f"{what} at {corner}: VCD value changes differ")

check(emitted >= len(ISCAS) + 10, f"only {emitted} designs were written back")
print(f"{emitted} designs written back; {len(failures)} failures")
sys.exit(1 if failures else 0)
