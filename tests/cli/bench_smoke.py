#!/usr/bin/python3
# Benchmark smoke test: every measurement of scripts/bench runs once on tiny designs and reports.
#
# Called by ctest as: bench_smoke.py <settle binary> <source dir>. Asserts nothing about time.
# When the Google Benchmark executable is built (-DSETTLE_BENCH=ON, <build>/bench/settle_bench),
# scripts/bench --tiny --no-build runs it and its JSON must hold every benchmark with its figure.
# Otherwise the same measurements go through the settle binary: run (events, wall_s, as issue 6
# asks of `run --json`), run --vcd, sweep at 1 and 2 threads, explore, and the s38417 run.
import json
import os
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import fail, failures, iscas_dir  # noqa: E402

settle, src = os.path.abspath(sys.argv[1]), os.path.abspath(sys.argv[2])
build = os.path.dirname(os.path.dirname(settle))
bench_bin = os.path.join(build, "bench", "settle_bench")
iscas = iscas_dir(src, must_hold="s38417.bench")  # tests/data/iscas; fails without it
s38417 = os.path.join(iscas, "s38417.bench")


def positive(doc, key, what):
    v = doc.get(key)
    if not isinstance(v, (int, float)) or v <= 0:
        fail(f"{what}: {key} = {v!r}, expected a positive number")


def gen(tmp, name, *args):
    path = os.path.join(tmp, name)
    subprocess.run([sys.executable, os.path.join(src, "scripts", "gen"), *args, "-o", path], check=True)
    return path


def settle_json(what, *args, ok=(0, 1)):
    """Runs settle with --json - and returns the parsed document (exit 1 = findings is fine here)."""
    p = subprocess.run([settle, *args, "--json", "-"], capture_output=True, text=True)
    if p.returncode not in ok:
        fail(f"{what}: exit {p.returncode}: {p.stderr.strip()[:400]}")
        return {}
    try:
        return json.loads(p.stdout)
    except json.JSONDecodeError as e:
        fail(f"{what}: output is not JSON ({e}): {p.stdout[:200]!r}")
        return {}


def with_bench_binary(tmp):
    out = os.path.join(tmp, "bench.json")
    env = dict(os.environ, BUILD_DIR=build)
    p = subprocess.run([sys.executable, os.path.join(src, "scripts", "bench"), "--tiny", "--no-build", "--json-only",
                        "--out", out, "--data", os.path.join(tmp, "designs")],
                       capture_output=True, text=True, env=env)
    print(p.stdout[-3000:])
    if p.returncode != 0:
        fail(f"scripts/bench --tiny exited {p.returncode}: {p.stderr.strip()[-600:]}")
    if not os.path.exists(out):
        fail("scripts/bench wrote no JSON")
        return
    with open(out) as f:
        doc = json.load(f)
    def by_name(name):  # Google Benchmark appends "/iterations:N/real_time" to the registered name
        return next((b for b in doc.get("benchmarks", []) if b["name"] == name or b["name"].startswith(name + "/")),
                    None)

    want = {
        "kernel/random_100k": "events_per_s", "kernel/random_1m": "events_per_s",
        "load/random_1m": "rss_bytes_per_gate", "vcd/random_100k": "bytes_per_second",
        "sweep/pipeline_500/threads:1": "corners_per_s", "sweep/pipeline_500/threads:2": "corners_per_s",
        "sweep_setup/pipeline_500": "setup_share", "explore/pipeline_12": "states_per_s",
        "iscas/s38417/cycles:10": "events_per_s",
    }
    for name, key in want.items():
        b = by_name(name)
        if b is None:
            fail(f"{name}: missing from the benchmark JSON")
        elif b.get("error_occurred"):
            fail(f"{name}: {b.get('error_message')}")
        else:
            if b.get("iterations", 0) < 1:
                fail(f"{name}: no iteration ran")
            if key == "rss_bytes_per_gate":
                positive(b, "heap_bytes_per_gate", name)  # RSS may round to a page; the heap cannot be empty
            else:
                positive(b, key, name)
    for f_ in doc.get("families", []):
        if f_.get("exit") != 0:
            fail(f"family {f_.get('family')} exited {f_.get('exit')}")


