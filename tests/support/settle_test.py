"""Helpers the command-line tests in tests/cli share: the list of failures, fail and check,
running the settle binary (plainly, timed, or bounded and judged), writing temporary designs,
the shared ISCAS folder, and the closing count. A test puts this folder on sys.path:

    sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
    from settle_test import check, failures, runner  # noqa: E402

`failures` is one list shared by every helper; a test reads it (never rebinds it)."""
import atexit
import json
import os
import shutil
import subprocess
import sys
import tempfile
import time

failures = []


def fail(msg):
    """Records a failure and prints it as "FAIL: msg"."""
    failures.append(msg)
    print("FAIL:", msg)


def check(cond, what):
    """Records `what` as a failure unless `cond` holds."""
    if not cond:
        fail(what)


def run_settle(binary, *args, timeout=300, errors=None):
    """Runs `binary args...` capturing text output; returns (exit status, stdout, stderr).
    `errors` is how undecodable output is read (None: strict, "replace": as U+FFFD)."""
    p = subprocess.run([binary, *args], capture_output=True, text=True, timeout=timeout, errors=errors)
    return p.returncode, p.stdout, p.stderr


def run_timed(binary, *args, timeout=300, errors=None):
    """run_settle that also measures the wall-clock time: (exit status, stdout, stderr, seconds)."""
    t0 = time.monotonic()
    rc, out, err = run_settle(binary, *args, timeout=timeout, errors=errors)
    return rc, out, err, time.monotonic() - t0


def run_bounded(binary, what, args, want, limit=60, no_crash=False, places=2, errors=None):
    """Runs `binary args...` for at most `limit` seconds, prints "what: exit N in T s" (T with
    `places` decimals) and checks the exit status is in `want`; with `no_crash`, first that it is
    not a signal nor the 134/139 of an abort or segfault. `errors` is as for run_settle.
    Returns (exit status, stdout, stderr, seconds), or (None, "", "", limit) after recording
    that it did not finish in time."""
    try:
        rc, out, err, el = run_timed(binary, *args, timeout=limit, errors=errors)
    except subprocess.TimeoutExpired:
        check(False, f"{what}: did not finish within {limit} s")
        return None, "", "", limit
    print(f"{what}: exit {rc} in {el:.{places}f} s")
    if no_crash:
        check(rc >= 0 and rc not in (134, 139), f"{what}: no crash (status {rc}, {err[-300:]!r})")
    check(rc in want, f"{what}: exit {sorted(want)} (got {rc}; {err[-400:]!r})")
    return rc, out, err, el


def runner(binary, timeout=300):
    """A run(*args) that calls run_settle(binary, *args, timeout=timeout)."""
    return lambda *args: run_settle(binary, *args, timeout=timeout)


def json_report(binary, args, what):
    """Runs `binary args...` (a command writing JSON to stdout); returns (exit status, the parsed
    report), or records "what: no JSON on stdout" and returns (exit status, None)."""
    rc, out, err = run_settle(binary, *args)
    try:
        return rc, json.loads(out)
    except json.JSONDecodeError:
        fail(f"{what}: no JSON on stdout (rc={rc}): {err[:300]}")
        return rc, None


def json_steps(binary, args, what):
    """Runs `binary args...` (a command with --json -); returns the report's "steps", or
    records a failure named `what` (a non-zero exit, or no steps in the JSON) and returns None."""
    p = subprocess.run([binary, *args], capture_output=True, text=True)
    if p.returncode != 0:
        fail(f"{what}: exit {p.returncode}: {p.stderr.strip()[:400]}")
        return None
    try:
        return json.loads(p.stdout)["steps"]
    except (json.JSONDecodeError, KeyError) as e:
        fail(f"{what}: no steps in the JSON ({e}): {p.stdout[:200]!r}")
        return None


def write_file(folder, name, text):
    """Writes `text` to folder/name (a temporary design, stimulus or the like); returns the path."""
    path = os.path.join(folder, name)
    with open(path, "w") as f:
        f.write(text)
    return path


