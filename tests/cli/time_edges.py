#!/usr/bin/python3
"""Time at its edges (issue 14): every path where settle adds times (`at`, `after`, `run`
windows, the horizon, clocks, gate delays), over values near 0 and near 2^64 fs, against
Python's integers as the reference. Python ints have unlimited precision (The Python Language
Reference, 3.2 "The standard type hierarchy": numbers.Integral "represent numbers in an
unlimited range"), so a true sum is never wrapped and the test can say, for each case, whether
it passes the last representable instant L = 2^64 - 2 fs (2^64 - 1 fs means never; README,
"Time at its edges"). settle must then refuse the text (exit 2), or end the step as a timeout at
the end of representable time; otherwise it must report the exact times.

The design is one buffer q = buf(a) with delay D (a demo of our own: a contact line into a
panel lamp driver). A buffer's output follows its input D later (common practice: a pure
delay element), so every instant the run processes is known in closed form."""
import json
import os
import random
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_settle, scratch, summary, write_file  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-time-edges-")

L = 2**64 - 2          # the last representable instant (README, "Time at its edges")
NEVER = 2**64 - 1      # not a time: reaching it would mean a wrap
EOT = "timeout at the end of representable time"
ONE_NS = 10**6
count = 0
tally = {}  # verdicts seen, printed at the end: every kind must occur for the test to mean much


def design(d, stim_lines):
    return ("input a\noutput q\n" f"q = buf(a) delay {d}fs\n" "stimulus {\n" +
            "".join(f"    {s}\n" for s in stim_lines) + "}\n")


def default_horizon(d):
    """10,000 x the largest delay, clamped to L, at least 1 ns (README, `--horizon`)."""
    return max(min(10000 * d, L), ONE_NS)


def settle_run(what, d, stim_lines, horizon=None):
    """Runs the design; returns (exit status, the JSON steps or None, stderr)."""
    global count
    count += 1
    path = write_file(tmp, f"case{count}.settle", design(d, stim_lines))
    args = ["run", path, "--json", "-"] + (["--horizon", f"{horizon}fs"] if horizon is not None else [])
    rc, out, err = run_settle(settle, *args, timeout=60)
    steps = None
    if rc in (0, 1):
        try:
            steps = json.loads(out)["steps"]
        except (ValueError, KeyError) as e:
            check(False, f"{what}: JSON report ({e}; {out[:200]!r})")
    return rc, steps, err


def judge(start, event, limit_true, d):
    """The verdict of a step that starts at `start` and whose last instant is the buffer's
    output change at `event`, with the step's true limit `limit_true` (a Python int, never
    wrapped). An instant is processed only when it plus the longest delay D is at most L;
    a limit beyond that cannot be reached. Returns (status, end, end_of_time)."""
    ceiling = L - d
    unreachable = limit_true > ceiling
    last = min(limit_true, ceiling)
    if event <= last:
        return "settled", event, False
    if unreachable:
        return "timeout", max(last, min(start, L)), True
    return "timeout", limit_true, False


def expect_step(what, st, status, end, eot, settle_fs=None):
    key = "end of time" if eot else status
    tally[key] = tally.get(key, 0) + 1
    check(st["status"] == status, f"{what}: status {status} (got {st['status']})")
    check(st["end_fs"] == end, f"{what}: end_fs {end} (got {st['end_fs']})")
    check(st["end_fs"] < NEVER and st["start_fs"] < NEVER, f"{what}: no time reaches never")
    check((st.get("detail") == EOT) == eot, f"{what}: detail {'EOT' if eot else 'none'} (got {st.get('detail')!r})")
    if settle_fs is not None:
        check(st["settle_fs"] == settle_fs, f"{what}: settle_fs {settle_fs} (got {st['settle_fs']})")


def refused(what, rc, err, words):
    tally["refused"] = tally.get("refused", 0) + 1
    check(rc == 2, f"{what}: exit 2 (got {rc}; {err[-300:]!r})")
    check(words in err, f"{what}: message says {words!r} ({err[-300:]!r})")


