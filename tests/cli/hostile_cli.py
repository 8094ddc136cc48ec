#!/usr/bin/python3
"""Hostile command lines (issue 14): a table of cases, each with the argument list, the exit
status and a substring of the message expected, and for every case that could destroy a file,
the bytes of every file involved compared before and after.

References: file identity is the device and inode pair stat(2) reports after following
symbolic links, and a hard link is the same inode under a second name (POSIX, common practice);
rename(2) replaces its target in one step (POSIX); 130 = 128 + SIGINT is the shell's status for
a process ended by Ctrl-C (common practice); 2^64-1 = 18446744073709551615 is computed below with
Python integers; a VCD file starts with declaration commands such as $date, $version or
$timescale and ends them with $enddefinitions (IEEE 1364-2005 clause 18). The designs are demo
scenarios of our own (a panel-switch debouncer)."""
import json
import os
import signal
import subprocess
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, scratch, summary, wait_until_caught, write_file  # noqa: E402

if len(sys.argv) < 3:
    print("usage: hostile_cli.py <settle> <source dir>")
    sys.exit(2)
settle, src = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
tmp = scratch("settle-hostile-")
os.chdir(tmp)  # every path below is relative to the scratch folder

U64_MAX = 2**64 - 1  # Python integers: the largest 64-bit unsigned value

# A panel-switch debouncer (demo): 4 gates, so 3 + 2 x 4 = 11 extremes corners (numbered 0..10)
# and 2^4 = 16 exhaustive corners (0..15), by the corner definitions in README's sweep section.
write_file(tmp, "deb.settle", """# panel-switch debouncer: a NAND latch cleans the bounce of a changeover contact
input  nc, no
output clean, clean_n
wire   s, r
s       = buf(nc)             delay 10ps..20ps
r       = buf(no)             delay 10ps..20ps
clean   = nand(s, clean_n)    delay 30ps..50ps
clean_n = nand(r, clean)      delay 30ps..50ps
stimulus {
    at 0ns     nc = 0, no = 1
    settle
    expect clean = 1
    after 1ns  nc = 1, no = 0
    settle
    expect clean = 0
}
""")
write_file(tmp, "press.stim", """# the panel switch pressed once
stimulus {
    at 0ns  nc = 0, no = 1
    settle
}
""")
# Line 4, column 5 is the `settle` that ends step 1 while `no` is still x.
write_file(tmp, "half.stim", """# debouncer stimulus that leaves the normally-open contact unassigned
stimulus {
    at 0ns  nc = 0
    settle
}
""")
write_file(tmp, "empty.settle", "# nothing here yet: the panel's netlist is still to be drawn\n")
write_file(tmp, "old.json", "OLD REPORT\n")
write_file(tmp, "old.vcd", "OLD WAVES\n")
write_file(tmp, "old.xml", "OLD XML\n")
os.symlink("deb.settle", "deb_link.settle")
os.link("deb.settle", "deb_hard.settle")
os.mkdir("folder")
os.mkdir("sub")
os.mkdir("vcds")
write_file(os.path.join(tmp, "vcds"), "step1_outcome1_typ.vcd", "A USER'S OWN FILE\n")

# Every file a case may touch: their bytes before the case, compared after it.
watched = ["deb.settle", "press.stim", "half.stim", "old.json", "old.vcd", "old.xml",
           "vcds/step1_outcome1_typ.vcd"]

# Words of library texts that must never reach the user (CLI11, nlohmann-json, the C++ library).
leaks = ["Run with --help", "required TEXT", "[json.exception", "std::", "basic_string", "terminate called",
         "not in range", "Could not convert", "The following argument"]

