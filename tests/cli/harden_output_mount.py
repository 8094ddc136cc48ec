#!/usr/bin/python3
"""Output safety on real file systems (issue 7): a read-only folder and a full disk, each a
small tmpfs mounted for the test. A failed write gives exit 2 and a message naming the path,
keeps the file that was there before byte for byte, and leaves no temporary behind. A VCD
larger than the space left must not appear truncated. Skipped (exit 77) where mount is not
permitted. tmpfs and its size= and ro options: Linux mount(8) and tmpfs(5) (common practice)."""
import errno
import os
import subprocess
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, failures, scratch  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
lamp = os.path.join(src, "tests", "data", "lamp_panel.settle")
mounted = []


def run(args):
    p = subprocess.run([settle, *args], capture_output=True, text=True, timeout=300)
    return p.returncode, p.stdout, p.stderr


def mount(folder, opts):
    p = subprocess.run(["mount", "-t", "tmpfs", "-o", opts, "tmpfs", folder], capture_output=True, text=True)
    if p.returncode == 0:
        mounted.append(folder)
    return p.returncode == 0


def leftovers(folder):
    return [n for n in os.listdir(folder) if ".tmp." in n]


tmp = scratch("settle-harden-mount-")
try:
    full = os.path.join(tmp, "full")
    os.mkdir(full)
    if not mount(full, "size=16k"):
        print("skipped: mount -t tmpfs is not permitted here")
        sys.exit(77)

    # A full disk: an old report sits there, then the rest of the space is taken.
    old = os.path.join(full, "report.out")
    with open(old, "w") as f:
        f.write("OLD REPORT\n")
    try:
        with open(os.path.join(full, "filler"), "wb") as f:
            while True:
                f.write(b"\0" * 1024)
                f.flush()
    except OSError as e:
        check(e.errno == errno.ENOSPC, f"the tmpfs fills up ({e})")
    for name, args in (("check --json", ["check", lamp, "--json", old]),
                       ("run --json", ["run", lamp, "--json", old]),
                       ("run --vcd", ["run", lamp, "--vcd", old]),
                       ("sweep --json", ["sweep", lamp, "--corners", "extremes", "--json", old])):
        rc, _, se = run(args)
        check(rc == 2, f"full disk, {name}: exit 2 (got {rc})")
        check(old in se, f"full disk, {name}: the message names the path ({se[-300:]!r})")
        check(open(old).read() == "OLD REPORT\n", f"full disk, {name}: the old file is intact")
        check(not leftovers(full), f"full disk, {name}: no temporary left ({leftovers(full)})")

    # Room for a little but not for the whole VCD: the write fails part-way, nothing appears.
    roomy = os.path.join(tmp, "roomy")
    os.mkdir(roomy)
    if mount(roomy, "size=64k"):
        # A bank of delay-monitor rings (demo scenario) left running for 200ns: about a megabyte of VCD.
        lines = ["input enable", "output " + ", ".join(f"t{r}" for r in range(10))]
        for r in range(10):
            lines.append("wire " + ", ".join(f"r{r}_{k}" for k in range(5)))
            lines.append(f"r{r}_0 = nand(enable, r{r}_4) delay 40ps")
            lines += [f"r{r}_{k} = not(r{r}_{k-1}) delay 25ps" for k in range(1, 5)]
            lines.append(f"t{r} = buf(r{r}_4) delay 30ps")
        lines += ["stimulus {", "  at 0ns enable = 0", "  settle", "  after 1ns enable = 1", "  run 200ns", "}"]
        ring = os.path.join(tmp, "ring_bank.settle")
        with open(ring, "w") as f:
            f.write("\n".join(lines) + "\n")
        vcd = os.path.join(roomy, "ring.vcd")
        rc, _, se = run(["run", ring, "--vcd", vcd])
        probe = os.path.join(tmp, "probe.vcd")
        run(["run", ring, "--vcd", probe])
        big = os.path.getsize(probe) if os.path.exists(probe) else 0
        check(big > 64 * 1024, f"the probe VCD is larger than the 64k tmpfs ({big} bytes)")
        check(rc == 2 and vcd in se, f"VCD larger than the disk: exit 2 naming it ({rc}, {se[-300:]!r})")
        check(not os.path.exists(vcd), "VCD larger than the disk: no truncated file at the path")
        check(not leftovers(roomy), "VCD larger than the disk: no temporary left")

    # A read-only folder.
    ro = os.path.join(tmp, "readonly")
    os.mkdir(ro)
    if mount(ro, "size=64k,ro"):
        target = os.path.join(ro, "r.json")
        rc, _, se = run(["run", lamp, "--json", target])
        check(rc == 2 and target in se, f"read-only folder: exit 2 naming the path ({rc}, {se[-300:]!r})")
        check(not os.path.exists(target), "read-only folder: nothing at the path")
    else:
        print("note: a read-only tmpfs could not be mounted; that case was not run")
finally:
    for m in reversed(mounted):
        subprocess.run(["umount", m], capture_output=True)

sys.exit(1 if failures else 0)
