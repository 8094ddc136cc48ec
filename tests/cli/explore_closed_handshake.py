#!/usr/bin/python3
# `settle explore` on a closed four-phase handshake: one place of a sensor FIFO (a C-element with
# an inverter on the reader's acknowledge) between a sensor and a reader written as `times 3`
# reaction rules, and the same place with a buffer where the inverter belongs.
#
# Called by ctest as: explore_closed_handshake.py <settle binary> <source dir>. Exit 77 = skipped.
# Expected behaviour, each from an outside source:
# - The correct place completes every handshake whatever the delays: no deadlock, no gate
#   disabled before it fires, and request and acknowledge alternate on both channels (common
#   practice of four-phase handshake protocols; the C-element's hold, Muller and Bartky 1959).
# - The miswired place waits for a reader acknowledge that is never offered: the sensor's first
#   request is never answered, a deadlock with its rules owed (the deadlock the miswired FIFO
#   example of the project documents, examples/fifo_loop_stuck.settle).
# - Under the single-firing model, the deadlock states and non-persistent gates explore reports
#   are those a search of our own finds (tests/support/closed_reference.py, networkx reachability).
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_cases  # noqa: E402
from closed_reference import parsed_system, reference_deadlocks, reference_nonpersistent  # noqa: E402
from explore_closed import (closed_data, explore, findings, has_closed_fields, path_is_well_formed,  # noqa: E402
                            run_corner, step_status, timed_is_well_formed)

SRC = sys.argv[2] if len(sys.argv) > 2 else "."
RULES = 4  # the environment's rules in both files
PROTOCOL = 8  # the `never ... while ...` properties of both files


def correct_place(binary, tmp):
    path = closed_data(SRC, "fifo_place.settle")
    for model in ("gmw", "single"):
        what = f"fifo_place --model {model}"
        rc, doc = explore(binary, path, what, model=model, want_rc=0)
        if doc is None:
            continue
        has_closed_fields(doc, what)
        check(doc.get("result") == "pass", f"{what}: result {doc.get('result')}, want pass")
        # Common practice (four-phase protocol): every handshake completes, so no reachable state is
        # quiet with a rule owed.
        check(findings(doc, "deadlocks") == [], f"{what}: deadlocks {findings(doc, 'deadlocks')[:2]}, want none")
        # Common practice: request and acknowledge alternate on each channel. Each property is
        # listed, once, as holding, with an empty path and no timed answer.
        props = findings(doc, "properties")
        texts = sorted({p.get("text") for _, p in props})
        check(len(texts) == PROTOCOL, f"{what}: {len(texts)} properties listed, want the file's {PROTOCOL}: {texts}")
        for _, p in props:
            check(p.get("holds") is True and p.get("path") == [] and p.get("timed") is None,
                  f"{what}: property {p}, want holds with path [] and timed null")
        # Muller and Bartky 1959: a C-element place with its environment waiting for each answer is
        # semi-modular, so no gate is ever disabled before it fires.
        check(findings(doc, "nonpersistent") == [],
              f"{what}: non-persistent gates {findings(doc, 'nonpersistent')[:3]}, want none")


def miswired_place(binary, tmp):
    path = closed_data(SRC, "fifo_place_stuck.settle")
    rc, doc = explore(binary, path, "fifo_place_stuck", want_rc=1)
    if doc is None:
        return
    has_closed_fields(doc, "fifo_place_stuck")
    check(doc.get("result") == "findings", f"fifo_place_stuck: result {doc.get('result')}, want findings")
    dead = findings(doc, "deadlocks")
    # examples/fifo_loop_stuck.settle: the place never copies the request, so the run deadlocks in
    # the step that holds the rules (step 2), never in step 1 (no rule is active there).
    check(dead and all(i == 1 for i, _ in dead), f"fifo_place_stuck: deadlocks in steps {[i + 1 for i, _ in dead]}, "
          "want some, all in step 2")
    order = doc.get("state_order") or []
    for i, d in dead:
        what = f"fifo_place_stuck deadlock {d.get('state')}"
        check(len(d.get("state", "")) == len(order) and set(d.get("state", "")) <= {"0", "1"},
              f"{what}: state is not one 0/1 per gate of state_order {order}")
        # The sensor's request went up once (its rule fired 1 of 3) and nothing answered it: the
        # rule that lowers the request is owed, never fired (the example's own account).
        owed = d.get("owed") or []
        lower = next((o for o in owed if "sensor_req = 0" in o.get("text", "")), {})
        check(lower.get("fired") == 0 and lower.get("times") == 3,
              f"{what}: owed {owed}, want the rule lowering sensor_req owed with 0 of 3 fired")
        check(d.get("inputs", {}).get("sensor_req") == 1, f"{what}: inputs {d.get('inputs')}, want sensor_req = 1")
        # The path from the step's start is not empty: at least the sensor's request must fire.
        p = d.get("path")
        check(isinstance(p, list) and len(p) >= 1, f"{what}: path {p}, want a non-empty firing sequence")
        path_is_well_formed(p, what, RULES)
        check(any(f.get("rule") == 1 for inst in p or [] for f in inst),
              f"{what}: path {p} never fires rule 1, the sensor's request")
        t = d.get("timed")
        if not timed_is_well_formed(t, what):
            continue
        # The deadlock happens under every corner (the sweep of examples/fifo_loop_stuck.settle),
        # so the timed check must find delays for it, and `run` at that corner must deadlock.
        check(t["feasible"] is True, f"{what}: timed {t}, want feasible")
        if t["feasible"]:
            run = run_corner(binary, path, t["corner"], what)
            check(step_status(run, i) == "deadlock", f"{what}: run --corner {t['corner']!r} gives step "
                  f"{i + 1} status {step_status(run, i)}, want deadlock")
            check(t.get("confirmed") is True, f"{what}: timed {t}, want confirmed by the engine's own replay")


def against_reference(binary, tmp):
    for name in ("fifo_place.settle", "fifo_place_stuck.settle"):
        path = closed_data(SRC, name)
        model = parsed_system(path)
        want_np, want_dead = reference_nonpersistent(model), reference_deadlocks(model)
        rc, doc = explore(binary, path, f"{name} --model single", model="single")
        if doc is None:
            continue
        order = doc.get("state_order") or []
        got_dead = {("".join(d.get("state", "")[order.index(g)] for g in model.gates if g in order),
                     tuple(d.get("inputs", {}).get(i) for i in model.inputs)) for _, d in findings(doc, "deadlocks")}
        check(got_dead == want_dead, f"{name} --model single: deadlocks {sorted(got_dead)}, our search {sorted(want_dead)}")
        got_np = {h.get("gate") for _, h in findings(doc, "nonpersistent")}
        check(got_np == want_np, f"{name} --model single: non-persistent {sorted(got_np)}, our search {sorted(want_np)}")


if __name__ == "__main__":
    sys.exit(run_cases([correct_place, miswired_place, against_reference], "settle-explore-closed-hs-"))