# (what, argv, exit status, stderr substring, paths that must not exist afterwards)
cases = [
    # 1. Outputs against inputs, by identity, not spelling (POSIX stat: device and inode).
    ("run --json onto the design", ["run", "deb.settle", "--json", "deb.settle"], 2,
     "--json deb.settle is the design file deb.settle", []),
    ("run --vcd onto the design", ["run", "deb.settle", "--vcd", "deb.settle"], 2,
     "--vcd deb.settle is the design file deb.settle", []),
    ("run --json onto --stim", ["run", "deb.settle", "--stim", "press.stim", "--json", "press.stim"], 2,
     "--json press.stim is the --stim file press.stim", []),
    ("run --json through a symbolic link to the design", ["run", "deb_link.settle", "--json", "deb.settle"], 2,
     "is the design file deb_link.settle", []),
    ("run --html onto a hard link of the design", ["run", "deb.settle", "--html", "deb_hard.settle"], 2,
     "--html deb_hard.settle is the design file deb.settle", []),
    ("run --junit onto the design spelt another way", ["run", "deb.settle", "--junit", "sub/../deb.settle"], 2,
     "--junit sub/../deb.settle is the design file deb.settle", []),
    ("run --json and --vcd on one new path", ["run", "deb.settle", "--json", "new.out", "--vcd", "./new.out"], 2,
     "is the same file as", ["new.out"]),
    ("run --json and --junit on one old file", ["run", "deb.settle", "--json", "old.json", "--junit",
                                                "sub/../old.json"], 2, "is the same file as", []),
    ("check --json onto the design", ["check", "deb.settle", "--json", "./deb.settle"], 2,
     "--json ./deb.settle is the design file deb.settle", []),
    ("explore --dot onto the design", ["explore", "deb.settle", "--dot", "deb.settle"], 2,
     "--dot deb.settle is the design file", []),
    ("explore --json and --html on one path", ["explore", "deb.settle", "--json", "old.json", "--html", "old.json"],
     2, "--html old.json is the same file as --json old.json", []),
    ("sweep --junit onto --stim", ["sweep", "deb.settle", "--stim", "press.stim", "--corners", "extremes",
                                   "--junit", "press.stim"], 2, "--junit press.stim is the --stim file", []),
    ("sweep --vcd-dir onto the design", ["sweep", "deb.settle", "--corners", "extremes", "--vcd-dir",
                                         "deb.settle"], 2, "--vcd-dir deb.settle is the design file", []),
    ("sweep --json where a witness VCD may go", ["sweep", "deb.settle", "--corners", "extremes", "--vcd-dir", "vcds",
                                                 "--json", "vcds/step1_outcome1_typ.vcd"], 2, "lies in --vcd-dir vcds",
     []),
    ("margin --update-baseline onto the design", ["margin", "deb.settle", "--corners", "extremes",
                                                  "--update-baseline", "--baseline", "deb.settle"], 2,
     "--baseline deb.settle is the design file", []),
    ("margin --json onto the baseline it reads", ["margin", "deb.settle", "--corners", "extremes", "--baseline",
                                                  "old.json", "--json", "old.json"], 2,
     "--json old.json is the baseline file old.json", []),
    ("run --json and --junit may share /dev/null (a character device loses nothing)",
     ["run", "deb.settle", "--json", "/dev/null", "--junit", "/dev/null", "-q"], 0, "", []),
    # 1b. All or nothing: one output that cannot be written leaves every other target as it was.
    # /dev/full fails every write with ENOSPC (Linux device, common practice).
    ("run: --json to a full device, --vcd kept", ["run", "deb.settle", "--vcd", "old.vcd", "--json", "/dev/full"],
     2, "/dev/full", []),
    ("run: --junit in a missing folder, --json kept", ["run", "deb.settle", "--json", "old.json", "--junit",
                                                       "no/such/folder/r.xml"], 2, "no/such/folder/r.xml", []),
    ("explore: --dot to a full device, --json kept", ["explore", "deb.settle", "--json", "old.json", "--dot",
                                                      "/dev/full"], 2, "/dev/full", []),
    ("sweep: --junit to a full device, --json kept", ["sweep", "deb.settle", "--corners", "extremes", "--json",
                                                      "old.json", "--junit", "/dev/full"], 2, "/dev/full", []),
    # 3. Numeric options in range, in words.
    ("sweep --seed -1", ["sweep", "deb.settle", "--corners", "random:2", "--seed", "-1"], 2,
     f"the seed must be a whole number from 0 to {U64_MAX}", []),
    ("sweep --seed 2^64", ["sweep", "deb.settle", "--corners", "random:2", "--seed", str(U64_MAX + 1)], 2,
     f"{U64_MAX + 1} is too large", []),
    ("sweep --seed 2^64-1 is accepted", ["sweep", "deb.settle", "--corners", "random:2", "--seed", str(U64_MAX),
                                         "-q"], 0, "", []),
    ("margin --seed -1", ["margin", "deb.settle", "--seed", "-1"], 2, "the seed must be a whole number", []),
    ("run --horizon 0ps", ["run", "deb.settle", "--horizon", "0ps", "--json", "h.json"], 2,
     "must be greater than 0", ["h.json"]),
    ("run --json ''", ["run", "deb.settle", "--json", ""], 2, "--json: the path is empty", []),
    ("sweep --vcd-dir ''", ["sweep", "deb.settle", "--vcd-dir", ""], 2, "--vcd-dir: the path is empty", []),
    ("run --stim ''", ["run", "deb.settle", "--stim", ""], 2, "the --stim file path is empty", []),
    ("sweep --threads 0", ["sweep", "deb.settle", "--threads", "0"], 2,
     "the thread count must be a whole number from 1 to 4096", []),
    ("sweep --timeout -1", ["sweep", "deb.settle", "--timeout", "-1"], 2, "at least 0", []),
    ("sweep --timeout nan", ["sweep", "deb.settle", "--timeout", "nan"], 2, "finite number", []),
    ("run --max-events -5", ["run", "deb.settle", "--max-events", "-5"], 2, "the event limit must be a whole", []),
    ("explore --max-states 0", ["explore", "deb.settle", "--max-states", "0"], 2, "the state budget", []),
    ("sweep --corners extremes+extremes", ["sweep", "deb.settle", "--corners", "extremes+extremes"], 2,
     "'extremes' appears twice", []),
    ("sweep --corners interval+extremes+interval", ["sweep", "deb.settle", "--corners",
                                                    "interval+extremes+interval"], 2, "'interval' appears twice", []),
    ("run --corner extremes#999", ["run", "deb.settle", "--corner", "extremes#999"], 2,
     "11 extremes corners, numbered 0..10", []),
    ("run --corner extremes#11", ["run", "deb.settle", "--corner", "extremes#11"], 2, "numbered 0..10", []),
    ("run --corner extremes#10 is accepted", ["run", "deb.settle", "--corner", "extremes#10", "-q"], 0, "", []),
    ("run --corner exhaustive#16 does not wrap", ["run", "deb.settle", "--corner", "exhaustive#16"], 2,
     "16 exhaustive corners, numbered 0..15", []),
    ("run --corner exhaustive#15 is accepted", ["run", "deb.settle", "--corner", "exhaustive#15", "-q"], 0, "", []),
    ("run --corner random:-1", ["run", "deb.settle", "--corner", "random:-1"], 2,
     f"a whole number from 0 to {U64_MAX}", []),
    ("run --corner random:2^64", ["run", "deb.settle", "--corner", f"random:{U64_MAX + 1}"], 2,
     f"a whole number from 0 to {U64_MAX}", []),
    ("run --corner random:2^64-1 is accepted", ["run", "deb.settle", "--corner", f"random:{U64_MAX}", "-q"], 0, "",
     []),
    ("run --format xml", ["run", "deb.settle", "--format", "xml"], 2, "'xml' is not one of auto, settle, bench", []),
    # 4. Diagnostics that name the right file and say why.
    ("explore --stim error names the stim file", ["explore", "deb.settle", "--stim", "half.stim"], 2,
     "half.stim:4:5: error: input 'no' is still x", []),
    ("a folder as the design", ["run", "folder", "--json", "f.json"], 2, "is a directory", ["f.json"]),
    ("a folder as --stim", ["sweep", "deb.settle", "--stim", "folder"], 2, "folder: error: cannot read file: it is "
                                                                          "a directory", []),
    ("an unknown command", ["frobnicate", "deb.settle"], 2, "unknown command 'frobnicate'", []),
    ("no command", [], 2, "no command given", []),
    ("an unexpected argument", ["run", "deb.settle", "stray"], 2, "run: unexpected argument 'stray'", []),
    ("an option without its value", ["run", "deb.settle", "--json"], 2, "--json needs a value", []),
    ("an output option given twice", ["run", "deb.settle", "--json", "a.json", "--json", "b.json"], 2,
     "--json is given more than once", ["a.json", "b.json"]),
    ("no design file", ["sweep"], 2, "sweep: no design file given", []),
    ("check an empty design: a warning", ["check", "empty.settle"], 0, "warning: empty.settle: the design is empty",
     []),
    ("run an empty design: an error", ["run", "empty.settle", "--json", "e.json"], 2,
     "the design is empty (no gates and no inputs)", ["e.json"]),
    ("sweep an empty design", ["sweep", "empty.settle"], 2, "the design is empty", []),
    ("explore an empty design", ["explore", "empty.settle"], 2, "the design is empty", []),
    ("margin an empty design", ["margin", "empty.settle"], 2, "the design is empty", []),
]


