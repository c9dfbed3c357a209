# check_exact.py — checks bellcheck's exact values and interval enclosures against references in Python fractions.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Usage:
  /usr/bin/python3 check_exact.py fractions NAME REPORT.json EXPECTED.json
      REPORT is `bellcheck solve --method exact --json` output; EXPECTED maps
      every state to an exact value (a "p/q" string or a number).  Checks that
      exact_values equals EXPECTED exactly, that each printed double is the
      double nearest its exact value, and exact_value_initial.
  /usr/bin/python3 check_exact.py enclose NAME INTERVAL.json EXACT.json
      INTERVAL is a `solve --proof interval --json` report, EXACT a
      `solve --method exact --json` report of the same model.  Checks that the
      exact optimum lies within the proven bound of every interval value and
      of value_initial.
Prints PASS/FAIL lines.  Uses only Python's fractions (standard library):
float(Fraction) rounds correctly to the nearest double and Fraction(float)
is the exact value of a double, so nothing here depends on bellcheck's
arithmetic.
"""
import json
import sys
from fractions import Fraction


def frac(x):
    """An expected value: "p/q", an integer, or a decimal number as written."""
    return Fraction(str(x)) if isinstance(x, float) else Fraction(x)


def check(name, ok, why):
    print(("PASS %s" % name) if ok else ("FAIL %s: %s" % (name, why)))


def fractions_mode(name, report, expected):
    ex = report.get("exact_values")
    check(name + " has exact_values", isinstance(ex, dict), "no exact_values in the report")
    if not isinstance(ex, dict):
        return
    bad = [s for s in expected if s not in ex or Fraction(ex[s]) != frac(expected[s])]
    check(name + " exact values", not bad and len(ex) == len(expected),
          "%d states differ, e.g. %s: %s vs %s" % (len(bad), bad[0], ex.get(bad[0]), expected[bad[0]])
          if bad else "state sets differ")
    lowest = [s for s in ex if "/" in ex[s] and Fraction(ex[s]).denominator != int(ex[s].split("/")[1])]
    check(name + " lowest terms", not lowest, "not in lowest terms: %s" % lowest[:3])
    near = [s for s in ex if report["values"][s] != float(Fraction(ex[s]))]
    check(name + " values are the nearest doubles", not near, "e.g. %s" % near[:3])
    check(name + " proof kind exact", report["proof"]["kind"] == "exact", report["proof"]["kind"])


def enclose_mode(name, interval, exact):
    ex = {s: Fraction(v) for s, v in exact["exact_values"].items()}
    proof = interval["proof"]
    check(name + " proof kind interval", proof["kind"] == "interval", proof["kind"])
    if proof["kind"] != "interval":
        return
    bound = Fraction(proof["bound"])
    out = [s for s, v in interval["values"].items() if abs(Fraction(v) - ex[s]) > bound]
    check(name + " enclosure contains the exact optimum", not out,
          "%d states outside, e.g. %s" % (len(out), out[:3]))
    vi = Fraction(interval["value_initial"])
    b0 = Fraction(interval["value_initial_proof"]["bound"])
    check(name + " initial enclosure", abs(vi - Fraction(exact["exact_value_initial"])) <= b0,
          "value_initial %r, bound %r" % (interval["value_initial"], float(b0)))


def main(argv):
    if len(argv) != 5 or argv[1] not in ("fractions", "enclose"):
        print(__doc__, file=sys.stderr)
        return 2
    with open(argv[3]) as f:
        a = json.load(f)
    with open(argv[4]) as f:
        b = json.load(f)
    (fractions_mode if argv[1] == "fractions" else enclose_mode)(argv[2], a, b)
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
