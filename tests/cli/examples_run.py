#!/usr/bin/python3
# Every example runs with the exit status it intends, its JSON carries steps, and its VCD loads in sigrok-cli.
#
# Called by ctest as: examples_run.py <settle binary> <source dir>. Exit 77 = skipped.
import glob
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, failures  # noqa: E402
from vcd_rules import changes_of  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
examples = os.path.join(src, "examples")


# What each example intends at the default corner of `settle run` (typ).
# 0: every step settles (or, for `run` steps, runs its window) and every expectation holds.
# The arbiter races on purpose, but its host NAND is 2ps slower at every fixed corner, so
# a single run is decisive and exits 0; the race shows across corners (see below).
INTENDED = {
    "debounce.settle": 0,
    "fifo_stage.settle": 0,
    "delay_ring.settle": 0,
    "clock_switch.settle": 0,
    "arbiter.settle": 0,
    "strobe_pulse.settle": 0,
    "sensor_watchdog.settle": 0,  # its margin is tracked by tests/cli/margin_ci_example.py
    "fifo_loop.settle": 0,        # a closed loop: producer and consumer rules finish their `times`
    "fifo_loop_stuck.settle": 1,  # the same loop with a wiring bug: deadlock, a finding
    "arbiter_mutex.settle": 0,    # requests 2ps apart: a slow decision, inside its budget
    "panel_sync.settle": 0,       # a button sampled 3ps before an edge: resolved within budget
}
# Stimulus files run with --stim against a design: (design, stim, intended exit status).
STIMS = [
    ("delay_ring.settle", "delay_ring_free.stim", 1),  # settle on a running ring: oscillating, a finding
    ("debounce.settle", "debounce_chatter.stim", 0),
]


def run(args, expect_json=True):
    p = subprocess.run([settle] + args, capture_output=True, text=True, timeout=120,
                       env=dict(os.environ, NO_COLOR="1"))
    doc = None
    if expect_json:
        try:
            doc = json.loads(p.stdout)
        except ValueError as e:
            fail(f"{' '.join(args)}: stdout is not JSON ({e}); stderr: {p.stderr.strip()[:400]}")
    return p, doc


def sigrok_loads(vcd, label):
    """The VCD must load in sigrok-cli's VCD input (Debian package sigrok-cli) and give output."""
    p = subprocess.run(["sigrok-cli", "-I", "vcd", "-i", vcd, "-O", "vcd"], capture_output=True, timeout=120)
    if p.returncode != 0 or not p.stdout.strip():
        fail(f"{label}: sigrok-cli could not read {vcd}: rc={p.returncode} {p.stderr.decode()[:300]}")
        return None
    return p.stdout.decode(errors="replace")


def check_run_json(doc, label, want_status):
    if doc is None:
        return
    # Field names from the JSON contract of `settle run` (issue 2).
    for key in ("tool", "version", "design", "corner", "events", "steps", "result"):
        if key not in doc:
            fail(f"{label}: JSON lacks '{key}'")
    steps = doc.get("steps") or []
    if not steps:
        fail(f"{label}: JSON has no steps")
    for s in steps:
        for key in ("index", "status", "start_fs", "end_fs", "values", "transitions", "expect"):
            if key not in s:
                fail(f"{label}: step {s.get('index')} lacks '{key}'")
        # A settle time only for a step that went quiet (README "JSON"); an oscillating
        # step gives detected_fs, a timeout last_change_fs (corrected when they stopped
        # carrying settle_fs, which was the last change, not a settle time).
        want = {"oscillating": "detected_fs", "timeout": "last_change_fs",
                "event_limit": "last_change_fs"}.get(s.get("status"), "settle_fs")
        if want not in s:
            fail(f"{label}: step {s.get('index')} ({s.get('status')}) lacks '{want}'")
        for e in s.get("expect", []):
            if want_status == 0 and not e.get("pass"):
                fail(f"{label}: step {s.get('index')} expectation {e} failed")
    result = doc.get("result")
    if (want_status == 0) != (result == "pass"):
        fail(f"{label}: result '{result}' but intended exit status {want_status}")