rng = random.Random(14)
DELAYS = [1, 15000, 2**32, 2**62, L // 2, L // 2 + 1, L - 1, L]


def around(*centres):
    """Values at and next to each centre, kept within 0 .. 2^64 - 1 (what a literal can hold)."""
    out = set()
    for c in centres:
        for k in (-2, -1, 0, 1, 2):
            if 0 <= c + k <= NEVER:
                out.add(c + k)
    return sorted(out)


def near_edges():
    return around(0, 15000, ONE_NS, 2**63, L, NEVER)


def pick(values, n):
    values = sorted(set(values))
    return values if len(values) <= n else sorted(rng.sample(values, n))


# ---- `at A`: one input change at an absolute time.
for d in DELAYS:
    for a in pick(around(L - d, L - 2 * d) + near_edges(), 8):
        what = f"at {a}fs, delay {d}fs"
        rc, steps, err = settle_run(what, d, [f"at {a}fs a = 1", "settle"])
        if a + d > L:  # the change's consequence passes L: known from the text
            refused(what, rc, err, "passes the end of representable time")
            continue
        if steps is None or not steps:
            check(False, f"{what}: a report with a step (exit {rc}; {err[-300:]!r})")
            continue
        status, end, eot = judge(a, a + d, a + default_horizon(d), d)
        expect_step(what, steps[0], status, end, eot, d if status == "settled" else None)

# ---- `after B`: relative to the end of a first step that settles at D.
for d in DELAYS:
    for b in pick(around(L - d, L - 2 * d, L - 3 * d) + near_edges(), 8):
        what = f"after {b}fs, delay {d}fs"
        rc, steps, err = settle_run(what, d, ["at 0fs a = 0", "settle", f"after {b}fs a = 1", "settle"])
        if b + d > L:  # the earliest the change can happen is b
            refused(what, rc, err, "passes the end of representable time")
            continue
        if not steps:
            check(False, f"{what}: a report (exit {rc}; {err[-300:]!r})")
            continue
        s1 = judge(0, d, default_horizon(d), d)
        expect_step(what + ", step 1", steps[0], *s1)
        if s1[2]:
            check(len(steps) == 1, f"{what}: the run stops after the end of representable time")
            continue
        t_in = d + b
        if t_in > L:
            expect_step(what, steps[1], "timeout", L, True)
        elif t_in > L - d:
            expect_step(what, steps[1], "timeout", t_in, True)
        else:
            expect_step(what, steps[1], *judge(t_in, t_in + d, t_in + default_horizon(d), d))

# ---- `--horizon H`: the per-step limit.
for d in (1, 15000, 2**40, L // 3):
    for a in (0, L - 2 * d, L - 2 * d - 1, L // 2):
        for h in pick(around(1, d, L - a - 2 * d, L - a - d, L - a, L) + [2**64 - 1], 7):
            what = f"at {a}fs, delay {d}fs, --horizon {h}fs"
            rc, steps, err = settle_run(what, d, [f"at {a}fs a = 1", "settle"], horizon=h)
            if h == 0 or h > L:
                refused(what, rc, err, "--horizon")
                continue
            if a + d > L:
                refused(what, rc, err, "passes the end of representable time")
                continue
            if not steps:
                check(False, f"{what}: a report (exit {rc}; {err[-300:]!r})")
                continue
            status, end, eot = judge(a, a + d, a + h, d)
            expect_step(what, steps[0], status, end, eot)

# ---- `run T`: a window that need not end quiet.
for d in (1, 15000, 2**40, L // 3):
    for a in (0, L - 2 * d, L // 2):
        for t in pick(around(1, d, L - a - 2 * d, L - a - d, L - a) + [NEVER], 7):
            if t == 0:
                continue
            what = f"at {a}fs, delay {d}fs, run {t}fs"
            rc, steps, err = settle_run(what, d, [f"at {a}fs a = 1", f"run {t}fs"])
            if a + d > L or a + t > L:
                refused(what, rc, err, "passes the end of representable time")
                continue
            if not steps:
                check(False, f"{what}: a report (exit {rc}; {err[-300:]!r})")
                continue
            status, end, eot = judge(a, a + d, a + t, d)
            # `run T` advances time by exactly T from the step's start even when the circuit
            # went quiet earlier (parser/LANGUAGE.md, steps), so a settled window ends at a + T.
            if status == "settled":
                end = a + t
            # A run window that ends with the buffer's change still pending is `running`.
            expect_step(what, steps[0], "running" if status == "timeout" and not eot else status, end, eot)

# ---- clocks: `clock a period P high H [cycles N]` into the buffer, under --horizon.
CLOCKS = []
for d in (1, 15000, 2**40):
    for p in pick(around(2 * d, L // 2, L // 3, L - d, L - 2 * d) + [2**63, NEVER], 6):
        for n in (1, 2, 3, 0):
            CLOCKS.append((d, p, n))
for d, p, n in CLOCKS:
    hi = p // 2
    if hi < d or p - hi < d:  # keep every pulse longer than the delay: each edge passes the buffer
        continue
    horizon = L
    what = f"clock period {p}fs cycles {n}, delay {d}fs"
    stim = [f"clock a period {p}fs" + (f" cycles {n}" if n else ""), "settle"]
    rc, steps, err = settle_run(what, d, stim, horizon=horizon)
    static = hi + d > L or (n != 1 and p + d > L) or (n > 1 and (n - 1) * p + hi + d > L)
    if static:
        refused(what, rc, err, "passes the end of representable time")
        continue
    if not steps:
        check(False, f"{what}: a report (exit {rc}; {err[-300:]!r})")
        continue
    ceiling = L - d
    last = min(horizon, ceiling)
    unreachable = horizon > ceiling
    instants = []  # every edge and the buffer's change after it, while within reach
    k = 0
    while True:
        if n and k >= n:
            break
        rise, fall = k * p, k * p + hi
        instants += [rise, rise + d, fall, fall + d]
        if rise > last or len(instants) > 200:
            break
        k += 1
    instants.sort()
    beyond = [t for t in instants if t > last]
    if len([t for t in instants if t <= last]) > 100:
        continue  # long enough for repeat detection to call it oscillating; not a time edge
    st = steps[0]
    if n and not beyond:
        expect_step(what, st, "settled", (n - 1) * p + hi + d, False)
    else:
        # A clock that runs on (or an edge past the limit): a timeout, at the end of
        # representable time exactly when the limit lies past the ceiling.
        expect_step(what, st, "timeout", last if unreachable else horizon, unreachable)

# ---- delays: a literal of 2^64 - 1 fs is refused where it is written.
for d in (NEVER,):
    rc, steps, err = settle_run(f"delay {d}fs", d, ["at 0fs a = 1", "settle"])
    refused(f"delay {d}fs", rc, err, "a delay of 18446744073709551615fs passes the end of representable time")

print(f"{count} cases: " + ", ".join(f"{k} {v}" for k, v in sorted(tally.items())))
for kind in ("settled", "timeout", "running", "end of time", "refused"):
    check(tally.get(kind, 0) > 0, f"the cases include some that end {kind}")
sys.exit(summary())
