"""Helpers the command-line tests in tests/cli share: the list of failures, fail and check,
running the settle binary, and the closing count. A test puts this folder on sys.path:

    sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
    from settle_test import check, failures, runner  # noqa: E402

`failures` is one list shared by every helper; a test reads it (never rebinds it)."""
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


def summary():
    """The end of a test's main(): prints the failure count, or "ok"; returns the exit status."""
    if failures:
        print(f"{len(failures)} failure(s)")
        return 1
    print("ok")
    return 0
