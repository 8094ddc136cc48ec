#!/usr/bin/python3
# `settle explore` on a three-place Muller C-element pipeline between a sensor and a logger
# (reaction rules with `times 3`), and on the same pipeline with an AND gate as its second place.
#
# Called by ctest as: explore_closed_pipeline.py <settle binary> <source dir>. Exit 77 = skipped.
# Expected behaviour, each from an outside source:
# - A C-element pipeline with a four-phase environment is speed-independent: no gate is ever
#   disabled before it fires, on any gate (Muller and Bartky 1959, semi-modularity; common
#   practice for Muller pipelines), and every sample passes, so nothing deadlocks.
# - With an AND gate as place two, p2 falls as soon as p1 does, even while p3 is still excited to
#   copy it: p3 can be disabled before it fires (derived by hand from the gate equations: p1 falls
#   once sample_req is withdrawn and e2 has fallen, and AND(p1, e3) follows p1 without waiting for
#   p3), a non-persistent gate on a reported net.
# - Under the single-firing model, the non-persistent gates and the deadlock states explore reports
#   are those a search of our own finds (tests/support/closed_reference.py, networkx reachability).
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_cases  # noqa: E402
from closed_reference import parsed_system, reference_deadlocks, reference_nonpersistent  # noqa: E402
from explore_closed import (closed_data, explore, findings, has_closed_fields, path_is_well_formed,  # noqa: E402
                            timed_is_well_formed)

SRC = sys.argv[2] if len(sys.argv) > 2 else "."
GATES = {"p1", "p2", "p3", "e2", "e3", "e_log"}
REPORTED = {"p1", "p2", "p3"}  # the outputs


def c_element_pipeline(binary, tmp):
    path = closed_data(SRC, "sensor_pipeline.settle")
    for model in ("gmw", "single"):
        what = f"sensor_pipeline --model {model}"
        rc, doc = explore(binary, path, what, model=model, want_rc=0)
        if doc is None:
            continue
        has_closed_fields(doc, what)
        check(sorted(doc.get("state_order") or []) == sorted(GATES),
              f"{what}: state_order {doc.get('state_order')}, want the six gates {sorted(GATES)}")
        # Muller and Bartky 1959: semi-modular, on every gate (outputs and internal inverters alike).
        check(findings(doc, "nonpersistent") == [], f"{what}: non-persistent {findings(doc, 'nonpersistent')[:3]}")
        # Common practice: a Muller pipeline passes every sample its four-phase environment offers.
        check(findings(doc, "deadlocks") == [], f"{what}: deadlocks {findings(doc, 'deadlocks')[:2]}")
        check(doc.get("result") == "pass", f"{what}: result {doc.get('result')}, want pass")


def and_gate_place(binary, tmp):
    path = closed_data(SRC, "sensor_pipeline_and.settle")
    rc, doc = explore(binary, path, "sensor_pipeline_and")
    if doc is None:
        return
    has_closed_fields(doc, "sensor_pipeline_and")
    hazards = findings(doc, "nonpersistent")
    names = {h.get("gate") for _, h in hazards}
    check(names <= GATES, f"sensor_pipeline_and: non-persistent gates {names} are not all gates of the design")
    # Derived by hand (header): p3 can be excited by p2 and disabled by p2's fall before it fires.
    p3 = next((h for i, h in hazards if h.get("gate") == "p3" and i == 1), None)
    check(p3 is not None, f"sensor_pipeline_and: p3 not reported non-persistent in step 2; reported {hazards[:4]}")
    if p3 is None:
        return
    check(p3.get("output") is True, f"sensor_pipeline_and: p3 drives an output, reported output={p3.get('output')}")
    for _, h in hazards:
        check(h.get("output") is (h.get("gate") in REPORTED),
              f"sensor_pipeline_and: {h.get('gate')} output={h.get('output')}, want {h.get('gate') in REPORTED}")
    path_p = p3.get("path")
    if path_is_well_formed(path_p, "p3's path", 4):
        fired = [(f.get("gate"), f.get("value")) for inst in path_p for f in inst]
        # p3 is excited only once p2 has risen (p3 = C(p2, e_log) starts at 0 with p2 = 0), so the
        # path raises p2, and p3 does not rise after p2's last rise (it is disabled, not fired).
        rises = [k for k, f in enumerate(fired) if f == ("p2", 1)]
        check(rises and ("p3", 1) not in fired[rises[-1]:],
              f"p3's path {path_p}: want p2 to rise and p3 not to fire after it")
    timed_is_well_formed(p3.get("timed"), "p3's timed answer")
    # The correct pipeline's place two differs only in its kind, so its hazard is the AND's doing.
    with open(path) as f:
        check("p2    = and(p1, e3)" in f.read(), "sensor_pipeline_and.settle no longer has its AND gate")
    # The single-firing model reaches this hazard too: it needs no two gates to fire at once.
    rc, one = explore(binary, path, "sensor_pipeline_and --model single", model="single")
    check(any(h.get("gate") == "p3" for _, h in findings(one, "nonpersistent")),
          "sensor_pipeline_and --model single: p3 not reported non-persistent")


def against_reference(binary, tmp):
    for name in ("sensor_pipeline.settle", "sensor_pipeline_and.settle"):
        path = closed_data(SRC, name)
        model = parsed_system(path)
        want_np, want_dead = reference_nonpersistent(model), reference_deadlocks(model)
        print(f"{name}: our own search finds non-persistent {sorted(want_np)}, deadlocks {sorted(want_dead)}")
        rc, doc = explore(binary, path, f"{name} --model single", model="single")
        if doc is None:
            continue
        got_np = {h.get("gate") for _, h in findings(doc, "nonpersistent")}
        check(got_np == want_np, f"{name} --model single: non-persistent {sorted(got_np)}, our search {sorted(want_np)}")
        order = doc.get("state_order") or []
        got_dead = {("".join(d.get("state", "")[order.index(g)] for g in model.gates if g in order),
                     tuple(d.get("inputs", {}).get(i) for i in model.inputs)) for _, d in findings(doc, "deadlocks")}
        check(got_dead == want_dead, f"{name} --model single: deadlocks {sorted(got_dead)}, our search {sorted(want_dead)}")
        # Every single-firing run is a gmw run (one gate per instant), so gmw finds at least these.
        rc, gmw = explore(binary, path, f"{name} --model gmw")
        got_gmw = {h.get("gate") for _, h in findings(gmw, "nonpersistent")}
        check(want_np <= got_gmw, f"{name} --model gmw: non-persistent {sorted(got_gmw)} lacks some of {sorted(want_np)}")
    # The reference itself, on the two files: none in the C-element pipeline (Muller and Bartky
    # 1959), p3 among them with the AND gate (the hand derivation in the header).
    check(not reference_nonpersistent(parsed_system(closed_data(SRC, "sensor_pipeline.settle"))),
          "our own search finds a non-persistent gate in the C-element pipeline")
    check("p3" in reference_nonpersistent(parsed_system(closed_data(SRC, "sensor_pipeline_and.settle"))),
          "our own search does not find p3 non-persistent with the AND gate")


if __name__ == "__main__":
    sys.exit(run_cases([c_element_pipeline, and_gate_place, against_reference], "settle-explore-closed-pipe-"))
