#!/usr/bin/python3
# `settle check FILE --json -` on every shared .bench file reports the file's line counts as stats.csv gives them.
#
# Called by ctest as: bench_check.py <settle binary> <source dir>. Exit 77 = skipped.
# The reference figures are the ISCAS benchmark descriptions, Brglez and Fujiwara 1985
# (ISCAS-85) and Brglez, Bryan and Kozminski 1989 (ISCAS-89), as counted from the files'
# lines in tests/data/iscas/stats.csv (see SOURCE.md there).
import csv
import json
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, failures, iscas_dir  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
iscas = iscas_dir(src, must_hold="stats.csv")  # tests/data/iscas; fails without it


with open(os.path.join(iscas, "stats.csv"), newline="") as f:
    rows = list(csv.DictReader(f))
if len(rows) < 30:
    fail(f"stats.csv has {len(rows)} rows, expected at least 30")

# stats.csv column -> the "source" field of `check --json` (issue 6).
FIELDS = {"inputs": "inputs", "outputs": "outputs", "dffs": "dffs", "inverters": "inverters",
          "buffs": "buffers", "gates": "gates"}

for row in rows:
    path = os.path.join(iscas, row["name"] + ".bench")
    p = subprocess.run([settle, "check", path, "--json", "-"], capture_output=True, text=True)
    if p.returncode != 0:
        fail(f"{row['name']}: exit {p.returncode}: {p.stderr.strip()[:400]}")
        continue
    try:
        doc = json.loads(p.stdout)
    except json.JSONDecodeError as e:
        fail(f"{row['name']}: stdout is not JSON ({e}): {p.stdout[:200]!r}")
        continue
    source = doc.get("source")
    if not isinstance(source, dict):
        fail(f"{row['name']}: no \"source\" object in {sorted(doc)}")
        continue
    if source.get("format") != "bench":
        fail(f"{row['name']}: source.format is {source.get('format')!r}, expected 'bench'")
    for col, field in FIELDS.items():
        want = int(row[col])
        if source.get(field) != want:
            fail(f"{row['name']}: source.{field} = {source.get(field)!r}, stats.csv {col} = {want}")
    # In gates mode each DFF is six NAND gates (METHODS.md section 7), every other line one gate.
    total = sum(int(row[c]) for c in ("gates", "inverters", "buffs")) + 6 * int(row["dffs"])
    if doc.get("gates") != total:
        fail(f"{row['name']}: check reports {doc.get('gates')!r} gates, expected {total}")
    # The human summary shows the same source counts (issue 6): each figure appears in it.
    h = subprocess.run([settle, "check", path], capture_output=True, text=True)
    if h.returncode != 0:
        fail(f"{row['name']}: plain check exit {h.returncode}")
    elif "bench" not in h.stdout or not all(str(int(row[c])) in h.stdout for c in FIELDS):
        fail(f"{row['name']}: the summary lacks the source counts: {h.stdout[:300]!r}")

print(f"{len(rows)} files checked, {len(failures)} failures")
sys.exit(1 if failures else 0)
