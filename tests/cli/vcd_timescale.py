#!/usr/bin/python3
"""One VCD timescale per design: the same $timescale under every corner, from run --vcd
and from sweep --vcd-dir, and every file read back by sigrok-cli (Debian package
sigrok-cli, a general-purpose VCD reader). The format rules are IEEE Std 1364-2005
clause 18 (18.2.3.5: `$timescale number unit $end`, number 1, 10 or 100)."""
import glob
import os
import re
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, run_settle, scratch  # noqa: E402
from vcd_rules import UNITS, need_sigrok  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
need_sigrok()


def timescale_of(path):
    text = open(path).read()
    m = re.search(r"\$timescale\s+(1|10|100)\s*(s|ms|us|ns|ps|fs)\s+\$end", text)  # IEEE 1364-2005 18.2.3.5
    check(m is not None, f"{path}: a $timescale of 1, 10 or 100 s..fs")
    if not m:
        return None
    scale = int(m.group(1)) * UNITS[m.group(2)]
    body = text.partition("$enddefinitions $end")[2]
    times = [int(l[1:]) * scale for l in body.split("\n") if l.startswith("#")]
    return scale, times


def sigrok_reads(path):
    # sigrok-cli's VCD input reads the file and writes it back out as VCD.
    p = subprocess.run(["sigrok-cli", "-I", "vcd", "-i", path, "-O", "vcd"], capture_output=True, text=True,
                       timeout=120)
    check(p.returncode == 0 and "$enddefinitions" in p.stdout, f"sigrok-cli reads {path} ({p.stderr.strip()})")


tmp = scratch("settle-vcd-ts-")
CORNERS = ["min", "typ", "max", "random:1"]

# A panel lamp driver with fixed delays of 20 ps and 30 ps and inputs on whole
# nanoseconds (demo data): every time any corner can produce is a multiple of
# 10 ps (gcd of 20 ps, 30 ps, 1 ns and the default step limit 10,000 x 30 ps =
# 300 ns), and 100 ps does not divide 30 ps. So the design's timescale is 10 ps.
FIXED = """input press
output lamp
wire lit_n
lit_n = not(press) delay 20ps
lamp = not(lit_n) delay 30ps
stimulus {
    at 0ns press = 0
    settle
    after 1ns press = 1
    settle
    after 2ns press = 0
    settle
}
"""
# The same with a range on one gate: a random corner draws any whole fs in
# 20..30 ps, so only 1 fs represents every corner, min and max included.
RANGED = FIXED.replace("delay 20ps", "delay 20ps..30ps")

for name, text, want in (("fixed", FIXED, 10**4), ("ranged", RANGED, 1)):
    design = os.path.join(tmp, name + ".settle")
    open(design, "w").write(text)
    seen = {}
    for c in CORNERS:
        vcd = os.path.join(tmp, f"{name}_{c.replace(':', '-')}.vcd")
        rc, _, err = run_settle(settle, "run", design, "--corner", c, "--vcd", vcd, "-q")
        check(rc == 0, f"{name} {c}: run exits 0 ({rc}, {err.strip()})")
        got = timescale_of(vcd) if os.path.exists(vcd) else None
        if got:
            scale, times = got
            seen[c] = scale
            check(all(t % scale == 0 for t in times), f"{name} {c}: every #time is a whole multiple of the timescale")
            sigrok_reads(vcd)
    check(len(set(seen.values())) == 1, f"{name}: one $timescale under {CORNERS} (got {seen})")
    check(all(v == want for v in seen.values()), f"{name}: timescale {want} fs (got {seen})")
    print(f"{name}: $timescale {sorted(set(seen.values()))} fs under {', '.join(CORNERS)}")

# The arbiter example races: sweep writes one VCD per outcome, each from its own
# witness corner. They and run's VCDs of the same design share one timescale.
arbiter = os.path.join(src, "examples", "arbiter.settle")
if os.path.exists(arbiter):
    out = os.path.join(tmp, "witness")
    rc, _, err = run_settle(settle, "sweep", arbiter, "--vcd-dir", out, "-q")
    check(rc == 1, f"arbiter sweep exits 1 (a race) ({rc}, {err.strip()})")
    files = sorted(glob.glob(os.path.join(out, "*.vcd")))
    check(len(files) >= 2, f"arbiter sweep writes a VCD per outcome ({files})")
    scales = {}
    for f in files:
        got = timescale_of(f)
        if got:
            scales[os.path.basename(f)] = got[0]
            sigrok_reads(f)
    for c in CORNERS:
        vcd = os.path.join(tmp, f"arbiter_{c.replace(':', '-')}.vcd")
        run_settle(settle, "run", arbiter, "--corner", c, "--vcd", vcd, "-q")
        got = timescale_of(vcd) if os.path.exists(vcd) else None
        if got:
            scales[c] = got[0]
    check(len(set(scales.values())) == 1, f"arbiter: one $timescale over sweep witnesses and run corners ({scales})")
    print(f"arbiter: $timescale {sorted(set(scales.values()))} fs over {len(scales)} files")

print("vcd_timescale:", "FAILED" if failures else "ok", f"({len(failures)} failures)")
sys.exit(1 if failures else 0)
