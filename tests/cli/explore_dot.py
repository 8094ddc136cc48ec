#!/usr/bin/python3
# `settle explore --dot` writes Graphviz DOT that Debian's graphviz (`dot -Tsvg`) accepts; the SVG
# it renders is well-formed XML (xmllint, Debian libxml2-utils) with one node per explored state.
# Large graphs are refused with exit 2 and no file written.
#
# Called by ctest as: explore_dot.py <settle binary> <source dir>. Exit 77 = skipped.
import json
import os
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, failures  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
if not shutil.which("dot") or not shutil.which("xmllint"):
    print("SKIP: graphviz (dot) and libxml2-utils (xmllint) are needed")
    sys.exit(77)


with tempfile.TemporaryDirectory() as tmp:
    for rel in ["tests/data/explore_contacts.settle", "tests/data/explore_monitor_ring.settle",
                "examples/arbiter.settle"]:
        dot, svg = os.path.join(tmp, "g.dot"), os.path.join(tmp, "g.svg")
        p = subprocess.run([settle, "explore", os.path.join(src, rel), "--dot", dot, "--json", "-"],
                           capture_output=True, text=True)
        if p.returncode not in (0, 1):
            fail(f"{rel}: exit {p.returncode}: {p.stderr.strip()}")
            continue
        states = sum(s["states"] for s in json.loads(p.stdout)["steps"])
        q = subprocess.run(["dot", "-Tsvg", dot, "-o", svg], capture_output=True, text=True)
        if q.returncode != 0 or q.stderr.strip():
            fail(f"{rel}: dot -Tsvg: exit {q.returncode} {q.stderr.strip()}")
            continue
        x = subprocess.run(["xmllint", "--noout", svg], capture_output=True, text=True)
        if x.returncode != 0:
            fail(f"{rel}: the SVG is not well-formed: {x.stderr.strip()}")
        with open(svg) as f:
            nodes = f.read().count('class="node"')
        if nodes != states:
            fail(f"{rel}: the SVG shows {nodes} nodes, the JSON reports {states} states")
        else:
            print(f"{rel}: {states} states rendered")

    # Above the DOT limit: refused, exit 2, nothing written (issue 2: no output file on error).
    dot = os.path.join(tmp, "wide.dot")
    p = subprocess.run([settle, "explore", os.path.join(src, "tests/data/explore_wide.settle"), "--dot", dot],
                       capture_output=True, text=True)
    if p.returncode != 2 or os.path.exists(dot) or "DOT output is for designs up to" not in p.stderr:
        fail(f"wide design with --dot: exit {p.returncode}, file written {os.path.exists(dot)}, {p.stderr.strip()}")

sys.exit(1 if failures else 0)
