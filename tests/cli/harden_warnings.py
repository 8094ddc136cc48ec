#!/usr/bin/python3
"""Diagnostic floods (issue 7): a design with 100,000 unread nets (each a warning, issue 2)
prints at most 20 warning blocks and then one line "settle: N more warnings not shown"; a design
with 100,000 errors prints at most 50 and a like line. Exit codes stay 0 and 2."""
import os
import re
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, run_settle, write_file, scratch  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-harden-warn-")


def flood(name, text, what, kind, want_rc, shown_max):
    """Writes the design and checks it (`what` names the case): the exit status is `want_rc` and
    `shown_max` diagnostics of `kind` (warning, error) are shown. Returns (stderr, the match of
    the one line that counts the rest, or None)."""
    rc, _, err = run_settle(settle, "check", write_file(tmp, name, text), timeout=300)
    check(rc == want_rc, f"{what}: exit {want_rc} ({rc})")
    shown = len(re.findall(f": {kind}: ", err))
    check(shown == shown_max, f"{shown_max} {kind}s shown ({shown})")
    return err, re.search(rf"^settle: (\d+) more {kind}s not shown$", err, re.M)


n = 100000
# One net per line: 100,000 names on one `wire` line make the parser keep a copy of that
# line per warning (tens of GB; reported as a parser bug, tests/fuzz/bug_diag_line_copies.py).
err, m = flood("unread.settle", "input a\noutput y\ny = not(a) delay 10ps\n" +
               "".join(f"wire u{k}\nu{k} = buf(a) delay 10ps\n" for k in range(n)),
               "warnings only", "warning", 0, 20)
check(m is not None and int(m.group(1)) == n - 20, f"one line counts the rest ({m.group(0) if m else err[-200:]!r})")
check(len(err) < 20000, f"stderr stays short ({len(err)} bytes)")

err, m = flood("undriven.settle", "input a\noutput " + ", ".join(f"y{k}" for k in range(n)) + "\n" +
               "".join(f"y{k} = and(a, nowhere{k}) delay 10ps\n" for k in range(n)),
               "errors", "error", 2, 50)
check(m is not None and int(m.group(1)) >= n - 50, f"one line counts the rest ({m.group(0) if m else err[-200:]!r})")
check(re.search(r"undriven\.settle:3:", err) is not None, "the first error shown is the first in the file (line 3)")

sys.exit(1 if failures else 0)
