#!/usr/bin/env python3
"""The --html reports, loaded in headless Chromium (Debian package chromium).

Checks, on reports of examples/arbiter.settle (two outcomes in step 2):
- the page renders with no script error (the page counts them into
  <body data-errors>) and Chromium logs no console error or uncaught exception;
- the DOM holds one outcome block per outcome of the sweep JSON and one
  waveform row per (non-deterministic step, drawn witness, reported net);
- the numbers on the page (counts, shares, settle times) equal those of the
  sweep's --json for the same run, and those of an independent second run;
- each witness trace ends on the values its outcome reports, and the histogram
  holds exactly each outcome's corners between the settle min and max;
- run, explore and margin reports load without errors too;
- a 1280x900 screenshot is kept as a test artefact in the build directory.
Usage: html_report.py SETTLE_BINARY SOURCE_DIR
"""
import html.parser
import json
import os
import re
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, scratch  # noqa: E402

CHROMIUM = "/usr/bin/chromium"
settle, src = sys.argv[1], sys.argv[2]
if not os.path.exists(CHROMIUM):
    print("SKIP: /usr/bin/chromium is absent (Debian package chromium; scripts/deps installs it)")
    sys.exit(77)


tmp = scratch("settle-html-")
artefacts = os.path.join(os.path.dirname(os.path.dirname(os.path.abspath(settle))), "test-artefacts")
os.makedirs(artefacts, exist_ok=True)
arbiter = os.path.join(src, "examples", "arbiter.settle")


def chromium(args, profile):
    # Chromium's own headless mode: no network, no first-run work, a fresh profile.
    base = [CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
            "--disable-background-networking", "--disable-component-update", "--disable-sync",
            "--user-data-dir=" + os.path.join(tmp, profile), "--enable-logging=stderr", "--v=0",
            "--virtual-time-budget=5000"]
    return subprocess.run(base + args, capture_output=True, text=True, timeout=120)


def load(page, name):
    """Dumps the rendered DOM; returns (dom, stderr)."""
    p = chromium(["--dump-dom", "file://" + page], name)
    check(p.returncode == 0, f"{name}: chromium --dump-dom exit {p.returncode}: {p.stderr[-400:]}")
    err = p.stderr
    # Chromium logs page console messages as "CONSOLE(n)" / "Uncaught ..." lines (common practice of its logging).
    bad = [l for l in err.splitlines() if "Uncaught" in l or ("CONSOLE" in l and "error" in l.lower())]
    check(not bad, f"{name}: console errors: {bad[:3]}")
    body = re.search(r"<body([^>]*)>", p.stdout)
    check(body is not None, f"{name}: no <body> in the dumped DOM")
    attrs = body.group(1) if body else ""
    check('data-errors="0"' in attrs, f"{name}: script errors recorded on the page: {attrs}")
    check('data-rendered="1"' in attrs, f"{name}: the page did not finish drawing: {attrs}")
    return p.stdout


