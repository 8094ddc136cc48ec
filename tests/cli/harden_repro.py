#!/usr/bin/python3
"""Reproducibility (issue 7): the same command twice gives byte-identical JSON apart from fields
named wall_s and date; a sweep's JSON is the same with --threads 1 and 2 apart from those and
"threads" (issue 3). Checked on every example, for check, run, sweep, explore and margin."""
import glob
import json
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]


def scrub(v, drop):
    """The JSON with every field named in `drop` removed, at any depth."""
    if isinstance(v, dict):
        return {k: scrub(x, drop) for k, x in v.items() if k not in drop}
    if isinstance(v, list):
        return [scrub(x, drop) for x in v]
    return v


def out(args, ok_errors=()):
    p = subprocess.run([settle, *args, "--json", "-"], capture_output=True, text=True, timeout=300)
    if p.returncode == 2 and any(e in p.stderr for e in ok_errors):
        return None  # a refusal the command documents (explore and clocks or reaction rules)
    if p.returncode not in (0, 1):
        check(False, f"{' '.join(args)}: exit {p.returncode} ({p.stderr[-300:]!r})")
        return None
    return p.stdout


def same(a, b, what, drop=("wall_s", "date")):
    if a is None or b is None:
        return
    ja, jb = json.loads(a), json.loads(b)
    check(json.dumps(scrub(ja, drop)) == json.dumps(scrub(jb, drop)), f"{what}: identical JSON")
    # Byte-identical too, once the dropped fields' lines are gone (the writer's layout is stable).
    strip = lambda t: "\n".join(l for l in t.splitlines() if not any(f'"{d}"' in l for d in drop))
    check(strip(a) == strip(b), f"{what}: byte-identical apart from {', '.join(drop)}")


has_margin = subprocess.run([settle, "margin", "--help"], capture_output=True).returncode == 0
designs = sorted(glob.glob(os.path.join(src, "examples", "*.settle")))
check(len(designs) >= 4, "the examples are there")
for d in designs:
    name = os.path.basename(d)
    same(out(["check", d]), out(["check", d]), f"check {name}")
    for corner in ("typ", "min", "random:7"):
        same(out(["run", d, "--corner", corner]), out(["run", d, "--corner", corner]), f"run {name} {corner}")
    # The interval run refuses reaction rules (a closed loop), so those sweep corners alone.
    closed = any(line.lstrip().startswith("when ") for line in open(d))
    spec = ["--corners", "extremes+random:100" + ("" if closed else "+interval")]
    one = out(["sweep", d, *spec, "--threads", "1"])
    same(one, out(["sweep", d, *spec, "--threads", "1"]), f"sweep {name} twice")
    same(one, out(["sweep", d, *spec, "--threads", "2"]), f"sweep {name} threads 1 vs 2",
         drop=("wall_s", "date", "threads"))
    ex = out(["explore", d], ok_errors=("does not support clocks", "does not take reaction rules",
                                        "does not take metastable elements"))
    if ex is not None:
        same(ex, out(["explore", d]), f"explore {name}")
    if has_margin:
        m = ["margin", d, "--corners", "extremes+random:20", "--resolution", "10"]
        same(out(m + ["--threads", "1"]), out(m + ["--threads", "2"]), f"margin {name} threads 1 vs 2",
             drop=("wall_s", "date", "threads"))

sys.exit(1 if failures else 0)
