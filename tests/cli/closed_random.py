#!/usr/bin/python3
# Environment delays under `random:` corners: every firing draws a fresh delay, uniform on the
# rule's range over many corners (Kolmogorov-Smirnov test, scipy.stats.kstest from Debian
# python3-scipy), and a corner replays to the same firing times. The firing delays are read back
# from the VCD through sigrok-cli's VCD input (Debian package sigrok-cli).
#
# Called by ctest as: closed_random.py <settle binary> <source dir>. Exit 77 = skipped.
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, run_cases, run_settle, write_file  # noqa: E402
from closed_loop import edges, have_sigrok, sigrok_changes  # noqa: E402

LO, HI = 100_000, 300_000  # fs: the rules' range, 100ps..300ps
TIMES = 12
D = 20_000  # fs: the buffer's fixed delay

DESIGN = f"""# a request/acknowledge pair whose environment answers after a spread of delays
input  req
output ack
ack = buf(req) delay 20ps
stimulus {{
    at 0ns req = 0
    settle
    after 1ns req = 1
    when ack after 100ps..300ps : req = 0 times {TIMES}
    when ~ack & ~req after 100ps..300ps : req = 1 times {TIMES}
    settle
}}
"""


def firing_delays(binary, path, corner, vcd):
    """The delays of the rules' firings at `corner`: each request edge after the acknowledge edge
    that triggered it, from the VCD as sigrok-cli reads it."""
    rc, out, err = run_settle(binary, "run", path, "--corner", corner, "--vcd", vcd)
    if rc != 0:
        fail(f"run at {corner}: exit {rc}: {err[:300]}")
        return None, None
    ch = sigrok_changes(vcd)
    if ch is None:
        return None, None
    ack = sorted([(t, "1") for t in edges(ch, "ack", "1")] + [(t, "0") for t in edges(ch, "ack", "0")])
    req = sorted([(t, "1") for t in edges(ch, "req", "1")] + [(t, "0") for t in edges(ch, "req", "0")])
    # req's first change is to 0 at 0ns and its next the rise by `after 1ns`; each later edge
    # answers the acknowledge edge before it (the acknowledge's first change, to 0, answers none).
    answers = req[2:]
    ack = ack[1:]
    if len(answers) != len(ack) - 1 and len(answers) != len(ack):
        fail(f"{corner}: {len(ack)} acknowledge edges against {len(answers)} answers")
        return None, None
    delays = [r[0] - a[0] for a, r in zip(ack, answers)]
    return delays, req


def uniform_fresh_and_replayable(binary, tmp):
    if not have_sigrok():
        print("SKIP: sigrok-cli is not installed (scripts/deps installs it)")
        sys.exit(77)
    try:
        from scipy.stats import kstest
    except ImportError:
        print("SKIP: python3-scipy is not installed (scripts/deps installs it)")
        sys.exit(77)
    path = write_file(tmp, "spread.settle", DESIGN)
    vcd = os.path.join(tmp, "w.vcd")
    pooled = []
    for i in range(40):
        corner = f"random:7#{i}"
        delays, req = firing_delays(binary, path, corner, vcd)
        if delays is None:
            continue
        check(len(delays) == 2 * TIMES, f"{corner}: {len(delays)} firings, want 2 x {TIMES}")
        check(all(LO <= d <= HI for d in delays), f"{corner}: delays outside 100ps..300ps: {delays}")
        # A fresh draw per firing: 24 draws from a 200001-value range all alike would be absurd.
        check(len(set(delays)) > TIMES, f"{corner}: only {len(set(delays))} distinct delays in {delays}")
        pooled += delays
        if i < 3:  # the corner replays exactly
            again, req2 = firing_delays(binary, path, corner, vcd)
            check(req2 == req, f"{corner}: the replay's request edges differ")
    # Kolmogorov-Smirnov against the uniform distribution on the range (scipy.stats.kstest).
    if len(pooled) >= 500:
        res = kstest(pooled, "uniform", args=(LO, HI - LO))
        check(res.pvalue > 0.001, f"{len(pooled)} firing delays: KS statistic {res.statistic:.4f}, "
              f"p = {res.pvalue:.3g} against uniform on 100ps..300ps")
    else:
        fail(f"only {len(pooled)} firing delays collected")
    # Different corners draw differently (the stream is per corner).
    a, _ = firing_delays(binary, path, "random:7#0", vcd)
    b, _ = firing_delays(binary, path, "random:7#1", vcd)
    check(a != b, "random:7#0 and random:7#1 drew the same firing delays")
    # Fixed corners treat a rule like a gate: every firing takes the range's min, typ or max.
    for corner, want in (("min", LO), ("typ", (LO + HI) // 2), ("max", HI)):
        delays, _ = firing_delays(binary, path, corner, vcd)
        check(delays is not None and set(delays) == {want}, f"{corner}: firing delays {set(delays or [])}, "
              f"want all {want} fs")


if __name__ == "__main__":
    sys.exit(run_cases([uniform_fresh_and_replayable], "settle-closed-random-"))
