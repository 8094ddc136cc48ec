#!/usr/bin/python3
# `settle explore`: exit statuses and the JSON contract of issue 4 on small designs of our own.
#
# Called by ctest as: explore_cli.py <settle binary> <source dir>. Exit 77 = skipped.
# Expected behaviour, each from an outside source:
# - NOR set/reset latch released from (1,1) to (0,0): two stable states and a reachable cycle,
#   released on one input: one stable state (handbook behaviour; METHODS.md section 5 check).
# - Muller C-element: holds on disagreeing inputs, follows agreeing ones (Muller and Bartky 1959).
# - An odd ring of inverting stages has no stable state and oscillates (common practice).
# - Single-winner runs are gmw runs (Brzozowski and Seger, Asynchronous Circuits, 1995).
import json
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, failures  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]


def explore(*args):
    p = subprocess.run([settle, "explore", *args, "--json", "-"], capture_output=True, text=True)
    try:
        return p.returncode, json.loads(p.stdout) if p.stdout.strip() else None, p.stderr
    except json.JSONDecodeError:
        return p.returncode, None, p.stderr


def data(name):
    return os.path.join(src, "tests", "data", name)


def outcomes(step):
    return sorted(tuple(sorted(s["values"].items())) for s in step["stable"])


# Simultaneous release of the latch: a critical race with a reachable cycle, exit 1.
rc, r, err = explore(data("explore_contacts.settle"))
if rc != 1 or r is None:
    fail(f"contacts: exit {rc}, {err}")
else:
    for key in ("tool", "version", "design", "model", "steps", "result"):
        if key not in r:
            fail(f"contacts: JSON lacks '{key}'")
    s = r["steps"][1]
    want = sorted([(("q", "0"), ("q_n", "1")), (("q", "1"), ("q_n", "0"))])
    if outcomes(s) != want:
        fail(f"contacts step 2: stable {outcomes(s)}")
    if (s["critical_race"], s["may_oscillate"], s["must_oscillate"]) != (True, True, False):
        fail(f"contacts step 2: race/oscillation flags {s['critical_race']} {s['may_oscillate']} {s['must_oscillate']}")
    if s["ternary"] != {"q": "x", "q_n": "x"} or not s["complete"] or r["result"] != "findings":
        fail(f"contacts step 2: ternary {s['ternary']} complete {s['complete']} result {r['result']}")
    if any(len(st["state"]) != len(r["state_order"]) or set(st["state"]) - {"0", "1"} for st in s["stable"]):
        fail("contacts: 'state' is not one 0/1 character per gate of state_order")
    # The witness paths replay: firing each set in turn from the start reaches the stable state.
    for st in s["stable"]:
        cur = {"q": "0", "q_n": "0"}
        for fired in st["path"]:
            for g in fired:
                cur[g] = "1" if cur[g] == "0" else "0"
        if cur != st["values"]:
            fail(f"contacts: path {st['path']} ends in {cur}, not {st['values']}")
    # single-winner outcomes are among gmw's
    rc1, r1, _ = explore(data("explore_contacts.settle"), "--model", "single")
    if r1 is None or not set(outcomes(r1["steps"][1])) <= set(outcomes(s)) or r1["model"] != "single":
        fail("contacts: single-winner outcomes are not a subset of gmw's")

# Releasing one input: one stable state, the expectation holds, exit 0.
rc, r, err = explore(data("explore_contacts.settle"), "--stim", data("explore_contacts_one.stim"))
if rc != 0 or r is None or r["result"] != "pass":
    fail(f"contacts, one release: exit {rc}, {err}")
elif outcomes(r["steps"][1]) != [(("q", "0"), ("q_n", "1"))] or not all(e["pass"] for e in r["steps"][1]["expect"]):
    fail(f"contacts, one release: {r['steps'][1]}")

# The handshake stage: every step one stable state, expectations hold, no glitch, exit 0.
for model in ("gmw", "single", "ternary"):
    rc, r, err = explore(data("explore_handshake.settle"), "--model", model)
    if rc != 0 or r is None or r["result"] != "pass":
        fail(f"handshake --model {model}: exit {rc}, {err}")
        continue
    got = [s["stable"][0]["values"]["stage_ack"] for s in r["steps"]]
    if got != ["0", "1", "1", "0", "0"]:
        fail(f"handshake --model {model}: stage_ack per step {got}")

# The ring: no stable state while enabled, must oscillate, exit 1.
rc, r, err = explore(data("explore_monitor_ring.settle"))
if rc != 1 or r is None:
    fail(f"ring: exit {rc}, {err}")
else:
    s = r["steps"][1]
    if s["stable"] or s["must_oscillate"] is not True or s["sccs"]["oscillating"] != 1:
        fail(f"ring step 2: {s['stable']} {s['must_oscillate']} {s.get('sccs')}")
    if len(r["steps"][2]["stable"]) != 1:
        fail("ring step 3: dropping enable should park the ring in one state")

# The budget: stops cleanly, says how far it got, falls back to ternary (binary here: exact).
rc, r, err = explore(data("explore_wide.settle"), "--max-states", "1000")
if r is None:
    fail(f"wide: no JSON, exit {rc}, {err}")
else:
    s = r["steps"][1]
    if s["complete"] or "budget" not in s.get("stopped", "") or s["ternary"] != {"f13": "1"} or not s["exact"]:
        fail(f"wide with a budget: {s}")
    if rc != 0 or s["hazards_from"] != "ternary":
        fail(f"wide with a budget: exit {rc}, hazards_from {s['hazards_from']}")
rc, r, err = explore(data("explore_wide.settle"))
if r is None or r["steps"][1]["states"] != 2 ** 13 + 1 or not r["steps"][1]["complete"]:
    fail(f"wide: 2^13 + 1 states expected (13 racing buffers, then the and gate): {r and r['steps'][1]['states']}")

# Errors: exit 2 with a message, and no output file.
with tempfile.TemporaryDirectory() as tmp:
    out = os.path.join(tmp, "r.json")
    cases = [([os.path.join(src, "examples", "clock_switch.settle")], "clocks"),
             ([data("explore_contacts.settle"), "--model", "sideways"], "sideways"),
             ([os.path.join(tmp, "missing.settle")], "missing.settle"),
             ([data("explore_contacts.settle"), "--model", "ternary", "--dot", os.path.join(tmp, "g.dot")], "--dot")]
    for args, word in cases:
        p = subprocess.run([settle, "explore", *args, "--json", out], capture_output=True, text=True)
        if p.returncode != 2 or word not in p.stderr or os.path.exists(out):
            fail(f"{args}: exit {p.returncode}, stderr {p.stderr.strip()!r}, output written {os.path.exists(out)}")

# The summary table names every step and the result.
p = subprocess.run([settle, "explore", data("explore_contacts.settle")], capture_output=True, text=True)
# Text output marks findings in capitals (README "Reading the output"): the race
# column reads CRITICAL and the result FINDINGS (corrected when the marks were unified).
if "CRITICAL" not in p.stdout or "result: FINDINGS" not in p.stdout or "stable 2:" not in p.stdout:
    fail(f"summary table: {p.stdout}")

sys.exit(1 if failures else 0)