def main():
    if not shutil.which("sigrok-cli"):
        print("SKIP: sigrok-cli is not installed (scripts/deps installs it)")
        return 77
    found = sorted(os.path.basename(p) for p in glob.glob(os.path.join(examples, "*.settle")))
    for name in found:
        if name not in INTENDED:
            fail(f"examples/{name} has no intended exit status in examples_run.py")
    for name in INTENDED:
        if name not in found:
            fail(f"examples/{name} is missing")
    tmp = tempfile.mkdtemp(prefix="settle-examples-")
    docs = {}
    try:
        runs = [(n, None, INTENDED[n]) for n in found if n in INTENDED] + list(STIMS)
        for design, stim, want in runs:
            label = design if stim is None else f"{design} --stim {stim}"
            vcd = os.path.join(tmp, re.sub(r"\W", "_", label) + ".vcd")
            args = ["run", os.path.join(examples, design), "--json", "-", "--vcd", vcd]
            if stim:
                args += ["--stim", os.path.join(examples, stim)]
            p, doc = run(args)
            if p.returncode != want:
                fail(f"{label}: exit {p.returncode}, intended {want}; stderr: {p.stderr.strip()[:400]}")
            check_run_json(doc, label, want)
            docs[label] = doc
            if not os.path.exists(vcd):
                fail(f"{label}: no VCD written at {vcd}")
            else:
                text = sigrok_loads(vcd, label)
                if text is not None:
                    docs[label + " vcd"] = text
        example_facts(docs, tmp)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    if failures:
        print(f"{len(failures)} failure(s)")
        return 1
    print(f"ok: {len(found)} examples and {len(STIMS)} stimulus files")
    return 0


def step(doc, i):
    steps = (doc or {}).get("steps") or []
    return steps[i - 1] if len(steps) >= i else {}