def snapshot():
    out = {}
    for p in watched:
        with open(p, "rb") as f:
            out[p] = f.read()
    return out


def leftovers():
    found = []
    for folder, _, names in os.walk(tmp):
        found += [os.path.join(folder, n) for n in names if ".tmp." in n]
    return found


check(len(cases) >= 30, f"at least 30 table cases ({len(cases)})")
for what, argv, want_rc, want_msg, absent in cases:
    before = snapshot()
    p = subprocess.run([settle, *argv], capture_output=True, text=True, timeout=300, errors="replace")
    check(p.returncode == want_rc, f"{what}: exit {want_rc} (got {p.returncode}; {p.stderr[-300:]!r})")
    check(want_msg in p.stderr, f"{what}: stderr says {want_msg!r} ({p.stderr[-300:]!r})")
    for word in leaks:
        check(word not in p.stderr, f"{what}: no library text {word!r} on stderr ({p.stderr[-300:]!r})")
    after = snapshot()
    for path in watched:
        check(before[path] == after[path], f"{what}: {path} is byte for byte as it was")
    for path in absent:
        check(not os.path.exists(path), f"{what}: nothing written at {path}")
    check(not leftovers(), f"{what}: no temporary file left ({leftovers()})")
    # A symbolic link and a hard link stay what they were (POSIX: lstat, st_nlink).
    check(os.path.islink("deb_link.settle") and os.stat("deb_hard.settle").st_nlink == 2,
          f"{what}: the links are untouched")

