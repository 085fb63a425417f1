#!/usr/bin/env python3
"""Benchmark: one plane evaluation, compiled kernel vs numpy kernel vs trimesh slice-with-cap, same run.

Baseline: ``trimesh.Trimesh.slice_plane(point, -normal, cap=True)`` followed by its
``volume`` and ``center_mass``. Meshes: Wigley hulls of about 10k, 100k, 1M and 5M faces,
cut at 20° heel through the design waterline. Prints median times, the ratios trimesh /
compiled and numpy / compiled, the largest relative difference (volume, and centroid
relative to hull length) of the compiled kernel from trimesh and from the numpy kernel,
and the vertical extent from the blocks (kernel.extent_along) against a scan of all vertices.
Floors: one cut at 1M faces ≤ 0.6 ms and ≥ 1,000× trimesh; ≤ 1.5 ms at 5M.
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

from meshhydro import kernel, load_hull  # noqa: E402
from meshhydro.forms import wigley  # noqa: E402
from meshhydro.frames import up_vector  # noqa: E402

SIZES = {"10k": (40, 56, 4), "100k": (200, 112, 10), "1M": (1000, 240, 10), "5M": (2000, 640, 10)}


def timeit(fn, repeat: int) -> float:
    ts = []
    for _ in range(repeat):
        t = time.perf_counter()
        fn()
        ts.append(time.perf_counter() - t)
    return statistics.median(ts)


def rel_diff(a, vol: float, cen: np.ndarray, length: float) -> float:
    return max(abs(a.volume - vol) / vol, float(np.max(np.abs(a.centroid - cen))) / length)


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", default="10k,100k,1M,5M")
    ap.add_argument("--repeat", type=int, default=51)
    args = ap.parse_args(argv)
    L, B, T = 100.0, 10.0, 6.25
    n = up_vector(20.0, 0.5)
    p = np.array([0.0, 0.0, T])
    print(f"{'mesh':>5} {'faces':>9} {'compiled ms':>11} {'numpy ms':>9} {'trimesh ms':>11} {'tm/comp':>8} "
          f"{'np/comp':>8} {'diff tm':>8} {'diff np':>8} {'extent ms':>9} {'scan ms':>8}")
    for name in args.sizes.split(","):
        s, w, a = SIZES[name]
        v, f = wigley(L, B, T, stations=s, waterlines=w, above=a)
        tmesh = trimesh.Trimesh(v, f, process=False)
        hull = load_hull(tmesh, x_ref=0.0)
        prep = hull.prepared
        c = kernel.cut(prep, p, n, backend="compiled")
        tc = timeit(lambda: kernel.cut(prep, p, n, backend="compiled"), args.repeat)
        tn = timeit(lambda: kernel.cut(prep, p, n, backend="numpy"), max(5, args.repeat // 5))
        ref = {}

        def base():
            sl = tmesh.slice_plane(p, -n, cap=True)
            ref["v"], ref["c"] = sl.volume, sl.center_mass

        tb = timeit(base, 2 if len(f) > 2_000_000 else 3)
        cn = kernel.cut(prep, p, n, backend="numpy")
        te = timeit(lambda: kernel.extent_along(prep, n), args.repeat)
        ts = timeit(lambda: (hull.vertices @ n).min(), max(5, args.repeat // 5))
        lo, hi = kernel.extent_along(prep, n)
        sv = hull.vertices @ n
        assert lo <= sv.min() and hi >= sv.max(), "extent_along does not bracket the vertices"
        print(f"{name:>5} {len(f):>9} {tc * 1e3:>11.3f} {tn * 1e3:>9.3f} {tb * 1e3:>11.1f} {tb / tc:>8.0f} "
              f"{tn / tc:>8.1f} {rel_diff(c, ref['v'], ref['c'], L):>8.1e} "
              f"{rel_diff(c, cn.volume, cn.centroid, L):>8.1e} {te * 1e3:>9.3f} {ts * 1e3:>8.2f}", flush=True)
        del tmesh, hull, prep, v, f
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
