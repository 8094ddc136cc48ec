#!/usr/bin/python3
# Closed loops in `settle margin` and in the JUnit and HTML reports: a property has a margin of
# its own, found like a step's; a deadlocked step and a violated property are JUnit failures
# (read back with xmllint, Debian package libxml2-utils, and Python's XML parser); the HTML page
# draws the owed rules and the properties and gauges without a script error (headless Chromium,
# Debian package chromium).
#
# Called by ctest as: closed_reports.py <settle binary> <source dir>. Exit 77 = skipped.
import json
import os
import re
import shutil
import subprocess
import sys
import xml.etree.ElementTree as ET

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_cases, run_settle, write_file  # noqa: E402
from closed_loop import by_name, report  # noqa: E402

# a's delay is 60ps..100ps (typ 80ps) against b's fixed 50ps. Widened about typ by w, a's
# shortest delay is 80 - 20w ps, and a & b overlaps only while a rises before b falls, i.e. for
# 80 - 20w < 50: w > 1.5 (arithmetic on the spread's definition in README, `settle margin`).
OVERLAP = """# a select line's true copy, slower than its inverted copy unless the ranges widen
input  s
output a, b
a = buf(s) delay 60ps..100ps
b = not(s) delay 50ps
stimulus {
    at 0ns s = 0
    settle
    never a & b
    at 1ns s = 1
    settle
}
"""

STUCK = """# a request nobody acknowledges
input  req
output ack
ack = and(req, 0) delay 40ps
stimulus {
    at 0ns req = 0
    settle
    after 1ns req = 1
    when ack after 100ps : req = 0 times 3
    when ~ack & ~req after 100ps : req = 1 times 3
    gauge cycle = period of ack
    settle
}
"""


def property_margin(binary, tmp):
    path = write_file(tmp, "overlap.settle", OVERLAP)
    rc, doc = report(binary, ["margin", path, "--corners", "extremes", "--up-to", "300"], "margin of the overlap",
                     want_rc=0)
    if doc is None:
        return
    p = by_name(doc.get("properties"), "text", "never a & b")
    check(p.get("margin_pct") == 150.0 and p.get("at_least") is False,
          f"property margin {p.get('margin_pct')}%, want 150% (80 - 20w < 50 past w = 1.5)")
    check(doc.get("margin_pct") == 150.0, f"design margin {doc.get('margin_pct')}%, want the property's 150%")
    f = p.get("failure") or {}
    check(f.get("kind") == "property" and f.get("spread_pct") == 151.0, f"property failure {f}")
    # The witness replays: violated at 151%, held at 150% (where a rises as b falls).
    w = f.get("witness", "extremes#0@1.51")
    rc, one = report(binary, ["run", path, "--corner", w], f"replay {w}", want_rc=1)
    check(by_name((one or {}).get("properties"), "text", "never a & b").get("holds") is False,
          f"replay of {w}: the property should be violated")
    rc, one = report(binary, ["run", path, "--corner", w.split("@")[0] + "@1.5"], "replay at 150%", want_rc=0)
    check(by_name((one or {}).get("properties"), "text", "never a & b").get("holds") is True,
          "replay at 150%: the property should hold")


# The buffer's delay is 40ps..120ps (typ 80ps) and the environment answers after a fixed 100ps.
# A four-phase cycle is two round trips, 2(d + e) (common practice); widened by w the shortest
# cycle is 2(80 - 40w + 100) ps, which leaves 250ps..500ps past w = 1.375, while the longest,
# 2(80 + 40w + 100) ps, leaves it only past w = 1.75.
CYCLE = """# a handshake whose cycle time has a budget
input  req
output ack
ack = buf(req) delay 40ps..120ps
stimulus {
    at 0ns req = 0
    settle
    after 1ns req = 1
    when ack after 100ps : req = 0 times 4
    when ~ack & ~req after 100ps : req = 1 times 4
    gauge cycle = period of ack
    settle
    expect cycle within 250ps..500ps
}
"""


def gauge_expectation_margin(binary, tmp):
    path = write_file(tmp, "cycle.settle", CYCLE)
    rc, doc = report(binary, ["margin", path, "--corners", "extremes", "--up-to", "300"], "margin of the cycle",
                     want_rc=0)
    if doc is None:
        return
    # On the 1% grid the last passing spread below 137.5% is 137%.
    check(doc.get("margin_pct") == 137.0, f"margin {doc.get('margin_pct')}%, want 137% (w <= 1.375)")
    f = doc.get("failure") or {}
    check(f.get("kind") == "expectation" and "cycle within" in f.get("expectation", ""),
          f"margin failure {f}, want the gauge expectation")


