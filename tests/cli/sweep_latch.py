#!/usr/bin/env python3
# settle sweep on a NAND set/reset latch released from (0, 0): a critical race
# when the two NAND delay ranges overlap, a deterministic release when one gate
# is always faster, and an oscillation of period 2 x the gate delay when the
# delays are exactly equal. Witnesses replay with `settle run --corner NAME`.
#
# Called by ctest as: sweep_latch.py <settle binary> <source dir>. Exit 77 = skipped.
import json
import re
import os
import shutil
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, json_report, released_latch, run_cases, run_settle as settle, write_file  # noqa: E402


# A cabinet-door interlock latch (our own scenario): both active-low controls
# are held low, then released at the same instant.
def door_latch(a, b):
    return released_latch("door.settle - cabinet-door interlock latch", ("open_n", "close_n"),
                          ("door", "door_n"), (a, b))


def sweep_json(binary, design, *extra):
    return json_report(binary, ["sweep", design, "--json", "-", *extra], f"sweep {design} {extra}")


UNIT_FS = {"s": 10**15, "ms": 10**12, "us": 10**9, "ns": 10**6, "ps": 10**3, "fs": 1}


def read_vcd(text):
    """(final value per net, last #time in fs) of a VCD, read per IEEE Std 1364-2005
    clause 18: $timescale, $var wire 1 <code> <name>, #time lines, scalar changes."""
    m = re.search(r"\$timescale\s+([\d.]+)\s*(\w+)\s+\$end", text)
    scale = round(float(m.group(1)) * UNIT_FS[m.group(2)]) if m else 1
    names = dict(re.findall(r"\$var\s+wire\s+1\s+(\S+)\s+(\S+)\s+\$end", text))
    values, now = {}, 0
    for tok in text.split("$enddefinitions", 1)[-1].split():
        if tok.startswith("#"):
            now = int(tok[1:]) * scale
        elif tok[0] in "01xXzZ" and tok[1:] in names:
            values[names[tok[1:]]] = tok[0].lower()
    return values, now


def overlapping(binary, tmp):
    design = write_file(tmp, "door_overlap.settle", door_latch("40ps..60ps", "40ps..60ps"))
    vcd_dir = os.path.join(tmp, "witnesses")
    rc, doc = sweep_json(binary, design, "--corners", "random:400", "--vcd-dir", vcd_dir)
    if doc is None:
        return
    if rc != 1:
        fail(f"overlapping ranges: exit {rc}, expected 1 (a critical race is a finding)")
    step = doc["steps"][1]
    if step["verdict"] != "nondeterministic" or not step["first_divergence"]:
        fail(f"overlapping ranges: step 2 verdict {step['verdict']}, first_divergence {step['first_divergence']}")
    settled = {(o["values"]["door"], o["values"]["door_n"]) for o in step["outcomes"] if o["status"] == "settled"}
    # Handbook behaviour of a set/reset latch released from the forbidden state:
    # either gate may win, ending in (0, 1) or (1, 0).
    if settled != {("0", "1"), ("1", "0")}:
        fail(f"overlapping ranges: settled outcomes {sorted(settled)}, expected both (0,1) and (1,0)")
    if sum(o["count"] for o in step["outcomes"]) != doc["corners"]:
        fail("overlapping ranges: outcome counts do not add up to the corners")
    for rank, o in enumerate(step["outcomes"], start=1):
        rc, out, err = settle(binary, "run", design, "--corner", o["witness"], "--json", "-")
        try:
            run = json.loads(out)
        except json.JSONDecodeError:
            fail(f"run --corner {o['witness']}: no JSON (rc={rc}): {err[:300]}")
            continue
        got = run["steps"][1]
        if got["status"] != o["status"] or got["values"] != o["values"]:
            fail(f"witness {o['witness']} replays to {got['status']} {got['values']}, sweep said {o['status']} {o['values']}")
        if not (o["settle_fs"]["min"] <= got["settle_fs"] <= o["settle_fs"]["max"]):
            fail(f"witness {o['witness']}: settle {got['settle_fs']} outside the outcome's min..max")
        name = f"step2_outcome{rank}_{o['witness'].replace(':', '-').replace('#', '-')}.vcd"
        vcd = os.path.join(vcd_dir, name)
        if not os.path.exists(vcd):
            fail(f"--vcd-dir: {name} missing (have {sorted(os.listdir(vcd_dir)) if os.path.isdir(vcd_dir) else []})")
        else:
            with open(vcd) as f:
                final, _ = read_vcd(f.read())
            if any(final.get(k) != v for k, v in o["values"].items()):
                fail(f"{name}: ends in {final}, the outcome is {o['values']}")
            if shutil.which("sigrok-cli"):
                # An independent reader (Debian sigrok-cli's VCD input) loads it and
                # reaches the replayed run's last change. (It writes no values at the
                # final instant, which ends its capture, so values are read above.)
                p = subprocess.run(["sigrok-cli", "-I", "vcd", "-i", vcd, "-O", "vcd"], capture_output=True,
                                   text=True, timeout=120)
                _, last = read_vcd(p.stdout)
                if p.returncode != 0 or last != got["end_fs"]:
                    fail(f"{name}: sigrok-cli rc={p.returncode}, last time {last} fs, run ended at {got['end_fs']} fs")
    files = sorted(os.listdir(vcd_dir)) if os.path.isdir(vcd_dir) else []
    if len(files) != len(step["outcomes"]):
        fail(f"--vcd-dir: {len(files)} files for {len(step['outcomes'])} outcomes of the one divergent step: {files}")


