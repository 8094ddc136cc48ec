#!/usr/bin/python3
"""Hostile input at the edges of time, stimulus conflicts and damaged bytes (issue 14, items 3,
8 and 9): a table of cases, each a set of files, the command line, the exit status expected
(0 ok, 1 findings, 2 error: README "Exit status") and words the output must hold. A case that
must be refused also shows its place: file:line:col, the source line and a caret under the
byte (the diagnostic format of parser/LANGUAGE.md). Designs are demo scenarios of our own (a
panel lamp driver, a sensor strobe, a delay-monitor ring, a small ISCAS-format netlist)."""
import os
import re
import shutil
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_settle, scratch, summary  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-hostile-time-")
EOT = "timeout at the end of representable time"
# The run table marks its verdicts the README way (a finding in capitals), so
# there the status reads "TIMEOUT at the end ..." and the result "FINDINGS";
# JSON and the sweep's reason line keep the words above.
EOT_TEXT = "TIMEOUT at the end of representable time"
# 2^64 - 1 fs is never; the last instant is 2^64 - 2 fs (README, "Time at its edges").
TOP = "18446744073709551615fs"

LAMP = "input a\noutput q\nq = buf(a) delay 15ps\n"


def lamp(*stim):
    return LAMP + "stimulus {\n" + "".join(f"    {s}\n" for s in stim) + "}\n"


RING = ("# delay-monitor ring with very slow stages\ninput en\noutput tap\nwire n\n"
        "n = nand(en, tap) delay 2000000ms\ntap = buf(n) delay 1000000ms\n"
        "stimulus {\n    at 0ns en = 0\n    settle\n    after 1ns en = 1\n    settle\n}\n")
STROBE = ("# sensor strobe with a period of 8000 s\ninput ck\noutput s\ns = buf(ck) delay 15ps\n"
          "stimulus {\n    clock ck period 8000000ms\n    settle\n}\n")
SLOW = ("# panel lamp driver with a 2000 s relay\ninput a\noutput q\nq = buf(a) delay 2000000ms\n"
        "stimulus {\n    at 0ns a = 0\n    settle\n    after 1ns a = 1\n    settle\n    expect q = 1\n"
        "    after 1ns a = 0\n    settle\n    expect q = 0\n}\n")
# ISCAS-format netlist (the format of Brglez and Fujiwara 1985) with numeric and dotted names.
BENCH = "INPUT(1)\nINPUT(G1.a)\nOUTPUT(22)\n22 = NAND(1, G1.a)\n"
BENCH_STIM = ('stimulus {\n    at 0ns "1" = 1, "G1.a" = 1\n    settle\n    expect "22" = 0\n'
              '    after 1ns "G1.a" = 0\n    settle\n    expect "22" = 1\n    watch "1"\n}\n')
CLASH = "INPUT(a.b)\nINPUT(a_b)\nOUTPUT(q)\nq = AND(a.b, a_b)\n"


def caret_under(err, needle):
    """True when stderr holds a source line with `needle` and, on the next line, a caret under
    needle's first character (LANGUAGE.md, "Diagnostics")."""
    lines = err.split("\n")
    for i, line in enumerate(lines[:-1]):
        at = line.find(needle)
        if at >= 0 and lines[i + 1].rstrip().endswith("^") and lines[i + 1].index("^") == at:
            return True
    return False


def vcd_names(path):
    """The $var reference names of a VCD file (IEEE 1364-2005, 18.2.1: $var type size id ref $end)."""
    with open(path) as f:
        return re.findall(r"\$var\s+\S+\s+\d+\s+\S+\s+(\S+)\s+\$end", f.read())


def vcd_distinct(path):
    """Three distinct $var names, and, when sigrok-cli is installed, three distinct channels as
    its VCD reader sees them (sigrok-cli --show lists "- NAME: logic" per channel)."""
    names = vcd_names(path)
    if len(names) != 3 or len(set(names)) != 3:
        return False, f"three distinct $var names ({names})"
    if shutil.which("sigrok-cli"):
        p = subprocess.run(["sigrok-cli", "-I", "vcd", "-i", path, "--show"], capture_output=True, text=True)
        channels = re.findall(r"^- (\S+): logic$", p.stdout, re.M)
        if len(set(channels)) != 3:
            return False, f"sigrok-cli reads three distinct channels ({channels}; {p.stderr[-200:]!r})"
    return True, ""


