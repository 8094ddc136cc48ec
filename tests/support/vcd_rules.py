"""What the VCD tests share: the sigrok-cli check (Debian package sigrok-cli, a general-purpose
VCD reader) and the IEEE Std 1364-2005 clause 18 time units."""
import re
import shutil
import sys

# IEEE 1364-2005 18.2.3.5: $timescale time_number time_unit $end, unit s, ms, us, ns, ps or fs.
UNITS = {"s": 10**15, "ms": 10**12, "us": 10**9, "ns": 10**6, "ps": 10**3, "fs": 1}


def need_sigrok():
    """Exits 77 (ctest: skipped) when sigrok-cli is absent; scripts/test installs it."""
    if shutil.which("sigrok-cli") is None:
        print("skipped: sigrok-cli (Debian package sigrok-cli) is not installed")
        sys.exit(77)


def changes_of(text):
    """Value changes per net name in the VCD text sigrok-cli writes back (IEEE 1364-2005 clause
    18): {name: [(time_fs, value)]}. sigrok-cli may write a decimal time number ("0.100 ps")."""
    scale, names, changes, now = 1, {}, {}, 0
    m = re.search(r"\$timescale\s+([\d.]+)\s*(\w+)\s+\$end", text)
    if m:
        scale = round(float(m.group(1)) * UNITS[m.group(2)])
    for code, name in re.findall(r"\$var\s+wire\s+1\s+(\S+)\s+(\S+)\s+\$end", text):
        names[code] = name
    body = text.split("$enddefinitions", 1)[-1]
    for tok in body.split():
        if tok.startswith("#"):
            now = int(tok[1:]) * scale
        elif tok[0] in "01xXzZ" and tok[1:] in names:
            changes.setdefault(names[tok[1:]], []).append((now, tok[0]))
    return changes
