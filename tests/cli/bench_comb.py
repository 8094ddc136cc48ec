#!/usr/bin/python3
# Combinational ISCAS-85 circuits: settled outputs after random input vectors equal a sympy evaluation.
#
# Called by ctest as: bench_comb.py <settle binary> <source dir>. Exit 77 = skipped.
# Circuits: ISCAS-85 (Brglez and Fujiwara 1985), from tests/data/iscas.
# Reference: Debian's python3-sympy (sympy.logic.boolalg And, Or, Not, Xor, Nand, Nor,
# Xnor), built from the same file, evaluated with zero delay by `subs` of each vector.
# Whatever the gate delays, a combinational circuit settles to its Boolean function of
# the inputs (common practice), so every corner must agree with the zero-delay values.
import os
import random
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, failures, iscas_dir, json_steps, write_file  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), sys.argv[2]
iscas = iscas_dir(src)  # tests/data/iscas; fails without it
sys.path.insert(0, os.path.join(src, "scripts"))
from bench_reference import Circuit  # noqa: E402 (reads the file's lines; no evaluation)
from sympy import And, Nand, Nor, Not, Or, Symbol, Xor, false, true  # noqa: E402
from sympy.logic.boolalg import Xnor  # noqa: E402

OPS = {"AND": And, "OR": Or, "NAND": Nand, "NOR": Nor, "XOR": Xor, "XNOR": Xnor}
CIRCUITS = ["c17", "c432", "c499", "c880", "c1355", "c1908"]
VECTORS = 8


def random_vector(inputs, k):
    """Uniform vectors, and sparse, one-hot and dense ones, which reach the parts a
    uniform vector seldom does (the single-error correction of c499 and c1355 fires
    only when the syndrome matches one column)."""
    if k % 4 == 1:
        hot = rng.randrange(len(inputs))
        return {x: int(j == hot) for j, x in enumerate(inputs)}
    density = {0: 0.5, 2: 0.1, 3: 0.9}[k % 4]
    return {x: int(rng.random() < density) for x in inputs}


def sympy_model(c):
    """Each net's sympy expression over the nets it reads, in evaluation order. Composing
    whole output expressions over the inputs is exact too but takes minutes on c432."""
    sym = {}

    def s(net):
        return sym.setdefault(net, Symbol(net))

    order = c.order()
    expr = {}
    for net in order:
        kind, args = c.gates[net]
        a = [s(x) for x in args]
        expr[net] = Not(a[0]) if kind == "NOT" else a[0] if kind == "BUFF" else OPS[kind](*a)
    return order, sym, expr


def sympy_eval(c, model, vec):
    order, sym, expr = model
    val = {i: (true if vec[i] else false) for i in c.inputs}
    for net in order:
        r = expr[net].subs({sym[x]: val[x] for x in c.gates[net][1]})
        if r not in (true, false):
            raise RuntimeError(f"sympy left {net} = {r}")
        val[net] = r
    return {o: "1" if val[o] == true else "0" for o in c.outputs}


def whole_function_eval(c, vec):
    """For c17 only: the outputs as whole expressions of the inputs, then one subs."""
    e = {i: Symbol(i) for i in c.inputs}
    for net in c.order():
        kind, args = c.gates[net]
        a = [e[x] for x in args]
        e[net] = Not(a[0]) if kind == "NOT" else a[0] if kind == "BUFF" else OPS[kind](*a)
    subst = {e[i]: (true if vec[i] else false) for i in c.inputs}
    return {o: "1" if e[o].subs(subst) == true else "0" for o in c.outputs}


rng = random.Random(20240611)
with tempfile.TemporaryDirectory() as tmp:
    for name in CIRCUITS:
        path = os.path.join(iscas, name + ".bench")
        c = Circuit(path)
        model = sympy_model(c)
        vectors = [random_vector(c.inputs, k) for k in range(VECTORS)]
        lines = ["stimulus {"]
        for k, vec in enumerate(vectors):
            assigns = ", ".join(f"{i} = {vec[i]}" for i in c.inputs)
            lines.append(("    at 0ns " if k == 0 else "    after 10ns ") + assigns)
            lines.append("    settle")
        lines.append("}")
        stim = write_file(tmp, name + ".stim", "\n".join(lines) + "\n")
        want = [sympy_eval(c, model, v) for v in vectors]
        if name == "c17" and want != [whole_function_eval(c, v) for v in vectors]:
            fail("c17: gate-by-gate and whole-expression sympy evaluations disagree")
        for corner in ("min", "max", f"random:{rng.randint(1, 10**6)}"):
            steps = json_steps(settle, ["run", path, "--stim", stim, "--corner", corner, "--json", "-", "-q"],
                               f"{name} {corner}")
            if steps is None:
                continue
            if len(steps) != VECTORS:
                fail(f"{name} {corner}: {len(steps)} steps, expected {VECTORS}")
                continue
            for k, (step, ref) in enumerate(zip(steps, want)):
                if step.get("status") != "settled":
                    fail(f"{name} {corner} vector {k}: status {step.get('status')}")
                got = {o: step.get("values", {}).get(o) for o in c.outputs}
                bad = [o for o in c.outputs if got[o] != ref[o]]
                if bad:
                    fail(f"{name} {corner} vector {k}: {len(bad)} outputs differ from sympy, e.g. "
                         f"{bad[0]} = {got[bad[0]]!r}, sympy {ref[bad[0]]}")
        print(f"{name}: {VECTORS} vectors x 3 corners, {len(c.outputs)} outputs each")

print(f"{len(failures)} failures")
sys.exit(1 if failures else 0)
