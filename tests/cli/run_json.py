#!/usr/bin/python3
"""settle run: the JSON contract of issue 2, exit statuses 0/1/2, -q, --version, --help, bad input."""
import json
import os
import re
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, runner, scratch  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
data = os.path.join(src, "tests", "data")
design = os.path.join(data, "lamp_panel.settle")


run = runner(settle, 120)


tmp = scratch("settle-run-json-")
out = os.path.join(tmp, "r.json")

# --version: "settle <version>" (issue 2), exit 0.
rc, so, _ = run("--version")
check(rc == 0 and re.fullmatch(r"settle \d+\.\d+\.\d+\n", so) is not None, f"--version prints 'settle X.Y.Z' ({so!r})")

# --help on the program and on every command, exit 0, naming the options.
for args, words in ((["--help"], ["check", "run"]),
                    (["run", "--help"], ["--corner", "--vcd", "--vcd-nets", "--json", "--horizon", "--max-events", "--stim", "--format", "--dff", "--delay"]),
                    (["check", "--help"], ["--json", "--format"])):
    rc, so, _ = run(*args)
    check(rc == 0, f"{' '.join(args)} exits 0")
    for w in words:
        check(w in so, f"{' '.join(args)} mentions {w}")

# A passing run: exit 0, every field of the contract with its type.
rc, so, se = run("run", design, "--corner", "min", "--json", out)
check(rc == 0, f"passing run exits 0 (rc {rc}, {se})")
check("step 1" in so and "result" in so, "a table is printed on stdout")
j = json.load(open(out))
for key, typ in (("tool", str), ("version", str), ("design", str), ("corner", str), ("events", int),
                 ("wall_s", (int, float)), ("steps", list), ("result", str)):
    check(isinstance(j.get(key), typ), f"run JSON has {key} of type {typ}")
check(j["tool"] == "settle" and j["corner"] == "min" and j["result"] == "pass", "tool, corner, result")
check(list(j.keys())[:8] == ["tool", "version", "design", "corner", "events", "wall_s", "steps", "result"],
      f"top-level key order {list(j.keys())}")
check(len(j["steps"]) == 6, "six steps")
reported = ["lamp", "fault_seen", "latched"]  # outputs in declaration order, then watched nets
for i, s in enumerate(j["steps"], 1):
    check(s["index"] == i, f"step index {i}")
    for key in ("start_fs", "end_fs", "settle_fs"):
        check(isinstance(s[key], int) and s[key] >= 0, f"step {i} {key} is an integer fs count")
    check(s["status"] == "settled", f"step {i} settled")
    check("period_fs" not in s and "toggling" not in s, f"step {i}: period/toggling only when oscillating")
    check(list(s["values"].keys()) == reported, f"step {i} values keys in reported order {list(s['values'])}")
    check(list(s["transitions"].keys()) == reported, f"step {i} transitions keys in reported order")
    check(all(v in ("0", "1", "x") for v in s["values"].values()), f"step {i} values are 0/1/x strings")
    check(all(isinstance(t, int) for t in s["transitions"].values()), f"step {i} transitions are integers")
    for e in s["expect"]:
        check(isinstance(e["pass"], bool) and e["pass"], f"step {i} expectation passes")
        # Every expectation names its kind, as in sweep and explore (issue 17).
        check(e.get("kind") in ("value", "stable", "oscillating", "within", "no_glitch", "deterministic", "gauge"),
              f"step {i} expectation kind {e.get('kind')}")
        if e["kind"] == "value":
            check(set(e) >= {"net", "want", "got"} and e["got"] == e["want"], f"step {i} value expectation fields")
    check(s["end_fs"] >= s["start_fs"] + s["settle_fs"], f"step {i} settle time lies inside the step")
check(j["steps"][0]["values"] == {"lamp": "0", "fault_seen": "0", "latched": "0"}, "step 1 values")
check(j["steps"][2]["values"] == {"lamp": "1", "fault_seen": "1", "latched": "1"}, "step 3 values")
within = [e for e in j["steps"][2]["expect"] if e.get("kind") == "within"]
check(len(within) == 1 and within[0]["budget_fs"] == 1000000 and "net" not in within[0],
      "settle within 1ns appears as kind 'within' with its budget in fs and no net")
