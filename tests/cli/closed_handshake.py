#!/usr/bin/python3
# A four-phase handshake closed by reaction rules: a one-buffer circuit of delay d answered by an
# environment that reacts to every acknowledge edge after e. The acknowledge's period is 2(d + e),
# `times N` gives N + 1 request rises, and a circuit that never acknowledges ends in `deadlock`.
#
# Called by ctest as: closed_handshake.py <settle binary> <source dir>. Exit 77 = skipped.
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, run_cases, run_settle, write_file  # noqa: E402
from closed_loop import by_name, edges, have_sigrok, report, sigrok_changes  # noqa: E402


def handshake(d_ps, e_ps, n, gate="ack = buf(req)"):
    """Step 1 settles with req = ack = 0; step 2 raises the request once by `after`, and from
    then on each acknowledge edge is answered after e. The rules' line is the instant of that
    rise, where neither condition is true (the lowering rule waits for ~ack with req low)."""
    return f"""# one request/acknowledge pair closed by the environment
input  req
output ack
{gate} delay {d_ps}ps
stimulus {{
    at 0ns req = 0
    settle
    after 1ns req = 1
    when ack after {e_ps}ps : req = 0 times {n}
    when ~ack & ~req after {e_ps}ps : req = 1 times {n}
    gauge cycle = period of ack
    settle
}}
"""


def period_is_two_round_trips(binary, tmp):
    # Common practice: a four-phase (return-to-zero) cycle is two round trips through circuit and
    # environment, so the acknowledge rises every 2(d + e).
    n = 6
    for d, e in ((30, 100), (45, 250), (70, 70), (125, 10)):
        path = write_file(tmp, f"hs_{d}_{e}.settle", handshake(d, e, n))
        vcd = os.path.join(tmp, f"hs_{d}_{e}.vcd")
        rc, doc = report(binary, ["run", path, "--vcd", vcd], f"handshake d={d}ps e={e}ps", want_rc=0)
        if doc is None:
            continue
        want = 2 * (d + e) * 1000
        g = by_name(doc.get("gauges"), "name", "cycle")
        check(g.get("kind") == "period" and g.get("nets") == ["ack"],
              f"d={d} e={e}: gauge {g}, want kind period on nets ['ack']")
        # N + 1 acknowledge rises (one per request rise) give N periods.
        check(g.get("count") == n, f"d={d} e={e}: gauge count {g.get('count')}, want {n}")
        for k in ("min_fs", "mean_fs", "max_fs"):
            check(g.get(k) == want, f"d={d} e={e}: gauge {k} {g.get(k)}, want 2(d+e) = {want} fs")
        steps = doc.get("steps") or []
        check(steps and steps[-1].get("status") == "settled",
              f"d={d} e={e}: last step {steps[-1].get('status') if steps else None}, want settled "
              "(every rule fired its `times`)")
        if have_sigrok():
            ch = sigrok_changes(vcd)
            if ch is not None:
                rises = edges(ch, "req", "1")
                # `at` raises it once and the rule N times more (the rule's words: times N).
                check(len(rises) == n + 1, f"d={d} e={e}: {len(rises)} request rises in the VCD read by "
                      f"sigrok-cli, want N + 1 = {n + 1}")
                acks = edges(ch, "ack", "1")
                gaps = {b - a for a, b in zip(acks, acks[1:])}
                check(gaps == {want}, f"d={d} e={e}: acknowledge rises {gaps} fs apart in the VCD, want {want}")


def never_acknowledged(binary, tmp):
    # The same environment against a circuit that never acknowledges (its enable is tied low):
    # the first request is never answered, so the rule that lowers it is owed when all is quiet.
    path = write_file(tmp, "stuck.settle", handshake(40, 100, 5, gate="ack = and(req, 0)"))
    rc, doc = report(binary, ["run", path], "run on a circuit that never acknowledges", want_rc=1)
    if doc is not None:
        st = (doc.get("steps") or [{}])[-1]
        check(st.get("status") == "deadlock", f"stuck run: status {st.get('status')}, want deadlock")
        owed = st.get("owed") or []
        lower = next((o for o in owed if "req = 0" in o.get("rule", "")), {})
        check(lower.get("rule", "").startswith("when ack after 100ps"),
              f"stuck run: owed {owed}, want the rule 'when ack after 100ps : req = 0' named")
        check(lower.get("fired") == 0 and lower.get("times") == 5 and lower.get("condition") == "0",
              f"stuck run: owed rule {lower}, want fired 0 of 5 with condition 0")
        check(doc.get("result") == "findings", f"stuck run: result {doc.get('result')}, want findings")
    rc, out, err = run_settle(binary, "run", path)
    check(rc == 1 and "deadlock" in out and "when ack after 100ps" in out,
          f"stuck run (text): exit {rc}, want 1 with 'deadlock' and the owed rule in: {out[-600:]!r}")
    rc, doc = report(binary, ["sweep", path, "--corners", "extremes+random:20"], "sweep of the stuck circuit",
                     want_rc=1)
    if doc is not None:
        st = (doc.get("steps") or [{}])[-1]
        check(st.get("verdict") == "deadlock", f"stuck sweep: verdict {st.get('verdict')}, want deadlock")
        outs = st.get("outcomes") or []
        check(outs and all(o.get("status") == "deadlock" for o in outs),
              f"stuck sweep: outcomes {[o.get('status') for o in outs]}, want all deadlock")
    rc, out, err = run_settle(binary, "sweep", path, "--corners", "extremes")
    check(rc == 1 and "DEADLOCK" in out, f"stuck sweep (text): exit {rc}, want 1 and DEADLOCK in {out[-600:]!r}")


if __name__ == "__main__":
    sys.exit(run_cases([period_is_two_round_trips, never_acknowledged], "settle-closed-hs-"))
