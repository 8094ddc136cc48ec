"""Helpers the closed-loop command-line tests (tests/cli/closed_*.py) share: running settle for
its JSON report, reading a VCD back through sigrok-cli's VCD input (Debian package sigrok-cli),
and picking edges out of the changes. A test puts this folder on sys.path beside settle_test."""
import json
import shutil
import subprocess

from settle_test import fail
from vcd_rules import changes_of


def report(binary, args, what, want_rc=None, timeout=600):
    """Runs `binary args... --json -`; returns (exit status, the parsed JSON or None). Records a
    failure when the exit status is not `want_rc` (if given) or stdout holds no JSON."""
    p = subprocess.run([binary, *args, "--json", "-"], capture_output=True, text=True, timeout=timeout)
    if want_rc is not None and p.returncode != want_rc:
        fail(f"{what}: exit {p.returncode}, want {want_rc}; stderr: {p.stderr.strip()[:400]}")
    try:
        return p.returncode, json.loads(p.stdout)
    except json.JSONDecodeError:
        fail(f"{what}: no JSON on stdout (rc={p.returncode}): {p.stderr.strip()[:400]}")
        return p.returncode, None


def have_sigrok():
    return shutil.which("sigrok-cli") is not None


def sigrok_changes(vcd_path):
    """The value changes of every net in a VCD file as read by sigrok-cli's VCD input and written
    back by its VCD output (IEEE 1364 clause 18 text): {name: [(time_fs, value)]}, or None after
    recording a failure when sigrok-cli cannot read the file."""
    p = subprocess.run(["sigrok-cli", "-I", "vcd", "-i", vcd_path, "-O", "vcd"], capture_output=True,
                       timeout=300)
    if p.returncode != 0 or not p.stdout.strip():
        fail(f"sigrok-cli could not read {vcd_path}: rc={p.returncode} {p.stderr.decode()[:300]}")
        return None
    return changes_of(p.stdout.decode(errors="replace"))


def edges(changes, net, value):
    """Times at which `net` changes to `value` ("0" or "1") from another value."""
    out, last = [], None
    for t, v in changes.get(net, []):
        if v == value and last != value:
            out.append(t)
        last = v
    return out


def by_name(items, key, name):
    """The first dict in `items` whose `key` is `name`, or {}."""
    return next((i for i in items or [] if i.get(key) == name), {})