def junit_of(binary, args, path, what):
    """Runs settle with --junit; returns the parsed XML root, checked well-formed by xmllint."""
    run_settle(binary, *args, "--junit", path, "-q")
    if not os.path.exists(path):
        check(False, f"{what}: no JUnit file written")
        return None
    if shutil.which("xmllint"):
        p = subprocess.run(["xmllint", "--noout", path], capture_output=True, text=True)
        check(p.returncode == 0, f"{what}: xmllint rejects the JUnit XML: {p.stderr[:300]}")
    return ET.parse(path).getroot()


def failures_of(root, type_):
    return [f for f in root.iter("failure") if f.get("type") == type_] if root is not None else []


def junit_reports(binary, tmp):
    stuck = write_file(tmp, "stuck.settle", STUCK)
    for cmd in (["run", stuck], ["sweep", stuck, "--corners", "extremes"]):
        root = junit_of(binary, cmd, os.path.join(tmp, cmd[0] + "_stuck.xml"), f"{cmd[0]} --junit")
        dead = failures_of(root, "deadlock")
        check(len(dead) == 1 and "when ack after 100ps" in dead[0].get("message", ""),
              f"{cmd[0]} --junit: deadlock failures {[d.attrib for d in dead]}, want one naming the owed rule")
        if root is not None:
            check(int(root.get("failures", "0")) >= 1, f"{cmd[0]} --junit: testsuites failures {root.get('failures')}")
    overlap = write_file(tmp, "overlap.settle", OVERLAP)
    # At twice the written spread the all-min corner gives a 40ps: the overlap happens.
    root = junit_of(binary, ["run", overlap, "--corner", "extremes#0@2"], os.path.join(tmp, "ov_run.xml"),
                    "run --junit")
    props = [c for c in (root.iter("testcase") if root is not None else []) if c.get("name", "").startswith("property:")]
    check(len(props) == 1 and props[0].find("failure") is not None
          and props[0].find("failure").get("type") == "property",
          f"run --junit at 200%: property testcases {[(c.get('name'), [f.attrib for f in c]) for c in props]}")
    root = junit_of(binary, ["margin", overlap, "--corners", "extremes", "--up-to", "120"], os.path.join(tmp, "ov_m.xml"),
                    "margin --junit")
    props = [c for c in (root.iter("testcase") if root is not None else []) if c.get("name", "").startswith("property:")]
    check(len(props) == 1 and props[0].find("failure") is None,
          "margin --junit up to 120%: the property holds at the written spread (its margin is 150%)")


CHROMIUM = "/usr/bin/chromium"


def rendered(page, profile, tmp):
    """The DOM of `page` after its script ran in headless Chromium, or None (and a failure)."""
    p = subprocess.run([CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
                        "--disable-background-networking", "--disable-component-update", "--disable-sync",
                        "--user-data-dir=" + os.path.join(tmp, profile), "--virtual-time-budget=5000",
                        "--dump-dom", "file://" + page], capture_output=True, text=True, timeout=120)
    body = re.search(r"<body([^>]*)>", p.stdout)
    attrs = body.group(1) if body else ""
    check('data-errors="0"' in attrs and 'data-rendered="1"' in attrs, f"{page}: the page did not draw cleanly: {attrs}")
    return p.stdout if body else None


def html_reports(binary, tmp):
    if not os.path.exists(CHROMIUM):
        print("note: /usr/bin/chromium is absent; the HTML pages are not rendered")
        return
    stuck = write_file(tmp, "stuck_h.settle", STUCK)
    for cmd in (["run", stuck], ["sweep", stuck, "--corners", "extremes"]):
        page, js = os.path.join(tmp, cmd[0] + ".html"), os.path.join(tmp, cmd[0] + ".json")
        run_settle(binary, *cmd, "--html", page, "--json", js, "-q")
        dom = rendered(page, cmd[0], tmp)
        if dom is None or not os.path.exists(js):
            continue
        doc = json.load(open(js))
        last = doc["steps"][-1]
        owed = last.get("owed") or (last.get("outcomes") or [{}])[0].get("owed") or []
        blocks = re.findall(r'data-owed="(\d+)"', dom)
        check(blocks and all(int(b) == len(owed) for b in blocks) and len(owed) == 2,
              f"{cmd[0]} --html: owed blocks {blocks}, want each to list the JSON's {len(owed)} owed rules (2)")
        check('class="step closed-loop"' in dom and "cycle" in dom,
              f"{cmd[0]} --html: no section with the gauges")
    # The margin page lists the property's own margin and the written spread's properties.
    overlap = write_file(tmp, "overlap_h.settle", OVERLAP)
    page = os.path.join(tmp, "margin.html")
    run_settle(binary, "margin", overlap, "--corners", "extremes", "--up-to", "300", "--html", page, "-q")
    dom = rendered(page, "margin", tmp)
    check(dom is not None and dom.count("never a &amp; b") >= 2 and "150%" in dom,
          "margin --html: the property and its 150% margin are not on the page")


if __name__ == "__main__":
    sys.exit(run_cases([property_margin, gauge_expectation_margin, junit_reports, html_reports], "settle-closed-reports-"))
