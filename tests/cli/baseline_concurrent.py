#!/usr/bin/python3
"""Concurrent `settle margin --update-baseline` on one baseline file: three processes for three
designs started at once, 20 trials, every entry survives every time (half the trials create the
file, half add to one that holds a fourth design); three processes that must wait for a lock this
test holds all wait and then keep every entry; the old file's mode and group (and a symbolic link)
are kept; a read-only file or folder is refused with exit 2 before the search runs, the file's
bytes unchanged; SIGINT while waiting for the lock writes nothing and says so.

References: flock(2) (Linux man-pages): an exclusive lock on an open file excludes every other
flock on the same file until it is released, and the lock belongs to the open file, so a test
holding it through Python's fcntl.flock excludes settle; rename(2) (POSIX.1-2017): the new name
refers to the new file atomically, so a reader sees the old bytes or the new, never a mix; stat(2)
(POSIX): st_mode, st_gid, st_ino."""
import fcntl
import grp
import json
import os
import signal
import subprocess
import sys
import time

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "support"))
from settle_test import check, scratch, summary, wait_until_caught  # noqa: E402

settle, src = sys.argv[1], sys.argv[2]
tmp = scratch("settle-baseline-concurrent-")

# Three designs of similar search time, so the three runs finish close together; a fourth is
# the entry already in the file. Entries are keyed by the path as given (cwd = source dir).
designs = ["examples/sensor_watchdog.settle", "examples/delay_ring.settle", "examples/clock_switch.settle"]
keeper = "examples/debounce.settle"
quick = ["--corners", "extremes", "--no-culprits", "--threads", "1"]


def margin(design, base, *extra, quiet=True):
    args = [settle, "margin", design, *quick, "--baseline", base, "--update-baseline", *extra]
    return args + (["-q"] if quiet else [])


def entries(base):
    with open(base) as f:
        return [d["design"] for d in json.load(f)["designs"]]


def start_three(base, quiet=True, stderr_to=None):
    procs = []
    for i, d in enumerate(designs):
        err = open(os.path.join(tmp, f"err{i}"), "w") if stderr_to else subprocess.PIPE
        procs.append(subprocess.Popen(margin(d, base, quiet=quiet), cwd=src, stdout=subprocess.DEVNULL,
                                      stderr=err, text=True))
    return procs


def finish(procs, what):
    for p, d in zip(procs, designs):
        try:
            _, err = p.communicate(timeout=120)
        except subprocess.TimeoutExpired:
            p.kill()
            p.communicate()
            check(False, f"{what}: {d} did not finish within 120 s")
            continue
        # 0 or 1 is the margin's own verdict; 2 would be an error.
        check(p.returncode in (0, 1), f"{what}: {d} exits 0 or 1, got {p.returncode}: {err}")


# 1. Twenty trials of three at once.
lost = 0
for trial in range(20):
    base = os.path.join(tmp, f"trial{trial}.json")
    want = set(designs)
    if trial % 2:
        # Half the trials add to a file that holds another design already.
        p = subprocess.run(margin(keeper, base), cwd=src, capture_output=True, text=True, timeout=120)
        check(p.returncode == 0, f"trial {trial}: seeding the baseline exits 0, got {p.returncode}: {p.stderr}")
        want.add(keeper)
    finish(start_three(base), f"trial {trial}")
    got = entries(base) if os.path.exists(base) else []
    if set(got) != want or len(got) != len(want):
        lost += 1
        check(False, f"trial {trial}: every entry survives exactly once: want {sorted(want)}, got {got}")
    leftovers = [f for f in os.listdir(tmp) if f.startswith(f".trial{trial}.json")]
    check(not leftovers, f"trial {trial}: no lock or temporary file left beside the baseline: {leftovers}")
print(f"20 trials of three concurrent updates: {lost} lost an entry")

# 2. Deterministic contention: the test holds the lock while all three start. Each must wait
# (it says so on stderr), re-read the file under the lock once it has it, and keep the others.
base = os.path.join(tmp, "held.json")
subprocess.run(margin(keeper, base), cwd=src, capture_output=True, timeout=120)
holder = open(base)
fcntl.flock(holder, fcntl.LOCK_EX)
procs = start_three(base, quiet=False, stderr_to=True)
deadline = time.monotonic() + 60
waiting = []
while time.monotonic() < deadline:
    waiting = [i for i in range(3) if "waiting for the lock" in open(os.path.join(tmp, f"err{i}")).read()]
    if len(waiting) == 3 or any(p.poll() is not None for p in procs):
        break
    time.sleep(0.05)
check(len(waiting) == 3, f"all three wait for the held lock (waiting: {waiting})")
check(all(p.poll() is None for p in procs), "none finishes while the lock is held")
check(entries(base) == [keeper], "the file is untouched while the lock is held")
fcntl.flock(holder, fcntl.LOCK_UN)
holder.close()
finish(procs, "held lock")
check(sorted(entries(base)) == sorted(designs + [keeper]), f"after the wait every entry is there: {entries(base)}")

