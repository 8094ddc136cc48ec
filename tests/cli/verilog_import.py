#!/usr/bin/python3
# `import "FILE.v"` in a .settle file and `include in the Verilog reader (issue 19).
#
# Called by ctest as: verilog_import.py <settle binary> <source dir>.
# Data: tests/data/import/ (a panel switch debouncer of our own: panel_latch.v, the NAND latch
# as a Verilog cell; panel_import.settle imports it; panel_block.settle writes it as a block;
# panel_switch.v includes it; panel_switch_flat.v is that include written out; panel_hold.settle
# sets initial values inside an imported instance).
import json
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, fail, run_cases, run_settle, write_file  # noqa: E402

src = sys.argv[2] if len(sys.argv) > 2 else "."
data = os.path.join(src, "tests", "data", "import")


def need(*names):
    paths = [os.path.join(data, n) for n in names]
    for p in paths:
        if not os.path.exists(p):
            fail(f"missing test data {p}")
            sys.exit(1)
    return paths


def vcd_changes(path):
    """The value changes of a VCD file per net name: IEEE 1364-2005 clause 18.2 ($var TYPE SIZE
    CODE NAME $end declares a code, '#T' sets the time, 'VCODE' changes a scalar). A name
    declared in several scopes keeps the changes of its code once."""
    names, out, t = {}, {}, 0
    with open(path) as f:
        body = False
        for line in f:
            w = line.split()
            if not w:
                continue
            if w[0] == "$var":
                names.setdefault(w[3], []).append(w[4])
            elif w[0] == "$enddefinitions":
                body = True
            elif body and w[0].startswith("#"):
                t = int(w[0][1:])
            elif body and w[0][0] in "01xXzZ" and len(w) == 1:
                for n in names.get(w[0][1:], []):
                    out.setdefault(n, []).append((t, w[0][0].lower()))
    return out


def case_latch_same(settle, tmp):
    """(a) The imported latch and the same latch written as a block give the same steps and the
    same VCD value changes, at every fixed corner."""
    imp, blk = need("panel_import.settle", "panel_block.settle")
    for corner in ("min", "typ", "max"):
        runs = []
        for design in (imp, blk):
            vcd = os.path.join(tmp, f"{os.path.basename(design)}.{corner}.vcd")
            rc, out, err = run_settle(settle, "run", design, "--corner", corner, "--json", "-", "-q", "--vcd", vcd)
            check(rc == 0, f"{design} {corner}: exit {rc}, want 0: {err[-300:]}")
            if rc != 0:
                return
            runs.append((json.loads(out)["steps"], vcd_changes(vcd)))
        (si, vi), (sb, vb) = runs
        check([(s["status"], s["values"]) for s in si] == [(s["status"], s["values"]) for s in sb],
              f"{corner}: imported and block latches give different steps: {si} / {sb}")
        check(vi == vb, f"{corner}: imported and block latches give different VCD changes: {vi} / {vb}")
        # The cross-coupled NAND latch truth table (common practice): set_n = 0 gives q = 1,
        # reset_n = 0 gives q = 0, both 1 holds the previous q; q_n is its complement once settled.
        # The steps drive (set_n, reset_n) = (1,0), (1,1), (0,1), (1,1), (1,0).
        want = ["0", "0", "1", "1", "0"]
        got = [s["values"].get("clean") for s in si]
        check(got == want, f"{corner}: clean per step {got}, want {want} (NAND latch truth table)")
        check(all(s["values"].get("clean_n") == ("1" if q == "0" else "0") for s, q in zip(si, want)),
              f"{corner}: clean_n is not the complement of clean: {si}")