# The --stim diagnostic carries the source line and a caret under column 5, and does not
# blame the design file (issue 14, item 9).
p = subprocess.run([settle, "explore", "deb.settle", "--stim", "half.stim"], capture_output=True, text=True)
lines = p.stderr.splitlines()
at = next((i for i, line in enumerate(lines) if line.startswith("half.stim:4:5:")), None)
check(at is not None and lines[at + 1] == "    settle" and lines[at + 2] == "    ^",
      f"explore --stim: source line and caret ({p.stderr!r})")
check("deb.settle:4:5" not in p.stderr, "explore --stim: the design file is not blamed")

# A successful multi-output run replaces the old targets (rename into place, POSIX).
p = subprocess.run([settle, "run", "deb.settle", "--json", "old.json", "--vcd", "old.vcd", "-q"],
                   capture_output=True, text=True)
check(p.returncode == 0, f"run writing two outputs: exit 0 ({p.stderr[-300:]!r})")
with open("old.json") as f:
    check(json.load(f).get("result") == "pass", "run: the new JSON replaced the old")
with open("old.vcd") as f:
    head = f.read()
check(head.startswith("$") and "$enddefinitions" in head, "run: the new VCD replaced the old (IEEE 1364 header)")
check(not leftovers(), f"run writing two outputs: no temporary left ({leftovers()})")

