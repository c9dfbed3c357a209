#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""utf8_ref.py — the length of the first UTF-8 character of each 4-byte record, by Python's strict codec.

Reads 4-byte records on standard input and writes one byte per record: the
length (1 to 4) of the well-formed UTF-8 character the record starts with,
or 0 if it starts with none.  The reference is CPython's strict UTF-8
decoder, which follows RFC 3629 (F. Yergeau, 2003) and Table 3-7 of the
Unicode Standard: no overlong forms, no surrogates, nothing past U+10FFFF.
The smallest prefix that decodes is exactly the first character, since no
proper prefix of a well-formed character decodes and a bad first byte spoils
every prefix.
"""
import sys


def first_length(rec):
    for k in range(1, 5):
        try:
            rec[:k].decode("utf-8", "strict")
            return k
        except UnicodeDecodeError:
            pass
    return 0


data = sys.stdin.buffer.read()
out = bytes(first_length(data[i:i + 4]) for i in range(0, len(data), 4))
sys.stdout.buffer.write(out)
