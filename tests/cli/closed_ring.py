#!/usr/bin/python3
# A ring of Muller C-elements holding tokens, driven by nothing but its initial state: its period
# gauge equals the maximum cycle mean of the ring's timed marked graph, computed here with
# networkx (Debian python3-networkx) by enumerating the graph's simple cycles.
#
# The marked graph (Commoner, Holt, Even and Pnueli 1971; timed: Ramamoorthy and Ho 1980) has
# one transition per edge of each net. A C-element y = c(a, b) contributes arcs a+ -> y+ and
# a- -> y- for each input (Muller and Bartky 1959: the output follows once all inputs agree); an
# inverter y = not(a) contributes a+ -> y- and a- -> y+. Each arc's delay is that of the gate it
# enters, and it holds a token when the initial state has made its source edge and not yet its
# target edge. The steady cycle time is the maximum over cycles of the sum of the delays over the
# tokens on the cycle (Ramamoorthy and Ho 1980; Karp 1978 computes the same figure).
#
# Called by ctest as: closed_ring.py <settle binary> <source dir>. Exit 77 = skipped.
import os
import sys

import networkx as nx

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, run_cases, write_file  # noqa: E402
from closed_loop import by_name, report  # noqa: E402

# Delay ranges in ps of the seven C-elements and of the inverters on their next-stage inputs
# (demo values of our own).
CELEM = [(40, 60), (45, 75), (50, 70), (42, 58), (55, 65), (60, 90), (35, 45)]
INV = [(10, 20), (12, 18), (15, 25), (11, 19), (14, 16), (20, 30), (9, 13)]
N = len(CELEM)


def at_corner(rng, corner):
    """A range's delay in fs at a fixed corner: typ is the midpoint rounded down to a whole fs
    (parser/LANGUAGE.md, Delays)."""
    lo, hi = rng[0] * 1000, rng[1] * 1000
    return {"min": lo, "max": hi, "typ": (lo + hi) // 2}[corner]


def gates(corner):
    """{output: (kind, inputs, delay_fs)} of the ring: stage i copies stage i-1 once stage i+1 is
    empty, x_i = c(x_{i-1}, nx_{i+1}), nx_j = not(x_j)."""
    g = {}
    for i in range(N):
        g[f"x{i}"] = ("c", [f"x{(i - 1) % N}", f"nx{(i + 1) % N}"], at_corner(CELEM[i], corner))
        g[f"nx{i}"] = ("not", [f"x{i}"], at_corner(INV[i], corner))
    return g


def initial(stages):
    v = {}
    for i, b in enumerate(stages):
        v[f"x{i}"], v[f"nx{i}"] = b, 1 - b
    return v


def max_cycle_mean(corner, init):
    graph = nx.DiGraph()
    for y, (kind, ins, d) in gates(corner).items():
        for a in ins:
            for va in (0, 1):
                vy = va if kind == "c" else 1 - va
                token = 1 if init[a] == va and init[y] != vy else 0
                graph.add_edge((a, va), (y, vy), delay=d, tokens=token)
    best = 0.0
    for cycle in nx.simple_cycles(graph):
        arcs = list(zip(cycle, cycle[1:] + cycle[:1]))
        delay = sum(graph[u][v]["delay"] for u, v in arcs)
        tokens = sum(graph[u][v]["tokens"] for u, v in arcs)
        if tokens == 0:  # a cycle without tokens can never fire: the ring would be dead
            fail(f"marked graph: cycle {cycle} holds no token")
            continue
        best = max(best, delay / tokens)
    return best


def design(stages):
    lines = ["# a self-timed ring of C-elements started from its initial state alone", "output x0"]
    lines.append("wire " + ", ".join([f"x{i}" for i in range(1, N)] + [f"nx{i}" for i in range(N)]))
    for y, (kind, ins, _) in gates("typ").items():
        i = int(y.lstrip("nx"))
        rng = CELEM[i] if kind == "c" else INV[i]
        lines.append(f"{y} = {kind}({', '.join(ins)}) delay {rng[0]}ps..{rng[1]}ps")
    init = initial(stages)
    lines.append("init " + ", ".join(f"{k} = {v}" for k, v in init.items()))
    lines += ["stimulus {", "    run 6ns", "    gauge lap = period of x0", "    run 60ns", "}", ""]
    return "\n".join(lines)


def ring(binary, tmp):
    for stages, exact in (([1, 0, 0, 0, 0, 0, 0], True), ([1, 0, 0, 1, 0, 0, 0], False)):
        path = write_file(tmp, "ring_" + "".join(map(str, stages)) + ".settle", design(stages))
        for corner in ("min", "typ", "max"):
            lam = max_cycle_mean(corner, initial(stages))
            rc, doc = report(binary, ["run", path, "--corner", corner], f"ring {stages} at {corner}", want_rc=0)
            g = by_name((doc or {}).get("gauges"), "name", "lap")
            count = g.get("count") or 0
            if count < 50:
                fail(f"ring {stages} at {corner}: gauge {g}, want at least 50 periods in 60ns")
                continue
            if exact:
                # One cycle is critical and every lap takes exactly its mean.
                for k in ("min_fs", "mean_fs", "max_fs"):
                    check(g.get(k) == lam, f"ring {stages} at {corner}: {k} {g.get(k)}, want {lam} fs")
            else:
                # Several tokens share the critical cycle: laps alternate about the mean, which
                # the average over `count` laps meets to within the spread of a part-block of at
                # most two laps (the ring's laps repeat in threes), over the count.
                tol = 2 * (g["max_fs"] - g["min_fs"]) / count + 1
                check(g["min_fs"] <= lam <= g["max_fs"] and abs(g["mean_fs"] - lam) <= tol,
                      f"ring {stages} at {corner}: laps {g['min_fs']}..{g['max_fs']} mean {g['mean_fs']} fs, "
                      f"want about the maximum cycle mean {lam:.1f} fs (within {tol:.1f})")


if __name__ == "__main__":
    sys.exit(run_cases([ring], "settle-closed-ring-"))
