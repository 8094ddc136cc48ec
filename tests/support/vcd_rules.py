"""What the VCD tests share: the sigrok-cli check (Debian package sigrok-cli, a general-purpose
VCD reader) and the IEEE Std 1364-2005 clause 18 time units."""
import shutil
import sys

# IEEE 1364-2005 18.2.3.5: $timescale time_number time_unit $end, unit s, ms, us, ns, ps or fs.
UNITS = {"s": 10**15, "ms": 10**12, "us": 10**9, "ns": 10**6, "ps": 10**3, "fs": 1}


def need_sigrok():
    """Exits 77 (ctest: skipped) when sigrok-cli is absent; scripts/test installs it."""
    if shutil.which("sigrok-cli") is None:
        print("skipped: sigrok-cli (Debian package sigrok-cli) is not installed")
        sys.exit(77)
