#!/usr/bin/env python3
"""Benchmark: one plane evaluation of the exact kernel vs trimesh slice-with-cap, same run.

Baseline: ``trimesh.Trimesh.slice_plane(point, -normal, cap=True)`` followed by its
``volume`` and ``center_mass``. Meshes: Wigley hulls of about 10k, 100k and 1M faces,
cut at 20° heel through the design waterline. Prints both times, the ratio and the
largest relative difference of volume and centroid (centroid relative to hull length).
"""
from __future__ import annotations

import argparse
import os
import statistics
import sys
import time

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

import trimesh  # noqa: E402

from meshhydro import load_hull  # noqa: E402
from meshhydro.forms import wigley  # noqa: E402
from meshhydro.frames import up_vector  # noqa: E402

SIZES = {"10k": (40, 56, 4), "100k": (200, 112, 10), "1M": (1000, 240, 10)}


def timeit(fn, repeat: int) -> float:
    ts = []
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        ts.append(time.perf_counter() - t)
    return statistics.median(ts)


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", default="10k,100k,1M")
    ap.add_argument("--repeat", type=int, default=7)
    args = ap.parse_args(argv)
    L, B, T = 100.0, 10.0, 6.25
    n = up_vector(20.0, 0.5)
    p = np.array([0.0, 0.0, T])
    print(f"{'mesh':>6} {'faces':>9} {'kernel ms':>10} {'trimesh ms':>11} {'ratio':>7} {'max rel diff':>13}")
    for name in args.sizes.split(","):
        s, w, a = SIZES[name]
        v, f = wigley(L, B, T, stations=s, waterlines=w, above=a)
        tmesh = trimesh.Trimesh(v, f, process=False)
        hull = load_hull(tmesh, x_ref=0.0)
        hull.cut(p, n)
        tk = timeit(lambda: hull.cut(p, n), args.repeat)
        ref_holder = {}

        def base():
            sl = tmesh.slice_plane(p, -n, cap=True)
            ref_holder["v"] = sl.volume
            ref_holder["c"] = sl.center_mass

        tb = timeit(base, max(2, args.repeat // 3))
        c = hull.cut(p, n)
        dv = abs(c.volume - ref_holder["v"]) / ref_holder["v"]
        dc = float(np.max(np.abs(c.centroid - ref_holder["c"]))) / L
        print(f"{name:>6} {len(f):>9} {tk * 1e3:>10.3f} {tb * 1e3:>11.1f} {tb / tk:>7.1f} {max(dv, dc):>13.2e}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