# (name, files {name: bytes or str}, argv (file names are replaced by their paths), exit status,
#  words that must appear in stdout + stderr, extra check(stdout, stderr) -> (ok, why) or None)
CASES = [
    ("horizon 2^64-1 refused", {"d.settle": lamp("at 0ns a = 1", "settle")},
     ["run", "d.settle", "--horizon", TOP], 2, ["--horizon", "passes the end of representable time"], None),
    ("horizon 0 refused", {"d.settle": lamp("at 0ns a = 1", "settle")},
     ["run", "d.settle", "--horizon", "0ps"], 2, ["--horizon"], None),
    ("horizon at the last instant settles exactly", {"d.settle": lamp("at 0ns a = 1", "settle", "expect q = 1")},
     ["run", "d.settle", "--horizon", "18446744073709551614fs", "--json", "-"], 0,
     ['"end_fs": 15000', '"status": "settled"'], None),
    ("run window of 2^64-1 fs refused", {"d.settle": lamp("at 0ns a = 0", f"run {TOP}")},
     ["run", "d.settle"], 2, ["d.settle:6:9:", "a run window", "passes the end of representable time"],
     lambda so, se: (caret_under(se, TOP), "caret under the window")),
    ("change at 2^64-16 fs into a 15 ps buffer refused", {"d.settle": lamp("at 18446744073709551600fs a = 1", "settle")},
     ["run", "d.settle"], 2, ["d.settle:5:8:", "longest delay of 15000fs"], None),
    ("change at 2^64-1 fs refused", {"d.settle": lamp(f"at {TOP} a = 1", "settle")},
     ["run", "d.settle"], 2, ["d.settle:5:8:", "passes the end of representable time"], None),
    ("a sum of afters past the end refused",
     {"d.settle": lamp("at 18000000ms a = 0", "settle", "after 446744073710ns a = 1", "settle")},
     ["run", "d.settle"], 2, ["d.settle:7:11:", "passes the end of representable time"], None),
    ("clock period near 2^64 refused", {"d.settle": lamp("clock a period 18446744073709551600fs", "settle")},
     ["run", "d.settle"], 2, ["a clock's second rise"], None),
    ("clock cycles past the end refused", {"d.settle": lamp("clock a period 8000000ms cycles 3", "settle")},
     ["run", "d.settle"], 2, ["a clock's last fall"], None),
    ("delay of 2^64-1 fs refused", {"d.settle": "input a\noutput q\nq = buf(a) delay " + TOP + "\n"},
     ["check", "d.settle"], 2, ["d.settle:3:18:", "a delay of 18446744073709551615fs"], None),
    ("2000 s delays give exact times, no wrap", {"slow.settle": SLOW},
     ["run", "slow.settle", "--json", "-"], 0,
     ['"end_fs": 6000000000002000000', '"result": "pass"'], None),
    ("a slow ring reaches the end of time honestly", {"ring.settle": RING},
     ["run", "ring.settle"], 1, [EOT_TEXT, "result  FINDINGS"], None),
    ("a slow ring in JSON says why", {"ring.settle": RING},
     ["run", "ring.settle", "--json", "-"], 1, [f'"detail": "{EOT}"', '"status": "timeout"'], None),
    ("a sweep of the slow ring says why, in text", {"ring.settle": RING},
     ["sweep", "ring.settle", "--corners", "extremes"], 1, [f"reason  {EOT}"], None),
    ("a sweep of the slow ring says why, in JSON", {"ring.settle": RING},
     ["sweep", "ring.settle", "--corners", "extremes", "--json", "-"], 1, [f'"detail": "{EOT}"'], None),
    ("a margin search on the slow ring names the end of time", {"ring.settle": RING},
     ["margin", "ring.settle"], 1, [EOT], None),
    ("a slow clock under a long horizon times out at the horizon", {"s.settle": STROBE},
     ["run", "s.settle", "--horizon", "18000000ms", "--json", "-"], 1,
     ['"end_fs": 18000000000000000000', '"status": "timeout"'],
     lambda so, se: (EOT not in so, "an ordinary timeout, not the end of time")),
    ("a slow clock under the longest horizon reaches the end of time", {"s.settle": STROBE},
     ["run", "s.settle", "--horizon", "18446744073709551614fs"], 1, [EOT_TEXT], None),
    ("two assignments on one line", {"d.settle": lamp("at 0ns a = 1, a = 0", "settle")},
     ["run", "d.settle"], 2, ["d.settle:5:19: error: input 'a' is assigned twice", "d.settle:5:12: note:"],
     lambda so, se: (caret_under(se, "a = 0") and caret_under(se, "a = 1"), "a caret under each")),
    ("two lines at one instant", {"d.settle": lamp("at 1ns a = 1", "after 0ns a = 0", "settle")},
     ["run", "d.settle"], 2, ["d.settle:6:15: error: input 'a' is assigned twice", "d.settle:5:12: note:"], None),
    ("two clocks on one net", {"d.settle": lamp("clock a period 10ns", "clock a period 20ns", "run 100ns")},
     ["run", "d.settle"], 2, ["d.settle:6:11: error: input 'a' already has a clock", "d.settle:5:11: note:"], None),
    ("the same offset in two steps is no conflict", {"d.settle": lamp("after 1ns a = 1", "settle", "after 1ns a = 0",
                                                                      "settle", "expect q = 0")},
     ["run", "d.settle"], 0, ["result  pass"], None),
    # An absolute instant the stimulus has already passed would run another stimulus than the
    # one written (parser/LANGUAGE.md, 'at' earlier than the time reached).
    ("an 'at' a later step has passed is an error", {"d.settle": lamp("at 1ns a = 1", "settle", "at 1ns a = 0",
                                                                       "settle")},
     ["run", "d.settle"], 2, ["d.settle:7:8: error: 'at 1ns' is earlier than"], None),
    ("conflict in a --stim file names that file",
     {"d.settle": LAMP, "x.stim": "stimulus {\n  after 2ns a = 1\n  after 0ns a = 0\n  settle\n}\n"},
     ["run", "d.settle", "--stim", "x.stim"], 2, ["x.stim:3:13: error:", "x.stim:2:13: note:"], None),
    ("NUL in a .settle file", {"d.settle": b"input a\0b\noutput q\nq = buf(a) delay 1ps\n"},
     ["check", "d.settle"], 2, ["d.settle:1:8:", "'\\0b'"], lambda so, se: (caret_under(se, "\\0b"), "caret under \\0")),
    ("NUL in a .bench file", {"d.bench": b"INPUT(a\0)\nOUTPUT(q)\nq = NOT(a)\n"},
     ["check", "d.bench"], 2, ["d.bench:1:8:", "'\\0'"], lambda so, se: (caret_under(se, "\\0)"), "caret under \\0")),
    ("NUL in a --stim file", {"d.settle": LAMP, "x.stim": b"stimulus {\n  at 0ns a = 1\0\n  settle\n}\n"},
     ["run", "d.settle", "--stim", "x.stim"], 2, ["x.stim:2:15:", "\\0"],
     lambda so, se: (caret_under(se, "\\0"), "caret under \\0")),
    ("a control byte is shown escaped", {"d.settle": b"input a\noutput q\nq = buf(a) delay 1ps \x01\n"},
     ["check", "d.settle"], 2, ["\\x01"], lambda so, se: (caret_under(se, "\\x01"), "caret under \\x01")),
    ("NUL after a tab keeps the caret aligned", {"d.settle": b"input a\n\toutput q\x00\nq = buf(a) delay 1ps\n"},
     ["check", "d.settle"], 2, ["d.settle:2:10:"], lambda so, se: (caret_under(se, "\\0"), "caret under \\0")),
    ("quoted ISCAS names in a stimulus", {"n.bench": BENCH, "n.stim": BENCH_STIM},
     ["run", "n.bench", "--stim", "n.stim"], 0, ["result  pass", "22"], None),
    ("quoted name that is no net", {"n.bench": BENCH, "n.stim": 'stimulus {\n  at 0ns "7" = 1\n  settle\n}\n'},
     ["run", "n.bench", "--stim", "n.stim"], 2, ["n.stim:2:11: error: unknown net '7'"], None),
    ("quoted name in a block's declaration",
     {"d.settle": 'block p(in a; out q) {\n  wire "n"\n  q = buf(a) delay 1ps\n}\ninput i\noutput o\ninst u p(a: i, q: o)\n'},
     ["check", "d.settle"], 2, ["d.settle:2:9:", "a quoted name can only refer to a net at top level"], None),
    ("VCD names stay distinct after sanitising", {"c.bench": CLASH, "c.stim":
                                                   'stimulus {\n  at 0ns "a.b" = 1, "a_b" = 1\n  settle\n}\n'},
     ["run", "c.bench", "--stim", "c.stim", "--vcd", "c.vcd"], 0, ["result  pass"],
     lambda so, se: vcd_distinct(os.path.join(tmp, "c.vcd"))),
]