def example_facts(docs, tmp):
    """What each example is meant to show, checked against facts outside the project."""
    # Inertial delay swallows a pulse shorter than the gate delay; transport delay passes it
    # (common practice; IEEE 1076 and 1364 delay semantics). The tick is 45ps..95ps wide and
    # both buffers take 120ps..150ps, so the rising-edge step shows 0 transitions against 2.
    s = step(docs.get("strobe_pulse.settle"), 2)
    tr = s.get("transitions", {})
    if tr.get("tick_inertial") != 0 or tr.get("tick_transport") != 2:
        fail(f"strobe_pulse: step 2 transitions {tr}, want tick_inertial 0 and tick_transport 2")

    # A ring of an odd number of inverting stages oscillates with period 2 x the sum of its
    # stage delays (common practice). Stage delays at each fixed corner, from the design file:
    # NAND 30/40/50ps, four inverters 20/25/30ps each.
    for corner, period in (("min", 2 * (30 + 4 * 20)), ("typ", 2 * (40 + 4 * 25)), ("max", 2 * (50 + 4 * 30))):
        p, doc = run(["run", os.path.join(examples, "delay_ring.settle"), "--stim",
                      os.path.join(examples, "delay_ring_free.stim"), "--corner", corner, "--json", "-"])
        s = step(doc, 2)
        if s.get("status") != "oscillating" or s.get("period_fs") != period * 1000:
            fail(f"delay_ring at {corner}: step 2 {s.get('status')} period {s.get('period_fs')} fs, "
                 f"want oscillating with {period * 1000} fs")
        elif not {"tap", "n0"} <= set(s.get("toggling", [])):
            fail(f"delay_ring at {corner}: toggling {s.get('toggling')} lacks tap or n0")

    # The same, read back from the waveform by an independent VCD reader (sigrok-cli, Debian
    # package sigrok-cli): at typ every rising edge of `tap` in the enabled window follows the
    # previous one by 2 x (40 + 4 x 25)ps = 280ps (common practice, as above).
    text = docs.get("delay_ring.settle vcd")
    if text is not None:
        window = step(docs.get("delay_ring.settle"), 2)  # from `enable` rising to just before it falls
        lo, hi = window.get("start_fs", 0), window.get("end_fs", 0)
        rises = [t for t, v in changes_of(text).get("tap", []) if v == "1" and lo < t <= hi]
        gaps = {b - a for a, b in zip(rises, rises[1:])}
        if len(rises) < 20 or gaps != {280000}:
            fail(f"delay_ring VCD via sigrok-cli: {len(rises)} rising edges of tap, gaps {sorted(gaps)[:5]} fs, "
                 "want at least 20, all 280000 fs")

    # A glitch-free clock switch passes only whole pulses of its input clocks (common practice:
    # that is what glitch-free means). At typ the and-or gate has one delay for both edges, so
    # every high pulse of clk_out is a full high phase of clk_fast (1ns) or clk_slow (1.2ns)
    # and every low phase is at least the shorter low phase of the two (1ns). Read through
    # sigrok-cli as above.
    text = docs.get("clock_switch.settle vcd")
    if text is not None:
        edges = [(t, v) for t, v in changes_of(text).get("clk_out", []) if v in "01"]
        edges = [e for i, e in enumerate(edges) if i == 0 or e[1] != edges[i - 1][1]]
        widths = [(b[0] - a[0], a[1]) for a, b in zip(edges, edges[1:])]
        highs = {w for w, v in widths if v == "1"}
        lows = [w for w, v in widths if v == "0"]
        if not highs or not highs <= {1000000, 1200000} or min(lows, default=0) < 1000000:
            fail(f"clock_switch VCD via sigrok-cli: high pulses {sorted(highs)} fs, shortest low "
                 f"{min(lows, default=None)} fs; want only 1000000/1200000 and lows >= 1000000")
        elif highs != {1000000, 1200000}:
            fail(f"clock_switch: clk_out showed pulses of only one clock: {sorted(highs)}")

    # The debouncer: the bounces never reach the output, so `clean` changes once when the
    # blade lands and once when it is thrown back (handbook behaviour of a set/reset latch).
    doc = docs.get("debounce.settle")
    total = sum(s.get("transitions", {}).get("clean", 0) for s in (doc or {}).get("steps", []))
    if total != 2:
        fail(f"debounce: clean made {total} transitions over the run, want 2")

    # A 20ps spike is shorter than the latch's fastest gate (35ps) and is swallowed by inertial
    # delay; of the five chattering changes only the first moves `clean` (common practice).
    doc = docs.get("debounce.settle --stim debounce_chatter.stim")
    got = [step(doc, i).get("transitions", {}).get("clean") for i in (3, 4)]
    if got != [0, 1]:
        fail(f"debounce_chatter: clean transitions in steps 3 and 4 are {got}, want [0, 1]")

    # A mutual-exclusion cell grants at most one requester, and here exactly one once both ask
    # (handbook behaviour of a cross-coupled NAND arbiter). Random corners (the same seed always
    # gives the same delays) must show both winners: the host's NAND is faster in about 40% of
    # uniform draws from 40..60ps against 42..62ps
    # (derived: with X, Y uniform on 0..20, P(X - Y > 2) = 18^2 / (2 x 20^2) = 0.405).
    winners = set()
    for seed in range(1, 25):
        p, doc = run(["run", os.path.join(examples, "arbiter.settle"), "--corner", f"random:{seed}",
                      "--json", "-"])
        if p.returncode != 0:
            fail(f"arbiter at random:{seed}: exit {p.returncode}")
        v = step(doc, 2).get("values", {})
        grants = (v.get("gnt_sensor"), v.get("gnt_host"))
        if grants not in (("1", "0"), ("0", "1")):
            fail(f"arbiter at random:{seed}: grants {grants} after both requests, want exactly one")
        winners.add(grants)
    if len(winners) != 2:
        fail(f"arbiter: 24 random corners gave only {winners}")
    v = step(docs.get("arbiter.settle"), 2).get("values", {})
    if (v.get("gnt_sensor"), v.get("gnt_host")) != ("1", "0"):
        fail(f"arbiter at typ: {v}, want the sensor granted (its NAND is 2ps faster)")

    closed_loop_facts(docs)

    # The sweep's verdicts, once `settle sweep` exists: only the arbiter's race step diverges.
    if subprocess.run([settle, "sweep", "--help"], capture_output=True).returncode != 0:
        print("note: settle sweep is not available; sweep verdicts not checked")
        return
    for name, want_exit in (("arbiter.settle", 1), ("fifo_stage.settle", 0), ("debounce.settle", 0)):
        p, doc = run(["sweep", os.path.join(examples, name), "--corners", "extremes+random:50", "--json", "-"])
        if p.returncode != want_exit:
            fail(f"sweep {name}: exit {p.returncode}, intended {want_exit}; {p.stderr.strip()[:300]}")
        verdicts = [s.get("verdict") for s in (doc or {}).get("steps", [])]
        if name == "arbiter.settle":
            if len(verdicts) < 2 or verdicts[1] != "nondeterministic":
                fail(f"sweep arbiter: verdicts {verdicts}, want step 2 nondeterministic")
        elif any(v != "deterministic" for v in verdicts):
            fail(f"sweep {name}: verdicts {verdicts}, want all deterministic")

    # Over random corners alone the host wins with probability 0.405 (derived above). With 1,000
    # corners the share's standard error is 0.0155, so 0.05 is more than three of them.
    p, doc = run(["sweep", os.path.join(examples, "arbiter.settle"), "--corners", "random:1000", "--json", "-"])
    outs = step(doc, 2).get("outcomes", [])
    host = [o.get("share") for o in outs if o.get("values", {}).get("gnt_host") == "1"]
    if len(host) != 1 or abs(host[0] - 0.405) > 0.05:
        fail(f"sweep arbiter random:1000: host share {host}, want one outcome near 0.405")