class Dom(html.parser.HTMLParser):
    """Elements with their attributes, and the text of <script id=settle-data>, from the dumped DOM."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.elements, self.data, self._in_data = [], "", False

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        a["<tag>"] = tag
        self.elements.append(a)
        self._in_data = tag == "script" and a.get("id") == "settle-data"

    def handle_endtag(self, tag):
        if tag == "script":
            self._in_data = False

    def handle_data(self, d):
        if self._in_data:
            self.data += d

    def with_class(self, cls):
        return [e for e in self.elements if cls in (e.get("class") or "").split()]


def parse(dom):
    d = Dom()
    d.feed(dom)
    return d


# ---- the sweep report and the sweep's JSON of the same run
page = os.path.join(tmp, "arbiter.html")
out = os.path.join(tmp, "arbiter.json")
p = subprocess.run([settle, "sweep", arbiter, "--json", out, "--html", page, "-q"], capture_output=True, text=True)
check(p.returncode == 1, f"sweep exit {p.returncode} (the arbiter race is a finding): {p.stderr}")
check(os.path.exists(page), "sweep --html wrote no file")
sweep = json.load(open(out))
dom = parse(load(page, "sweep"))
embedded = json.loads(dom.data)
check(embedded["kind"] == "sweep", "embedded kind")
# The page's data are the command's JSON for the same run, number for number.
check(embedded["result"] == sweep, "embedded result differs from sweep --json")
# An independent second run gives the same counts, shares and settle times (timing fields aside).
again = json.loads(subprocess.run([settle, "sweep", arbiter, "--json", "-", "-q", "--threads", "1"],
                                  capture_output=True, text=True).stdout)
for s_page, s_json in zip(embedded["result"]["steps"], again["steps"]):
    for o_page, o_json in zip(s_page["outcomes"], s_json["outcomes"]):
        for k in ("count", "share", "share_ci95", "settle_fs", "witness", "values", "status"):
            check(o_page[k] == o_json[k], f"step {s_page['index']}: {k} {o_page[k]} != {o_json[k]}")

nets = embedded["nets"]
first = sweep["steps"][0]["outcomes"][0]["values"]
check(nets == list(first.keys()), f"reported nets {nets} vs JSON values {list(first.keys())}")

outcomes = dom.with_class("outcome")
want_outcomes = sum(len(s["outcomes"]) for s in sweep["steps"])
check(len(outcomes) == want_outcomes, f"{len(outcomes)} outcome blocks, want {want_outcomes}")
check(want_outcomes == 5, f"the arbiter sweep has 1+2+1+1 outcomes, got {want_outcomes}")
for e in outcomes:
    st = sweep["steps"][int(e["data-step"]) - 1]
    o = st["outcomes"][int(e["data-rank"]) - 1]
    check(int(e["data-count"]) == o["count"], f"outcome block count {e['data-count']} vs {o['count']}")
    check(float(e["data-share"]) == o["share"], f"outcome block share {e['data-share']} vs {o['share']}")
    check(e["data-witness"] == o["witness"], "outcome block witness")
    for k in ("min", "median", "max"):
        check(int(e["data-settle-" + k]) == o["settle_fs"][k], f"outcome block settle {k}")

nondet = [s for s in sweep["steps"] if s["verdict"] != "deterministic"]
check(len(nondet) == 1 and nondet[0]["index"] == 2, "the arbiter's step 2 alone is not deterministic")
rows = dom.with_class("wave-row")
want_rows = sum(min(len(s["outcomes"]), 8) for s in nondet) * len(nets)
check(len(rows) == want_rows, f"{len(rows)} waveform rows, want {want_rows}")
check(len(dom.with_class("parting")) == len(nondet), "one parting mark per waveform panel")
check(len(dom.with_class("hist")) == len(sweep["steps"]), "one histogram per step")


def value_at(net, t):
    v = net["i"]
    for ti, vi in zip(net["t"], net["v"]):
        if ti <= t:
            v = vi
    return v


for w in embedded["waves"]:
    st = sweep["steps"][w["step"] - 1]
    for tr in w["traces"]:
        o = st["outcomes"][tr["outcome"] - 1]
        check(tr["corner"] == o["witness"], "trace corner is the outcome's witness")
        end = [value_at(n, w["span_fs"]) for n in tr["nets"]]
        check(end == [o["values"][n] for n in nets], f"step {w['step']} witness {tr['corner']} ends at {end}")
    # Where the traces part: before it every net agrees, at it some net differs.
    d = w["diverge_fs"]
    check(d is not None, "the two witnesses part somewhere")
    if d is not None:
        at = [[value_at(n, d) for n in tr["nets"]] for tr in w["traces"]]
        check(at[0] != at[1], "the witnesses differ at the parting instant")
        times = sorted({t for tr in w["traces"] for n in tr["nets"] for t in n["t"] if t < d} | {0})
        for t in times:
            vals = [[value_at(n, t) for n in tr["nets"]] for tr in w["traces"]]
            check(vals[0] == vals[1], f"the witnesses already differ at {t} fs, before {d}")

for h in embedded["hist"]:
    st = sweep["steps"][h["step"] - 1]
    check(h["lo_fs"] == min(o["settle_fs"]["min"] for o in st["outcomes"]), "histogram low end")
    check(h["hi_fs"] == max(o["settle_fs"]["max"] for o in st["outcomes"]), "histogram high end")
    for c, o in zip(h["counts"], st["outcomes"]):
        check(sum(c) == o["count"], f"histogram of step {h['step']} holds {sum(c)} corners, want {o['count']}")

shot = os.path.join(artefacts, "html_sweep_arbiter.png")
if os.path.exists(shot):
    os.remove(shot)
p = chromium(["--hide-scrollbars", "--window-size=1280,900", "--screenshot=" + shot, "file://" + page], "shot")
ok = os.path.exists(shot) and open(shot, "rb").read(8) == b"\x89PNG\r\n\x1a\n"  # PNG signature (RFC 2083)
check(ok, f"no PNG screenshot at {shot}")
print("screenshot:", shot)

# ---- run, explore and margin reports of the same design
run_page = os.path.join(tmp, "run.html")
run_json = os.path.join(tmp, "run.json")
p = subprocess.run([settle, "run", arbiter, "--corner", "max", "--json", run_json, "--html", run_page, "-q"],
                   capture_output=True, text=True)
check(p.returncode == 0, f"run exit {p.returncode}: {p.stderr}")
run = json.load(open(run_json))
rdom = parse(load(run_page, "run"))
rdata = json.loads(rdom.data)
check(rdata["result"]["steps"] == run["steps"], "run report: embedded steps differ from run --json")
check(len(rdom.with_class("wave-row")) == len(run["steps"]) * len(nets), "run report: one row per step and net")
for w in rdata["waves"]:
    st = run["steps"][w["step"] - 1]
    tr = w["traces"][0]
    check(tr["start_fs"] == st["start_fs"] and tr["end_fs"] == st["end_fs"], "run report: step window")
    changes = {n: sum(1 for _ in net["t"]) for n, net in zip(nets, tr["nets"])}
    check(changes == st["transitions"], f"run report: step {w['step']} changes {changes} vs {st['transitions']}")

exp_page = os.path.join(tmp, "explore.html")
p = subprocess.run([settle, "explore", arbiter, "--html", exp_page], capture_output=True, text=True)
edom = parse(load(exp_page, "explore"))
edata = json.loads(edom.data)
graphs = edom.with_class("graph")
check(len(graphs) == len(edata["graphs"]) >= 1, "explore report: state graphs drawn")
for g in edata["graphs"]:
    st = edata["result"]["steps"][g["step"] - 1]
    check(len(g["nodes"]) == st["states"], "explore report: every state of the step is a node")
    check(sum(1 for n in g["nodes"] if n["stable"]) == len(st["stable"]), "explore report: stable states")

mar_page = os.path.join(tmp, "margin.html")
p = subprocess.run([settle, "margin", arbiter, "--corners", "extremes+random:50", "--html", mar_page, "-q"],
                   capture_output=True, text=True)
check(os.path.exists(mar_page), f"margin --html wrote no file: {p.stderr}")
mdom = parse(load(mar_page, "margin"))
mdata = json.loads(mdom.data)
fig = [e for e in mdom.elements if "data-margin" in e]
check(len(fig) == 1 and float(fig[0]["data-margin"]) == mdata["result"]["margin_pct"], "margin figure")

# ---- oscillating and timed-out outcomes: their times are labelled for what they are
# (detection, last change), never as settle times, and the pages still render cleanly.
ring = [os.path.join(src, "examples", "delay_ring.settle"), "--stim", os.path.join(src, "examples", "delay_ring_free.stim")]
for name, extra in (("ring-osc", []), ("ring-timeout", ["--horizon", "500ps"])):
    rpage, rjson = os.path.join(tmp, name + ".html"), os.path.join(tmp, name + ".json")
    subprocess.run([settle, "sweep", *ring, "--corners", "extremes", *extra, "--json", rjson, "--html", rpage, "-q"],
                   capture_output=True, text=True)
    rdom2 = parse(load(rpage, name))
    rsweep = json.load(open(rjson))
    key = "detected_fs" if name == "ring-osc" else "last_change_fs"
    word = "repeat detected " if name == "ring-osc" else "last change "
    cards = [e for e in rdom2.with_class("outcome") if e["data-step"] == "2"]
    check(cards, f"{name}: outcome blocks for step 2")
    for e in cards:
        o = rsweep["steps"][1]["outcomes"][int(e["data-rank"]) - 1]
        check("settle_fs" not in o and key in o, f"{name}: outcome times under {key}, not settle_fs ({list(o)})")
        for k in ("min", "median", "max"):
            check(int(e["data-settle-" + k]) == o[key][k], f"{name}: outcome block {k} is its {key}")
    check(word.strip() in "".join(re.findall(r'class="sub">([^<]*)<', load(rpage, name + "-text"))),
          f"{name}: the outcome card labels its times '{word.strip()}'")

if failures:
    print(f"{len(failures)} failure(s)")
    sys.exit(1)
print("ok")
