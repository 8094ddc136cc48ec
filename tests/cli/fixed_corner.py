#!/usr/bin/python3
# `run --corner fixed:...` replays explicit delays exactly. The references are the project's own
# named corners (an internal equivalence, not an outside source): a fixed: corner that lists every
# gate at its min delay must give the same steps and the same VCD bytes as `--corner min`, every
# gate at max the same as `--corner max`, and on a closed loop every rule at the min bound of its
# range the same as `--corner min` (min gives every rule firing its min bound; LANGUAGE.md,
# "Corners"). One mixed corner is checked against the matching `extremes` corner, and against the
# fact of the trade that the faster of two cross-coupled NANDs wins a simultaneous race (common
# practice). The errors exit 2 and write no output.
#
# Called by ctest as: fixed_corner.py <settle binary> <source dir>. Exit 77 = skipped.
import json
import os
import re
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_cases, run_settle  # noqa: E402

SRC = sys.argv[2] if len(sys.argv) > 2 else "."
ARBITER = os.path.join(SRC, "examples", "arbiter.settle")
FIFO = os.path.join(SRC, "examples", "fifo_loop.settle")
# The VCD's $date follows SOURCE_DATE_EPOCH when set (reproducible-builds.org specification), so
# two runs can be compared byte for byte.
os.environ["SOURCE_DATE_EPOCH"] = "0"


def ranges(path):
    """The gates' delay ranges as written in the example (NAME = ... delay MIN..MAX) and the
    reaction rules' (when ... after MIN..MAX :), in file order."""
    gates, rules = [], []
    with open(path) as f:
        for line in f:
            line = line.split("#")[0]
            m = re.match(r"\s*(\w+)\s*=.*\bdelay\s+(\S+)\.\.(\S+)\s*$", line)
            if m:
                gates.append(m.groups())
            m = re.match(r"\s*when\b.*\bafter\s+(\S+)\.\.(\S+)\s*:", line)
            if m:
                rules.append(m.groups())
    return gates, rules


def masked(doc):
    """The report without the fields that may differ between two names of one corner: the
    corner's name and the wall time."""
    if isinstance(doc, dict):
        return {k: masked(v) for k, v in doc.items() if k not in ("corner", "wall_s")}
    if isinstance(doc, list):
        return [masked(v) for v in doc]
    return doc


def run(binary, tmp, design, corner, tag):
    """Runs `run DESIGN --corner C --json J --vcd V`; returns (exit status, report, VCD bytes)."""
    j, v = os.path.join(tmp, f"{tag}.json"), os.path.join(tmp, f"{tag}.vcd")
    rc, out, err = run_settle(binary, "run", design, "--corner", corner, "--json", j, "--vcd", v)
    if rc not in (0, 1):
        check(False, f"{tag}: run --corner {corner} exits {rc}: {err.strip()[:300]}")
        return rc, None, None
    with open(j) as f:
        doc = json.load(f)
    with open(v, "rb") as f:
        vcd = f.read()
    return rc, doc, vcd


def same(binary, tmp, design, fixed, named, what):
    rc_a, a, va = run(binary, tmp, design, fixed, what + "-fixed")
    rc_b, b, vb = run(binary, tmp, design, named, what + "-named")
    if a is None or b is None:
        return None
    check(a.get("corner") == fixed, f"{what}: the report names the corner {a.get('corner')!r}")
    check(rc_a == rc_b, f"{what}: exit {rc_a} under {fixed}, {rc_b} under {named}")
    check(len(a.get("steps", [])) > 0, f"{what}: the report has steps")
    check(masked(a) == masked(b), f"{what}: the JSON reports differ apart from corner and wall_s")
    check(va == vb, f"{what}: the VCD files differ ({len(va)} and {len(vb)} bytes)")
    return a


def arbiter_bounds(binary, tmp):
    gates, _ = ranges(ARBITER)
    check(len(gates) == 4, f"arbiter.settle has 4 gates with ranges (found {len(gates)})")
    for end, named in ((1, "min"), (2, "max")):
        fixed = "fixed:" + ",".join(f"{g[0]}={g[end]}" for g in gates)
        same(binary, tmp, ARBITER, fixed, named, f"arbiter at {named}")


