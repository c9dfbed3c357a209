# make_agents.py — writes the .npy Q-tables and policies that tests/unit/test_agent_read.c reads, with NumPy itself.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Usage: /usr/bin/python3 make_agents.py DIR

Writes into DIR (which must exist) every NPY file the agent-reader unit test
needs, so that the test reads what NumPy writes rather than what our own C
writes.  Nothing binary is committed: the test runs this script in a fresh
temporary directory.  The arrays are written out by hand here and again in
the C test (never computed by the code under test).

The models (text in the C test):
  greenhouse: states cold mild hot wilted (wilted terminal), actions
    open shut heat; pairs cold:{shut,heat} mild:{open,shut} hot:{open,shut,heat}
  lamps: states on off, actions flip stay, every pair present.

The file format is NumPy's documented .npy format (numpy.lib.format, format
versions 1.0, 2.0 and 3.0).  Exits 1 with a message if numpy is missing.
"""
import os
import sys

try:
    import numpy as np
except ImportError as exc:  # the C test must fail, not skip, without numpy
    sys.stderr.write("make_agents.py: numpy is not available: %s\n" % exc)
    sys.exit(1)

NAN = float("nan")

# greenhouse, rows cold mild hot wilted, columns open shut heat; NaN: no such pair.
Q = [[NAN, 1.5, -0.25],
     [2.0, 3.125, NAN],
     [0.5, -4.75, -9.0],
     [NAN, NAN, NAN]]


def q_with(row, col, value):
    """Q with one cell replaced (a copy)."""
    q = np.array(Q, dtype="<f8")
    q[row, col] = value
    return q


def save(directory, name, array):
    np.save(os.path.join(directory, name), array, allow_pickle=False)


def save_version(directory, name, array, version):
    with open(os.path.join(directory, name), "wb") as f:
        np.lib.format.write_array(f, array, version=version, allow_pickle=False)


def write_bytes(directory, name, data):
    with open(os.path.join(directory, name), "wb") as f:
        f.write(data)


def npy_bytes(array):
    """What np.save writes for array, as bytes."""
    import io
    buf = io.BytesIO()
    np.save(buf, array, allow_pickle=False)
    return buf.getvalue()


def happy_files(d):
    q = np.array(Q, dtype="<f8")
    save(d, "q_f8.npy", q)
    save(d, "q_f4.npy", q.astype("<f4"))
    save(d, "q_f8_big.npy", q.astype(">f8"))
    fortran = np.asfortranarray(q)
    assert fortran.flags.f_contiguous and not fortran.flags.c_contiguous
    save(d, "q_fortran.npy", fortran)
    save_version(d, "q_v2.npy", q, (2, 0))
    save_version(d, "q_v3.npy", q, (3, 0))
    zero_terminal = q.copy()
    zero_terminal[3, :] = 0.0
    save(d, "q_terminal_zero.npy", zero_terminal)
    # lamps: rows on off, columns flip stay.
    save(d, "lamps_i2_big.npy", np.array([[3, -2], [-7, 100]], dtype=">i2"))
    save(d, "lamps_u1.npy", np.array([[3, 2], [7, 255]], dtype="|u1"))
    save(d, "lamps_u8.npy", np.array([[1, 2], [3, 2**40]], dtype="<u8"))
    # policies of greenhouse: cold->heat (2), mild->open (0), hot->shut (1), wilted none.
    save(d, "pol_i4.npy", np.array([2, 0, 1, -1], dtype="<i4"))
    save(d, "pol_u1.npy", np.array([2, 0, 1, 0], dtype="|u1"))
    save(d, "pol_i8_big.npy", np.array([2, 0, 1, -1], dtype=">i8"))
    save(d, "pol_i1.npy", np.array([2, 0, 1, -1], dtype="|i1"))


def size_files(d):
    good = npy_bytes(np.array(Q, dtype="<f8"))
    write_bytes(d, "q_truncated.npy", good[:-5])
    write_bytes(d, "q_longer.npy", good + b"\0" * 8)
    assert good.count(b"(4, 3)") == 1
    write_bytes(d, "q_bigshape.npy", good.replace(b"(4, 3)", b"(5, 3)"))


def error_files(d):
    save(d, "q_wrongshape.npy", np.zeros((4, 2)))
    save(d, "q_1d.npy", np.zeros(4))
    save(d, "q_c16.npy", np.zeros((4, 3), dtype=complex))
    save(d, "q_f2.npy", np.zeros((4, 3), dtype="<f2"))
    save(d, "q_bool.npy", np.zeros((4, 3), dtype=bool))
    save(d, "q_nan_pair.npy", q_with(2, 1, NAN))     # hot/shut
    save(d, "q_inf_pair.npy", q_with(0, 2, np.inf))  # cold/heat
    save(d, "q_value_nonpair.npy", q_with(0, 0, 7.0))  # cold/open does not exist
    save(d, "q_terminal_nonzero.npy", q_with(3, 1, 1.0))  # wilted/shut
    missing = np.array(Q, dtype="<f8")
    missing[2, :] = NAN  # hot not covered
    save(d, "q_missing_row.npy", missing)
    save(d, "q_i4.npy", np.nan_to_num(np.array(Q)).astype("<i4"))  # 0 where cold has no open
    save(d, "pol_f8.npy", np.array([2.0, 0.0, 1.0, -1.0]))
    save(d, "pol_range.npy", np.array([2, 0, 5, -1], dtype="<i4"))
    save(d, "pol_notallowed.npy", np.array([0, 0, 1, -1], dtype="<i4"))
    save(d, "pol_missing.npy", np.array([2, -1, 1, -1], dtype="<i4"))
    save(d, "pol_shape.npy", np.array([[2], [0], [1], [0]], dtype="<i4"))
    save(d, "pol_struct.npy", np.zeros(4, dtype=[("a", "<i4"), ("b", "<f8")]))


def main():
    if len(sys.argv) != 2 or not os.path.isdir(sys.argv[1]):
        sys.stderr.write("usage: make_agents.py DIR\n")
        return 2
    d = sys.argv[1]
    happy_files(d)
    size_files(d)
    error_files(d)
    return 0


if __name__ == "__main__":
    sys.exit(main())
