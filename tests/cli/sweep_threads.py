#!/usr/bin/env python3
# `settle sweep --threads 1` and `--threads 2` give the same JSON apart from the
# timing field wall_s and the pool size reported in threads (issue 3: corner i's
# delays follow from (seed, i) alone, results are stored per corner).
#
# Called by ctest as: sweep_threads.py <settle binary> <source dir>. Exit 77 = skipped.
import json
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, summary  # noqa: E402


def sweep(binary, args, threads):
    p = subprocess.run([binary, "sweep", *args, "--threads", str(threads), "--json", "-"], capture_output=True,
                       text=True, timeout=600)
    try:
        doc = json.loads(p.stdout)
    except json.JSONDecodeError:
        fail(f"sweep {args} --threads {threads}: no JSON (rc={p.returncode}): {p.stderr[:300]}")
        return p.returncode, None
    if doc.get("threads") != threads:
        fail(f"sweep {args}: threads {doc.get('threads')}, asked for {threads}")
    for field in ("wall_s", "threads"):
        doc.pop(field, None)
    return p.returncode, doc


def main():
    if len(sys.argv) < 3:
        return 2
    binary, src = sys.argv[1], sys.argv[2]
    ex = os.path.join(src, "examples")
    cases = [
        [os.path.join(ex, "arbiter.settle"), "--corners", "extremes+random:600+gauss:200+interval", "--seed", "11"],
        [os.path.join(ex, "fifo_stage.settle"), "--corners", "extremes+random:300"],
        [os.path.join(ex, "delay_ring.settle"), "--stim", os.path.join(ex, "delay_ring_free.stim"),
         "--corners", "extremes+gauss:200"],
    ]
    for args in cases:
        rc1, one = sweep(binary, args, 1)
        rc2, two = sweep(binary, args, 2)
        if one is None or two is None:
            continue
        if rc1 != rc2:
            fail(f"{args}: exit {rc1} with one thread, {rc2} with two")
        if one != two:
            fail(f"{args}: the JSON differs between --threads 1 and --threads 2")
        if one["events"] <= 0 or one["corners"] <= 0:
            fail(f"{args}: no events or corners: {one['events']} {one['corners']}")
    return summary()


if __name__ == "__main__":
    sys.exit(main())
