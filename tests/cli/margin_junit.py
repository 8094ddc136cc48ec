#!/usr/bin/python3
"""JUnit-style XML from run, sweep and margin: well-formed per xmllint --noout (Debian
libxml2-utils), one failure per failing expectation, replay commands in the failures."""
import json
import os
import shutil
import subprocess
import sys
import tempfile
import xml.etree.ElementTree as ET

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, runner  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
if not shutil.which("xmllint"):
    print("xmllint (libxml2-utils) not installed: skipped")
    sys.exit(77)
data = os.path.join(src, "tests", "data")
race = os.path.join(data, "margin_race.settle")


run = runner(settle, 300)


def well_formed(path):
    # xmllint --noout prints nothing and exits 0 on a well-formed document (libxml2).
    p = subprocess.run(["xmllint", "--noout", path], capture_output=True, text=True)
    return p.returncode == 0 and p.stderr == ""


def expectation_failures(path):
    root = ET.parse(path).getroot()
    return [f for f in root.iter("failure") if f.get("type") == "expectation"]


tmp = tempfile.mkdtemp(prefix="settle-junit-")


def junit_and_json(cmd, args, xml_name, json_name):
    """Runs `settle cmd race args` writing JUnit XML and JSON into tmp; checks the XML is
    well-formed and has one expectation failure per expectation the JSON reports failing.
    Returns (XML path, JSON report, failing count, the XML's expectation failures)."""
    x = os.path.join(tmp, xml_name)
    run(cmd, race, *args, "--junit", x, "--json", os.path.join(tmp, json_name))
    check(well_formed(x), f"{cmd} JUnit is well-formed")
    doc = json.load(open(os.path.join(tmp, json_name)))
    failing = sum(1 for s in doc["steps"] for e in s["expect"] if not e["pass"])
    fx = expectation_failures(x)
    check(len(fx) == failing and failing > 0, f"{cmd}: {len(fx)} expectation failures vs {failing} in JSON")
    return x, doc, failing, fx


# run: a corner above the margin fails step 2's value expectation.
x, rj, failing, fx = junit_and_json("run", ["--corner", "max"], "run.xml", "run.json")
check(all("settle run" in f.text and "--corner max" in f.text for f in fx), "run failures carry the replay command")
root = ET.parse(x).getroot()
suite = root.find("testsuite")
check(suite is not None and suite.get("name") == race, "one testsuite named after the design")
cases = suite.findall("testcase")
n_expect = sum(len(s["expect"]) for s in rj["steps"])
check(len(cases) == len(rj["steps"]) + n_expect, "a testcase per step and per expectation")
check(int(suite.get("failures")) == sum(1 for c in cases if c.find("failure") is not None), "failures count")

# sweep: per expectation, failing in any corner.
x, _, failing, fx = junit_and_json("sweep", ["--corners", "extremes+random:50"], "sweep.xml", "s.json")
check(all("witness:" in f.text and "replay: settle run" in f.text for f in fx), "sweep failures name witness and replay")

# margin: expectations judged at the written spread.
x = os.path.join(tmp, "margin.xml")
rc, out, err = run("margin", race, "--corners", "extremes+random:50", "--junit", x, "--json", os.path.join(tmp, "m.json"))
check(well_formed(x), "margin JUnit is well-formed")
fx = expectation_failures(x)
check(len(fx) == failing, f"margin: {len(fx)} expectation failures vs {failing} in the same sweep at w = 100%")
mfail = [f for f in ET.parse(x).getroot().iter("failure") if f.get("type") == "margin"]
check(len(mfail) == 1 and "@0." in mfail[0].text, "one margin failure (step 2) with its witness at a spread")

# Escaping: names with XML metacharacters still give a well-formed file.
odd = os.path.join(tmp, 'a&b<"c">.settle')
shutil.copy(race, odd)
x = os.path.join(tmp, "odd.xml")
run("run", odd, "--corner", "max", "--junit", x)
check(well_formed(x), "escaped design name is well-formed")
check(ET.parse(x).getroot().find("testsuite").get("name") == odd, "the escaped name reads back unchanged")

shutil.rmtree(tmp)
sys.exit(1 if failures else 0)
