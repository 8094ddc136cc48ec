#!/usr/bin/python3
"""Hostile input to `settle margin`'s baseline and search options, one table row per case: the
command line, the exit status, a message substring, and, wherever a file could be destroyed, its
bytes before and after. Covers the bisection options (--resolution, --up-to, --threads,
--tolerance), baseline files of the wrong shape (every error names the entry and the field, never
library text), baselines that cannot be written, the search ceiling as a lower bound, and an
interrupted --update-baseline.

References: RFC 8259 (JSON) for the value types a field is said to expect (number, string, true or
false, array, object); the exit statuses 0/1/2/130 are settle's contract in README.md, 130 being
128 + SIGINT, the shell convention (common practice); flock(2) and rename(2) (Linux man-pages,
POSIX) for the update. The expected margins come from the hand arithmetic in
examples/sensor_watchdog.settle (259% with exhaustive corners) and from a run of the arbiter under
its 11 extremes corners, which races above 9% of the written spread (tests/cli/margin_baseline.py
checks margins against hand arithmetic; here only the comparison logic is under test)."""
import json
import os
import signal
import subprocess
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, scratch, summary, wait_until_caught  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-hostile-baseline-")
ARB = "examples/arbiter.settle"
WATCH = "examples/sensor_watchdog.settle"
FAST = ["--corners", "extremes", "--no-culprits", "--threads", "1"]
# Words that only a JSON library's exception text would carry.
LIBRARY_WORDS = ("json.exception", "type_error", "out_of_range", "parse_error", "[json", "what()")


def entry(design=ARB, **fields):
    e = {"design": design, "spec": "extremes", "ceiling_pct": 100.0, "margin_pct": 9.0, "at_least": False,
         "steps": [{"index": 2, "label": "after 2ns  req_sensor = 1, req_host = 1", "margin_pct": 9.0}]}
    e.update(fields)
    return e


def base_text(*entries, version=1):
    return json.dumps({"format_version": version, "written_by": "hostile test", "designs": list(entries)}, indent=1)


with open(os.path.join(src, "examples", "sensor_watchdog.margins.json")) as f:
    WATCH_BASE = f.read()

