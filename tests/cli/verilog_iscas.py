#!/usr/bin/python3
# ISCAS circuits converted to structural Verilog read like their .bench originals.
#
# Called by ctest as: verilog_iscas.py <settle binary> <source dir>. Exit 77 = skipped.
# Circuits: ISCAS-85 (Brglez and Fujiwara 1985) and ISCAS-89 (Brglez, Bryan and Kozminski
# 1989), from tests/data/iscas, with their published line counts in stats.csv. Each .bench file
# is turned into IEEE 1364-2005 structural Verilog by the converter below (gate primitives,
# clause 7; a flip-flop becomes an instance of a module of six NAND primitives, the same
# positive-edge-triggered D flip-flop the .bench importer builds, METHODS.md section 7).
# Checks: `settle check --json` of the Verilog equals that of the .bench reading and the
# stats.csv figures; `settle run` under the same random input vectors gives the same settled
# outputs for both readings (combinational circuits; the sequential ones start from the
# importer's reset state, which a structural netlist does not state).
import csv
import json
import os
import random
import re
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, failures, iscas_dir, json_steps, run_settle, write_file  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
iscas = iscas_dir(src)  # tests/data/iscas; fails without it
COMBINATIONAL = ["c17", "c432", "c880"]
SEQUENTIAL = ["s27", "s298"]
VECTORS = 8

PRIMITIVE = {"AND": "and", "OR": "or", "NAND": "nand", "NOR": "nor", "NOT": "not", "BUFF": "buf",
             "BUF": "buf", "XOR": "xor", "XNOR": "xnor"}

# The flip-flop as six NAND gates (three set/reset latches, the TTL '74 logic without preset
# and clear; common practice), written as a module of its own.
FLIP_FLOP = """module ff_nand6 (d, ck, q);
  input d, ck;
  output q;
  wire n1, n2, n3, n4, qb;
  nand (n1, n4, n2);
  nand (n2, n1, ck);
  nand (n3, n2, ck, n4);
  nand (n4, n3, d);
  nand (q, n2, qb);
  nand (qb, n3, q);
endmodule
"""


def read_bench(path):
    """The file's INPUT, OUTPUT and gate lines (the ISCAS format: one statement a line, # comments)."""
    inputs, outputs, gates = [], [], []
    for raw in open(path, encoding="ascii"):
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        m = re.fullmatch(r"(INPUT|OUTPUT)\s*\(\s*(\S+)\s*\)", line, re.I)
        if m:
            (inputs if m.group(1).upper() == "INPUT" else outputs).append(m.group(2))
            continue
        m = re.fullmatch(r"(\S+)\s*=\s*(\w+)\s*\((.*)\)", line)
        gates.append((m.group(1), m.group(2).upper(), [a.strip() for a in m.group(3).split(",")]))
    return inputs, outputs, gates


def to_verilog(name, inputs, outputs, gates):
    """Structural Verilog of a .bench circuit: one primitive per gate line, an ff_nand6 instance
    per DFF line, and the generated clock CK as an extra input when there are flip-flops."""
    has_ff = any(k == "DFF" for _, k, _ in gates)
    ports = inputs + (["CK"] if has_ff else []) + [o for o in outputs if o not in inputs]
    lines = ["// converted from the ISCAS .bench netlist by tests/cli/verilog_iscas.py",
             "`timescale 1ps/1ps", f"module {name} ({', '.join(ports)});"]
    lines.append(f"  input {', '.join(inputs + (['CK'] if has_ff else []))};")
    lines.append(f"  output {', '.join(outputs)};")
    declared = set(inputs) | set(outputs)
    wires = [out for out, _, _ in gates if out not in declared]
    for i in range(0, len(wires), 16):
        lines.append(f"  wire {', '.join(wires[i:i + 16])};")
    for k, (out, kind, args) in enumerate(gates):
        if kind == "DFF":
            lines.append(f"  ff_nand6 ff_{out} (.d({args[0]}), .ck(CK), .q({out}));")
        else:
            lines.append(f"  {PRIMITIVE[kind]} g{k} ({', '.join([out] + args)});")
    lines.append("endmodule")
    return "\n".join(lines) + "\n" + (FLIP_FLOP if has_ff else "")


