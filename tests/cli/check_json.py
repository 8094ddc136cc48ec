#!/usr/bin/python3
"""settle check: counts and feedback loops, cross-checked with python3-networkx and the ISCAS files."""
import csv
import json
import os
import re
import subprocess
import sys

import networkx as nx  # Debian python3-networkx

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, iscas_dir  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]


def check_json(path, *extra):
    p = subprocess.run([settle, "check", path, "--json", "-", *extra], capture_output=True, text=True, timeout=300)
    check(p.returncode == 0, f"check {path} exits 0 ({p.stderr.strip()[:300]})")
    return json.loads(p.stdout) if p.returncode == 0 else {}


KINDS = {"not", "buf", "and", "or", "nand", "nor", "xor", "xnor", "mux", "maj", "c", "gc"}
WORDS = KINDS | {"delay", "rise", "fall", "transport", "set", "reset", "syncff", "tau", "window"}


def settle_gates(path):
    """Flat gate list {output: [inputs]} of a .settle file, elaborated by hand here
    (blocks with named port binding, inner nets named inst.net) from issue 2's rules."""
    blocks, top, cur = {}, [], None
    for raw in open(path):
        line = raw.split("#", 1)[0].strip()
        if not line:
            continue
        m = re.match(r"block\s+(\w+)\s*\((.*)\)\s*\{", line)
        if m:
            ports = re.findall(r"\w+", m.group(2).replace("in ", " ").replace("out ", " "))
            cur = blocks[m.group(1)] = {"ports": [p for p in ports if p not in ("in", "out")], "lines": []}
            continue
        if line == "}" and cur is not None:
            cur = None
            continue
        if line.startswith("stimulus"):
            break
        (cur["lines"] if cur is not None else top).append(line)

    gates = {}

    def elaborate(lines, rename):
        for line in lines:
            m = re.match(r"inst\s+(\w+)\s+(\w+)\s*\((.*)\)", line)
            if m:
                inst, blk, binds = m.groups()
                b = dict(re.findall(r"(\w+)\s*:\s*([\w.]+)", binds))
                inner = lambda n, inst=inst, b=b: rename(b[n]) if n in b else f"{rename(inst)}.{n}"
                elaborate(blocks[blk]["lines"], inner)
                continue
            # `ga, gb = mutex(ra, rb) ...`: each grant reads both requests and the other grant
            # (parser/LANGUAGE.md, metastable elements)
            m = re.match(r"([\w.]+)\s*,\s*([\w.]+)\s*=\s*mutex\s*\(\s*([\w.]+)\s*,\s*([\w.]+)\s*\)", line)
            if m:
                ga, gb, ra, rb = (rename(w) for w in m.groups())
                gates[ga], gates[gb] = [ra, rb, gb], [rb, ra, ga]
                continue
            m = re.match(r"([\w.]+)\s*=\s*(.*)", line)
            if m and not re.match(r"(input|output|wire|init|default)\b", line):
                rhs = re.split(r"\b(delay|rise|transport)\b", m.group(2))[0]
                ins = [w for w in re.findall(r"\b[A-Za-z_][\w.]*\b", rhs) if w not in WORDS]
                gates[rename(m.group(1))] = [rename(w) for w in ins]

    elaborate(top, lambda n: n)
    return gates


def nx_loops(gates):
    """Non-trivial SCCs of the gate graph (a gate reading itself counts), by networkx."""
    g = nx.DiGraph()
    g.add_nodes_from(gates)
    for out, ins in gates.items():
        for i in ins:
            if i in gates:
                g.add_edge(i, out)
    loops = [sorted(c) for c in nx.strongly_connected_components(g) if len(c) > 1 or any(g.has_edge(n, n) for n in c)]
    loops.sort(key=lambda c: (-len(c), c[0]))
    return loops


