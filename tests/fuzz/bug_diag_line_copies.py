#!/usr/bin/python3
"""Reproducer (not run by ctest: it needs tens of GB): 100,000 unread nets declared on ONE
`wire` line. Every "driven but never read" warning stores its own copy of the ~700 KB source
line (diagnostic::source_line), so loading takes 100,000 x 700 KB = 70 GB and is killed by the
OOM killer. Usage: bug_diag_line_copies.py OUT.settle; then `settle check OUT.settle`."""
import sys

n = 100000
with open(sys.argv[1], "w") as f:
    f.write("input a\noutput y\ny = not(a) delay 10ps\nwire " + ", ".join(f"u{k}" for k in range(n)) + "\n")
    for k in range(n):
        f.write(f"u{k} = buf(a) delay 10ps\n")
