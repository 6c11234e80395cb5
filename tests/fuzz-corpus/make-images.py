#!/usr/bin/env python3
"""Writes the PBM and PNG seed files of the mask-reader fuzz tests (tests/fuzz-corpus/pbm and
png). Invented pictures; PNG chunks, filters, palettes and Adam7 interlacing as in the PNG
specification (W3C 2003), PBM as in the Netpbm PBM format specification. Run from the
repository root: python3 tests/fuzz-corpus/make-images.py"""
import struct
import zlib
from pathlib import Path

HERE = Path(__file__).resolve().parent

# The letter J, 6 x 10 (Netpbm PBM format specification example picture).
J = ["000010"] * 6 + ["100010", "011100", "000000", "000000"]


def pbm_files():
    plain = "P1\n# the letter J\n6 10\n" + "\n".join(" ".join(row) for row in J) + "\n"
    packed = "P1\n6 10\n" + "".join(J) + "\n"
    raw = b"P4\n6 10\n" + bytes(int(row + "00", 2) for row in J)
    # One whitespace character (here LF) ends the header of a raw image.
    crlf = b"P4 # raw with a comment\r\n9\r\n2\n\xff\x80\x00\x00"
    return {
        "j-plain.pbm": plain.encode(),
        "j-packed.pbm": packed.encode(),
        "j-raw.pbm": raw,
        "comment-crlf.pbm": crlf,
        "two-images.pbm": raw + b"P1 2 1 1 0\n",
        "maxval-line.pbm": b"P4\n8 2\n1\n\xff\x00",
        "extra-pixels.pbm": b"P1\n2 1\n1 0\n1\n",
        "truncated.pbm": b"P4 16 3\n\xff\xff\x00",
        "huge-width.pbm": b"P1\n100000000000000000000000000 2\n",
    }


def chunk(kind, data):
    return struct.pack(">I", len(data)) + kind + data + struct.pack(">I", zlib.crc32(kind + data))


def png(width, height, colour, depth, rows, palette=None, trns=None, interlace=0):
    """rows: one bytes object per row, already packed at `depth` (no filter byte)."""
    out = b"\x89PNG\r\n\x1a\n"
    out += chunk(b"IHDR", struct.pack(">IIBBBBB", width, height, depth, colour, 0, 0, interlace))
    if palette is not None:
        out += chunk(b"PLTE", bytes(palette))
    if trns is not None:
        out += chunk(b"tRNS", bytes(trns))
    out += chunk(b"tEXt", b"Comment\x00seed file")
    if interlace:
        raw = adam7(width, height, depth, colour, rows)
    else:
        # Filter types 0 to 4 (None, Sub, Up, Average, Paeth; section 9.2) row by row in turn.
        bpp = max(1, CHANNELS[colour] * depth // 8)
        raw = b"".join(bytes([y % 5]) + filtered(y % 5, row, rows[y - 1] if y else None, bpp)
                       for y, row in enumerate(rows))
    data = zlib.compress(raw, 9)
    # Two IDAT chunks: the stream may be split anywhere (section 11.2.4).
    half = len(data) // 2
    out += chunk(b"IDAT", data[:half]) + chunk(b"IDAT", data[half:])
    out += chunk(b"IEND", b"")
    return out


CHANNELS = {0: 1, 2: 3, 3: 1, 4: 2, 6: 4}


def filtered(kind, row, previous, bpp):
    """One row filtered with filter type `kind` (PNG specification, section 9.2)."""
    previous = previous or bytes(len(row))
    out = bytearray()
    for i, x in enumerate(row):
        a = row[i - bpp] if i >= bpp else 0
        b = previous[i]
        c = previous[i - bpp] if i >= bpp else 0
        if kind == 0:
            predictor = 0
        elif kind == 1:
            predictor = a
        elif kind == 2:
            predictor = b
        elif kind == 3:
            predictor = (a + b) // 2
        else:
            p = a + b - c
            pa, pb, pc = abs(p - a), abs(p - b), abs(p - c)
            predictor = a if pa <= pb and pa <= pc else (b if pb <= pc else c)
        out.append((x - predictor) % 256)
    return bytes(out)


def adam7(width, height, depth, colour, rows):
    """Adam7 passes (section 8.2) of 8-bit images only (depth 8, whole bytes per pixel)."""
    assert depth == 8
    size = CHANNELS[colour]
    passes = [(0, 0, 8, 8), (4, 0, 8, 8), (0, 4, 4, 8), (2, 0, 4, 4), (0, 2, 2, 4), (1, 0, 2, 2),
              (0, 1, 1, 2)]
    out = b""
    for x0, y0, dx, dy in passes:
        for y in range(y0, height, dy):
            line = b"".join(rows[y][x * size:(x + 1) * size] for x in range(x0, width, dx))
            if line:
                out += b"\x00" + line
    return out


def png_files():
    grey8 = [bytes((x * 40 + y * 25) % 256 for x in range(7)) for y in range(5)]
    rgb8 = [bytes(v for x in range(4) for v in ((x * 70) % 256, (y * 90) % 256, 128))
            for y in range(4)]
    rgba8 = [b"".join(bytes((0, 0, 0, 255 if (x + y) % 2 else 0)) for x in range(5))
             for y in range(3)]
    grey_alpha16 = [b"".join(struct.pack(">HH", x * 9000, 65535 - y * 20000) for x in range(3))
                    for y in range(3)]
    one_bit = [bytes([0b01100000, 0b01000000]), bytes([0b11111111, 0b10000000])]
    index2 = [bytes([0b10010010]), bytes([0b00011011])]
    return {
        "grey-8.png": png(7, 5, 0, 8, grey8),
        "grey-1.png": png(10, 2, 0, 1, one_bit),
        "rgb-8.png": png(4, 4, 2, 8, rgb8),
        "rgba-8.png": png(5, 3, 6, 8, rgba8),
        "grey-alpha-16.png": png(3, 3, 4, 16, grey_alpha16),
        "palette-2-trns.png": png(4, 2, 3, 2, index2, palette=[0, 0, 0, 255, 255, 255, 9, 9, 9, 0, 0, 0],
                                  trns=[255, 255, 255, 0]),
        "palette-index-beyond.png": png(4, 2, 3, 2, index2, palette=[0, 0, 0, 255, 255, 255]),
        "grey-8-interlaced.png": png(9, 9, 0, 8, [bytes((x * y * 7) % 256 for x in range(9))
                                                    for y in range(9)], interlace=1),
        "rgb-8-interlaced.png": png(3, 5, 2, 8, [bytes((x * 80, y * 50, 0)[c] for x in range(3)
                                                       for c in range(3)) for y in range(5)],
                                    interlace=1),
    }


def main():
    for name, data in pbm_files().items():
        (HERE / "pbm" / name).write_bytes(data)
    for name, data in png_files().items():
        (HERE / "png" / name).write_bytes(data)
    bad = bytearray(png_files()["grey-8.png"])
    bad[17] ^= 0x40  # inside IHDR: its CRC no longer matches
    (HERE / "png" / "crc-damaged.png").write_bytes(bytes(bad))


main()
