#!/usr/bin/python3
"""settle margin baselines: write, compare unchanged (exit 0), compare after narrowing one
gate's margin (exit 1 naming the step), versions, atomic write, errors (exit 2)."""
import json
import os
import shutil
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, runner  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]


run = runner(settle, 300)


tmp = tempfile.mkdtemp(prefix="settle-margin-baseline-")
design = os.path.join(tmp, "race.settle")
shutil.copy(os.path.join(src, "tests", "data", "margin_race.settle"), design)
base = os.path.join(tmp, "margins.json")
common = ["--corners", "exhaustive", "--threads", "2", "--no-culprits"]

rc, out, err = run("margin", design, *common, "--baseline", base, "--update-baseline")
check(rc == 1, f"update exits with the margin's own status (1: below 100%), got {rc}: {err}")
check(os.path.exists(base), "baseline written")
check(not [f for f in os.listdir(tmp) if f.startswith(".")], "no temporary file left behind")
b = json.load(open(base))
check(b["format_version"] == 1, "format_version 1")
entry = b["designs"][0]
check(entry["design"] == design and entry["margin_pct"] == 21, f"entry {entry['design']} {entry['margin_pct']}")
check([s["margin_pct"] for s in entry["steps"]] == [100, 21, 100], f"step margins {entry['steps']}")

# Unchanged design: no margin moved. The exit status then follows the design
# (1: it fails as written); what matters is that no regression is reported.
rc, out, err = run("margin", design, *common, "--baseline", base, "--json", "-")
j = json.loads(out)
check(j["baseline"]["compared"] and j["baseline"]["regressions"] == [], f"unchanged: {j['baseline']}")

# A design that passes as written exits 0 against its own baseline: compare
# only step 3 (ready falls), which holds at every spread up to 300%.
ok = os.path.join(tmp, "release.settle")
text = open(design).read()
open(ok, "w").write(text.replace("expect gnt_early = 1, gnt_late = 0\n    expect deterministic\n", "")
                    .replace("after 2ns  ready = 1\n    settle\n", "after 2ns  ready = 1\n    run 1ns\n"))
rc, out, err = run("margin", ok, "--corners", "extremes", "--up-to", "300", "--baseline", base, "--update-baseline")
check(rc == 0, f"passing design: update exits 0, got {rc}: {out} {err}")
rc, out, err = run("margin", ok, "--corners", "extremes", "--up-to", "300", "--baseline", base)
check(rc == 0, f"passing design unchanged: exit 0, got {rc}: {out}")
b = json.load(open(base))
check(len(b["designs"]) == 2, "two designs in one baseline file")

# Narrow one gate's margin: widen the first early buffer to 40ps..64ps (typ
# 52ps). The early chain then arrives by 152 + 32w ps, the late one by
# 160 - 16w ps: w > 8/48 = 16.7%, so step 2 falls from 21% to 16% (5 points).
open(design, "w").write(text.replace("e1        = buf(ready)      delay 40ps..60ps",
                                     "e1        = buf(ready)      delay 40ps..64ps"))
rc, out, err = run("margin", design, *common, "--baseline", base, "--json", "-")
check(rc == 1, f"narrowed: exit 1, got {rc}")
j = json.loads(out)
reg = j["baseline"]["regressions"]
check(any(r["what"].startswith("step 2") and abs(r["drop_pct"] - 5) < 1e-9 for r in reg), f"step 2 named: {reg}")
rc, out, err = run("margin", design, *common, "--baseline", base)
check("SHRANK" in out and "step 2" in out and "21% -> 16%" in out, f"summary names the shrink: {out}")
# A tolerance of 5 points accepts it.
rc, out, err = run("margin", design, *common, "--baseline", base, "--tolerance", "5", "--json", "-")
check(json.loads(out)["baseline"]["regressions"] == [], "within a 5-point tolerance")

# Versions: an older minimal file is read, a newer one refused with exit 2.
old = os.path.join(tmp, "old.json")
json.dump({"format_version": 1, "designs": [{"design": ok, "margin_pct": 300,
           "steps": [{"index": 3, "margin_pct": 300}]}]}, open(old, "w"))
rc, out, err = run("margin", ok, "--corners", "extremes", "--up-to", "300", "--baseline", old)
check(rc == 0, f"older minimal baseline read: {rc} {err}")
newer = os.path.join(tmp, "newer.json")
json.dump({"format_version": 99, "designs": []}, open(newer, "w"))
rc, out, err = run("margin", ok, "--baseline", newer)
check(rc == 2 and "newer" in err, f"newer format refused: {rc} {err}")
# Missing file, missing entry, --update-baseline without --baseline: exit 2.
rc, out, err = run("margin", ok, "--baseline", os.path.join(tmp, "none.json"))
check(rc == 2, f"missing baseline file: {rc}")
rc, out, err = run("margin", os.path.join(src, "tests", "data", "margin_planted.settle"), "--baseline", base)
check(rc == 2 and "no entry" in err, f"no entry for the design: {rc} {err}")
rc, out, err = run("margin", ok, "--update-baseline")
check(rc == 2, f"--update-baseline alone: {rc}")

shutil.rmtree(tmp)
sys.exit(1 if failures else 0)
