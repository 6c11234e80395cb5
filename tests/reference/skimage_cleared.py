#!/usr/bin/env python3
"""scikit-image's answers for the cleared-leaf checks (run by tests/tests/cleared_skimage.rs).

Usage: python3 tests/reference/skimage_cleared.py FOLDER

FOLDER holds what the Rust test wrote: `otsu-*.pgm` (grey images) and, for each shape,
`shape-NAME.pgm` (a binary mask, 0 off, 255 on) and `ours-NAME.pgm` (Ramulus's skeleton of it).
Prints one JSON object on stdout:

  {"skimage_version": "...",
   "otsu": {"otsu-NAME": threshold, ...},
   "topology": {"NAME": {"skimage": [ends, branches, loops], "ours": [ends, branches, loops]}}}

where `otsu` is skimage.filters.threshold_otsu of each grey image, and `topology` counts, by one
rule applied to both skeletons, skimage.morphology.skeletonize's skeleton of the mask and ours:
end points (pixels with one 8-neighbour), branch points (8-connected groups of pixels with three
or more), loops (holes: 4-connected background regions not reaching the border). Corner pixels
of staircases (exactly two neighbours, two perpendicular 4-neighbours) are removed from both
first, so that a step of a diagonal is not read as a junction.

The first run makes a virtual environment in target/skimage-venv and installs scikit-image into
it with pip (idempotent: later runs reuse it). If that fails, it says so on stderr and exits
with status 3, so the Rust test fails with that message.
"""

import json
import os
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
VENV = os.path.abspath(os.path.join(HERE, "..", "..", "target", "skimage-venv"))
PYTHON = os.path.join(VENV, "bin", "python3")
REQUIREMENT = "scikit-image>=0.22"


def fail(message):
    sys.stderr.write("skimage_cleared.py: " + message + "\n")
    sys.exit(3)


def in_venv():
    """Re-runs this script inside the virtual environment, making it first when missing."""
    if os.path.abspath(sys.prefix) == VENV:
        return
    try:
        if not os.path.exists(PYTHON):
            subprocess.check_call([sys.executable, "-m", "venv", VENV])
        probe = subprocess.run([PYTHON, "-c", "import skimage, scipy, numpy"],
                               capture_output=True)
        if probe.returncode != 0:
            subprocess.check_call([PYTHON, "-m", "pip", "install", "--quiet", REQUIREMENT],
                                  stdout=sys.stderr)
    except (OSError, subprocess.CalledProcessError) as error:
        fail("cannot install %s into %s with pip (%s); the cleared-leaf checks against "
             "scikit-image need it (PyPI must be reachable once)" % (REQUIREMENT, VENV, error))
    os.execv(PYTHON, [PYTHON, os.path.abspath(__file__)] + sys.argv[1:])


def read_pgm(path):
    import numpy as np

    with open(path, "rb") as handle:
        data = handle.read()
    # Four header fields, each ended by one white-space byte (Netpbm's PGM format); the
    # pixels follow the white space after the last one, and may themselves be white space.
    fields, position = [], 0
    while len(fields) < 4:
        while data[position : position + 1].isspace():
            position += 1
        end = position
        while not data[end : end + 1].isspace():
            end += 1
        fields.append(data[position:end])
        position = end + 1
    if fields[0] != b"P5" or int(fields[3]) != 255:
        fail("%s is not an 8-bit binary PGM" % path)
    width, height = int(fields[1]), int(fields[2])
    pixels = np.frombuffer(data[position : position + width * height], dtype=np.uint8)
    return pixels.reshape(height, width)


def without_staircase_corners(skeleton):
    import numpy as np

    on = skeleton.copy()
    height, width = on.shape
    padded = np.pad(on, 1)
    for y in range(height):
        for x in range(width):
            if not on[y, x]:
                continue
            window = padded[y : y + 3, x : x + 3].copy()
            window[1, 1] = False
            if window.sum() != 2:
                continue
            north, south, west, east = window[0, 1], window[2, 1], window[1, 0], window[1, 2]
            if (north or south) and (east or west):
                on[y, x] = False
                padded[y + 1, x + 1] = False
    return on


def topology(skeleton):
    import numpy as np
    from scipy import ndimage

    on = without_staircase_corners(skeleton.astype(bool))
    neighbours = ndimage.convolve(on.astype(int), np.ones((3, 3), int), mode="constant") - on
    neighbours = neighbours * on
    ends = int(((neighbours == 1) & on).sum())
    branch_pixels = (neighbours >= 3) & on
    _, branches = ndimage.label(branch_pixels, structure=np.ones((3, 3), int))
    background = np.pad(~on, 1, constant_values=True)
    labels, regions = ndimage.label(background, structure=[[0, 1, 0], [1, 1, 1], [0, 1, 0]])
    loops = regions - 1
    return [ends, int(branches), int(loops)]


def main():
    if len(sys.argv) != 2:
        fail("usage: skimage_cleared.py FOLDER")
    in_venv()
    import skimage
    from skimage.filters import threshold_otsu
    from skimage.morphology import skeletonize

    folder = sys.argv[1]
    result = {"skimage_version": skimage.__version__, "otsu": {}, "topology": {}}
    for name in sorted(os.listdir(folder)):
        path = os.path.join(folder, name)
        stem = name[: -len(".pgm")]
        if name.startswith("otsu-") and name.endswith(".pgm"):
            result["otsu"][stem] = int(threshold_otsu(read_pgm(path)))
        elif name.startswith("shape-") and name.endswith(".pgm"):
            shape = stem[len("shape-") :]
            mask = read_pgm(path) > 127
            ours = read_pgm(os.path.join(folder, "ours-" + shape + ".pgm")) > 127
            result["topology"][shape] = {
                "skimage": topology(skeletonize(mask)),
                "ours": topology(ours),
            }
    json.dump(result, sys.stdout, sort_keys=True)
    sys.stdout.write("\n")


if __name__ == "__main__":
    main()