def check_json(path):
    rc, out, err = run_settle(settle, "check", path, "--json", "-")
    if rc != 0:
        fail(f"check {os.path.basename(path)}: exit {rc}: {err[-400:]}")
        return None
    return json.loads(out)


with open(os.path.join(iscas, "stats.csv"), newline="") as f:
    stats = {row["name"]: row for row in csv.DictReader(f)}

rng = random.Random(19851989)
with tempfile.TemporaryDirectory() as tmp:
    for name in COMBINATIONAL + SEQUENTIAL:
        bench = os.path.join(iscas, name + ".bench")
        inputs, outputs, gates = read_bench(bench)
        vpath = write_file(tmp, name + ".v", to_verilog(name, inputs, outputs, gates))
        b, v = check_json(bench), check_json(vpath)
        if b is None or v is None:
            continue
        # Both readings of one netlist: the same flat design.
        for field in ("gates", "nets", "inputs", "outputs", "by_kind"):
            check(v[field] == b[field], f"{name}: check '{field}' is {v[field]} for the Verilog, "
                                        f"{b[field]} for the .bench reading")
        check(len(v["loops"]) == len(b["loops"]), f"{name}: {len(v['loops'])} loops, .bench {len(b['loops'])}")
        check(v.get("source", {}).get("format") == "verilog", f"{name}: source.format {v.get('source')}")
        # The published figures (stats.csv: Brglez and Fujiwara 1985; Brglez, Bryan and
        # Kozminski 1989). A flip-flop is six NAND gates and adds the clock input CK.
        s = {k: int(s) for k, s in stats[name].items() if k in ("inputs", "outputs", "dffs", "gates",
                                                                  "inverters", "buffs")}
        check(v["inputs"] == s["inputs"] + (1 if s["dffs"] else 0), f"{name}: inputs {v['inputs']}, stats {s}")
        check(v["outputs"] == s["outputs"], f"{name}: outputs {v['outputs']}, stats {s}")
        check(v["by_kind"].get("not", 0) == s["inverters"], f"{name}: not {v['by_kind']}, stats {s}")
        check(v["by_kind"].get("buf", 0) == s["buffs"], f"{name}: buf {v['by_kind']}, stats {s}")
        check(v["gates"] == s["gates"] + s["inverters"] + s["buffs"] + 6 * s["dffs"],
              f"{name}: {v['gates']} gates, stats {s}")
        check(v["instances"] == s["dffs"], f"{name}: {v['instances']} instances, {s['dffs']} flip-flops")
        if name in SEQUENTIAL:
            print(f"{name}: check counts agree")
            continue
        # The same random vectors for both readings; every settled output must agree.
        vectors = [{x: rng.randint(0, 1) for x in inputs} for _ in range(VECTORS)]
        stim = ["stimulus {"]
        for k, vec in enumerate(vectors):
            stim.append(("    at 0ns " if k == 0 else "    after 10ns ") + ", ".join(f"{x} = {vec[x]}" for x in inputs))
            stim.append("    settle")
        stim.append("}")
        stim_path = write_file(tmp, name + ".stim", "\n".join(stim) + "\n")
        for corner in ("min", "max"):
            runs = [json_steps(settle, ["run", p, "--stim", stim_path, "--corner", corner, "--json", "-", "-q"],
                               f"{name} {corner} {os.path.basename(p)}") for p in (bench, vpath)]
            if None in runs:
                continue
            check(len(runs[0]) == len(runs[1]) == VECTORS, f"{name} {corner}: step counts {len(runs[0])}, "
                                                           f"{len(runs[1])}")
            for k, (sb, sv) in enumerate(zip(*runs)):
                check(sb.get("status") == sv.get("status") == "settled",
                      f"{name} {corner} vector {k}: status {sb.get('status')} / {sv.get('status')}")
                got = {o: sv.get("values", {}).get(o) for o in outputs}
                want = {o: sb.get("values", {}).get(o) for o in outputs}
                check(got == want and None not in got.values(),
                      f"{name} {corner} vector {k}: Verilog outputs {got}, .bench {want}")
        print(f"{name}: check counts agree; {VECTORS} vectors x 2 corners give the same outputs")

print(f"{len(failures)} failures")
sys.exit(1 if failures else 0)
