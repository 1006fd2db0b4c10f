#!/usr/bin/python3
"""Large mosaics for SeamDetectBenchmark (the seam detector's time on wide images), drawn by the independent generator
tools/reference/make_mosaics.py at workstation sizes: a 4 x 4 mosaic of gain steps and shading and a snake with a
covered overlap, about 2000 px on a side, each whole and trimmed (as its --crop draws). Not committed: made on demand,
   /usr/bin/python3 tools/benchmark/make_large_mosaics.py DIR
"""
import os
import sys

sys.path.insert(0, os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "reference"))
import make_mosaics as mm  # noqa: E402

LARGE = [
    # name, seed, rows, cols, tile width, tile height, options (as make_mosaics.LAYOUTS)
    ("a-steps-large", 171, 4, 4, 512, 480, {}),
    ("c-snake-large", 371, 4, 4, 536, 500, {"overlap": 40, "snake": True}),
]


def main():
    mm.OUT = sys.argv[1]
    os.makedirs(mm.OUT, exist_ok=True)
    truths = []
    for name, seed, rows, cols, tw, th, kw in LARGE:
        truths.append(mm.make(name, seed, rows, cols, tw, th, **kw))
        t = mm.make(name + "-trimmed", seed, rows, cols, tw, th, **kw)
        truths.append(mm.crop(t["name"], seed, t))
    with open(os.path.join(mm.OUT, "truth.txt"), "w") as f:
        for t in truths:
            f.write("\n".join(mm.table_lines(t)) + "\n")


if __name__ == "__main__":
    main()
