#!/usr/bin/env python3
"""The --html page stays small for a busy witness and draws x hatched (issue 8).

- A free-running ring whose witness has more than 100,000 value changes is
  decimated: the page says so, the trace is marked summarised, and the file
  stays under a size bound far below what the changes would take verbatim.
  The same holds when the changes are spread over several steps, none of
  which alone passes 100,000.
- A net at x is drawn with the hatch pattern: in the DOM Chromium renders
  (Debian package chromium), read with xmllint's HTML parser (Debian
  libxml2-utils), the net's x path is filled with url(#hx..), a <pattern>
  with that id holds the hatch line, and a net that is never x has no x area.
Usage: html_decimate.py SETTLE_BINARY SOURCE_DIR
"""
import functools
import json
import os
import re
import shutil
import subprocess
import sys
import tempfile

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, run_settle, summary, write_file  # noqa: E402

CHROMIUM = "/usr/bin/chromium"
XMLLINT = shutil.which("xmllint")
settle = sys.argv[1]
tmp = tempfile.mkdtemp(prefix="settle-html-decimate-")


write = functools.partial(write_file, tmp)


def page_data(path):
    """The report's data block: the JSON inside <script id="settle-data">."""
    with open(path) as f:
        text = f.read()
    m = re.search(r'<script type="application/json" id="settle-data">(.*?)</script>', text, re.S)
    if not m:
        fail(f"{path}: no settle-data block")
        return None
    return json.loads(m.group(1))


def dump_dom(page, profile):
    p = subprocess.run([CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run",
                        "--disable-background-networking", "--disable-component-update",
                        "--user-data-dir=" + os.path.join(tmp, profile), "--virtual-time-budget=5000",
                        "--dump-dom", "file://" + page], capture_output=True, text=True, timeout=120)
    check(p.returncode == 0, f"chromium --dump-dom {page}: exit {p.returncode}")
    dom = os.path.join(tmp, profile + ".dom.html")
    with open(dom, "w") as f:
        f.write(p.stdout)
    return dom


def xpath(dom, expr):
    """Values xmllint's HTML parser finds for an XPath expression (attribute values unquoted)."""
    p = subprocess.run([XMLLINT, "--html", "--xpath", expr, dom], capture_output=True, text=True)
    return re.findall(r'="([^"]*)"', p.stdout) if p.returncode == 0 else []


# A delay-monitor ring (our own scenario): a NAND and two inverters of 10ps
# each. A ring of n stages of delay d oscillates with period 2nd (common
# practice), here 60ps: every net changes twice per period, so 2us of running
# gives 3 x 2 x 2,000,000ps / 60ps = 200,000 changes on the three drawn nets.
RING = """# delay-monitor ring, free-running while enabled
input  en
output tap
wire   r1, r2
tap = nand(en, r2) delay 10ps
r1  = not(tap)     delay 10ps
r2  = not(r1)      delay 10ps
stimulus {{
    watch r1, r2
    at 0ns en = 0
    settle
    after 1ns en = 1
{runs}
}}
"""


def decimated(name, runs, bound):
    design = write(name + ".settle", RING.format(runs=runs))
    page = os.path.join(tmp, name + ".html")
    rc, out, err = run_settle(settle, "run", design, "--html", page, "--json", os.path.join(tmp, name + ".json"))
    check(rc == 0, f"{name}: exit {rc}: {err[-300:]}")
    with open(os.path.join(tmp, name + ".json")) as f:
        run = json.load(f)
    # The changes the run itself counts (its JSON transitions) are what the page must summarise.
    total = sum(sum(s["transitions"].values()) for s in run["steps"])
    check(total > 100_000, f"{name}: the witness has {total} changes, the test needs more than 100,000")
    d = page_data(page)
    if d is None:
        return
    notes = [n for n in d.get("notes", []) if "decimated" in n]
    check(len(notes) == 1 and str(total) in notes[0],
          f"{name}: the page does not say once that the {total}-change witness is decimated: {d.get('notes')}")
    traces = [t for w in d["waves"] for t in w["traces"]]
    check(any(t["summarised"] for t in traces), f"{name}: no trace is marked summarised")
    kept = sum(len(n["t"]) for t in traces for n in t["nets"])
    check(kept <= 100_000, f"{name}: {kept} changes kept on the page, more than 100,000")
    size = os.path.getsize(page)
    check(size < bound, f"{name}: the page is {size} bytes, above the bound of {bound}")
    return page


try:
    # One step of 2us: 200,000 changes in one window.
    one = decimated("ring_one_step", "    run 2us", 1_000_000)
    # Four steps of 600ns: about 60,000 changes each, 240,000 over the witness.
    decimated("ring_four_steps", "\n".join(["    run 600ns"] * 4), 1_000_000)

    if not os.path.exists(CHROMIUM) or not XMLLINT:
        print("SKIP (DOM checks): chromium or xmllint is absent (Debian packages chromium, libxml2-utils)")
    else:
        dom = dump_dom(one, "ring")
        # The note is rendered on the page, not only kept in the data.
        check(any("decimated" in t for t in xpath(dom, "//div[@class='note']/text()") + [open(dom).read()]),
              "ring: the rendered page shows no decimation note")
        busy = xpath(dom, "//path[starts-with(@fill,'url(#hb')]/@d")
        check(any(b.strip() for b in busy), "ring: no busy band is drawn for the decimated stretch")

        # A sensor FIFO handshake probe (our own scenario): the sensor line is x
        # in step 1; `seen` follows it through a buffer, `idle` is 0 throughout.
        # Step 1 says `expect seen = x`: an output left at x is a finding unless
        # the step expects it (issue 16).
        probe = write("probe.settle", """# sensor FIFO handshake probe: the sensor line floats until driven
input  sensor, ready
output seen, idle
seen = buf(sensor) delay 20ps
idle = not(ready)  delay 20ps
init idle = 0
stimulus {
    at 0ns sensor = x, ready = 1
    settle
    expect seen = x
    after 1ns sensor = 1
    settle
}
""")
        page = os.path.join(tmp, "probe.html")
        rc, out, err = run_settle(settle, "run", probe, "--html", page)
        check(rc == 0, f"probe: exit {rc}: {err[-300:]}")
        dom = dump_dom(page, "probe")
        # x is three-valued logic's unknown (Eichelberger 1965); the page must mark it apart.
        fills = set(xpath(dom, "//g[@data-net='seen']//path[starts-with(@fill,'url(#hx')]/@fill"))
        xs = [d for d in xpath(dom, "//g[@data-net='seen']//path[starts-with(@fill,'url(#hx')]/@d") if d.strip()]
        check(len(xs) >= 1, "probe: the x stretch of 'seen' is not drawn with the hatch fill")
        for f in fills:
            pid = f[len("url(#"):-1]
            lines = xpath(dom, f"//pattern[@id='{pid}']/line/@stroke")
            check(lines, f"probe: the pattern {pid} holds no hatch line")
        never_x = [d for d in xpath(dom, "//g[@data-net='idle']//path[starts-with(@fill,'url(#hx')]/@d") if d.strip()]
        check(not never_x, f"probe: 'idle' is never x but has hatched area {never_x}")
finally:
    shutil.rmtree(tmp, ignore_errors=True)

sys.exit(summary())