# Each case: name, files {name: text} written into a fresh folder (the baseline is "b.json"),
# argv ({d} is that folder), the exit status, a substring of stderr + stdout, and the files whose
# bytes must be unchanged. Optional: "mode" {name: mode}, "json" a check on the --json - report.
CASES = [
    # --- search options: refused in words with exit 2 before anything runs ---
    dict(name="resolution 1e-20 (overflowed into a 0% margin)", argv=[WATCH, "--resolution", "1e-20"], rc=2,
         text="at least 0.01"),
    dict(name="resolution 0", argv=[WATCH, "--resolution", "0"], rc=2, text="at least 0.01"),
    dict(name="resolution nan", argv=[WATCH, "--resolution", "nan"], rc=2, text="--resolution"),
    dict(name="resolution above 100", argv=[WATCH, "--resolution", "100.5"], rc=2, text="at most 100"),
    dict(name="up-to 5 (turned the racing arbiter into a pass)", argv=[ARB, "--up-to", "5"], rc=2,
         text="at least 100"),
    dict(name="up-to 99.99", argv=[ARB, "--up-to", "99.99"], rc=2, text="at least 100"),
    dict(name="up-to 1e308", argv=[ARB, "--up-to", "1e308"], rc=2, text="at most 10000"),
    dict(name="up-to inf", argv=[ARB, "--up-to", "inf"], rc=2, text="--up-to"),
    dict(name="threads 0 says the range in words", argv=[ARB, "--threads", "0"], rc=2,
         text="whole number from 1 to 4096", absent=["1.79769", "e+308"]),
    dict(name="threads -1", argv=[ARB, "--threads", "-1"], rc=2, text="whole number from 1 to 4096"),
    dict(name="threads 2.5", argv=[ARB, "--threads", "2.5"], rc=2, text="whole number from 1 to 4096"),
    dict(name="tolerance -1", argv=[ARB, "--tolerance", "-1"], rc=2, text="--tolerance"),
    dict(name="the floors themselves are accepted", argv=[WATCH, *FAST, "--resolution", "0.01", "--up-to", "100"],
         rc=0, text="result  pass"),
    # --- baseline files of the wrong shape: exit 2, the entry and field named, the file kept ---
    dict(name="margin_pct a string", files={"b.json": base_text(entry(margin_pct="9"))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2,
         text='b.json: entry "examples/arbiter.settle", field "margin_pct": expected a number', keep=["b.json"]),
    dict(name="margin_pct a string, while updating", files={"b.json": base_text(entry(margin_pct="9"))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json", "--update-baseline"], rc=2,
         text='field "margin_pct": expected a number', keep=["b.json"]),
    dict(name="margin_pct negative", files={"b.json": base_text(entry(margin_pct=-3))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text='field "margin_pct": expected a number of percent',
         keep=["b.json"]),
    dict(name="margin_pct missing", files={"b.json": base_text({"design": ARB})},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2,
         text='entry "examples/arbiter.settle", field "margin_pct": missing', keep=["b.json"]),
    dict(name="design missing", files={"b.json": base_text({"margin_pct": 3})},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text='entry #1, field "design": missing',
         keep=["b.json"]),
    dict(name="design a number", files={"b.json": base_text(entry(), {"design": 7, "margin_pct": 3})},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text='entry #2, field "design": expected a string',
         keep=["b.json"]),
    dict(name="an entry that is not an object", files={"b.json": base_text("arbiter")},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text='entry #1 of "designs": expected an object',
         keep=["b.json"]),
    dict(name="steps not an array", files={"b.json": base_text(entry(steps={"index": 2}))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text='field "steps": expected an array',
         keep=["b.json"]),
    dict(name="step index missing", files={"b.json": base_text(entry(steps=[{"margin_pct": 9}]))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2,
         text='entry "examples/arbiter.settle", steps[0], field "index": missing', keep=["b.json"]),
    dict(name="step index 0", files={"b.json": base_text(entry(steps=[{"index": 0, "margin_pct": 9}]))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text='field "index": expected a whole number, 1 or more',
         keep=["b.json"]),
    dict(name="at_least a string", files={"b.json": base_text(entry(at_least="yes"))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text='field "at_least": expected true or false',
         keep=["b.json"]),
    dict(name="budget_fs negative",
         files={"b.json": base_text(entry(settle_within=[{"step": 2, "budget_fs": -5, "margin_fs": 0}]))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2,
         text='settle_within[0], field "budget_fs": expected a whole number', keep=["b.json"]),
    dict(name="margin_fs beyond 64 bits",
         files={"b.json": base_text(entry(settle_within=[{"step": 2, "budget_fs": 5, "margin_fs": 2 ** 70}]))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text='field "margin_fs": expected a whole number',
         keep=["b.json"]),
    dict(name="format_version 2^40 (not truncated into range)", files={"b.json": base_text(entry(), version=2 ** 40)},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json", "--update-baseline"], rc=2, text="newer settle",
         keep=["b.json"]),
    dict(name="format_version a string", files={"b.json": base_text(entry(), version="1")},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text="format_version", keep=["b.json"]),
    dict(name="not JSON, while updating", files={"b.json": "{\"format_version\": 1, \"designs\": [\n"},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json", "--update-baseline"], rc=2, text="not valid JSON",
         keep=["b.json"]),
    dict(name="baseline to compare that is missing", argv=[ARB, *FAST, "--baseline", "{d}/none.json"], rc=2,
         text="none.json': no such file"),
    dict(name="baseline to compare that is a folder", files={"b.json/x": ""},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=2, text="b.json': it is not a regular file"),
    dict(name="baseline '-' while updating (was written to standard output)",
         argv=[ARB, *FAST, "--baseline", "-", "--update-baseline"], rc=2, text="--baseline -: a baseline is a file"),
    # --- baselines that cannot be written: exit 2 naming the file, before the search ---
    dict(name="read-only baseline (root bypasses access(2))", files={"b.json": base_text(entry())},
         mode={"b.json": 0o444}, argv=[ARB, *FAST, "--baseline", "{d}/b.json", "--update-baseline"], rc=2,
         text="b.json': the file is read-only (mode 0444); nothing was run", keep=["b.json"], absent=["corner runs"]),
    dict(name="baseline that is a folder", files={"b.json/x": ""},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json", "--update-baseline"], rc=2, text="not a regular file"),
    dict(name="baseline in a missing folder", argv=[ARB, *FAST, "--baseline", "{d}/no/such/b.json",
                                                    "--update-baseline"], rc=2, text="no/such"),
    # --- the ceiling is a lower bound ---
    dict(name="baseline from --up-to 400 compared at the default ceiling (was a false SHRANK)",
         files={"b.json": WATCH_BASE}, argv=[WATCH, "--baseline", "{d}/b.json", "--json", "-"], rc=0,
         text='"regressions": []', keep=["b.json"], absent=["SHRANK"],
         json=lambda j: j["baseline"]["baseline_ceiling_pct"] == 400 and j["baseline"]["ceiling_pct"] == 100
         and any("not compared above 100%" in n for n in j["baseline"]["notes"])),
    dict(name="same, the summary notes the ceilings", files={"b.json": WATCH_BASE},
         argv=[WATCH, "--baseline", "{d}/b.json"], rc=0, text="searched up to 400% in the baseline, up to 100% now",
         absent=["SHRANK"]),
    dict(name="an exact figure that fell is still a shrink", files={"b.json": base_text(entry(margin_pct=20.0))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json"], rc=1, text="SHRANK  design: 20% -> 9%", keep=["b.json"]),
    dict(name="an old lower bound the new exact figure falls below is a shrink",
         files={"b.json": base_text(entry(margin_pct=100.0, at_least=True))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json", "--json", "-"], rc=1, text='"before_at_least": true',
         json=lambda j: [r["what"] for r in j["baseline"]["regressions"]] == ["design"]),
    dict(name="a fall within the tolerance is no shrink", files={"b.json": base_text(entry(margin_pct=10.5))},
         argv=[ARB, *FAST, "--baseline", "{d}/b.json", "--json", "-"], rc=1,
         text='"regressions": []'),
]


def run_case(c):
    d = os.path.join(tmp, f"case{run_case.n}")
    run_case.n += 1
    os.mkdir(d)
    for name, text in c.get("files", {}).items():
        os.makedirs(os.path.dirname(os.path.join(d, name)), exist_ok=True)
        with open(os.path.join(d, name), "w") as f:
            f.write(text)
    for name, mode in c.get("mode", {}).items():
        os.chmod(os.path.join(d, name), mode)
    before = {k: open(os.path.join(d, k), "rb").read() for k in c.get("keep", [])}
    argv = [settle, "margin", *[a.replace("{d}", d) for a in c["argv"]]]
    p = subprocess.run(argv, capture_output=True, text=True, cwd=src, timeout=300)
    said = p.stderr + p.stdout
    name = c["name"]
    check(p.returncode == c["rc"], f"{name}: exit {c['rc']}, got {p.returncode}: {said[-400:]}")
    check(c["text"] in said, f"{name}: says {c['text']!r}: {said[-400:]}")
    for word in (*LIBRARY_WORDS, *c.get("absent", [])):
        check(word not in said, f"{name}: no {word!r} in the output: {said[-300:]}")
    for k, b in before.items():
        check(open(os.path.join(d, k), "rb").read() == b, f"{name}: {k} unchanged")
    if "json" in c:
        try:
            ok = c["json"](json.loads(p.stdout))
        except (json.JSONDecodeError, KeyError, TypeError) as e:
            ok = False
            print(f"{name}: {e}")
        check(ok, f"{name}: the JSON report: {p.stdout[-600:]}")
    leftovers = [f for f in os.listdir(d) if f.startswith(".")]
    check(not leftovers, f"{name}: no temporary or lock file left: {leftovers}")


run_case.n = 0
for case in CASES:
    run_case(case)
print(f"{len(CASES)} table cases")

# Interrupted --update-baseline (SIGINT and SIGTERM mid-search): the summary and the JSON say
# nothing was written ("updated": false), the file's bytes are unchanged, exit 130.
slow = ["--corners", "random:400000", "--threads", "1", "--no-culprits"]
for sig in (signal.SIGINT, signal.SIGTERM):
    d = os.path.join(tmp, f"sig{int(sig)}")
    os.mkdir(d)
    base, report = os.path.join(d, "b.json"), os.path.join(d, "r.json")
    with open(base, "w") as f:
        f.write(WATCH_BASE)
    before = open(base, "rb").read()
    proc = subprocess.Popen([settle, "margin", WATCH, *slow, "--baseline", base, "--update-baseline", "--json", report],
                            cwd=src, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    check(wait_until_caught(proc, sig), f"{sig.name}: the handler is installed before the search")
    time.sleep(0.3)
    still = proc.poll() is None
    proc.send_signal(sig)
    out, err = proc.communicate(timeout=120)
    if not still:
        print(f"{sig.name}: the search ended before the signal; the case proves nothing this time")
        continue
    check(proc.returncode == 130, f"{sig.name} during --update-baseline: exit 130, got {proc.returncode}: {err}")
    check(open(base, "rb").read() == before, f"{sig.name}: the baseline's bytes are unchanged")
    check("(not updated: the search was interrupted" in out and "(updated)" not in out,
          f"{sig.name}: the summary says the file was not updated: {out[-300:]}")
    r = json.load(open(report))
    check(r["baseline"]["updated"] is False and "interrupted" in r["baseline"].get("not_updated", ""),
          f"{sig.name}: the JSON says \"updated\": false and why: {r['baseline']}")
    check(not [f for f in os.listdir(d) if f.startswith(".")], f"{sig.name}: no temporary file left")

# Duplicate entries for one design in a hand-edited file are merged into the new run's one.
d = os.path.join(tmp, "dup")
os.mkdir(d)
base = os.path.join(d, "b.json")
with open(base, "w") as f:
    f.write(base_text(entry(margin_pct=1.0), entry(WATCH, margin_pct=259.0), entry(margin_pct=2.0)))
p = subprocess.run([settle, "margin", ARB, *FAST, "--baseline", base, "--update-baseline"], cwd=src,
                   capture_output=True, text=True, timeout=300)
got = [(e["design"], e["margin_pct"]) for e in json.load(open(base))["designs"]]
check(p.returncode == 1 and got == [(ARB, 9.0), (WATCH, 259.0)],
      f"duplicates merged, the new figure in the first one's place, the other design kept: {got} {p.stderr}")

sys.exit(summary())