for name, files, argv, want, words, extra in CASES:
    folder = os.path.join(tmp, re.sub(r"\W+", "_", name))
    os.makedirs(folder, exist_ok=True)
    paths = {}
    for fname, body in files.items():
        paths[fname] = os.path.join(folder, fname)
        with open(paths[fname], "wb") as f:
            f.write(body if isinstance(body, bytes) else body.encode())
    args = [paths.get(a, a) for a in argv]
    if "--vcd" in args:
        args[args.index("--vcd") + 1] = os.path.join(tmp, args[args.index("--vcd") + 1])
    rc, out, err = run_settle(settle, *args, timeout=120, errors="replace")
    # Diagnostics name files as given; compare against the bare file names.
    both = (out + err).replace(folder + os.sep, "")
    err = err.replace(folder + os.sep, "")
    check(rc == want, f"{name}: exit {want} (got {rc}; {err[-400:]!r})")
    for w in words:
        check(w in both, f"{name}: output holds {w!r} ({both[-500:]!r})")
    if want == 2:
        check("\0" not in err, f"{name}: no raw NUL in the message")
    if extra:
        ok, why = extra(out, err)
        check(ok, f"{name}: {why} ({err[-400:]!r})")

print(f"{len(CASES)} cases")
sys.exit(summary())
