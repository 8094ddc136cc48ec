#!/usr/bin/env python3
# Corner counts of `settle sweep`: extremes gives 3 + 2g corners and exhaustive
# 2^g for g gates (issue 3), with g taken from the ISCAS statistics
# (tests/data/iscas/stats.csv: gates + inverters + buffers of the
# combinational circuits); exhaustive refuses more than 2^20 corners with a
# message that suggests random:N, exit 2 and no output file.
#
# Called by ctest as: sweep_counts.py <settle binary> <source dir>. Exit 77 = skipped.
import csv
import json
import os
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, iscas_dir, run_settle, summary  # noqa: E402


def settle(binary, *args):
    return run_settle(binary, *args, timeout=600)


def corners(binary, design, spec, *extra):
    rc, out, err = settle(binary, "sweep", design, "--corners", spec, "--json", "-", *extra)
    try:
        return json.loads(out)
    except json.JSONDecodeError:
        fail(f"sweep {design} --corners {spec}: no JSON (rc={rc}): {err[:300]}")
        return None


def main():
    if len(sys.argv) < 3:
        return 2
    binary, src = sys.argv[1], sys.argv[2]
    iscas = iscas_dir(src, must_hold="stats.csv")  # tests/data/iscas; fails without it
    with open(os.path.join(iscas, "stats.csv")) as f:
        stats = {row["name"]: row for row in csv.DictReader(f)}

    def gates(name):
        r = stats[name]
        return int(r["gates"]) + int(r["inverters"]) + int(r["buffs"])

    for name in ("c17", "c432", "c880"):
        g = gates(name)
        doc = corners(binary, os.path.join(iscas, name + ".bench"), "extremes")
        if doc and doc["corners"] != 3 + 2 * g:
            fail(f"{name}: extremes gave {doc['corners']} corners, expected 3 + 2 x {g} = {3 + 2 * g}")

    g = gates("c17")
    doc = corners(binary, os.path.join(iscas, "c17.bench"), "exhaustive")
    if doc and doc["corners"] != 2 ** g:
        fail(f"c17: exhaustive gave {doc['corners']} corners, expected 2^{g}")
    doc = corners(binary, os.path.join(iscas, "c17.bench"), "extremes+exhaustive+random:7+gauss:5+interval")
    if doc and doc["corners"] != 3 + 2 * g + 2 ** g + 7 + 5:
        fail(f"c17: a combined spec gave {doc['corners']} corners, expected {3 + 2 * g + 2 ** g + 12}")

    # The examples' gate counts come from `settle check`; the sweep must agree with them.
    for name, spec_count in (("arbiter.settle", lambda g: 2 ** g), ("fifo_stage.settle", lambda g: 2 ** g)):
        path = os.path.join(src, "examples", name)
        rc, out, err = settle(binary, "check", path, "--json", "-")
        g = json.loads(out)["gates"]
        doc = corners(binary, path, "exhaustive")
        if doc is None:
            continue
        if doc["corners"] != spec_count(g):
            fail(f"{name}: exhaustive gave {doc['corners']} corners for {g} gates")
        for step in doc["steps"]:
            for o in step["outcomes"]:
                k = int(o["witness"].split("#")[1]) if o["witness"].startswith("exhaustive#") else -1
                if not 0 <= k < 2 ** g:
                    fail(f"{name}: witness {o['witness']} is not an exhaustive corner of {g} gates")

    # 160 gates: 2^160 corners is refused, exit 2, the message suggests random:N, nothing is written.
    with tempfile.TemporaryDirectory() as tmp:
        out_json = os.path.join(tmp, "sweep.json")
        rc, out, err = settle(binary, "sweep", os.path.join(iscas, "c432.bench"), "--corners", "exhaustive",
                              "--json", out_json)
        if rc != 2:
            fail(f"c432 exhaustive: exit {rc}, expected 2")
        if "random:" not in err or "2^20" not in err:
            fail(f"c432 exhaustive: the message does not suggest random:N or name the limit: {err.strip()}")
        if os.path.exists(out_json) or os.listdir(tmp):
            fail(f"c432 exhaustive: files written despite the error: {os.listdir(tmp)}")

    for bad in ("random:0", "extremes+", "fast", "gauss:many", "interval+"):
        rc, out, err = settle(binary, "sweep", os.path.join(src, "examples", "arbiter.settle"), "--corners", bad)
        if rc != 2 or "--corners" not in err:
            fail(f"--corners {bad}: exit {rc}, stderr {err.strip()[:200]}; expected 2 and a message")

    return summary()


if __name__ == "__main__":
    sys.exit(main())