def case_hier_init(settle, tmp):
    """(b) init of nets inside an imported instance (two levels deep: sw.lt.q) decides the run."""
    (hold,) = need("panel_hold.settle")
    need("panel_switch.v", "panel_latch.v")
    text = open(hold).read()
    # The latch holds while both contacts read 1 (common practice, the NAND latch truth table),
    # so with both released from the start the lamp shows the stored value, buffered.
    for init, lamp in (("init sw.lt.q = 1, sw.lt.q_n = 0", "1"), ("init sw.lt.q = 0, sw.lt.q_n = 1", "0"),
                       ("", "x")):
        design = write_file(tmp, "hold.settle",
                            text.replace('import "panel_switch.v"', f'import "{os.path.abspath(os.path.join(data, "panel_switch.v"))}"')
                            .replace("init sw.lt.q = 1, sw.lt.q_n = 0", init))
        rc, out, err = run_settle(settle, "run", design, "--json", "-", "-q", "--allow-x")
        check(rc in (0, 1), f"hold with '{init}': exit {rc}: {err[-300:]}")
        if rc not in (0, 1):
            continue
        steps = json.loads(out)["steps"]
        check(steps[0]["values"].get("lamp") == lamp, f"hold with '{init}': lamp {steps[0]['values']}, want {lamp}")
        # Touching the reset contact resets the latch whatever it held (the truth table).
        check(steps[1]["values"].get("lamp") == "0", f"hold with '{init}': after reset {steps[1]['values']}")
    rc, out, err = run_settle(settle, "run", hold, "-q")
    check(rc == 0, f"{hold}: exit {rc}, want 0 (its expectations hold): {err[-300:]}")


def expect_error(settle, design, where, text, what):
    rc, out, err = run_settle(settle, "check", design)
    check(rc == 2, f"{what}: exit {rc}, want 2: {err[-300:]}")
    check(f"{where}: error: " in err and text in err, f"{what}: want '{where}: error: ...{text}' in {err!r}")


def case_errors(settle, tmp):
    """(c) Every error case exits 2 with FILE:LINE:COL, a Verilog file's errors under its name."""
    cell = write_file(tmp, "lamp.v", "`timescale 1ps / 1ps\nmodule lamp_drive (input on, output lamp);\n"
                                     "  buf #(40:50:60) drv (lamp, on);\nendmodule\n")
    top = "input a\noutput q\ninst u lamp_drive(on: a, lamp: q)\n"
    d = write_file(tmp, "missing.settle", 'import "nowhere.v"\n' + top)
    expect_error(settle, d, f"{d}:1:8", "cannot import 'nowhere.v'", "missing file")
    d = write_file(tmp, "clash.settle", 'import "lamp.v"\nblock lamp_drive(in on; out lamp) {\n'
                                        '    lamp = buf(on) delay 1ps\n}\n' + top)
    expect_error(settle, d, f"{d}:1:8", f"module 'lamp_drive' of 'lamp.v' (at {cell}:2:8)", "name clash")
    d = write_file(tmp, "self.settle", 'import "self.settle"\n' + top)
    expect_error(settle, d, f"{d}:1:8", "import cycle", "import cycle")
    d = write_file(tmp, "inblock.settle", 'block b(in a; out q) {\n    import "lamp.v"\n'
                                          '    q = buf(a) delay 1ps\n}\n' + "input a\noutput q\ninst u b(a: a, q: q)\n")
    expect_error(settle, d, f"{d}:2:5", "'import' belongs at top level", "import in a block")
    bad = write_file(tmp, "bad.v", "`timescale 1ps / 1ps\nmodule lamp_drive (input on, output lamp);\n"
                                   "  buf #(40:50:60) drv (lamp, on)\n  wire w;\nendmodule\n")
    d = write_file(tmp, "badv.settle", 'import "bad.v"\n' + top)
    expect_error(settle, d, f"{bad}:4:3", "expected ';'", "syntax error in the Verilog file")
    # ... followed by a note pointing back at the import statement (the way compilers point
    # back at an include, common practice)
    rc, _, err = run_settle(settle, "check", d)
    check(f"{d}:1:8: note: 'bad.v' is imported here" in err, f"import note: {err!r}")
    two = write_file(tmp, "two.v", "`timescale 1ps / 1ps\nmodule lamp_drive (input on, output lamp);\n"
                                   "  buf #1 d1 (lamp, on);\n  not #1 d2 (lamp, on);\nendmodule\n")
    d = write_file(tmp, "two.settle", 'import "two.v"\n' + top)
    expect_error(settle, d, f"{two}:4:14", "has two drivers", "elaboration error in the Verilog file")
    # `include: a missing file, a cycle through two files, an error inside the included file.
    v = write_file(tmp, "inc_missing.v", '`include "gone.v"\n')
    expect_error(settle, v, f"{v}:1:10", "cannot read the included file", "missing include")
    a = write_file(tmp, "cyc_a.v", '`include "cyc_b.v"\n')
    b = write_file(tmp, "cyc_b.v", '`include "cyc_a.v"\n')
    expect_error(settle, a, f"{b}:1:10", f"`include cycle: {a} -> {b} -> {a}", "include cycle")
    v = write_file(tmp, "inc_bad.v", '// a top file including a broken cell\n`include "bad.v"\n')
    expect_error(settle, v, f"{bad}:4:3", "expected ';'", "error in an included file")


