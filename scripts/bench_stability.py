#!/usr/bin/env python3
"""Benchmark: free-trim righting curves (0-180° in 1° steps) and cross-curve sets.

For each demo hull and for a Wigley hull of about 1M faces, prints the time of a
free-trim curve and of a cross-curve set (10 displacements x 37 angles, 0-180° in 5°),
with the number of kernel evaluations per solved angle. The floor for the 1M-face
curve is 10 s and 6 evaluations per angle on average.
"""
from __future__ import annotations

import argparse
import os
import sys
import time

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

import trimesh  # noqa: E402

from meshhydro import load_hull  # noqa: E402
from meshhydro.forms import wigley  # noqa: E402
from meshhydro.loading import read_case  # noqa: E402
from meshhydro.stability import cross_curves  # noqa: E402

HERE = os.path.dirname(os.path.abspath(__file__))


def bench(name: str, hull, disp: float, cog, cross: bool) -> None:
    heels = np.arange(0.0, 181.0, 1.0)
    t = time.perf_counter()
    c = hull.righting_curve(disp, cog, heels=heels)
    tc = time.perf_counter() - t
    line = (f"{name:>22} {len(hull.faces):>9} {tc:>9.2f} {c.evaluations.sum() / len(heels):>10.2f}")
    if cross:
        ds = np.linspace(0.5 * disp, 1.4 * disp, 10)
        ds = ds[ds / c.density < 0.95 * hull.total_volume]
        t = time.perf_counter()
        cross_curves(hull, ds, np.arange(0.0, 181.0, 5.0), density=c.density)
        tx = time.perf_counter() - t
        line += f" {tx:>9.2f} {len(ds) * 37:>7d}"
    print(line, flush=True)


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--skip-large", action="store_true", help="demo hulls only")
    args = ap.parse_args(argv)
    print(f"{'hull':>22} {'faces':>9} {'curve s':>9} {'eval/angle':>10} {'cross s':>9} {'angles':>7}")
    for case in ("brindle_barge", "tern_sloop", "twinfin_cat", "kestrel_outrigger"):
        cs = read_case(os.path.join(HERE, "..", "meshes", "cases", case + ".toml"))
        hull = cs.load_hull()
        cond = cs.conditions[0]
        bench(case, hull, cond.displacement, cond.cog_fluid, cross=True)
    if not args.skip_large:
        v, f = wigley(100.0, 10.0, 6.25, stations=1000, waterlines=240, above=10)
        hull = load_hull(trimesh.Trimesh(v, f, process=False), x_ref=0.0)
        disp = hull.hydrostatics(5.0).displacement
        bench("wigley 1M", hull, disp, (0.0, 0.0, 4.0), cross=True)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
