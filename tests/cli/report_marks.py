#!/usr/bin/python3
"""One visual vocabulary for verdicts in text output (README "Reading the output"): a
finding is one word in capitals, whatever passes is lower case, in every command; colour
only on a terminal and never with NO_COLOR set. Outside sources: the colour codes are
ECMA-48 (5th edition, 1991) SGR sequences, ESC [ ... m, with 1 bold, 31 red and 32 green;
the NO_COLOR convention (no-color.org): any non-empty value turns colour off (common
practice). The terminal is a pseudo-terminal from Python's standard pty module."""
import os
import pty
import re
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, run_settle  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
ex = lambda name: os.path.join(src, "examples", name)  # noqa: E731
SGR = re.compile(r"\x1b\[[0-9;]*m")  # ECMA-48 8.3.117 SGR: CSI Ps ... m

ring = [ex("delay_ring.settle"), "--stim", ex("delay_ring_free.stim")]
cases = [
    # (what, argv, finding words that must appear in capitals, their lower-case forms that must not)
    ("run of the free ring", ["run", *ring, "--corner", "max"], ["OSCILLATING", "FINDINGS"],
     [r"status  oscillating", r"result  findings"]),
    ("sweep of the arbiter", ["sweep", ex("arbiter.settle")], ["NONDETERMINISTIC", "FINDINGS"],
     [r"^  nondeterministic", r"result  findings"]),
    ("explore of the arbiter", ["explore", ex("arbiter.settle")], ["CRITICAL", "FINDINGS"],
     [r" critical ", r"result: findings"]),
]
for what, argv, caps, lower in cases:
    rc, out, err = run_settle(settle, *argv)
    check(rc == 1, f"{what}: exit 1 ({rc}, {err.strip()})")
    for w in caps:
        check(w in out, f"{what}: the finding reads {w}")
    for pat in lower:
        check(re.search(pat, out, re.M) is None, f"{what}: no finding in lower case ({pat!r})")
    check(SGR.search(out) is None, f"{what}: no colour when stdout is a pipe")

# Passing words stay lower case: the debouncer passes.
rc, out, _ = run_settle(settle, "run", ex("debounce.settle"))
check(rc == 0 and "result  pass" in out and "FAIL" not in out, "a passing run reads pass, in lower case")


def on_terminal(argv, env):
    """Runs settle with stdout on a pseudo-terminal; returns what it printed."""
    master, slave = pty.openpty()
    p = subprocess.Popen([settle, *argv], stdout=slave, stderr=subprocess.DEVNULL, env=env)
    os.close(slave)
    chunks = []
    while True:
        try:
            b = os.read(master, 65536)
        except OSError:  # EIO once the child has closed its side (Linux)
            break
        if not b:
            break
        chunks.append(b)
    p.wait(timeout=60)
    os.close(master)
    return b"".join(chunks).decode("utf-8", "replace")


env = {k: v for k, v in os.environ.items() if k != "NO_COLOR"}
out = on_terminal(["run", *ring, "--corner", "max"], env)
codes = SGR.findall(out)
check(any("31" in c.split("[")[1] for c in codes), f"on a terminal a finding is red (SGR 31) ({codes[:4]})")
check(any("32" in c.split("[")[1] for c in codes), f"on a terminal a passing word is green (SGR 32) ({codes[:4]})")
check("OSCILLATING" in SGR.sub("", out), "the capitals stay with colour on")
out = on_terminal(["run", *ring, "--corner", "max"], {**env, "NO_COLOR": "1"})
check(SGR.search(out) is None, "NO_COLOR=1 turns colour off on a terminal")
check("OSCILLATING" in out and "FINDINGS" in out, "without colour the capitals still mark the findings")
out = on_terminal(["run", *ring, "--corner", "max"], {**env, "NO_COLOR": ""})
check(SGR.search(out) is not None, "an empty NO_COLOR leaves colour on (no-color.org)")

print("report_marks:", "FAILED" if failures else "ok", f"({len(failures)} failures)")
sys.exit(1 if failures else 0)
