#!/usr/bin/python3
"""Oscillations and timeouts say what they are: an oscillating step gives its period and
the instant its repeat was detected (no settle time); a timeout says how far it got and,
when the net values had repeated without the full state, says so and suggests --horizon.
Checked on two free-running rings of coprime stage delays (a delay-monitor scenario of
our own). Facts of the trade used (common practice): a ring of N inverting stages of delay
d oscillates with period 2·N·d; two independent periodic signals that start together
repeat jointly first after the least common multiple of their periods."""
import json
import math
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, run_settle, scratch  # noqa: E402

settle = sys.argv[1]
tmp = scratch("settle-repeats-")
DA, DB = 10007, 10009  # fs per stage; odd and 2 apart, so coprime
RINGS = f"""input en
output a3, b3
wire a1, a2, b1, b2
a1 = nand(en, a3) delay {DA}fs
a2 = not(a1) delay {DA}fs
a3 = not(a2) delay {DA}fs
b1 = nand(en, b3) delay {DB}fs
b2 = not(b1) delay {DB}fs
b3 = not(b2) delay {DB}fs
stimulus {{
    at 0ns en = 0
    settle
    after 1ns en = 1
    settle
}}
"""
design = os.path.join(tmp, "monitor.settle")
open(design, "w").write(RINGS)
PA, PB = 2 * 3 * DA, 2 * 3 * DB   # 2·N·d with N = 3 stages
JOINT = PA * PB // math.gcd(PA, PB)  # 6 x 10007 x 10009 = 600,960,378 fs, about 601 ns
HORIZON = 10000 * DB               # the default step limit: 10,000 x the largest delay, about 100 ns
check(JOINT > HORIZON, "the joint repeat lies past the default step limit (test premise)")

# --- run, default horizon: a timeout whose values repeated
rc, out, err = run_settle(settle, "run", design, "--json", "-")
check(rc == 1, f"run exits 1: a timeout is a finding ({rc}, {err.strip()})")
st = json.loads(out)["steps"][1]
check(st["status"] == "timeout", f"step 2 times out ({st['status']})")
check(st.get("reached_fs") == HORIZON, f"reached_fs is the step limit {HORIZON} ({st.get('reached_fs')})")
check("settle_fs" not in st and "last_change_fs" in st, "a timeout gives its last change, not a settle time")
moved = sum(st["transitions"].values())
check(st.get("events", 0) >= moved > 0, f"events ({st.get('events')}) count at least the reported transitions ({moved})")
rep = st.get("values_repeat")
check(rep is not None and 0 < rep["period_fs"] and rep["at_fs"] <= st["end_fs"],
      f"the repeated values are reported ({rep})")
check("--horizon" in st.get("detail", "") and "repeated" in st.get("detail", ""),
      f"the detail says the values repeated and suggests --horizon ({st.get('detail')!r})")
rc, out, _ = run_settle(settle, "run", design)
check("reason  stopped at the step's time limit" in out and "--horizon" in out,
      f"the run table explains the timeout ({out[-500:]!r})")
check("TIMEOUT at" in out, "the run table marks the timeout as a finding (capitals)")

# --- run, a horizon well past the joint repeat (repeat detection needs up to a few
# periods to recognise it): the hint was right, it oscillates
rc, out, err = run_settle(settle, "run", design, "--horizon", "5us", "--json", "-")
st = json.loads(out)["steps"][1]
check(st["status"] == "oscillating", f"with --horizon 5us step 2 oscillates ({st['status']})")
check(st.get("period_fs") == JOINT, f"period = lcm(2·3·{DA}, 2·3·{DB}) = {JOINT} fs ({st.get('period_fs')})")
check("settle_fs" not in st, "an oscillating step has no settle time")
det = st.get("detected_fs", 0)
check(st["start_fs"] + JOINT <= det == st["end_fs"], f"detected_fs ({det}) is the step's end, a period or more in")
rc, out, _ = run_settle(settle, "run", design, "--horizon", "5us")
check(f"repeat detected at" in out and "OSCILLATING" in out, f"the table labels the detection time ({out[-400:]!r})")

# --- sweep: the same words in the outcome lines and JSON
rc, out, _ = run_settle(settle, "sweep", design, "--corners", "extremes")
check("reason  at " in out and "the net values repeated" in out and "--horizon" in out,
      f"the sweep's timeout outcome explains itself ({out[-700:]!r})")
check("last change " in out, "a timeout outcome's times are labelled last change")
rc, out, _ = run_settle(settle, "sweep", design, "--corners", "extremes", "--json", "-")
oc = json.loads(out)["steps"][1]["outcomes"][0]
check(oc["status"] == "timeout" and oc.get("reached_fs") == HORIZON and oc.get("witness_events", 0) > 0,
      f"the outcome gives how far its witness got ({oc})")
check("settle_fs" not in oc and "last_change_fs" in oc and "values_repeat" in oc, "no settle time for a timeout")
rc, out, _ = run_settle(settle, "sweep", design, "--corners", "extremes", "--horizon", "5us")
check("detected " in out and "oscillating" in out.lower(), f"oscillating outcome times are labelled detected ({out[-500:]!r})")
rc, out, _ = run_settle(settle, "sweep", design, "--corners", "extremes", "--horizon", "5us", "--json", "-")
oc = json.loads(out)["steps"][1]["outcomes"][0]
check(oc["status"] == "oscillating" and oc.get("period_fs") == JOINT, f"the sweep outcome's period is {JOINT} ({oc})")
check("settle_fs" not in oc and oc.get("detected_fs", {}).get("min", 0) >= JOINT,
      f"detected_fs, at least one period after the start, replaces settle_fs ({oc})")

print("report_repeats:", "FAILED" if failures else "ok", f"({len(failures)} failures)")
sys.exit(1 if failures else 0)
