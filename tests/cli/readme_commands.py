#!/usr/bin/python3
"""Every settle command README.md shows runs exactly as printed and exits as the README says.

The rule, so that a new command in the README is covered without touching this test:
- A code block is a run of lines indented by four or more spaces after a blank line (Markdown's
  indented code, CommonMark 0.30 section 4.4) or the lines between ``` fences (section 4.5).
- A command line is a line of a code block that begins with `settle ` or, in a shown session,
  `$ settle `. It must carry a shell comment `# exits N` (optionally `# exits N: why`), the exit
  status the README states; a command line without one is a failure of this test.
- It runs with the built binary for `settle`, in the source folder, with the words split as a
  POSIX shell would (Python's shlex, comments dropped). Only output paths change: the relative
  value of --vcd, --vcd-dir, --json (not `-`), --dot, --junit and --html is put under a temporary
  folder, so the source tree is never written.
- In a shown session (`$ settle ...`), the lines shown after it, up to the block's end, must
  appear in the actual output in that order; `...` stands for lines left out, and wall times
  (`0.02 s`) and thread counts are masked, since they follow the machine.
- A `dot` line (Graphviz) runs after the settle line that wrote its input, in the temporary
  folder, when Debian's graphviz is installed, and must exit 0: graphviz reads settle's DOT.
- Other lines (`scripts/...`, build commands) install, build or run every test, so they are
  not run here.
The exit statuses mean what README.md's "Exit codes" table says (0 pass, 1 findings, 2 error)."""
import os
import re
import shlex
import shutil
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, scratch, summary  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-readme-")
OUTPUT_OPTIONS = {"--vcd", "--vcd-dir", "--json", "--dot", "--junit", "--html"}


def code_blocks(text):
    """The README's code blocks, each a list of lines without their indent."""
    blocks, block, fenced, prev_blank = [], None, False, True
    for line in text.splitlines():
        if line.strip().startswith("```"):
            if fenced:
                blocks.append(block)
                block, fenced = None, False
            else:
                if block:
                    blocks.append(block)
                block, fenced = [], True
            prev_blank = False
            continue
        if fenced:
            block.append(line)
            continue
        if line.startswith("    ") and (block is not None or prev_blank):
            if block is None:
                block = []
            block.append(line[4:])
        elif block is not None and not line.strip():
            block.append("")
        else:
            if block:
                blocks.append(block)
            block = None
        prev_blank = not line.strip()
    if block:
        blocks.append(block)
    return [[ln for ln in b] for b in blocks]


def mask(line):
    line = re.sub(r"\b\d+ threads?\b", "N threads", line)
    line = re.sub(r"\b\d+(\.\d+)? s\b", "T s", line)
    return line.rstrip()


def rewrite_outputs(words):
    out, i = [], 0
    while i < len(words):
        w = words[i]
        out.append(w)
        if w in OUTPUT_OPTIONS and i + 1 < len(words):
            v = words[i + 1]
            if v != "-" and not os.path.isabs(v):
                v = os.path.join(tmp, v)
                os.makedirs(os.path.dirname(v), exist_ok=True)
            out.append(v)
            i += 1
        i += 1
    return out


with open(os.path.join(src, "README.md")) as f:
    blocks = code_blocks(f.read())

ran = 0
for block in blocks:
    for k, line in enumerate(block):
        session = line.startswith("$ settle ")
        if not (line.startswith("settle ") or session or line.startswith("dot ")):
            continue
        command = line[2:] if session else line
        if command.startswith("dot "):
            if not shutil.which("dot"):
                print(f"skip (no graphviz): {command}")
                continue
            # Graphviz's own reader is the reference for the DOT settle wrote (Debian graphviz).
            p = subprocess.run(shlex.split(command, comments=True), cwd=tmp, capture_output=True, text=True,
                               timeout=120)
            check(p.returncode == 0, f"README: `{command}` exits 0 under graphviz, got {p.returncode}: {p.stderr}")
            ran += 1
            continue
        m = re.search(r"#\s*exits\s+(\d+)\b", command)
        check(m is not None, f"README: `{command}` states no exit status (add `# exits N`)")
        if not m:
            continue
        want = int(m.group(1))
        words = shlex.split(command, comments=True)
        argv = [settle, *rewrite_outputs(words[1:])]
        before = set(os.listdir(src))
        p = subprocess.run(argv, cwd=src, capture_output=True, text=True, timeout=600)
        ran += 1
        print(f"exit {p.returncode} (README: {want}): {command}")
        check(p.returncode == want, f"README: `{command}` exits {want}, got {p.returncode}: {p.stderr[-400:]}")
        check(set(os.listdir(src)) == before, f"README: `{command}` wrote nothing into the source folder")
        for i, w in enumerate(words[:-1]):
            if w in OUTPUT_OPTIONS and words[i + 1] != "-" and w != "--vcd-dir":
                check(os.path.exists(os.path.join(tmp, words[i + 1])), f"README: `{command}` wrote {words[i + 1]}")
        if session:
            shown = []
            for s in block[k + 1:]:
                if s.startswith("$ ") or s.startswith("settle "):
                    break
                shown.append(s)
            while shown and not shown[-1].strip():
                shown.pop()
            actual = [mask(a) for a in p.stdout.splitlines()]
            at, matched = 0, 0
            for s in shown:
                if s.strip() == "...":
                    continue
                want_line = mask(s)
                try:
                    at = actual.index(want_line, at) + 1
                    matched += 1
                except ValueError:
                    check(False, f"README: `{command}` prints the shown line {s!r} (in order)")
                    break
            print(f"  {matched} of the {len([s for s in shown if s.strip() != '...'])} lines shown were printed")

check(ran >= 7, f"the README's commands were found and run ({ran})")
sys.exit(summary())
