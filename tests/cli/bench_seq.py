#!/usr/bin/python3
# Sequential ISCAS-89 circuits with six-NAND flip-flops: the clocked output sequence equals a cycle model.
#
# Called by ctest as: bench_seq.py <settle binary> <source dir>. Exit 77 = skipped.
# Circuits: ISCAS-89 (Brglez, Bryan and Kozminski 1989), from tests/data/iscas.
# Reference: scripts/bench_reference.py (Python standard library only), written from the
# format's meaning: a DFF's Q takes D at each rising clock edge; every flip-flop starts at
# 0 (common practice: a reset state), as settle's importer initialises them.
# Stimulus per cycle, each change followed by `settle` so the clock period is always long
# enough: CK falls; the inputs change while CK is low; CK rises. The outputs are compared
# after the input change (before the edge) and after the rising edge, and every flip-flop's
# Q (watched) after each edge.
import os
import random
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, failures, iscas_dir, json_steps, write_file  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
iscas = iscas_dir(src)  # tests/data/iscas; fails without it
sys.path.insert(0, os.path.join(src, "scripts"))
from bench_reference import Circuit, clocked_run  # noqa: E402

CIRCUITS = ["s27", "s208", "s298", "s344", "s386", "s1196", "s5378", "s38417"]
CYCLES = 24


def stimulus(c, vectors):
    """Three steps per cycle (fall, inputs, rise); the first cycle starts with CK = 0."""
    lines = ["stimulus {", "    watch " + ", ".join(c.dffs)]
    for k, vec in enumerate(vectors):
        assigns = ", ".join(f"{i} = {vec[i]}" for i in c.inputs)
        if k == 0:
            lines += [f"    at 0ns CK = 0, {assigns}", "    settle"]
        else:
            lines += ["    after 10ns CK = 0", "    settle", f"    after 10ns {assigns}", "    settle"]
        lines += ["    after 10ns CK = 1", "    settle"]
    lines.append("}")
    return "\n".join(lines) + "\n"


def fmt(values, outputs):
    return "".join(str(values[o]) for o in outputs)


rng = random.Random(19890501)
with tempfile.TemporaryDirectory() as tmp:
    for name in CIRCUITS:
        path = os.path.join(iscas, name + ".bench")
        c = Circuit(path)
        if not c.dffs or "CK" in c.inputs or "CK" in c.gates:
            fail(f"{name}: expected flip-flops and no net named CK")
            continue
        vectors = [{i: rng.randint(0, 1) for i in c.inputs} for _ in range(CYCLES)]
        want = clocked_run(c, vectors)
        stim = write_file(tmp, name + ".stim", stimulus(c, vectors))
        changes = sum(fmt(b, c.outputs) != fmt(a, c.outputs) for b, a, _ in want)
        qs = list(c.dffs)
        moves = sum(fmt(want[k][2], qs) != fmt(want[k - 1][2] if k else {q: 0 for q in qs}, qs)
                    for k in range(CYCLES))
        for corner in ("typ", f"random:{rng.randint(1, 10**6)}"):
            steps = json_steps(settle, ["run", path, "--stim", stim, "--corner", corner, "--json", "-", "-q"],
                               f"{name} {corner}")
            if steps is None:
                continue
            if len(steps) != 3 * CYCLES - 1:
                fail(f"{name} {corner}: {len(steps)} steps, expected {3 * CYCLES - 1}")
                continue
            if any(s.get("status") != "settled" for s in steps):
                fail(f"{name} {corner}: a step did not settle: {[s.get('status') for s in steps][:12]}")
            for k, (before, after, state) in enumerate(want):
                # Step indices in `steps`: cycle 0 has (inputs, rise); each later cycle (fall, inputs, rise).
                i_in = 0 if k == 0 else 3 * k
                for label, step, ref in (("before the edge", steps[i_in], before),
                                         ("after the edge", steps[i_in + 1], after)):
                    got = "".join(step.get("values", {}).get(o, "?") for o in c.outputs)
                    if got != fmt(ref, c.outputs):
                        fail(f"{name} {corner} cycle {k} {label}: outputs {got}, reference {fmt(ref, c.outputs)}")
                got = "".join(steps[i_in + 1].get("values", {}).get(q, "?") for q in qs)
                if got != fmt(state, qs):
                    fail(f"{name} {corner} cycle {k}: flip-flops {got}, reference {fmt(state, qs)}")
                if k > 0:  # the falling edge changes nothing: outputs stay those after the last rise
                    got = "".join(steps[i_in - 1].get("values", {}).get(o, "?") for o in c.outputs)
                    if got != fmt(want[k - 1][1], c.outputs):
                        fail(f"{name} {corner} cycle {k} falling edge: outputs {got}")
        print(f"{name}: {CYCLES} cycles x 2 corners, {len(c.dffs)} flip-flops, "
              f"the edge moved an output in {changes} cycles and the state in {moves}")

print(f"{len(failures)} failures")
sys.exit(1 if failures else 0)
