#!/usr/bin/env python3
"""Reference timing, never run in CI: scipy's minimum spanning tree of the same points that
`ramulus bench` grows its cheapest-first pure-length network on (the centres of a SIDE x SIDE
lattice, 1,000,000 points by default), joined within radius 1.5 (the 8 neighbours) by a k-d tree.

Usage: python3 tests/bench/mst_reference.py [SIDE] [ROUNDS]

The first run makes a virtual environment in target/mst-reference-venv and installs scipy into
it with pip; later runs reuse it. Prints the time of each round (k-d tree, radius graph and
minimum_spanning_tree, from the point array on) and the tree's total length, which must equal
the total length `ramulus bench` prints (the minimum spanning tree's weight is unique).
"""

import os
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
VENV = os.path.join(HERE, "..", "..", "target", "mst-reference-venv")
PYTHON = os.path.join(VENV, "bin", "python3")


def in_venv():
    """Re-runs this script inside the virtual environment, making it first when missing."""
    if os.path.abspath(sys.prefix) == os.path.abspath(VENV):
        return
    if not os.path.exists(PYTHON):
        subprocess.check_call([sys.executable, "-m", "venv", VENV])
        subprocess.check_call([PYTHON, "-m", "pip", "install", "--quiet", "scipy"])
    os.execv(PYTHON, [PYTHON, os.path.abspath(__file__)] + sys.argv[1:])


def one_round(side):
    import numpy as np
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import minimum_spanning_tree
    from scipy.spatial import cKDTree

    columns, rows = np.meshgrid(np.arange(side), np.arange(side))
    points = np.column_stack([columns.ravel() + 0.5, rows.ravel() + 0.5])
    start = time.perf_counter()
    tree = cKDTree(points)
    pairs = tree.query_pairs(r=1.5, output_type="ndarray")
    lengths = np.hypot(*(points[pairs[:, 0]] - points[pairs[:, 1]]).T)
    count = len(points)
    graph = coo_matrix((lengths, (pairs[:, 0], pairs[:, 1])), shape=(count, count)).tocsr()
    spanning = minimum_spanning_tree(graph)
    seconds = time.perf_counter() - start
    return seconds, spanning.sum(), len(pairs)


def main():
    in_venv()
    import scipy

    side = int(sys.argv[1]) if len(sys.argv) > 1 else 1000
    rounds = int(sys.argv[2]) if len(sys.argv) > 2 else 3
    times = []
    for _ in range(rounds):
        seconds, total, edges = one_round(side)
        times.append(seconds)
        print(f"scipy {scipy.__version__}: {side} x {side} points, {edges} radius-graph edges, "
              f"{seconds:.3f} s, total length {total:.6f}", flush=True)
    print(f"scipy cKDTree radius graph + minimum_spanning_tree: {min(times):.3f}-{max(times):.3f} s "
          f"over {rounds} rounds")


if __name__ == "__main__":
    main()