def arbiter_mixed(binary, tmp):
    # extremes#3 is the first gate's variable at max and every other at min (README, `--corners`).
    gates, _ = ranges(ARBITER)
    fixed = "fixed:" + ",".join(f"{g[0]}={g[2] if i == 0 else g[1]}" for i, g in enumerate(gates))
    doc = same(binary, tmp, ARBITER, fixed, "extremes#3", "arbiter mixed")
    if doc is None:
        return
    # Common practice: of two cross-coupled NANDs whose inputs rise together, the faster one falls
    # first and holds the other high, so with the host's NAND at 42ps against the sensor's 60ps
    # the host is granted after the race step.
    race = doc["steps"][1]
    ends = race.get("values", {})
    check(ends.get("gnt_host") == "1" and ends.get("gnt_sensor") == "0",
          f"arbiter mixed: the faster host NAND wins the race (ends {ends})")


def fifo_rules_at_min(binary, tmp):
    gates, rules = ranges(FIFO)
    check(len(gates) == 3 and len(rules) == 4,
          f"fifo_loop.settle has 3 gates and 4 rules with ranges ({len(gates)}, {len(rules)})")
    entries = [f"{g[0]}={g[1]}" for g in gates]
    entries += [f"rule#{k + 1}={r[0]}" for k, r in enumerate(rules)]
    same(binary, tmp, FIFO, "fixed:" + ",".join(entries), "min", "fifo_loop at min")
    # A list of several firing delays all equal to the bound is the same corner.
    entries = [f"{g[0]}={g[1]}" for g in gates]
    entries += [f"rule#{k + 1}={r[0]}/{r[0]}/{r[0]}" for k, r in enumerate(rules)]
    same(binary, tmp, FIFO, "fixed:" + ",".join(entries), "min", "fifo_loop lists at min")
    # And a list that differs does change the run: the first sensor request comes later.
    entries[len(gates)] = f"rule#1={rules[0][1]}/{rules[0][0]}"
    _, a, va = run(binary, tmp, FIFO, "fixed:" + ",".join(entries), "fifo-later")
    _, b, vb = run(binary, tmp, FIFO, "min", "fifo-min")
    if a is not None and b is not None:
        check(va != vb, "fifo_loop: a slower first firing of rule#1 changes the waveform")


def errors(binary, tmp):
    out = os.path.join(tmp, "never.json")
    for corner, words in (
        ("fixed:hold_sensor_n", "is not NAME=T"),
        ("fixed:hold_sensor_n=45", "unit"),
        ("fixed:nobody=45ps", "no gate is named 'nobody'"),
        ("fixed:req_host=45ps", "'req_host' is an input, not a gate"),
        ("fixed:gnt_host=31ps,gnt_host=32ps", "gate 'gnt_host' is listed twice"),
        ("fixed:hold_host_n=90ps", "delay 90ps of gate 'hold_host_n' (rise) is outside its range 42ps..62ps"),
        ("fixed:hold_host_n=50ps/41.999ps",
         "delay 41.999ps of gate 'hold_host_n' (fall) is outside its range 42ps..62ps"),
        ("fixed:rule#1=0fs", "there is no rule#1: this design has no reaction rules"),
    ):
        rc, _, err = run_settle(binary, "run", ARBITER, "--corner", corner, "--json", out)
        check(rc == 2, f"--corner {corner}: exit 2 (got {rc})")
        check(words in err, f"--corner {corner}: the message says {words!r} ({err.strip()[:300]!r})")
        check(not os.path.exists(out), f"--corner {corner}: no report written")
    rc, _, err = run_settle(binary, "run", FIFO, "--corner", "fixed:rule#5=1ns")
    check(rc == 2 and "this design has 4 reaction rules, numbered 1..4" in err,
          f"fifo_loop rule#5: exit 2 with the rule range ({rc}, {err.strip()[:300]!r})")
    rc, _, err = run_settle(binary, "run", FIFO, "--corner", "fixed:rule#2=250ps")
    check(rc == 2 and "delay 250ps of rule#2 (list entry 1) is outside its range 100ps..200ps" in err,
          f"fifo_loop rule#2 out of range: exit 2 ({rc}, {err.strip()[:300]!r})")


if __name__ == "__main__":
    sys.exit(run_cases([arbiter_bounds, arbiter_mixed, fifo_rules_at_min, errors], "settle-fixed-"))