def released_latch(title, controls, outputs, delays, last_expect=None):
    """The text of a NAND set/reset latch, q = nand(c1, q_n) and q_n = nand(c2, q) with delays
    (a, b), whose active-low controls (c1, c2) are both held low at 0ns (step 1 expects q = q_n = 1)
    and released at the same instant 1ns later; `last_expect` (e.g. "q = 0") is step 2's expectation.
    `title` names the scenario in the file's first line."""
    (c1, c2), (q, q_n), (a, b) = controls, outputs, delays
    set_expr, reset_expr = f"nand({c1}, {q_n})", f"nand({c2}, {q})"
    width = max(len(set_expr), len(reset_expr)) + 3
    return "\n".join([
        f"# {title}, both controls released at once",
        f"input  {c1}, {c2}",
        f"output {q}, {q_n}",
        f"{q:<{len(q_n)}} = {set_expr:<{width}}delay {a}",
        f"{q_n} = {reset_expr:<{width}}delay {b}",
        "stimulus {",
        f"    at 0ns     {c1} = 0, {c2} = 0",
        "    settle",
        f"    expect {q} = 1, {q_n} = 1",
        f"    after 1ns  {c1} = 1, {c2} = 1",
        "    settle",
        *([f"    expect {last_expect}"] if last_expect else []),
        "}",
        "",
    ])


def iscas_dir(src, must_hold=None):
    """The project's copy of the ISCAS benchmarks (tests/data/iscas, with its SOURCE.md). The data
    travels with the clone, so when the folder (or the file `must_hold`) is missing the test fails
    (exit 1): a check that passes without its data checks nothing."""
    iscas = os.path.join(src, "tests", "data", "iscas")
    if not (os.path.isfile(os.path.join(iscas, must_hold)) if must_hold else os.path.isdir(iscas)):
        print(f"FAIL: {iscas} is missing; the ISCAS checks need the project's benchmark copy")
        sys.exit(1)
    return iscas


def summary():
    """The end of a test's main(): prints the failure count, or "ok"; returns the exit status."""
    if failures:
        print(f"{len(failures)} failure(s)")
        return 1
    print("ok")
    return 0


def wait_until_caught(proc, sig, limit=60.0):
    """Waits until the running process `proc` has a handler for `sig` installed, as the kernel
    reports it in /proc/<pid>/status (SigCgt, a hexadecimal mask with bit sig-1 set for each
    caught signal; proc(5), Linux man-pages). A signal sent before that would end the process the
    default way, which is not what a signal test means to check; a fixed sleep is not enough on a
    loaded machine or under the sanitizers. Returns False if the process ended or `limit` seconds
    passed first."""
    end = time.monotonic() + limit
    while time.monotonic() < end and proc.poll() is None:
        try:
            with open(f"/proc/{proc.pid}/status") as f:
                caught = next((int(line.split()[1], 16) for line in f if line.startswith("SigCgt:")), 0)
        except OSError:
            caught = 0
        if caught >> (int(sig) - 1) & 1:
            return True
        time.sleep(0.02)
    return False


def scratch(prefix):
    """A temporary folder named with `prefix`, removed when the test exits."""
    folder = tempfile.mkdtemp(prefix=prefix)
    atexit.register(shutil.rmtree, folder, ignore_errors=True)
    return folder


def run_cases(cases, prefix):
    """The main() of a test made of cases, each called as case(settle binary, temporary folder):
    without <settle> <source dir> on the command line prints a usage line and returns 2; otherwise
    runs the cases in order in one folder (named with `prefix`, removed afterwards) and returns
    summary()."""
    if len(sys.argv) < 3:
        print(f"usage: {os.path.basename(sys.argv[0])} <settle> <source dir>")
        return 2
    tmp = tempfile.mkdtemp(prefix=prefix)
    try:
        for case in cases:
            case(sys.argv[1], tmp)
    finally:
        shutil.rmtree(tmp, ignore_errors=True)
    return summary()
