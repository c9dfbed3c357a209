# png_check.py — checks a screenshot with Python's standard library alone: PNG size, not blank, the map colours present.
# SPDX-License-Identifier: GPL-3.0-or-later
"""Usage: /usr/bin/python3 png_check.py NAME FILE WIDTH HEIGHT [#rrggbb:MIN ...]

Reads the PNG (8-bit RGB or RGBA, not interlaced; PNG specification, W3C
2003, sections 11.2 IHDR and 9 filtering), undoes the five scanline filters
and prints one line per check: "PASS NAME ..." or "FAIL NAME ...":
  - the image is WIDTH x HEIGHT;
  - at least 3 % of its pixels are not white (a blank page fails);
  - each colour #rrggbb covers at least MIN pixels (flat map colours prove
    that the inline SVG was drawn).
"""
import struct
import sys
import zlib


def read_png(path):
    data = open(path, "rb").read()
    if data[:8] != b"\x89PNG\r\n\x1a\n":
        raise ValueError("not a PNG file")
    pos, idat, head = 8, [], None
    while pos < len(data):
        length, kind = struct.unpack(">I4s", data[pos:pos + 8])
        body = data[pos + 8:pos + 8 + length]
        if kind == b"IHDR":
            head = struct.unpack(">IIBBBBB", body)
        elif kind == b"IDAT":
            idat.append(body)
        elif kind == b"IEND":
            break
        pos += 12 + length
    width, height, depth, ctype, _, _, interlace = head
    if depth != 8 or ctype not in (2, 6) or interlace:
        raise ValueError("unsupported PNG: depth %d, colour type %d, interlace %d" % (depth, ctype, interlace))
    bpp = 3 if ctype == 2 else 4
    raw = zlib.decompress(b"".join(idat))
    stride = width * bpp
    rows, prev = [], bytearray(stride)
    for y in range(height):
        f = raw[y * (stride + 1)]
        line = bytearray(raw[y * (stride + 1) + 1:(y + 1) * (stride + 1)])
        for i in range(stride):
            a = line[i - bpp] if i >= bpp else 0
            b = prev[i]
            c = prev[i - bpp] if i >= bpp else 0
            if f == 1:
                line[i] = (line[i] + a) & 255
            elif f == 2:
                line[i] = (line[i] + b) & 255
            elif f == 3:
                line[i] = (line[i] + (a + b) // 2) & 255
            elif f == 4:
                p = a + b - c
                pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
                line[i] = (line[i] + (a if pa <= pb and pa <= pc else b if pb <= pc else c)) & 255
        rows.append(bytes(line))
        prev = line
    return width, height, bpp, rows


def main(argv):
    name, path, want_w, want_h = argv[1], argv[2], int(argv[3]), int(argv[4])
    try:
        w, h, bpp, rows = read_png(path)
    except (OSError, ValueError, zlib.error, TypeError) as e:
        print("FAIL %s: cannot read %s: %s" % (name, path, e))
        return
    print(("PASS %s: %dx%d" if (w, h) == (want_w, want_h) else "FAIL %s: size %dx%d") % (name, w, h))
    counts, other = {}, 0
    for row in rows:
        for i in range(0, w * bpp, bpp):
            px = row[i:i + 3]
            if px != b"\xff\xff\xff":
                other += 1
                counts[px] = counts.get(px, 0) + 1
    share = other / float(w * h)
    print(("PASS %s: not blank (%.1f%% of pixels not white)" if share >= 0.03 else
           "FAIL %s: blank (%.2f%% of pixels not white)") % (name, 100 * share))
    for spec in argv[5:]:
        colour, least = spec.split(":")
        rgb = bytes(int(colour[k:k + 2], 16) for k in (1, 3, 5))
        n = counts.get(rgb, 0)
        print(("PASS %s: %s covers %d pixels" if n >= int(least) else "FAIL %s: %s covers only %d pixels")
              % (name, colour, n))


if __name__ == "__main__":
    main(sys.argv)