# 2. Signals. A bank of delay-monitor rings (demo) that runs far longer than the test waits.
rings = 8
ring_lines = ["# bank of delay-monitor rings, enabled together", "input enable",
              "output " + ", ".join(f"tap{r}" for r in range(rings))]
for r in range(rings):
    ring_lines.append("wire " + ", ".join(f"r{r}_{k}" for k in range(5)))
    ring_lines.append(f"r{r}_0 = nand(enable, r{r}_4) delay 30ps..50ps")
    ring_lines += [f"r{r}_{k} = not(r{r}_{k - 1}) delay 20ps..30ps" for k in range(1, 5)]
    ring_lines.append(f"tap{r} = buf(r{r}_4) delay 25ps..35ps")
ring_lines += ["stimulus {", "  at 0ns enable = 0", "  settle", "  after 1ns enable = 1", "  run 1000ms",
               "  after 100ps enable = 0", "  settle", "}"]
write_file(tmp, "rings.settle", "\n".join(ring_lines) + "\n")

for sig in (signal.SIGINT, signal.SIGTERM):
    name = signal.Signals(sig).name
    js, vcd = f"run_{name}.json", f"run_{name}.vcd"
    p = subprocess.Popen([settle, "run", "rings.settle", "--json", js, "--vcd", vcd, "--vcd-nets", "outputs", "-q"],
                         stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    check(wait_until_caught(p, sig), f"run {name}: settle catches the signal")
    time.sleep(1.0)  # past loading: the run itself is under way
    check(p.poll() is None, f"run {name}: still running after 1 s")
    p.send_signal(sig)
    try:
        _, se = p.communicate(timeout=60)
    except subprocess.TimeoutExpired:
        p.kill()
        _, se = p.communicate()
    check(p.returncode == 130, f"run {name}: exit 130 (got {p.returncode}; {se[-300:]!r})")
    check("interrupted by " + name in se and "partial" in se, f"run {name}: stderr says so ({se[-300:]!r})")
    try:
        with open(js) as f:
            j = json.load(f)
        check(j.get("interrupted") is True and j.get("stop_reason") == "signal" and j.get("result") == "findings",
              f"run {name}: the partial report is marked interrupted")
        check(1 <= len(j.get("steps", [])) < 3, f"run {name}: the steps reached, not all three")
    except (OSError, ValueError) as e:
        check(False, f"run {name}: the partial report is valid JSON ({e})")
    try:
        with open(vcd) as f:
            check("$enddefinitions" in f.read(), f"run {name}: the partial VCD has its header (IEEE 1364)")
    except OSError as e:
        check(False, f"run {name}: the partial VCD is there ({e})")
    check(not leftovers(), f"run {name}: no .NAME.vcd.tmp.XXXXXX left ({leftovers()})")

# A command that does not poll, stopped while a temporary exists: explore has written its JSON
# to a temporary and waits to open a FIFO (open(2) blocks until a reader comes, POSIX).
os.mkfifo("reader.fifo")
for sig in (signal.SIGINT, signal.SIGTERM):
    name = signal.Signals(sig).name
    p = subprocess.Popen([settle, "explore", "deb.settle", "--json", "ex.json", "--dot", "reader.fifo"],
                         stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    end = time.monotonic() + 60
    while time.monotonic() < end and not leftovers() and p.poll() is None:
        time.sleep(0.02)
    check(bool(leftovers()), f"explore {name}: the JSON waits in a temporary")
    p.send_signal(sig)
    try:
        p.communicate(timeout=60)
    except subprocess.TimeoutExpired:
        p.kill()
        p.communicate()
    check(p.returncode == 130, f"explore {name}: exit 130 (got {p.returncode})")
    check(not os.path.exists("ex.json"), f"explore {name}: nothing at the target")
    check(not leftovers(), f"explore {name}: the temporary was removed ({leftovers()})")

print(f"{len(cases)} table cases")
sys.exit(summary())
