#!/usr/bin/python3
# Whole-run properties and timing gauges under `settle run`: the first violation of `never a & b`
# lies where the overlap starts, and pulse and latency gauges on gate chains equal the sums of
# the delays along them.
#
# Called by ctest as: closed_props.py <settle binary> <source dir>. Exit 77 = skipped.
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_cases, write_file  # noqa: E402
from closed_loop import by_name, report  # noqa: E402

# s rises at 1ns (absolute): a rises 30ps later, b falls only 70ps later, so a & b is 1 from
# 1.030ns to 1.070ns (delays from the design below; inertial delays pass a full edge).
OVERLAP = """# a true and an inverted copy of a select line, the inverted one slower
input  s
output a, b
a = buf(s) delay 30ps
b = not(s) delay 70ps
stimulus {
    at 0ns s = 0
    settle
    never a & b
    always ~(a & b)
    never b rises while a
    at 1ns s = 1
    settle
    at 3ns s = 0
    settle
}
"""

# An edge-to-pulse shaper and a buffer chain. p = and(s, n3), n3 = s inverted through three
# inverters: on each rise of s, p is high for the three inverters' delays (common practice: the
# pulse of such a shaper is as wide as its inverting path). y is s through three buffers.
CHAINS = """# a pulse shaper and a delay line driven from one strobe
input  s
output p, y
wire   n1, n2, n3, y1, y2
n1 = not(s)  delay 21ps
n2 = not(n1) delay 34ps
n3 = not(n2) delay 55ps
p  = and(s, n3) delay 12ps
y1 = buf(s)  delay 40ps
y2 = buf(y1) delay 65ps
y  = buf(y2) delay rise 30ps fall 90ps
stimulus {
    at 0ns s = 0
    settle
    gauge shot = pulse of p high
    gauge gap = pulse of y low
    gauge up = latency from s rises to y rises
    gauge down = latency from s falls to y falls
    gauge across = latency from s rises to p falls
    after 1ns s = 1
    settle
    after 1ns s = 0
    settle
    after 1ns s = 1
    settle
    after 2ns s = 0
    settle
    after 1ns s = 1
    settle
    expect shot within 110ps..110ps
}
"""


def first_violation(binary, tmp):
    path = write_file(tmp, "overlap.settle", OVERLAP)
    rc, doc = report(binary, ["run", path], "run of the overlap", want_rc=1)
    if doc is None:
        return
    p = by_name(doc.get("properties"), "text", "never a & b")
    check(p.get("holds") is False, f"never a & b: {p}, want violated")
    # The overlap starts when a rises: 1ns + 30ps (the design's own delays).
    check(p.get("first_violation_fs") == 1_030_000, f"first_violation_fs {p.get('first_violation_fs')}, want 1030000")
    check(p.get("step") == 2, f"never a & b: step {p.get('step')}, want 2")
    check(p.get("values") == {"a": "1", "b": "1"}, f"never a & b: values {p.get('values')}, want a = b = 1")
    q = by_name(doc.get("properties"), "text", "always ~(a & b)")
    check(q.get("holds") is False and q.get("first_violation_fs") == 1_030_000,
          f"always ~(a & b) (De Morgan: the same set of instants): {q}")
    # b rises when s falls at 3ns + 70ps; a fell at 3ns + 30ps, so a is 0 then: holds.
    r = by_name(doc.get("properties"), "text", "never b rises while a")
    check(r.get("holds") is True and r.get("first_violation_fs") is None, f"never b rises while a: {r}")


def chain_gauges(binary, tmp):
    path = write_file(tmp, "chains.settle", CHAINS)
    rc, doc = report(binary, ["run", path], "run of the chains", want_rc=0)
    if doc is None:
        return
    gauges = doc.get("gauges")
    rises, falls = 3, 2  # edges of s after the gauges' line

    def same(name, kind, want_fs, count):
        g = by_name(gauges, "name", name)
        check(g.get("kind") == kind and g.get("count") == count,
              f"gauge {name}: kind {g.get('kind')} count {g.get('count')}, want {kind} with {count}")
        for k in ("min_fs", "mean_fs", "max_fs"):
            check(g.get(k) == want_fs, f"gauge {name}: {k} {g.get(k)}, want {want_fs}")

    # Common practice: the delay of a chain is the sum of its stage delays; the shaper's pulse is
    # the inverting path's delay (21 + 34 + 55 ps), the and gate shifting both of its edges alike.
    same("shot", "pulse_high", (21 + 34 + 55) * 1000, rises)
    same("up", "latency", (40 + 65 + 30) * 1000, rises)
    same("down", "latency", (40 + 65 + 90) * 1000, falls)
    # The low pulses of y: `after 1ns` counts from the end of the step before (LANGUAGE.md), and
    # a falling step ends when y falls, its last change; s then rises 1ns later and y follows
    # after its rise latency, so each low pulse is 1ns + (40 + 65 + 30)ps. The low before the
    # gauge's line is not a sample: the gauge is active from its line.
    same("gap", "pulse_low", 1_000_000 + (40 + 65 + 30) * 1000, falls)
    # From s rising to p falling: the inverting path plus the and gate.
    same("across", "latency", (21 + 34 + 55 + 12) * 1000, rises)
    st = (doc.get("steps") or [{}])[-1]
    ex = next((e for e in st.get("expect", []) if e.get("gauge") == "shot"), {})
    check(ex.get("want") == "110ps..110ps" and ex.get("pass") is True,
          f"expect shot within 110ps..110ps: {ex}, want pass (every sample is 110ps)")


if __name__ == "__main__":
    sys.exit(run_cases([first_violation, chain_gauges], "settle-closed-props-"))
