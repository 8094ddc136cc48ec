#!/usr/bin/python3
"""The memory guard, --max-memory MiB (issue 7). explore counts the bytes of the state graphs it
stores as they grow and stops the step incomplete past the guard, as --max-states does: a finding
(exit 1), a message naming the option and a valid report marked stopped. sweep and margin know
their per-corner results (about 20 bytes per corner and step) before any corner runs, so they
refuse an oversized run at once (exit 2), as they refuse more than 2^20 exhaustive corners.

Called by ctest as: harden_memory.py <settle binary> <source dir>."""
import functools
import json
import os
import shutil
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_timed, summary, write_file  # noqa: E402

settle = sys.argv[1]
tmp = tempfile.mkdtemp(prefix="settle-harden-memory-")


write = functools.partial(write_file, tmp)
run = functools.partial(run_timed, settle, timeout=120)  # (exit status, stdout, stderr, seconds)


def load(path, what):
    try:
        with open(path) as f:
            return json.load(f)
    except (OSError, json.JSONDecodeError) as e:
        check(False, f"{what}: no valid JSON report at {path} ({e})")
        return None


try:
    # A bank of 12 independent C-element toggles released together (our own
    # scenario). Each stage can be in either of two states independently of
    # the others, so the graph has at least 2^12 states of its own and its gmw
    # successors number up to 2^12 - 1 per state (combinatorics, common
    # practice): millions of edges, far beyond 1 MiB at 4 bytes per edge.
    n = 12
    lines = ["input go", "output " + ", ".join(f"q{k}" for k in range(n)),
             "wire " + ", ".join(f"m{k}" for k in range(n))]
    for k in range(n):
        lines += [f"m{k} = not(q{k}) delay 10ps..90ps", f"q{k} = c(go, m{k}) delay 10ps..90ps"]
    lines += ["init " + ", ".join(f"q{k} = 0, m{k} = 1" for k in range(n)),
              "stimulus {", "  at 0ns go = 0", "  settle", "  after 1ns go = 1", "  settle", "}"]
    bank = write("toggle_bank12.settle", "\n".join(lines) + "\n")

    out = os.path.join(tmp, "explore.json")
    rc, so, se, el = run("explore", bank, "--max-memory", "1", "--json", out)
    check(rc == 1, f"explore --max-memory 1: exit {rc}, expected 1 (a finding): {se[-300:]!r}")
    check(el < 60, f"explore --max-memory 1: stops promptly ({el:.1f} s)")
    j = load(out, "explore --max-memory")
    if j:
        st = j["steps"][-1]
        check(st["complete"] is False, "explore --max-memory: the stopped step is marked incomplete")
        check("--max-memory 1 MiB" in st.get("stopped", ""),
              f"explore --max-memory: the report names the option ({st.get('stopped')!r})")
        check(j["result"] == "findings", f"explore --max-memory: result {j['result']}, expected findings")
        # The guard bounds what is stored: one 64-bit word per state (24 gates fit
        # in one word) plus 4 bytes per edge stays within about 2 x 1 MiB
        # (a vector may double past the guard once before the next check).
        check(st["states"] * 8 + st["edges"] * 4 <= 3 * (1 << 20),
              f"explore --max-memory: {st['states']} states and {st['edges']} edges exceed the guard")
    rc, so, se, _ = run("explore", bank, "--max-memory", "1")
    check(rc == 1 and "memory limit reached" in so and "--max-memory 1 MiB" in so,
          f"explore --max-memory: the table says it stopped and why ({so[-400:]!r})")
    rc, so, se, _ = run("explore", bank, "--max-memory", "0")
    check(rc == 2, f"explore --max-memory 0: exit {rc}, expected 2 (a usage error)")

    # sweep and margin: 20 steps of a two-gate latch (our own scenario: a
    # pump-control latch toggled by two buttons).
    lines = ["input start_n, stop_n", "output run_q, run_qn",
             "run_q = nand(start_n, run_qn) delay 40ps..60ps", "run_qn = nand(stop_n, run_q) delay 40ps..60ps",
             "stimulus {", "  at 0ns start_n = 1, stop_n = 0", "  settle"]
    for k in range(19):
        lines += [f"  after 1ns start_n = {k % 2}, stop_n = {1 - k % 2}", "  settle"]
    lines += ["}"]
    pump = write("pump_latch.settle", "\n".join(lines) + "\n")
    # 3000 corners x 20 steps x 20 bytes = 1.2e6 bytes, more than 1 MiB (1,048,576) and less than 2 MiB.
    out = os.path.join(tmp, "sweep.json")
    rc, so, se, el = run("sweep", pump, "--corners", "random:3000", "--max-memory", "1", "--json", out)
    check(rc == 2, f"sweep --max-memory 1: exit {rc}, expected 2 (refused before any corner runs)")
    check("--max-memory 1 MiB" in se and "3000 corners x 20 steps" in se,
          f"sweep --max-memory: the message names the option and the size ({se[-400:]!r})")
    check(el < 10, f"sweep --max-memory: refused at once ({el:.1f} s)")
    check(not os.path.exists(out), "sweep --max-memory: no report is written for a refused sweep")
    rc, so, se, _ = run("sweep", pump, "--corners", "random:3000", "--max-memory", "2", "--json", out, "-q")
    check(rc in (0, 1) and load(out, "sweep --max-memory 2") is not None,
          f"sweep --max-memory 2: the same sweep runs within 2 MiB (exit {rc}: {se[-300:]!r})")
    # margin holds two sweeps' results (the probe running and the written spread):
    # 1500 corners x 20 steps x 20 bytes x 2 = 1.2e6 bytes.
    rc, so, se, el = run("margin", pump, "--corners", "random:1500", "--max-memory", "1")
    check(rc == 2 and "--max-memory 1 MiB" in se, f"margin --max-memory 1: exit {rc}, stderr {se[-300:]!r}")
    check(el < 10, f"margin --max-memory: refused at once ({el:.1f} s)")
finally:
    shutil.rmtree(tmp, ignore_errors=True)

sys.exit(summary())
