#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""library_names.py — the public functions of src/bellcheck.h that docs/library.md does not name.

Usage: library_names.py HEADER DOC.  Prints the missing names, one line, and
exits 1 if there are any.  A doc names a function by its full name, by a
group `bc_x_a/b/c` (bc_x_a, bc_x_b, bc_x_c) or by a prefix `bc_x_*`.
"""
import re
import sys

header, doc_path = sys.argv[1], sys.argv[2]
h = re.sub(r"/\*.*?\*/", "", open(header).read(), flags=re.S)
names = sorted(set(re.findall(r"\b(bc_[a-z0-9_]+)\s*\(", h)))
doc = open(doc_path).read()
have = set(re.findall(r"\bbc_[a-z0-9_]+", doc))
for m in re.finditer(r"\b(bc_[a-z0-9_]+)((?:/[a-z0-9_]+)+)", doc):
    first = m.group(1)
    prefix = first[: first.rfind("_") + 1]
    for alt in m.group(2).split("/")[1:]:
        have.add(prefix + alt)
stars = [m.group(1) for m in re.finditer(r"\b(bc_[a-z0-9_]+)_\*", doc)]
missing = [n for n in names if n not in have and not any(n.startswith(s + "_") for s in stars)]
print(" ".join(missing) if missing else "none missing (%d functions)" % len(names))
sys.exit(1 if missing else 0)
