#!/usr/bin/env python3
"""The state graphs drawn in `explore --html` are labelled with the same state bits as the DOT
file of the same run. For every example that `explore` accepts, and for the NOR lamp latch of
tests/data, the page is rendered in headless Chromium (Debian package chromium, `--dump-dom`), every
node label of every drawn graph is read from the DOM, and the set of labels per step must equal the
set of node labels per step cluster of the `--dot` output, as Graphviz reads it (`dot -Tjson`,
Debian package graphviz). A state whose bits are not a palindrome shows any reversal."""
import glob
import html.parser
import json
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, scratch, summary  # noqa: E402

CHROMIUM, DOT = "/usr/bin/chromium", "/usr/bin/dot"
HTML_GRAPH_LIMIT = 60  # html_graph_limit in waves/html.hpp: larger graphs are listed, not drawn
settle, src = sys.argv[1], sys.argv[2]
for tool in (CHROMIUM, DOT):
    if not os.path.exists(tool):
        print(f"SKIP: {tool} is absent (scripts/deps installs chromium and graphviz)")
        sys.exit(77)
tmp = scratch("settle-labels-")


class GraphLabels(html.parser.HTMLParser):
    """Per drawn graph (<svg class="graph" data-step=N>): the texts of its <text class="state-label">."""

    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.labels, self._step, self._in_label = {}, None, False

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        classes = (a.get("class") or "").split()
        if tag == "svg" and "graph" in classes:
            self._step = int(a["data-step"])
            self.labels.setdefault(self._step, [])
        self._in_label = tag == "text" and "state-label" in classes and self._step is not None

    def handle_endtag(self, tag):
        if tag == "svg":
            self._step = None
        if tag == "text":
            self._in_label = False

    def handle_data(self, d):
        if self._in_label:
            self.labels[self._step].append(d)


def dot_labels(path):
    """Per step cluster of the DOT file: the labels of its nodes, as Graphviz parses them."""
    p = subprocess.run([DOT, "-Tjson", path], capture_output=True, text=True, timeout=120)
    check(p.returncode == 0, f"{path}: dot -Tjson exit {p.returncode}: {p.stderr[-300:]}")
    objects = json.loads(p.stdout).get("objects", []) if p.returncode == 0 else []
    out = {}
    for o in objects:
        if o.get("name", "").startswith("cluster_step"):
            step = int(o["name"][len("cluster_step"):])
            out[step] = sorted(objects[i]["label"] for i in o.get("nodes", []))
    return out


designs = sorted(glob.glob(os.path.join(src, "examples", "*.settle")))
designs.append(os.path.join(src, "tests", "data", "explore_contacts.settle"))
compared = asymmetric = 0
for design in designs:
    name = os.path.basename(design)
    page, dot = os.path.join(tmp, name + ".html"), os.path.join(tmp, name + ".dot")
    p = subprocess.run([settle, "explore", design, "--html", page, "--dot", dot], capture_output=True, text=True,
                       timeout=300)
    if p.returncode == 2 and "does not support clocks" in p.stderr:
        print(f"{name}: explore refuses it (clocks), as documented")
        continue
    if p.returncode == 2 and "does not take metastable elements" in p.stderr:
        print(f"{name}: explore refuses it (a mutex or syncff), as documented")
        continue
    check(p.returncode in (0, 1), f"{name}: explore exit {p.returncode}: {p.stderr[-300:]}")
    if p.returncode not in (0, 1):
        continue
    r = subprocess.run([CHROMIUM, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
                        "--disable-background-networking", "--disable-component-update", "--disable-sync",
                        "--user-data-dir=" + os.path.join(tmp, "profile-" + name), "--virtual-time-budget=5000",
                        "--dump-dom", "file://" + page], capture_output=True, text=True, timeout=120)
    check(r.returncode == 0, f"{name}: chromium --dump-dom exit {r.returncode}")
    parser = GraphLabels()
    parser.feed(r.stdout)
    drawn = {step: sorted(labels) for step, labels in parser.labels.items()}
    # The page draws a step's graph only up to HTML_GRAPH_LIMIT states (waves/html.hpp), and says so.
    want = {step: labels for step, labels in dot_labels(dot).items() if len(labels) <= HTML_GRAPH_LIMIT}
    check(drawn == want, f"{name}: drawn labels {drawn} differ from the DOT labels {want}")
    compared += sum(len(v) for v in want.values())
    asymmetric += sum(1 for v in want.values() for label in v if label != label[::-1])
    print(f"{name}: {sum(len(v) for v in drawn.values())} drawn node labels in {len(drawn)} graphs")

# The check must be able to see a reversal: some compared state is not a palindrome.
check(compared > 0 and asymmetric > 0, f"{compared} labels compared, {asymmetric} of them not palindromes")
sys.exit(summary())