# 1. Our test design: counts, and loops against networkx.
design = os.path.join(src, "tests", "data", "lamp_panel.settle")
j = check_json(design)
gates = settle_gates(design)
check(j.get("tool") == "settle" and isinstance(j.get("version"), str), "check JSON has tool and version")
for key in ("design", "blocks", "instances", "gates", "nets", "inputs", "outputs", "by_kind", "loops"):
    check(key in j, f"check JSON has {key}")
check(j.get("gates") == len(gates), f"gate count {j.get('gates')} = {len(gates)} gate lines")
check(sum(j.get("by_kind", {}).values()) == j.get("gates"), "by_kind sums to gates")
check(j.get("blocks") == 1 and j.get("instances") == 1, "one block, one instance")
check(j.get("inputs") == 4 and j.get("outputs") == 2, "four inputs, two outputs as declared")
check(j.get("nets") == 14, f"14 nets: 4 inputs, 2 outputs, 8 wires; ports alias their nets ({j.get('nets')})")
want = nx_loops(gates)
got = j.get("loops", [])
check([l["size"] for l in got] == [len(c) for c in want], f"loop sizes {[l['size'] for l in got]} vs networkx {[len(c) for c in want]}")
for l, c in zip(got, want):
    check(l["nets"] == c[:4], f"loop members {l['nets']} vs networkx {c[:4]}")

# The human summary shows the same loops.
p = subprocess.run([settle, "check", design], capture_output=True, text=True)
check(p.returncode == 0 and "loops      3" in p.stdout and "nand 3" in p.stdout, "human summary of lamp_panel")

# 2. Every example: loops against networkx on the same file.
ex_dir = os.path.join(src, "examples")
for name in sorted(os.listdir(ex_dir)) if os.path.isdir(ex_dir) else []:
    if not name.endswith(".settle"):
        continue
    path = os.path.join(ex_dir, name)
    j = check_json(path)
    want = nx_loops(settle_gates(path))
    check([(l["size"], l["nets"]) for l in j.get("loops", [])] == [(len(c), c[:4]) for c in want],
          f"{name}: loops {j.get('loops')} vs networkx {[c[:4] for c in want]}")

# 3. ISCAS netlists (Brglez and Fujiwara 1985; Brglez, Bryan and Kozminski 1989):
# header counts against stats.csv, and the combinational ISCAS-85 circuits are
# acyclic (networkx finds no cycle in the .bench gate graph; settle reports none).
iscas = iscas_dir(src, must_hold="stats.csv")  # tests/data/iscas; fails without it
stats = {r["name"]: r for r in csv.DictReader(open(os.path.join(iscas, "stats.csv")))}
checked = 0
for circuit in ("c17", "c432", "c880", "s27", "s298"):
    path = os.path.join(iscas, circuit + ".bench")
    check(os.path.exists(path), f"{circuit}: {path} is in the project's ISCAS copy")
    if not os.path.exists(path):
        continue
    j = check_json(path)
    s = j.get("source", {})
    row = stats.get(circuit)
    if row:
        for key, col in (("inputs", "inputs"), ("outputs", "outputs"), ("dffs", "dffs"),
                         ("inverters", "inverters"), ("buffers", "buffs"), ("gates", "gates")):
            check(str(s.get(key)) == row[col], f"{circuit}: source {key} {s.get(key)} vs stats.csv {row[col]}")
        checked += 1
    if circuit.startswith("c"):
        g = nx.DiGraph()
        for line in open(path):
            m = re.match(r"\s*(\S+)\s*=\s*\w+\((.*)\)", line)
            if m:
                for i in m.group(2).split(","):
                    g.add_edge(i.strip(), m.group(1))
        check(nx.is_directed_acyclic_graph(g), f"{circuit}: networkx finds the netlist acyclic")
        check(j.get("loops") == [], f"{circuit}: settle reports no loops")

print(f"ISCAS: {checked} circuits against stats.csv")
print("check_json:", "FAILED" if failures else "ok", f"({len(failures)} failures)")
sys.exit(1 if failures else 0)
