#!/usr/bin/python3
"""VCD from settle run, checked against IEEE Std 1364-2005 clause 18 and read back by sigrok-cli."""
import json
from fractions import Fraction
import os
import re
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, scratch  # noqa: E402
from vcd_rules import UNITS, need_sigrok  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
need_sigrok()



def timescale_fs(text):
    # IEEE 1364-2005 18.2.3.5: $timescale time_number time_unit $end, number 1, 10 or 100.
    m = re.fullmatch(r"\s*(1|10|100)\s*(s|ms|us|ns|ps|fs)\s*", text)
    return int(m.group(1)) * UNITS[m.group(2)] if m else None


def check_structure(path, name):
    """IEEE 1364-2005 clause 18 rules on our own VCD; returns (scale_fs, times)."""
    text = open(path).read()
    head, sep, body = text.partition("$enddefinitions $end")
    check(sep != "", f"{name}: $enddefinitions $end present")
    for kw in ("$date", "$version", "$timescale"):
        check(kw in head, f"{name}: {kw} present")
    check(re.search(r"\$version\s+settle \d+\.\d+\.\d+\s+\$end", head) is not None, f"{name}: $version names settle")
    ts = re.search(r"\$timescale(.*?)\$end", head, re.S)
    scale = timescale_fs(ts.group(1)) if ts else None
    check(scale is not None, f"{name}: $timescale is 1/10/100 of s..fs ({ts.group(1) if ts else None!r})")
    depth, codes = 0, set()
    for tok in re.findall(r"\$scope\s+module\s+\S+\s+\$end|\$upscope\s+\$end|\$var\s+wire\s+1\s+\S+\s+\S+\s+\$end", head):
        if tok.startswith("$scope"):
            depth += 1
        elif tok.startswith("$upscope"):
            depth -= 1
            check(depth >= 0, f"{name}: $upscope without $scope")
        else:
            code = tok.split()[3]
            check(all(33 <= ord(c) <= 126 for c in code), f"{name}: identifier code {code!r} in ASCII 33..126")
            check(depth > 0, f"{name}: $var inside a scope")
            codes.add(code)
    check(depth == 0, f"{name}: balanced $scope/$upscope")
    times, last, dumped = [], -1, set()
    in_dump = False
    for line in body.split("\n"):
        if not line:
            continue
        if line == "$dumpvars":
            in_dump = True
            continue
        if line == "$end":
            in_dump = False
            continue
        if line[0] == "#":
            t = int(line[1:])
            check(t > last, f"{name}: time #{t} strictly after #{last} (18.2: time-ordered section)")
            last = t
            times.append(t)
            continue
        check(line[0] in "01xz" and line[1:] in codes, f"{name}: scalar change {line!r} of a declared code")
        if in_dump:
            dumped.add(line[1:])
    check(times[:1] == [0], f"{name}: the dump starts at #0")
    check(dumped == codes, f"{name}: $dumpvars gives every variable a value")
    # The timescale is the design's, the same under every corner (README "VCD"),
    # so it need not be the coarsest for this one run's times: that check was
    # dropped when the per-run choice went; vcd_timescale.py checks the choice.
    return scale, [t * scale for t in times] if scale else []


def final_changes(path):
    """Top-scope variables changed at the last timestamp of our own VCD."""
    text = open(path).read()
    head, _, body = text.partition("$enddefinitions $end")
    top = re.search(r"\$scope\s+module\s+\S+\s+\$end(.*?)(\$scope|\$upscope)", head, re.S).group(1)
    names = dict(re.findall(r"\$var\s+wire\s+1\s+(\S+)\s+(\S+)\s+\$end", top))
    last = body.rstrip("\n").rsplit("\n#", 1)[-1].split("\n")[1:]
    changed = {names[l[1:]]: 1 for l in last if l[1:] in names}
    values = {names[l[1:]]: l[0] for l in last if l[1:] in names}
    return changed, values


