#!/usr/bin/python3
"""Diagnostic floods (issue 7): a design with 100,000 unread nets (each a warning, issue 2)
prints at most 20 warning blocks and then one line "settle: N more warnings not shown"; a design
with 100,000 errors prints at most 50 and a like line. Exit codes stay 0 and 2."""
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = tempfile.mkdtemp(prefix="settle-harden-warn-")


n = 100000
path = os.path.join(tmp, "unread.settle")
with open(path, "w") as f:
    # One net per line: 100,000 names on one `wire` line make the parser keep a copy of that
    # line per warning (tens of GB; reported as a parser bug, tests/fuzz/bug_diag_line_copies.py).
    f.write("input a\noutput y\ny = not(a) delay 10ps\n")
    for k in range(n):
        f.write(f"wire u{k}\nu{k} = buf(a) delay 10ps\n")
p = subprocess.run([settle, "check", path], capture_output=True, text=True, timeout=300)
check(p.returncode == 0, f"warnings only: exit 0 ({p.returncode})")
shown = len(re.findall(r": warning: ", p.stderr))
check(shown == 20, f"20 warnings shown ({shown})")
m = re.search(r"^settle: (\d+) more warnings not shown$", p.stderr, re.M)
check(m is not None and int(m.group(1)) == n - 20, f"one line counts the rest ({m.group(0) if m else p.stderr[-200:]!r})")
check(len(p.stderr) < 20000, f"stderr stays short ({len(p.stderr)} bytes)")

path = os.path.join(tmp, "undriven.settle")
with open(path, "w") as f:
    f.write("input a\noutput " + ", ".join(f"y{k}" for k in range(n)) + "\n")
    for k in range(n):
        f.write(f"y{k} = and(a, nowhere{k}) delay 10ps\n")
p = subprocess.run([settle, "check", path], capture_output=True, text=True, timeout=300)
check(p.returncode == 2, f"errors: exit 2 ({p.returncode})")
shown = len(re.findall(r": error: ", p.stderr))
check(shown == 50, f"50 errors shown ({shown})")
m = re.search(r"^settle: (\d+) more errors not shown$", p.stderr, re.M)
check(m is not None and int(m.group(1)) >= n - 50, f"one line counts the rest ({m.group(0) if m else p.stderr[-200:]!r})")
check(re.search(r"undriven\.settle:3:", p.stderr) is not None, "the first error shown is the first in the file (line 3)")

sys.exit(1 if failures else 0)
