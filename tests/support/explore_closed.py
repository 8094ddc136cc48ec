"""Helpers the closed-system explorer tests (tests/cli/explore_closed_*.py) share: running
`settle explore` on a closed stimulus for its JSON, the data files under tests/data/closed,
the shape of a finding's path and timed answer, and replaying a timed answer's corner through
`settle run`. A test puts this folder on sys.path beside settle_test.

A finding (a deadlock, a violated property, a non-persistent gate) carries "path", the firings
from its step's start, and "timed": either {"feasible": true, "corner": "fixed:...", "replay":
"...", "confirmed": bool, "found_by": "constraints"} (or "found_by": "sampling" with the sampled
corner that showed it) or {"feasible": false, "exact": bool, "why": "..."}."""
import json
import os
import subprocess
import sys

from settle_test import check, fail
from closed_loop import report


def closed_data(src, name):
    """tests/data/closed/NAME. The designs travel with the clone: a missing one fails the test
    (exit 1) instead of passing it, since a check without its data checks nothing."""
    path = os.path.join(src, "tests", "data", "closed", name)
    if not os.path.isfile(path):
        print(f"FAIL: {path} is missing; this test needs the project's closed-system designs")
        sys.exit(1)
    return path


def explore(binary, path, what, model=None, want_rc=None, extra=(), timeout=300):
    """Runs `settle explore PATH [--model M] --json -`; returns (exit status, JSON or None),
    recording a failure when the status is not `want_rc` (if given) or there is no JSON."""
    return report(binary, ["explore", path, *(["--model", model] if model else []), *extra], what,
                  want_rc, timeout)


def findings(doc, key):
    """(step index, finding) for every entry of `key` ("deadlocks", "properties",
    "nonpersistent") over the steps of an explore report."""
    return [(i, f) for i, s in enumerate((doc or {}).get("steps") or []) for f in s.get(key) or []]


def has_closed_fields(doc, what):
    """Checks every step of a closed stimulus's explore report carries the three lists."""
    for i, s in enumerate((doc or {}).get("steps") or []):
        for key in ("deadlocks", "properties", "nonpersistent"):
            check(isinstance(s.get(key), list), f"{what}: step {i + 1} has no list '{key}': {sorted(s)}")


def path_is_well_formed(path, what, rules=None):
    """A path is a list of instants, each a non-empty list of firings: a gate with a value 0 or 1,
    or a rule K (1-based, at most `rules`) with its text starting with 'when'."""
    if not isinstance(path, list):
        fail(f"{what}: path {path!r} is not a list")
        return False
    ok = True
    for k, instant in enumerate(path):
        if not isinstance(instant, list) or not instant:
            fail(f"{what}: instant {k} of the path is {instant!r}, want a non-empty list")
            ok = False
            continue
        for f in instant:
            if "gate" in f:
                good = isinstance(f["gate"], str) and f.get("value") in (0, 1)
            else:
                good = (isinstance(f.get("rule"), int) and f["rule"] >= 1 and (rules is None or f["rule"] <= rules)
                        and str(f.get("text", "")).startswith("when"))
            if not good:
                fail(f"{what}: firing {f!r} in instant {k} is neither a gate with value 0/1 nor a rule")
                ok = False
    return ok


def timed_is_well_formed(timed, what):
    """The timed answer's two forms."""
    if not isinstance(timed, dict) or not isinstance(timed.get("feasible"), bool):
        fail(f"{what}: timed {timed!r} has no boolean 'feasible'")
        return False
    if timed["feasible"]:
        # Found by the difference constraints: a fixed: corner built from the path's solution; found by
        # running sampled corners: the name of the corner that showed the finding (extremes#k, random:S#i).
        by = timed.get("found_by")
        corner = str(timed.get("corner", ""))
        named = corner.startswith("fixed:") if by == "constraints" else by == "sampling" and corner != ""
        good = (named and isinstance(timed.get("confirmed"), bool)
                and corner in str(timed.get("replay", "")) and "--corner" in str(timed.get("replay", "")))
    else:
        good = isinstance(timed.get("exact"), bool) and isinstance(timed.get("why"), str) and timed["why"]
    check(good, f"{what}: timed answer {timed!r} lacks the fields of its form")
    return good


def run_corner(binary, path, corner, what, horizon=None):
    """`settle run PATH --corner CORNER --json -`; returns the JSON or None (recorded)."""
    args = [binary, "run", path, "--corner", corner, *(["--horizon", horizon] if horizon else []), "--json", "-"]
    p = subprocess.run(args, capture_output=True, text=True, timeout=300)
    try:
        doc = json.loads(p.stdout)
    except json.JSONDecodeError:
        fail(f"{what}: run --corner {corner!r} wrote no JSON (rc={p.returncode}): {p.stderr.strip()[:400]}")
        return None
    return doc


def step_status(run_doc, step):
    steps = (run_doc or {}).get("steps") or []
    return steps[step].get("status") if step < len(steps) else None


def property_holds(run_doc, text):
    p = next((p for p in (run_doc or {}).get("properties") or [] if p.get("text") == text), {})
    return p.get("holds")
