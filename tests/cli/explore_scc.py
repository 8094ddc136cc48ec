#!/usr/bin/python3
# `settle explore --dot --json`: the state graph it exports, read back and analysed with
# networkx (Debian python3-networkx), gives the figures the JSON reports.
#
# Called by ctest as: explore_scc.py <settle binary> <source dir>. Exit 77 = skipped.
# References: strongly connected and attracting components from networkx (Tarjan 1972 and
# the textbook definitions); the nontransient-cycle rule and stable states from Brzozowski
# and Seger, Asynchronous Circuits, 1995 (a cycle is transient when some gate stays excited
# and unchanged along it); hazards as in issue 4 (an output firing twice on some path).
import json
import os
import re
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, failures  # noqa: E402

try:
    import networkx as nx
except ImportError:
    print("SKIP: python3-networkx is not installed")
    sys.exit(77)

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
designs = ["tests/data/explore_contacts.settle", "tests/data/explore_handshake.settle",
           "tests/data/explore_monitor_ring.settle", "examples/arbiter.settle", "examples/delay_ring.settle",
           "examples/fifo_stage.settle", "examples/debounce.settle", "examples/strobe_pulse.settle"]
NODE = re.compile(r'^\s*(s(\d+)_\d+) \[label="([01]*)"(.*)\];$')
EDGE = re.compile(r'^\s*(s(\d+)_\d+) -> (s\d+_\d+) \[label="([^"]*)"\];$')


def read_dot(path):
    graphs, bits, starts = {}, {}, set()
    with open(path) as f:
        for line in f:
            m = NODE.match(line)
            if m:
                graphs.setdefault(int(m.group(2)), nx.DiGraph()).add_node(m.group(1))
                bits[m.group(1)] = m.group(3)
                if "style=bold" in m.group(4):
                    starts.add(m.group(1))
                continue
            m = EDGE.match(line)
            if m:
                graphs[int(m.group(2))].add_edge(m.group(1), m.group(3), fired=set(m.group(4).split(",")))
    return graphs, bits, starts


def nontransient(g, comp):
    always = None
    inside = set()
    for v in comp:
        excited = set()
        for _, w, d in g.out_edges(v, data=True):
            excited |= d["fired"]
            if w in comp:
                inside |= d["fired"]
        always = excited if always is None else always & excited
    return always <= inside


def hazard(g, starts, gate):
    cond = nx.condensation(g)
    member = cond.graph["mapping"]
    best = {}
    for c in nx.topological_sort(cond):
        comp = cond.nodes[c]["members"]
        here = best.get(c, 0 if any(v in starts for v in comp) else None)
        if here is None:
            continue
        if any(gate in d["fired"] for u, w, d in g.subgraph(comp).edges(data=True)):
            here = 2
        best[c] = here
        for v in comp:
            for _, w, d in g.out_edges(v, data=True):
                t = member[w]
                if t != c:
                    best[t] = max(best.get(t, 0), min(2, here + (gate in d["fired"])))
    return any(x >= 2 for x in best.values())


checked = 0
with tempfile.TemporaryDirectory() as tmp:
    for rel in designs:
        dot, js = os.path.join(tmp, "g.dot"), os.path.join(tmp, "r.json")
        p = subprocess.run([settle, "explore", os.path.join(src, rel), "--dot", dot, "--json", js],
                           capture_output=True, text=True)
        if p.returncode not in (0, 1):
            fail(f"{rel}: exit {p.returncode}: {p.stderr.strip()}")
            continue
        with open(js) as f:
            r = json.load(f)
        graphs, bits, starts = read_dot(dot)
        order = r["state_order"]
        for step in r["steps"]:
            where = f"{rel} step {step['index']}"
            g = graphs.get(step["index"])
            if g is None or not step["complete"]:
                fail(f"{where}: no complete graph in the DOT file")
                continue
            sccs = [set(c) for c in nx.strongly_connected_components(g)]
            attracting = [set(c) for c in nx.attracting_components(g)]
            sinks = [v for v in g if g.out_degree(v) == 0]
            want = {"count": len(sccs), "nontrivial": sum(len(c) > 1 for c in sccs),
                    "terminal": len(attracting), "oscillating": sum(len(c) > 1 for c in attracting),
                    "largest": max(len(c) for c in sccs)}
            if step["sccs"] != want:
                fail(f"{where}: JSON sccs {step['sccs']} but networkx gives {want}")
            if step["states"] != g.number_of_nodes() or step["edges"] != g.number_of_edges():
                fail(f"{where}: {step['states']} states/{step['edges']} edges vs DOT {g.number_of_nodes()}/{g.number_of_edges()}")
            if sorted(s["state"] for s in step["stable"]) != sorted(bits[v] for v in sinks):
                fail(f"{where}: stable states differ from the graph's sinks")
            may = any(len(c) > 1 and nontransient(g, c) for c in sccs)
            if step["may_oscillate"] != may:
                fail(f"{where}: may_oscillate {step['may_oscillate']}, graph says {may}")
            if step["must_oscillate"] != any(len(c) > 1 for c in attracting):
                fail(f"{where}: must_oscillate disagrees with the attracting components")
            if step["critical_race"] != (len(sinks) > 1):
                fail(f"{where}: critical_race disagrees with the number of sinks")
            step_starts = {v for v in starts if v.startswith(f"s{step['index']}_")}
            if len(step_starts) != step["start_states"]:
                fail(f"{where}: {len(step_starts)} bold start states, JSON says {step['start_states']}")
            hz = sorted(net for net in step["ternary"] if net in order and hazard(g, step_starts, net))
            if hz != sorted(step["hazards"]):
                fail(f"{where}: hazards {step['hazards']} but the graph gives {hz}")
            # Ternary soundness (Brzozowski and Seger 1995): binary ternary values hold in every stable state.
            for s in step["stable"]:
                for net, v in step["ternary"].items():
                    if v != "x" and s["values"][net] != v:
                        fail(f"{where}: ternary {net}={v} but a stable state has {s['values'][net]}")
            checked += 1

if checked < 25:
    fail(f"only {checked} steps compared")
print(f"{checked} steps compared with networkx")
sys.exit(1 if failures else 0)