# Time literals: 2ns = 2,000,000 fs (SI prefixes, BIPM SI Brochure 9th ed. Table 7).
check(j["steps"][1]["start_fs"] - j["steps"][0]["end_fs"] == 2000000, "after 2ns starts 2,000,000 fs later")

# -q: nothing on stdout, the JSON still written.
os.remove(out)
rc, so, _ = run("run", design, "-q", "--json", out)
check(rc == 0 and so == "" and os.path.exists(out), "-q prints nothing on stdout and still writes JSON")
# --json -: the JSON alone on stdout.
rc, so, _ = run("run", design, "--json", "-")
check(rc == 0 and json.loads(so)["result"] == "pass", "--json - writes parseable JSON alone on stdout")

# Findings: an oscillating ring exits 1. A ring of N inverting stages (here a
# NAND held open and four inverters, all 30ps at min) oscillates with period
# 2 x the sum of the stage delays (common practice): 2 x 5 x 30ps = 300ps.
rc, so, _ = run("run", design, "--stim", os.path.join(data, "lamp_panel_blink.stim"), "--corner", "min", "--json", out)
j = json.load(open(out))
s = j["steps"][-1]
check(rc == 1 and j["result"] == "findings", f"oscillating run exits 1 with result findings (rc {rc})")
check(s["status"] == "oscillating", "the ring step is oscillating")
check(s.get("period_fs") == 300000, f"ring period 300ps at min ({s.get('period_fs')})")
check(sorted(s.get("toggling", [])) == ["b1", "b2", "b3", "b4", "blink", "lamp"] or
      set(["b1", "b2", "b3", "b4", "blink"]) <= set(s.get("toggling", [])), f"toggling nets {s.get('toggling')}")

# A failed expectation exits 1 and shows got/want.
rc, so, _ = run("run", design, "--stim", os.path.join(data, "lamp_panel_wrong.stim"), "--json", out)
j = json.load(open(out))
e = j["steps"][0]["expect"][0]
check(rc == 1 and e == {"kind": "value", "net": "latched", "want": "1", "got": "0", "pass": False} | ({"detail": e["detail"]} if "detail" in e else {}),
      f"failed expectation {e}")
check("FAIL" in so, "the table marks the failed expectation")

# An event limit is a finding too.
rc, so, _ = run("run", design, "--max-events", "3", "--json", out)
j = json.load(open(out))
check(rc == 1 and any(s["status"] == "event_limit" for s in j["steps"]), f"--max-events 3 gives event_limit, exit 1 (rc {rc})")

# Errors exit 2 and leave nothing at the output paths.
for args, what in ((["run", os.path.join(data, "lamp_panel_bad.settle")], "syntax error"),
                   (["run", os.path.join(data, "no_such_file.settle")], "missing file"),
                   (["run", design, "--corner", "sideways"], "bad corner"),
                   (["run", design, "--horizon", "10"], "time without a unit"),
                   (["run", design, "--horizon", "0.5fs"], "time not a whole fs"),
                   (["run", design, "--vcd-nets", "some"], "bad --vcd-nets"),
                   (["run", design, "--no-such-option"], "unknown option"),
                   (["run"], "missing design"),
                   ([], "no command")):
    clean = scratch("settle-err-")
    j2, v2 = os.path.join(clean, "x.json"), os.path.join(clean, "x.vcd")
    extra = ["--json", j2, "--vcd", v2] if args and args[0] == "run" else []
    rc, so, se = run(*args, *extra)
    check(rc == 2, f"{what}: exit 2 (rc {rc})")
    check(os.listdir(clean) == [], f"{what}: nothing written ({os.listdir(clean)})")
# The diagnostic names file:line:col (issue 2 error format).
rc, so, se = run("run", os.path.join(data, "lamp_panel_bad.settle"))
check(re.search(r"lamp_panel_bad\.settle:4:\d+: error: ", se) is not None, f"file:line:col diagnostic ({se!r})")
# An unwritable output path is an I/O error: exit 2.
rc, so, se = run("run", design, "--json", "/nonexistent-dir/x.json")
check(rc == 2 and "/nonexistent-dir/x.json" in se, "unwritable --json path: exit 2 naming the path")

print("run_json:", "FAILED" if failures else "ok", f"({len(failures)} failures)")
sys.exit(1 if failures else 0)