def case_vector_ports(settle, tmp):
    """(e) A vector port of an imported module binds to a list of nets, most significant bit
    first, as a Verilog concatenation does (IEEE 1364-2005 5.1.14 and 12.3.9); a list of the
    wrong width, or one net for a vector port, is refused at the binding."""
    write_file(tmp, "sel.v", "`timescale 1ps / 1ps\nmodule lamp_sel (input [1:0] d, output [1:0] y);\n"
                             "  wire nd;\n  not #1 i0 (nd, d[0]);\n  and #1 a0 (y[1], d[1], nd);\n"
                             "  buf #1 b0 (y[0], d[0]);\nendmodule\n")
    top = 'import "sel.v"\ninput hi, lo\noutput q1, q0\n'
    d = write_file(tmp, "vec.settle", top + "inst u lamp_sel(d: {hi, lo}, y: {q1, q0})\n")
    rc, out, err = run_settle(settle, "check", d, "--emit", "-")
    check(rc == 0, f"vector ports: exit {rc}: {err[-300:]}")
    # d[1] is hi and d[0] is lo; y[1] is q1 and y[0] is q0
    for want in ('"u.nd" = not(lo)', 'q1 = and(hi, "u.nd")', "q0 = buf(lo)"):
        check(want in out, f"vector ports: want '{want}' in {out}")
    d = write_file(tmp, "vec3.settle", top + "inst u lamp_sel(d: {hi, lo, 0}, y: {q1, q0})\n")
    expect_error(settle, d, f"{d}:4:17", "port 'd' of block 'lamp_sel' is 2 bits wide: bind it to "
                 "a list {...} of 2 nets, most significant first (this list has 3)", "list of 3")
    d = write_file(tmp, "vec1.settle", top + "inst u lamp_sel(d: hi, y: {q1, q0})\n")
    expect_error(settle, d, f"{d}:4:17", "port 'd' of block 'lamp_sel' is 2 bits wide", "one net")
    d = write_file(tmp, "scalar.settle", "block b(in a; out y) {\n    y = buf(a) delay 1ps\n}\n"
                                         "input a, c\noutput y\ninst u b(a: {a, c}, y: y)\n")
    expect_error(settle, d, f"{d}:6:10", "port 'a' of block 'b' is one net; bind it to one net, "
                 "not a list", "list for a scalar port")


def case_include_same(settle, tmp):
    """(d) `include of a cell file reads the same netlist as the concatenated file."""
    inc, flat = need("panel_switch.v", "panel_switch_flat.v")
    reports = []
    for design in (inc, flat):
        rc, out, err = run_settle(settle, "check", design, "--json", "-")
        check(rc == 0, f"{design}: exit {rc}: {err[-300:]}")
        if rc != 0:
            return
        r = json.loads(out)
        r.pop("design", None)
        reports.append(r)
    check(reports[0] == reports[1], f"include and written-out files differ: {reports}")
    check(reports[0].get("gates") == 3 and reports[0].get("by_kind") == {"buf": 1, "nand": 2},
          f"panel_switch: 2 NAND and 1 buffer as written, got {reports[0]}")


if __name__ == "__main__":
    sys.exit(run_cases([case_latch_same, case_hier_init, case_errors, case_include_same, case_vector_ports], "settle-import-"))