def read_sigrok(path):
    """Changes per channel name as sigrok-cli's VCD input reads them (x reads as 0)."""
    p = subprocess.run(["sigrok-cli", "-I", "vcd", "-i", path, "-O", "vcd"], capture_output=True, text=True, timeout=120)
    check(p.returncode == 0, f"sigrok-cli reads {path} ({p.stderr.strip()})")
    out = p.stdout
    # sigrok-cli writes its own timescale, possibly with decimals ("0.001 ps").
    ts = re.search(r"\$timescale\s*([\d.]+)\s*(s|ms|us|ns|ps|fs)\s*\$end", out)
    check(ts is not None, f"sigrok-cli output for {path} has a timescale")
    scale = Fraction(ts.group(1)) * UNITS[ts.group(2)] if ts else 1
    names = {}
    for code, ref in re.findall(r"\$var\s+wire\s+1\s+(\S+)\s+(\S+)\s+\$end", out):
        names[code] = ref
    trace = {ref: [] for ref in names.values()}
    dup = len(set(names.values())) != len(names)
    for line in out.split("\n"):
        if not line.startswith("#"):
            continue
        toks = line.split()
        t = int(Fraction(int(toks[0][1:])) * scale)
        for tok in toks[1:]:
            if tok[1:] in names:
                trace[names[tok[1:]]].append((t, tok[0]))
    counts = {}
    for ref in names.values():
        counts[ref] = counts.get(ref, 0) + 1
    return trace, {r for r, c in counts.items() if c == 1}, dup


def value_at(changes, t):
    v = None
    for tc, val in changes:
        if tc <= t:
            v = val
    return v


def compare(design, extra, name):
    tmp = scratch("settle-vcd-")
    vcd, js = os.path.join(tmp, name + ".vcd"), os.path.join(tmp, name + ".json")
    p = subprocess.run([settle, "run", design, "--vcd", vcd, "--json", js, "-q", *extra], capture_output=True, text=True)
    check(p.returncode in (0, 1), f"{name}: run exits 0 or 1 ({p.returncode}, {p.stderr.strip()})")
    if not os.path.exists(vcd):
        return
    scale, times = check_structure(vcd, name)
    # sigrok-cli's VCD input is sample based: the last timestamp of a file ends
    # the capture, so a change written at that very instant has no sample.
    # Those changes, and only those, are taken from our own file.
    final = times[-1] if times else 0
    at_final, final_value = final_changes(vcd)
    j = json.load(open(js))
    trace, unique, _ = read_sigrok(vcd)
    compared = 0
    previous, prev_end = {}, 0
    for step in j["steps"]:
        for net, count in step["transitions"].items():
            leaf = net.split(".")[-1]
            end = step["values"][net]
            start = previous.get(net, "x")  # the value the step started from (x before step 1)
            if leaf not in unique or leaf != net or end == "x":
                continue  # a name sigrok flattens ambiguously, or x (sigrok-cli reads x as 0)
            # A step's transitions count from the end of the step before (free-running
            # parts keep changing in the gap before the step's input changes).
            got = len([c for c in trace[leaf] if prev_end < c[0] <= step["end_fs"]])
            got += at_final.get(leaf, 0) if step["end_fs"] >= final else 0
            # sigrok-cli (Debian package sigrok-cli) against our JSON: transitions of
            # binary stretches, and the value at the end of every step.
            if start != "x":
                check(got == count, f"{name} step {step['index']} {net}: sigrok {got} changes, JSON {count}")
            seen = value_at(trace[leaf], step["end_fs"])
            if step["end_fs"] >= final and leaf in final_value:
                seen = final_value[leaf]
            check(seen == end, f"{name} step {step['index']} {net}: sigrok value {seen}, JSON {end}")
            compared += 1
        previous, prev_end = step["values"], step["end_fs"]
    check(compared > 0, f"{name}: at least one net compared with sigrok-cli")
    print(f"{name}: {compared} (step, net) pairs agree with sigrok-cli, timescale {scale} fs")


data = os.path.join(src, "tests", "data")
compare(os.path.join(data, "lamp_panel.settle"), ["--corner", "min"], "lamp_panel_min")
compare(os.path.join(data, "lamp_panel.settle"), ["--corner", "random:7"], "lamp_panel_random7")
compare(os.path.join(data, "lamp_panel.settle"), ["--corner", "max", "--vcd-nets", "outputs"], "lamp_panel_outputs")
compare(os.path.join(data, "lamp_panel.settle"), ["--stim", os.path.join(data, "lamp_panel_blink.stim"),
                                                   "--corner", "typ"], "lamp_panel_blink")
for ex in ("debounce.settle", "strobe_pulse.settle", "fifo_stage.settle", "delay_ring.settle"):
    path = os.path.join(src, "examples", ex)
    if os.path.exists(path):
        compare(path, ["--corner", "max"], ex.split(".")[0])

print("vcd_sigrok:", "FAILED" if failures else "ok", f"({len(failures)} failures)")
sys.exit(1 if failures else 0)