# 3. Mode and group of the old file are kept (the file is replaced by a rename, a new inode).
base = os.path.join(tmp, "mode.json")
subprocess.run(margin(keeper, base), cwd=src, capture_output=True, timeout=120)
other = next((g.gr_gid for g in grp.getgrall() if g.gr_gid != os.getegid()), None)
os.chmod(base, 0o640)
if other is not None:
    os.chown(base, -1, other)
before = os.stat(base)
p = subprocess.run(margin(designs[0], base), cwd=src, capture_output=True, text=True, timeout=120)
after = os.stat(base)
check(p.returncode in (0, 1), f"update of a 0640 file exits 0 or 1, got {p.returncode}: {p.stderr}")
check(after.st_ino != before.st_ino, "the baseline was replaced by a rename (a new inode)")
check(after.st_mode & 0o7777 == 0o640, f"mode 0640 kept, got {after.st_mode & 0o7777:04o}")
check(after.st_gid == before.st_gid, f"group {before.st_gid} kept, got {after.st_gid}")
check(sorted(entries(base)) == sorted([keeper, designs[0]]), "the other entry is kept")

# A symbolic link stays a link; the file it points at is updated.
link = os.path.join(tmp, "link.json")
os.symlink(base, link)
p = subprocess.run(margin(designs[1], link), cwd=src, capture_output=True, text=True, timeout=120)
check(p.returncode in (0, 1) and os.path.islink(link), f"a linked baseline stays a link: {p.returncode} {p.stderr}")
check(designs[1] in entries(base), "the link's target holds the new entry")

# 4. A baseline that cannot be written is refused before the search: exit 2, the file named,
# the bytes unchanged, and no margin printed. chmod 444 is refused even for root, which
# access(2) alone would let through.
ro = os.path.join(tmp, "ro.json")
subprocess.run(margin(keeper, ro), cwd=src, capture_output=True, timeout=120)
os.chmod(ro, 0o444)
bytes_before = open(ro, "rb").read()
p = subprocess.run(margin(designs[0], ro, quiet=False), cwd=src, capture_output=True, text=True, timeout=120)
check(p.returncode == 2, f"read-only baseline: exit 2, got {p.returncode}")
check(ro in p.stderr and "read-only" in p.stderr, f"the message names the file and says why: {p.stderr}")
check("margin" not in p.stdout, f"the search did not run: {p.stdout[:200]}")
check(open(ro, "rb").read() == bytes_before, "the read-only baseline's bytes are unchanged")

folder = os.path.join(tmp, "locked")
os.mkdir(folder)
fb = os.path.join(folder, "base.json")
subprocess.run(margin(keeper, fb), cwd=src, capture_output=True, timeout=120)
bytes_before = open(fb, "rb").read()
os.chmod(folder, 0o555)
for target, what in ((fb, "existing file"), (os.path.join(folder, "new.json"), "new file")):
    p = subprocess.run(margin(designs[0], target, quiet=False), cwd=src, capture_output=True, text=True, timeout=120)
    check(p.returncode == 2 and folder in p.stderr and "not writable" in p.stderr,
          f"read-only folder, {what}: exit 2 naming the folder, got {p.returncode}: {p.stderr}")
os.chmod(folder, 0o755)
check(open(fb, "rb").read() == bytes_before, "the file in the read-only folder is unchanged")
check(not os.path.exists(os.path.join(folder, "new.json")), "no new file in the read-only folder")

# 5. SIGINT while waiting for the lock: nothing is written, the report says so, exit 130 (128 +
# SIGINT, the shell convention; common practice).
base = os.path.join(tmp, "intr.json")
subprocess.run(margin(keeper, base), cwd=src, capture_output=True, timeout=120)
bytes_before = open(base, "rb").read()
holder = open(base)
fcntl.flock(holder, fcntl.LOCK_EX)
report = os.path.join(tmp, "intr.report.json")
errf = os.path.join(tmp, "intr.err")
with open(errf, "w") as ef:
    proc = subprocess.Popen(margin(designs[0], base, "--json", report, quiet=False), cwd=src,
                            stdout=subprocess.PIPE, stderr=ef, text=True)
    check(wait_until_caught(proc, signal.SIGINT), "settle installs its SIGINT handler")
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline and "waiting for the lock" not in open(errf).read() and proc.poll() is None:
        time.sleep(0.05)
    proc.send_signal(signal.SIGINT)
    out, _ = proc.communicate(timeout=60)
fcntl.flock(holder, fcntl.LOCK_UN)
holder.close()
err = open(errf).read()
check(proc.returncode == 130, f"SIGINT while waiting: exit 130, got {proc.returncode}: {err}")
check(open(base, "rb").read() == bytes_before, "SIGINT while waiting: the baseline's bytes are unchanged")
check("not updated" in out and "(updated)" not in out, f"the summary says the file was not updated: {out[-300:]}")
r = json.load(open(report))
check(r["baseline"]["updated"] is False, f"the JSON says \"updated\": false: {r['baseline']}")
check(not [f for f in os.listdir(tmp) if f.startswith(".intr.json")], "no temporary file left")

sys.exit(summary())
