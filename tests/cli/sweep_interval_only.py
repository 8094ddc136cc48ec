#!/usr/bin/env python3
# settle sweep --corners interval: no corner runs, the one min-max ambiguity run
# judges every step. A NAND set/reset latch released from (0, 0) is proven when
# one gate is always faster and inconclusive when the two delay ranges overlap.
#
# Called by ctest as: sweep_interval_only.py <settle binary> <source dir>. Exit 77 = skipped.
import json
import os
import shutil
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, run_settle as settle, summary  # noqa: E402


# A tank-valve interlock latch (our own scenario): both active-low controls are
# held low, then released at the same instant.
def valve_latch(a, b):
    return f"""# valve.settle - tank-valve interlock latch, both controls released at once
input  fill_n, drain_n
output valve, valve_n
valve   = nand(fill_n, valve_n)   delay {a}
valve_n = nand(drain_n, valve)    delay {b}
stimulus {{
    at 0ns     fill_n = 0, drain_n = 0
    settle
    expect valve = 1, valve_n = 1
    after 1ns  fill_n = 1, drain_n = 1
    settle
    expect valve = 0
}}
"""


def write(tmp, name, text):
    path = os.path.join(tmp, name)
    with open(path, "w") as f:
        f.write(text)
    return path


def sweep(binary, design, *extra):
    rc, out, err = settle(binary, "sweep", design, *extra)
    return rc, out, err


def sweep_json(binary, design, spec):
    rc, out, err = settle(binary, "sweep", design, "--corners", spec, "--json", "-")
    try:
        return rc, json.loads(out)
    except json.JSONDecodeError:
        fail(f"sweep {design} --corners {spec}: no JSON on stdout (rc={rc}): {err[:300]}")
        return rc, None


def common_shape(doc, what):
    """The JSON contract of `interval` alone: no corners, empty outcomes, an interval object per step."""
    check(doc["corners"] == 0, f"{what}: corners {doc['corners']}, expected 0")
    check(doc["spec"] == "interval", f"{what}: spec {doc['spec']!r}")
    for st in doc["steps"]:
        check(st["outcomes"] == [], f"{what}: step {st['index']} has outcomes {st['outcomes']}")
        check(isinstance(st.get("interval"), dict) and {"values", "proven"} <= set(st["interval"]),
              f"{what}: step {st['index']} has no interval object: {st.get('interval')}")


def separated(binary, tmp):
    # valve (20..30ps) always falls before valve_n (40..60ps) can: valve_n stays
    # high and the latch ends at valve=0, valve_n=1 for every delay in range.
    # Min-max ambiguity simulation proves it in one run (Breuer and Friedman,
    # Diagnosis and Reliable Design of Digital Systems, 1976).
    design = write(tmp, "valve_fast.settle", valve_latch("20ps..30ps", "40ps..60ps"))
    rc, doc = sweep_json(binary, design, "interval")
    if doc is None:
        return
    common_shape(doc, "non-overlapping")
    check(rc == 0 and doc["result"] == "pass",
          f"non-overlapping: exit {rc}, result {doc['result']}, expected 0 and pass")
    step = doc["steps"][1]
    check(step["verdict"] == "deterministic", f"non-overlapping: step 2 verdict {step['verdict']}")
    # Breuer and Friedman 1976: binary values at the end of the ambiguity run hold in every corner.
    check(step["interval"] == {"values": {"valve": "0", "valve_n": "1"}, "proven": True},
          f"non-overlapping: interval {step['interval']}, expected proven valve=0 valve_n=1")
    check(all(e["pass"] and e["proven"] for s in doc["steps"] for e in s["expect"]),
          f"non-overlapping: expectations not all proven: {[s['expect'] for s in doc['steps']]}")
    # The sampled corners agree with the proof (the sweep itself is the second opinion).
    rc2, doc2 = sweep_json(binary, design, "extremes+random:200")
    if doc2 is not None:
        vals = [o["values"] for o in doc2["steps"][1]["outcomes"]]
        check(vals == [step["interval"]["values"]], f"non-overlapping: sampled outcomes {vals} differ from the proof")
    rc, out, err = sweep(binary, design, "--corners", "interval")
    check(rc == 0, f"non-overlapping summary: exit {rc}: {err[:300]}")
    check("proven: every delay assignment in range ends in the same state" in out,
          f"non-overlapping summary does not say what was proven:\n{out}")
    check("2 of 2 steps proven deterministic, 0 inconclusive" in out,
          f"non-overlapping summary has no proven count:\n{out}")


def overlapping(binary, tmp):
    # Equal ranges (40..60ps each): either gate may fall first, a critical race
    # (common practice: a set/reset latch released from the forbidden state).
    # The ambiguity run leaves both outputs x (Breuer and Friedman 1976: x marks
    # a value the run cannot decide), so the step is inconclusive, not proven.
    design = write(tmp, "valve_race.settle", valve_latch("40ps..60ps", "40ps..60ps"))
    rc, doc = sweep_json(binary, design, "interval")
    if doc is None:
        return
    common_shape(doc, "overlapping")
    check(rc == 1 and doc["result"] == "findings",
          f"overlapping: exit {rc}, result {doc['result']}, expected 1 and findings")
    first, step = doc["steps"][0], doc["steps"][1]
    check(first["verdict"] == "deterministic" and first["interval"]["proven"],
          f"overlapping: step 1 (both controls low) should be proven: {first['verdict']} {first['interval']}")
    check(step["verdict"] == "inconclusive", f"overlapping: step 2 verdict {step['verdict']}, expected inconclusive")
    check(step["interval"] == {"values": {"valve": "x", "valve_n": "x"}, "proven": False},
          f"overlapping: interval {step['interval']}, expected x on both outputs, not proven")
    check(not step["first_divergence"], "overlapping: an inconclusive step is not a divergence")
    exp = step["expect"]
    check(len(exp) == 1 and exp[0]["pass"] is False and exp[0]["proven"] is False and "failing" not in exp[0],
          f"overlapping: the expectation valve = 0 should be reported not proven, without a corner count: {exp}")
    rc, out, err = sweep(binary, design, "--corners", "interval")
    check(rc == 1, f"overlapping summary: exit {rc}")
    check("INCONCLUSIVE  not proven: the interval run leaves x on valve, valve_n" in out,
          f"overlapping summary does not say what is inconclusive:\n{out}")
    check("1 of 2 steps proven deterministic, 1 inconclusive" in out,
          f"overlapping summary has no proven count:\n{out}")
    # The report and the JUnit file accept a sweep without corners.
    html, junit = os.path.join(tmp, "race.html"), os.path.join(tmp, "race.xml")
    rc, out, err = sweep(binary, design, "--corners", "interval", "--html", html, "--junit", junit, "-q")
    check(rc == 1 and os.path.getsize(html) > 0 and os.path.getsize(junit) > 0,
          f"overlapping --html/--junit: exit {rc}: {err[:300]}")
    if os.path.exists(junit):
        with open(junit) as f:
            check("inconclusive" in f.read(), "overlapping --junit: the failure does not say inconclusive")


def main():
    if len(sys.argv) < 3:
        print("usage: sweep_interval_only.py <settle> <source dir>")
        return 2
    binary = sys.argv[1]
    tmp = tempfile.mkdtemp(prefix="settle-interval-only-")
    try:
        separated(binary, tmp)
        overlapping(binary, tmp)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return summary()


if __name__ == "__main__":
    sys.exit(main())
