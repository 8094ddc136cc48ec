"""A small reference model of a closed system, of our own, for the explorer's tests: the gate
kinds' Boolean functions (common practice; the C-element's hold, Muller and Bartky 1959) and the
single-firing state graph of circuit and rules, with its successor relation read off the rule
semantics in parser/LANGUAGE.md ("Reaction rules"): one excited gate fires or one pending firing
applies; then every rule whose condition turned from false to true, and which has scheduled fewer
than `times` firings, schedules one more. Graphs and reachability by networkx (Debian
python3-networkx).

A system is any object with: gates (names), kind and fanin (dicts by gate), inputs (names), init
(gate -> 0/1, the start with every input 0, quiet), and rules (dicts: lits [(net, 0/1)] whose
conjunction is the condition, net, value, times)."""


def evaluate(kind, ins, present):
    """The gate kinds' Boolean functions; the C-element follows agreeing inputs and holds."""
    if kind == "not":
        return 1 - ins[0]
    if kind == "buf":
        return ins[0]
    if kind == "c":
        return ins[0] if all(x == ins[0] for x in ins) else present
    a, b = ins
    return {"and": a & b, "or": a | b, "nand": 1 - (a & b), "nor": 1 - (a | b), "xor": a ^ b}[kind]


def excited(sys_, v):
    return {g for g in sys_.gates if evaluate(sys_.kind[g], [v[x] for x in sys_.fanin[g]], v[g]) != v[g]}


def reference_graph(sys_):
    """(networkx DiGraph of the reachable states, start, names). A state is (values in `names`
    order, pending firings per rule, scheduled firings per rule); an edge carries `fired`, the
    gate name or the rule number (1-based) that moved."""
    import networkx as nx
    names = list(sys_.gates) + list(sys_.inputs)

    def cond(r, v):
        return all(v[n] == want for n, want in r["lits"])

    def after(v, pend, sched, before):
        pend, sched = list(pend), list(sched)
        for k, r in enumerate(sys_.rules):
            if not cond(r, before) and cond(r, v) and sched[k] < r["times"]:
                pend[k] += 1
                sched[k] += 1
        return tuple(v[n] for n in names), tuple(pend), tuple(sched)

    v0 = {**{i: 0 for i in sys_.inputs}, **sys_.init}
    # At the rules' line a rule whose condition already holds triggers (LANGUAGE.md).
    pend0 = tuple(1 if cond(r, v0) else 0 for r in sys_.rules)
    start = (tuple(v0[n] for n in names), pend0, pend0)
    g = nx.DiGraph()
    g.add_node(start)
    todo = [start]
    while todo:
        st = todo.pop()
        v = dict(zip(names, st[0]))
        succ = []
        for gate in sorted(excited(sys_, v)):
            w = dict(v)
            w[gate] = 1 - v[gate]
            succ.append((gate, after(w, st[1], st[2], v)))
        for k, r in enumerate(sys_.rules):
            if st[1][k]:
                w = dict(v)
                w[r["net"]] = r["value"]
                pend = list(st[1])
                pend[k] -= 1
                succ.append((k + 1, after(w, pend, st[2], v)))
        for fired, t in succ:
            if t not in g:
                todo.append(t)
            g.add_edge(st, t, fired=fired)
    return g, start, names


def reference_deadlocks(sys_):
    """The reachable deadlock states: no excited gate, no pending firing, a rule owed. Returns
    {(gate values as a string in sys_.gates order, input values as a tuple in sys_.inputs order)}."""
    import networkx as nx
    g, start, names = reference_graph(sys_)
    out = set()
    for st in nx.descendants(g, start) | {start}:
        v = dict(zip(names, st[0]))
        if not excited(sys_, v) and not any(st[1]) and any(st[2][k] < r["times"] for k, r in enumerate(sys_.rules)):
            out.add(("".join(str(v[x]) for x in sys_.gates), tuple(v[i] for i in sys_.inputs)))
    return out


def reference_nonpersistent(sys_):
    """Gates excited in a reachable state and no longer excited in a successor reached by
    another gate's or a rule's firing (Muller and Bartky 1959, semi-modularity)."""
    g, start, names = reference_graph(sys_)
    out = set()
    for st, t, fired in g.edges(data="fired"):
        before, after = excited(sys_, dict(zip(names, st[0]))), excited(sys_, dict(zip(names, t[0])))
        out |= {x for x in before - after if x != fired}
    return out


class parsed_system:
    """A system read from a .settle file of the plain subset the closed-system designs use: one
    `input` line, gates `NAME = KIND(A, B) delay ...` of the kinds above, one top-level `init`,
    every input set to 0 by the stimulus's first `at`, and rules `when L & ~L ... after R :
    NET = V times N` whose conditions are conjunctions of literals. Whatever else is refused."""

    def __init__(self, path):
        import re
        self.gates, self.kind, self.fanin, self.inputs, self.init, self.rules = [], {}, {}, [], {}, []
        for line in open(path):
            line = line.split("#")[0].strip()
            if m := re.fullmatch(r"input\s+(.*)", line):
                self.inputs = [x.strip() for x in m.group(1).split(",")]
            elif m := re.fullmatch(r"(\w+)\s*=\s*(\w+)\(([^)]*)\)\s+delay\s+\S+", line):
                self.gates.append(m.group(1))
                self.kind[m.group(1)] = m.group(2)
                self.fanin[m.group(1)] = [x.strip() for x in m.group(3).split(",")]
                evaluate(m.group(2), [0] * len(self.fanin[m.group(1)]), 0)  # refuses an unknown kind
            elif m := re.fullmatch(r"init\s+(.*)", line):
                for a in m.group(1).split(","):
                    n, v = (x.strip() for x in a.split("="))
                    self.init[n] = int(v)
            elif m := re.fullmatch(r"when\s+(.*?)\s+after\s+\S+\s*:\s*(\w+)\s*=\s*([01])\s+times\s+(\d+)", line):
                lits = [(x.strip().lstrip("~"), 0 if x.strip().startswith("~") else 1) for x in m.group(1).split("&")]
                self.rules.append(dict(lits=lits, net=m.group(2), value=int(m.group(3)), times=int(m.group(4))))
            elif line.startswith("when"):
                raise ValueError(f"{path}: a rule outside the plain subset: {line}")
        if sorted(self.init) != sorted(self.gates) or excited(self, {**{i: 0 for i in self.inputs}, **self.init}):
            raise ValueError(f"{path}: the init does not give every gate a value quiet with the inputs at 0")
