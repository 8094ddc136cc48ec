#!/usr/bin/env python3
# settle sweep --corners interval: no corner runs, the one min-max ambiguity run
# judges every step. A NAND set/reset latch released from (0, 0) is proven when
# one gate is always faster and inconclusive when the two delay ranges overlap.
#
# Called by ctest as: sweep_interval_only.py <settle binary> <source dir>. Exit 77 = skipped.
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, json_report, released_latch, run_cases, run_settle as settle, write_file  # noqa: E402


# A tank-valve interlock latch (our own scenario): both active-low controls are
# held low, then released at the same instant.
def valve_latch(a, b):
    return released_latch("valve.settle - tank-valve interlock latch", ("fill_n", "drain_n"),
                          ("valve", "valve_n"), (a, b), last_expect="valve = 0")


def sweep(binary, design, *extra):
    rc, out, err = settle(binary, "sweep", design, *extra)
    return rc, out, err


def sweep_json(binary, design, spec):
    return json_report(binary, ["sweep", design, "--corners", spec, "--json", "-"], f"sweep {design} --corners {spec}")


def common_shape(doc, what):
    """The JSON contract of `interval` alone: no corners, empty outcomes, an interval object per step."""
    check(doc["corners"] == 0, f"{what}: corners {doc['corners']}, expected 0")
    check(doc["spec"] == "interval", f"{what}: spec {doc['spec']!r}")
    for st in doc["steps"]:
        check(st["outcomes"] == [], f"{what}: step {st['index']} has outcomes {st['outcomes']}")
        check(isinstance(st.get("interval"), dict) and {"values", "proven"} <= set(st["interval"]),
              f"{what}: step {st['index']} has no interval object: {st.get('interval')}")


def interval_run(binary, tmp, what, name, delays, want_rc, want_result):
    """Writes the latch with `delays` and sweeps it with --corners interval alone; checks the
    JSON shape and the exit status and result. Returns (design path, the report or None)."""
    design = write_file(tmp, name, valve_latch(*delays))
    rc, doc = sweep_json(binary, design, "interval")
    if doc is None:
        return design, None
    common_shape(doc, what)
    check(rc == want_rc and doc["result"] == want_result,
          f"{what}: exit {rc}, result {doc['result']}, expected {want_rc} and {want_result}")
    return design, doc


def summary_says(out, what, expected):
    """Checks the summary table `out` holds each text of `expected`, a list of (text, complaint)."""
    for text, complaint in expected:
        check(text in out, f"{what} summary {complaint}:\n{out}")


def separated(binary, tmp):
    # valve (20..30ps) always falls before valve_n (40..60ps) can: valve_n stays
    # high and the latch ends at valve=0, valve_n=1 for every delay in range.
    # Min-max ambiguity simulation proves it in one run (Breuer and Friedman,
    # Diagnosis and Reliable Design of Digital Systems, 1976).
    design, doc = interval_run(binary, tmp, "non-overlapping", "valve_fast.settle", ("20ps..30ps", "40ps..60ps"),
                               0, "pass")
    if doc is None:
        return
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
    summary_says(out, "non-overlapping",
                 [("proven: every delay assignment in range ends in the same state", "does not say what was proven"),
                  ("2 of 2 steps proven deterministic, 0 inconclusive", "has no proven count")])


def overlapping(binary, tmp):
    # Equal ranges (40..60ps each): either gate may fall first, a critical race
    # (common practice: a set/reset latch released from the forbidden state).
    # The ambiguity run leaves both outputs x (Breuer and Friedman 1976: x marks
    # a value the run cannot decide), so the step is inconclusive, not proven.
    design, doc = interval_run(binary, tmp, "overlapping", "valve_race.settle", ("40ps..60ps", "40ps..60ps"),
                               1, "findings")
    if doc is None:
        return
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
    summary_says(out, "overlapping",
                 [("INCONCLUSIVE  not proven: the interval run leaves x on valve, valve_n",
                   "does not say what is inconclusive"),
                  ("1 of 2 steps proven deterministic, 1 inconclusive", "has no proven count")])
    # The report and the JUnit file accept a sweep without corners.
    html, junit = os.path.join(tmp, "race.html"), os.path.join(tmp, "race.xml")
    rc, out, err = sweep(binary, design, "--corners", "interval", "--html", html, "--junit", junit, "-q")
    check(rc == 1 and os.path.getsize(html) > 0 and os.path.getsize(junit) > 0,
          f"overlapping --html/--junit: exit {rc}: {err[:300]}")
    if os.path.exists(junit):
        with open(junit) as f:
            check("inconclusive" in f.read(), "overlapping --junit: the failure does not say inconclusive")


def main():
    return run_cases([separated, overlapping], "settle-interval-only-")


if __name__ == "__main__":
    sys.exit(main())