def with_settle_binary(tmp):
    rnd = gen(tmp, "random.settle", "random", "--gates", "2000", "--depth", "10")
    lat = gen(tmp, "pipe20.settle", "pipeline", "--stages", "20")
    pipe = gen(tmp, "pipe.settle", "pipeline", "--stages", "4")

    r = settle_json("run random", "run", rnd, "--corner", "random:1", "-q")
    positive(r, "events", "run random")
    if not isinstance(r.get("wall_s"), (int, float)):
        fail(f"run random: wall_s = {r.get('wall_s')!r}")

    vcd = os.path.join(tmp, "random.vcd")
    p = subprocess.run([settle, "run", rnd, "--corner", "random:1", "--vcd", vcd, "-q"], capture_output=True, text=True)
    if p.returncode not in (0, 1) or not os.path.exists(vcd):
        fail(f"run --vcd: exit {p.returncode}: {p.stderr.strip()[:300]}")
    else:
        with open(vcd, encoding="ascii", errors="replace") as f:
            text = f.read()
        # IEEE Std 1364-2005 clause 18: the header ends with $enddefinitions; changes follow #time lines.
        if "$enddefinitions" not in text or "\n#" not in text:
            fail("run --vcd: no header end or no time line in the VCD")

    sweeps = {}
    for t in (1, 2):
        s = settle_json(f"sweep {t} thread(s)", "sweep", lat, "--corners", "random:20", "--threads", str(t), "-q")
        sweeps[t] = s
        if s.get("corners") != 20:
            fail(f"sweep {t}: corners = {s.get('corners')!r}, expected 20")
        positive(s, "events", f"sweep {t}")
        if not isinstance(s.get("wall_s"), (int, float)):
            fail(f"sweep {t}: wall_s = {s.get('wall_s')!r}")
    # sim/analysis/sweep.hpp: the result is the same whatever the thread count, apart from wall_s and threads.
    if sweeps[1].get("events") != sweeps[2].get("events") or sweeps[1].get("steps") != sweeps[2].get("steps"):
        fail("sweep: 1 and 2 threads disagree on events or steps")

    e = settle_json("explore pipeline", "explore", pipe)
    steps = e.get("steps", [])
    if not steps or sum(s.get("states", 0) for s in steps) <= 0:
        fail(f"explore pipeline: no states explored: {str(steps)[:200]}")

    c = settle_json("check s38417", "check", s38417)
    inputs = []  # from the file's INPUT lines
    with open(s38417, encoding="ascii") as f:
        for line in f:
            line = line.split("#", 1)[0].strip()
            if line.upper().startswith("INPUT(") and line.endswith(")"):
                inputs.append(line[6:-1].strip())
    if c.get("source", {}).get("inputs") != len(inputs):
        fail(f"check s38417: {c.get('source', {}).get('inputs')!r} inputs, the file declares {len(inputs)}")
    stim = os.path.join(tmp, "s38417.stim")
    with open(stim, "w") as f:
        f.write("stimulus {\n    at 0ns CK = 0, " + ", ".join(f"{i} = 0" for i in inputs) + "\n    settle\n")
        for k in range(3):
            f.write(f"    after 10ns CK = 1\n    settle\n    after 10ns CK = 0\n    settle\n")
        f.write("}\n")
    r = settle_json("run s38417", "run", s38417, "--stim", stim, "-q")
    positive(r, "events", "run s38417")


with tempfile.TemporaryDirectory() as tmp:
    if os.path.exists(bench_bin):
        print(f"benchmark executable: {bench_bin}")
        with_bench_binary(tmp)
    else:
        print(f"{bench_bin} is not built (-DSETTLE_BENCH=ON); smoke-testing through the settle binary")
        with_settle_binary(tmp)

print(f"{len(failures)} failures")
sys.exit(1 if failures else 0)