def separated(binary, tmp):
    # door is always faster (20..30ps against 40..60ps): it falls first and holds door_n high.
    design = write_file(tmp, "door_fast.settle", door_latch("20ps..30ps", "40ps..60ps"))
    rc, doc = sweep_json(binary, design, "--corners", "extremes+random:300+gauss:100+interval")
    if doc is None:
        return
    if rc != 0 or doc["result"] != "pass":
        fail(f"non-overlapping ranges: exit {rc}, result {doc['result']}, expected 0 and pass")
    step = doc["steps"][1]
    if step["verdict"] != "deterministic" or len(step["outcomes"]) != 1:
        fail(f"non-overlapping ranges: verdict {step['verdict']} with {len(step['outcomes'])} outcomes")
        return
    if step["outcomes"][0]["values"] != {"door": "0", "door_n": "1"}:
        fail(f"non-overlapping ranges: outcome {step['outcomes'][0]['values']}, expected door=0 door_n=1")
    iv = step.get("interval")
    if not iv or not iv["proven"] or iv["values"] != step["outcomes"][0]["values"]:
        fail(f"non-overlapping ranges: interval {iv} does not prove the sampled outcome")
    # Rule of three over the 400 random and gauss corners (Hanley and Lippman-Hand 1983).
    if abs(step.get("unseen_outcome_bound", -1) - 3 / 400) > 1e-12:
        fail(f"unseen_outcome_bound {step.get('unseen_outcome_bound')}, expected 3/400")
    if step["first_divergence"] or "inherits" in step:
        fail("non-overlapping ranges: a deterministic sweep has no divergence")


def equal(binary, tmp):
    # Exactly equal fixed delays: both NANDs fall together and rise together
    # forever, period 2 x 50ps (common practice: the ideal model of metastability).
    design = write_file(tmp, "door_tie.settle", door_latch("50ps", "50ps"))
    rc, doc = sweep_json(binary, design, "--corners", "extremes+random:20")
    if doc is None:
        return
    step = doc["steps"][1]
    if rc != 1 or step["verdict"] != "oscillating":
        fail(f"equal delays: exit {rc}, verdict {step['verdict']}, expected 1 and oscillating")
    periods = {o.get("period_fs") for o in step["outcomes"]}
    if periods != {100000}:
        fail(f"equal delays: periods {periods}, expected {{100000}} (2 x 50ps)")


def main():
    return run_cases([overlapping, separated, equal], "settle-sweep-latch-")


if __name__ == "__main__":
    sys.exit(main())
