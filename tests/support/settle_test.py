"""Helpers the command-line tests in tests/cli share: the list of failures, fail and check,
running the settle binary, and the closing count. A test puts this folder on sys.path:

    sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
    from settle_test import check, failures, runner  # noqa: E402

`failures` is one list shared by every helper; a test reads it (never rebinds it)."""
import json
import subprocess

failures = []


def fail(msg):
    """Records a failure and prints it as "FAIL: msg"."""
    failures.append(msg)
    print("FAIL:", msg)


def check(cond, what):
    """Records `what` as a failure unless `cond` holds."""
    if not cond:
        fail(what)


def run_settle(binary, *args, timeout=300):
    """Runs `binary args...` capturing text output; returns (exit status, stdout, stderr)."""
    p = subprocess.run([binary, *args], capture_output=True, text=True, timeout=timeout)
    return p.returncode, p.stdout, p.stderr


def runner(binary, timeout=300):
    """A run(*args) that calls run_settle(binary, *args, timeout=timeout)."""
    return lambda *args: run_settle(binary, *args, timeout=timeout)


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


def summary():
    """The end of a test's main(): prints the failure count, or "ok"; returns the exit status."""
    if failures:
        print(f"{len(failures)} failure(s)")
        return 1
    print("ok")
    return 0
