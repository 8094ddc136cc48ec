#!/usr/bin/python3
"""The tree follows the project's own .clang-format (Google style, 100 columns), checked with
Debian's clang-format. html_assets.cpp is generated (the report's embedded scripts) and left out."""
import os
import shutil
import subprocess
import sys

src = sys.argv[2]
tool = shutil.which("clang-format")
if tool is None:
    print("skipped: clang-format (Debian package clang-format) is not installed; scripts/test installs it")
    sys.exit(77)

GENERATED = {os.path.join("waves", "html_assets.cpp")}
files = []
for top in ("sim", "parser", "waves", "tests", "bench"):
    for root, _, names in os.walk(os.path.join(src, top)):
        for n in sorted(names):
            rel = os.path.relpath(os.path.join(root, n), src)
            if n.endswith((".cpp", ".hpp")) and rel not in GENERATED:
                files.append(rel)
if len(files) < 50:
    print(f"FAIL: only {len(files)} C++ files found under {src}; is this the source tree?")
    sys.exit(1)
p = subprocess.run([tool, "--dry-run", "--Werror", "--style=file"] + files, cwd=src, capture_output=True,
                   text=True)
if p.returncode != 0:
    shown = "\n".join(p.stderr.splitlines()[:40])
    print(f"FAIL: clang-format finds unformatted lines (run: clang-format -i FILE):\n{shown}")
    sys.exit(1)
print(f"ok: {len(files)} files formatted by .clang-format")
