#!/usr/bin/python3
"""Reference reading and zero-delay evaluation of ISCAS .bench netlists (Python standard library only).

Written from the format's meaning (Brglez and Fujiwara 1985, ISCAS-85; Brglez,
Bryan and Kozminski 1989, ISCAS-89): INPUT(x) and OUTPUT(y) lines, `y = KIND(a, ...)`
gate lines over AND OR NAND NOR NOT BUFF/BUF XOR XNOR, and DFF, a D flip-flop
whose output takes its input at each rising clock edge. It shares no code with
settle and is used by the tests in tests/cli/bench_*.py as an independent oracle.
"""
import random
import re
import sys

_IO = re.compile(r"^\s*(INPUT|OUTPUT)\s*\(\s*([^()\s,=]+)\s*\)\s*$", re.IGNORECASE)
_GATE = re.compile(r"^\s*([^()\s,=]+)\s*=\s*([A-Za-z]+)\s*\(([^()]*)\)\s*$")


class Circuit:
    """A parsed .bench file: inputs, outputs, gate lines {out: (KIND, [args])}, flip-flops {q: d}."""

    def __init__(self, path):
        self.inputs, self.outputs, self.gates, self.dffs = [], [], {}, {}
        with open(path, encoding="ascii") as f:
            for raw in f:
                line = raw.split("#", 1)[0].strip()
                if not line:
                    continue
                m = _IO.match(line)
                if m:
                    (self.inputs if m.group(1).upper() == "INPUT" else self.outputs).append(m.group(2))
                    continue
                m = _GATE.match(line)
                if not m:
                    raise ValueError(f"{path}: cannot read line {line!r}")
                out, kind = m.group(1), m.group(2).upper()
                args = [a.strip() for a in m.group(3).split(",")]
                if kind == "BUF":
                    kind = "BUFF"
                if kind == "DFF":
                    self.dffs[out] = args[0]
                else:
                    self.gates[out] = (kind, args)

    def order(self):
        """Gate outputs in an order where every gate follows the gates it reads."""
        done, seq = set(self.inputs) | set(self.dffs), []
        for root in self.gates:
            stack = [(root, False)]
            while stack:
                net, expanded = stack.pop()
                if net in done:
                    continue
                if expanded:
                    done.add(net)
                    seq.append(net)
                    continue
                stack.append((net, True))
                stack.extend((a, False) for a in self.gates[net][1] if a not in done)
        return seq


def _gate(kind, v):
    if kind == "AND":
        return int(all(v))
    if kind == "NAND":
        return int(not all(v))
    if kind == "OR":
        return int(any(v))
    if kind == "NOR":
        return int(not any(v))
    if kind == "XOR":
        return sum(v) % 2
    if kind == "XNOR":
        return 1 - sum(v) % 2
    if kind == "NOT":
        return 1 - v[0]
    if kind == "BUFF":
        return v[0]
    raise ValueError(f"unknown gate kind {kind}")


def evaluate(circuit, values, order=None):
    """Zero-delay values of every net from the inputs and flip-flop outputs in `values`."""
    v = dict(values)
    for net in order or circuit.order():
        kind, args = circuit.gates[net]
        v[net] = _gate(kind, [v[a] for a in args])
    return v


def clocked_run(circuit, vectors):
    """Cycle by cycle: every flip-flop starts at 0; for each input vector the
    outputs before the rising clock edge, the outputs after it (Q takes D at
    the edge) and the flip-flop outputs after it."""
    order = circuit.order()
    state = {q: 0 for q in circuit.dffs}
    rows = []
    for vec in vectors:
        v = evaluate(circuit, {**vec, **state}, order)
        before = {o: v[o] for o in circuit.outputs}
        state = {q: v[d] for q, d in circuit.dffs.items()}
        v = evaluate(circuit, {**vec, **state}, order)
        rows.append((before, {o: v[o] for o in circuit.outputs}, dict(state)))
    return rows


if __name__ == "__main__":
    # Prints the output sequence of a clocked run with seeded random inputs.
    c = Circuit(sys.argv[1])
    rng = random.Random(int(sys.argv[2]) if len(sys.argv) > 2 else 1)
    vecs = [{i: rng.randint(0, 1) for i in c.inputs} for _ in range(int(sys.argv[3]) if len(sys.argv) > 3 else 8)]
    for before, after, state in clocked_run(c, vecs):
        print(*("".join(str(m[n]) for n in names) for m, names in
                ((before, c.outputs), (after, c.outputs), (state, list(c.dffs)))))
