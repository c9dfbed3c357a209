# svg_cells.py — reads the cells, marks and outlines of a bellcheck map (SVG) with Python's standard library, for the picture tests.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Reads a map written by bellcheck (policy.svg, value.svg, agent.svg).

Usage as a module: cells(path) -> (nx, ny, {(i, j): fill}), with j counted
upwards as the picture's variable grows; marks(path) -> {(i, j): fill};
undecided(path) and traps(path) -> sets of (i, j).  The cells are the rectangles of the first <g class="cells">
group, drawn in cell units (a rectangle x, y, width w covers cells
x .. x+w-1 of drawn row y; rows are drawn from the top).

As a command: svg_cells.py FILE prints `nx ny` and one line `i j fill` per cell.
"""
import sys
import xml.etree.ElementTree as ET

NS = "{http://www.w3.org/2000/svg}"


def _groups(path):
    root = ET.parse(path).getroot()
    return [g for g in root.iter(NS + "g") if g.get("class") == "cells"]


def cells(path):
    groups = _groups(path)
    if not groups:
        raise ValueError("%s: no cells group" % path)
    runs = []
    for r in groups[0].iter(NS + "rect"):
        runs.append((int(r.get("x")), int(r.get("y")), int(r.get("width")), r.get("fill")))
    ny = max(y for _, y, _, _ in runs) + 1
    nx = max(x + w for x, _, w, _ in runs)
    out = {}
    for x, y, w, fill in runs:
        for i in range(x, x + w):
            if (i, ny - 1 - y) in out:
                raise ValueError("%s: cell %d,%d drawn twice" % (path, i, ny - 1 - y))
            out[(i, ny - 1 - y)] = fill
    if len(out) != nx * ny:
        raise ValueError("%s: %d cells drawn, %d x %d expected" % (path, len(out), nx, ny))
    return nx, ny, out


def _marked(path, cls):
    nx, ny, _ = cells(path)
    found = {}
    for g in _groups(path)[1:]:
        for r in g.iter(NS + "rect"):
            if r.get("class") == cls:
                i, y = int(float(r.get("x"))), int(float(r.get("y")))
                found[(i, ny - 1 - y)] = r.get("fill")
    return found


def marks(path):
    """{(i, j): fill} of the inset squares (cells acting otherwise than the optimum)."""
    return _marked(path, "mark")


def undecided(path):
    """The set of cells with a dashed square (optimal or not, within the proof's error)."""
    return set(_marked(path, "undecided"))


def traps(path):
    """The set of outlined cells."""
    return set(_marked(path, "trap"))


if __name__ == "__main__":
    nx, ny, c = cells(sys.argv[1])
    print(nx, ny)
    for (i, j), fill in sorted(c.items()):
        print(i, j, fill)
