# endless_bell.py — writes a .bell model that never ends to standard output (Ctrl-C while reading: tests/cli/hostile_inputs.sh).
# SPDX-License-Identifier: GPL-3.0-or-later
"""A valid header, then forever: 100 fresh transition lines (s0 -> s1 -> s2 ...)
followed by 2 MB of comment lines.  The reader goes through the text at full
speed while the model it builds grows by only a few megabytes a second, so a
reader that never stopped would not exhaust the machine's memory before the
test gives up on it.  Ends quietly when the reader goes away."""
import os
import sys


def main():
    out = sys.stdout.buffer
    pad = (b"# " + b"-" * 97 + b"\n") * 20000
    try:
        out.write(b"bell 1\nname endless\ndiscount 9/10\n")
        i = 0
        while True:
            lines = "".join("s%d go 1 -> s%d\n" % (k, k + 1) for k in range(i, i + 100))
            out.write(lines.encode() + pad)
            i += 100
    except BrokenPipeError:
        os._exit(0)  # the reader stopped: nothing to flush, nothing to say


if __name__ == "__main__":
    main()
