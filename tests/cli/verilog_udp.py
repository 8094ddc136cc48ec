#!/usr/bin/python3
# User-defined primitives (IEEE 1364-2005 clause 8) in a cell library of our own.
#
# Called by ctest as: verilog_udp.py <settle binary> <source dir>.
# Data: tests/data/verilog_cells.v. The C-element's reference is its definition in Muller and
# Bartky (1959), from memory: the output takes the inputs' value when they agree and holds it
# when they differ. The select cell's reference is its Boolean function, y = s ? b : a
# (Boolean algebra), evaluated here, not read from the table.
import itertools
import json
import os
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, failures, run_settle, write_file  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
cells = os.path.join(src, "tests", "data", "verilog_cells.v")
if not os.path.exists(cells):
    fail(f"missing test data {cells}")
    sys.exit(1)

rc, out, err = run_settle(settle, "check", cells, "--json", "-")
check(rc == 0, f"check: exit {rc}: {err}")
if rc == 0:
    j = json.loads(out)
    # The sequential table is a C-element and maps to settle's C-element gate.
    check(j["by_kind"] == {"not": 1, "c": 1, "expr": 1}, f"by_kind {j['by_kind']}")

# Every pair of successive input states over (req_in, ack_out, bypass), starting from the
# initial value q = 0 (`initial q = 1'b0`), so each C-element row is reached from both states.
states = list(itertools.product((0, 1), repeat=3))
seq = [(1, 1, 0)]  # req_in = 1, ack_out_n = 0: the inputs differ, so q keeps its initial 0
for a, b in itertools.product(states, repeat=2):
    seq += [a, b]
stim = ["stimulus {"]
for k, (r, ack, byp) in enumerate(seq):
    stim.append(("    at 0ns " if k == 0 else "    after 1ns ") + f"req_in = {r}, ack_out = {ack}, bypass = {byp}")
    stim.append("    settle")
stim.append("}")

with tempfile.TemporaryDirectory() as tmp:
    stim_path = write_file(tmp, "cells.stim", "\n".join(stim) + "\n")
    for corner in ("min", "max"):
        rc, out, err = run_settle(settle, "run", cells, "--stim", stim_path, "--corner", corner, "--json", "-", "-q")
        check(rc == 0, f"run {corner}: exit {rc}: {err[-300:]}")
        if rc != 0:
            continue
        steps = json.loads(out)["steps"]
        check(len(steps) == len(seq), f"{corner}: {len(steps)} steps for {len(seq)} vectors")
        q = 0  # initial q = 1'b0
        for k, ((r, ack, byp), s) in enumerate(zip(seq, steps)):
            a, b = r, 1 - ack
            if a == b:  # Muller and Bartky 1959 (from memory): follows when the inputs agree
                q = a
            want_grant = q if byp else r  # y = s ? b : a (Boolean algebra)
            got = s.get("values", {})
            check(s.get("status") == "settled" and got.get("req_out") == str(q) and got.get("grant") == str(want_grant),
                  f"{corner} step {k + 1} (req_in={r} ack_out={ack} bypass={byp}): {s.get('status')} {got}, "
                  f"want req_out={q} grant={want_grant}")

print(f"{len(failures)} failures")
sys.exit(1 if failures else 0)