def closed_loop_facts(docs):
    """The closed-loop FIFO place and its deadlocking variant (examples/fifo_loop*.settle)."""
    doc = docs.get("fifo_loop.settle")
    text = docs.get("fifo_loop.settle vcd")
    if doc is not None:
        gauge = next((g for g in doc.get("gauges", []) if g.get("name") == "cycle"), {})
        # 20 samples make 20 acknowledge rises, so 19 periods between them (the gauge's words).
        if gauge.get("count") != 19:
            fail(f"fifo_loop: cycle gauge {gauge}, want 19 periods")
        prop = next((p for p in doc.get("properties", []) if p.get("text", "").startswith("never sensor_ack")), {})
        if prop.get("holds") is not True:
            fail(f"fifo_loop: property {prop}, want it to hold")
    if text is not None:
        ch = changes_of(text)
        # A FIFO delivers every sample it takes, once (common practice): the reader acknowledges as
        # many samples as the sensor offered, 20 each (the rules' `times 20`), read via sigrok-cli.
        for net in ("sensor_req", "reader_ack"):
            rises = [t for i, (t, v) in enumerate(ch.get(net, [])) if v == "1" and (i == 0 or ch[net][i - 1][1] != "1")]
            if len(rises) != 20:
                fail(f"fifo_loop VCD via sigrok-cli: {net} rises {len(rises)} times, want 20")
    doc = docs.get("fifo_loop_stuck.settle")
    if doc is not None:
        last = (doc.get("steps") or [{}])[-1]
        owed = [o.get("rule", "") for o in last.get("owed", [])]
        if last.get("status") != "deadlock" or not any(r.startswith("when sensor_ack after") for r in owed):
            fail(f"fifo_loop_stuck: last step {last.get('status')} owing {owed}, want deadlock owing the "
                 "sensor's return-to-zero rule")
    for name, want_exit, verdict in (("fifo_loop.settle", 0, "deterministic"), ("fifo_loop_stuck.settle", 1, "deadlock")):
        p, doc = run(["sweep", os.path.join(examples, name), "--corners", "extremes+random:30", "--json", "-"])
        if p.returncode != want_exit:
            fail(f"sweep {name}: exit {p.returncode}, intended {want_exit}; {p.stderr.strip()[:300]}")
        last = ((doc or {}).get("steps") or [{}])[-1]
        if last.get("verdict") != verdict:
            fail(f"sweep {name}: last step {last.get('verdict')}, want {verdict}")


if __name__ == "__main__":
    sys.exit(main())
