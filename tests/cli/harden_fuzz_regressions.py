#!/usr/bin/python3
"""Every input the fuzzer ever tripped over (tests/fuzz/regressions/) goes through `settle check`
as .settle and as .bench: exit 0 or 2 with a diagnostic, never a crash, a hang or an uncaught
exception (issue 7)."""
import os
import shutil
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import scratch  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
folder = os.path.join(src, "tests", "fuzz", "regressions")
failures = []
tmp = scratch("settle-harden-fuzzreg-")
files = sorted(f for f in os.listdir(folder) if not f.startswith(".") and f != "README.md")
if not files:
    print("no regression inputs yet")
for name in files:
    for fmt in ("settle", "bench"):
        path = os.path.join(tmp, f"{name}.{fmt}")
        shutil.copyfile(os.path.join(folder, name), path)
        try:
            p = subprocess.run([settle, "check", path], capture_output=True, timeout=60)
            ok = p.returncode in (0, 2) and (p.returncode == 0 or b"error" in p.stderr)
            why = f"exit {p.returncode}: {p.stderr[-300:]!r}"
        except subprocess.TimeoutExpired:
            ok, why = False, "no answer within 60 s"
        if not ok:
            failures.append(name)
            print(f"FAIL: {name} as .{fmt}: {why}")
print(f"{len(files)} regression inputs")
sys.exit(1 if failures else 0)
