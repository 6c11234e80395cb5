#!/usr/bin/env python3
"""Writes the seed files of tests/tests/fuzz_image.rs into tests/fuzz-corpus/image/: small
cleared-leaf pictures (a grey blade on white with a dark H of veins) as PNG (grey, RGB with a
pHYs chunk, palette) and as JPEG (baseline grey, progressive colour with a JFIF density in dots
per inch, 4:2:0 subsampled), plus a PNG whose header claims 100,000 x 100,000 pixels and a JPEG
cut short. Invented demo data. Needs Pillow: run with target/skimage-venv/bin/python (made by
tests/reference/skimage_cleared.py), or any Python with Pillow.
"""

import os
import struct
import zlib

from PIL import Image, ImageDraw

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, "image")


def leaf(size):
    image = Image.new("L", (size, size), 245)
    draw = ImageDraw.Draw(image)
    margin = size // 6
    draw.ellipse([margin, margin // 2, size - margin, size - margin // 2], fill=170)
    middle, quarter = size // 2, size // 4
    width = max(2, size // 16)
    draw.line([(quarter + 4, middle), (size - quarter - 4, middle)], fill=60, width=width)
    for x in (quarter + 4, size - quarter - 4):
        draw.line([(x, middle - quarter + 4), (x, middle + quarter - 4)], fill=60, width=width)
    return image


def main():
    os.makedirs(OUT, exist_ok=True)
    leaf(40).save(os.path.join(OUT, "leaf-grey.png"))
    leaf(48).convert("RGB").save(os.path.join(OUT, "leaf-rgb-phys.png"), dpi=(1270, 1270))
    leaf(32).convert("P").save(os.path.join(OUT, "leaf-palette.png"))
    leaf(40).save(os.path.join(OUT, "leaf-grey.jpg"), quality=80)
    leaf(48).convert("RGB").save(
        os.path.join(OUT, "leaf-colour-progressive.jpg"),
        quality=70, progressive=True, dpi=(600, 600), subsampling=2)
    with open(os.path.join(OUT, "leaf-grey.png"), "rb") as handle:
        png = bytearray(handle.read())
    png[16:24] = struct.pack(">II", 100000, 100000)
    png[29:33] = struct.pack(">I", zlib.crc32(bytes(png[12:29])) & 0xFFFFFFFF)
    with open(os.path.join(OUT, "huge-header.png"), "wb") as handle:
        handle.write(png)
    with open(os.path.join(OUT, "leaf-grey.jpg"), "rb") as handle:
        jpeg = handle.read()
    with open(os.path.join(OUT, "cut-short.jpg"), "wb") as handle:
        handle.write(jpeg[: len(jpeg) // 2])


if __name__ == "__main__":
    main()
