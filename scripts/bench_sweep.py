#!/usr/bin/env python3
"""Benchmark: a 19-frame heel sweep (0-90° in 5°) of a hull of about 200k faces.

Frames, contact sheet and GIF at 960x720, off-screen, as `meshhydro sweep --sheet --gif` writes them.
Prints the split between solving (free-trim positions) and drawing plus encoding, wall and CPU
time (this process; the off-screen renderer runs in it), for the default frames and for
anti-aliased ones (``--smooth-edges``). Each run is a fresh process, so the first drawing pays for
importing the renderer as a command would. Floor (issue 14): at most 6 s in all for the default
frames; the ratio of the total to it is printed (at most 1 meets it). ``--repeat N`` runs each
variant N times, interleaved, and reports the median.
"""
from __future__ import annotations

import argparse
import os
import json
import statistics
import subprocess
import sys
import tempfile
import time

import numpy as np

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

import trimesh  # noqa: E402

from meshhydro import load_hull  # noqa: E402
from meshhydro.forms import wigley  # noqa: E402
from meshhydro.sweep import heel_trace, write_sweep  # noqa: E402

FLOOR = 6.0


def one_run(hull, disp: float, smooth: bool) -> tuple[float, float, float]:
    """(solve [s], draw and encode [s], CPU [s]) of one sweep written to a temporary folder."""
    c0 = time.process_time()
    t0 = time.perf_counter()
    tr = heel_trace(hull, disp, (0.0, 0.0, 1.1), np.arange(0.0, 91.0, 5.0))
    t_solve = time.perf_counter() - t0
    with tempfile.TemporaryDirectory() as d:
        t1 = time.perf_counter()
        write_sweep(hull, tr, os.path.join(d, "sweep"), view="3d", size=(960, 720), sheet=True, gif=True,
                    smooth=smooth)
        t_out = time.perf_counter() - t1
    return t_solve, t_out, time.process_time() - c0


def _hull():
    v, f = wigley(20.0, 4.0, 1.2, depth=2.4, stations=400, waterlines=110, above=12)
    hull = load_hull(trimesh.Trimesh(v, f, process=False), x_ref=0.0)
    return hull, hull.hydrostatics(1.0).displacement


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeat", type=int, default=1, help="runs of each variant (median reported)")
    ap.add_argument("--one", choices=("plain", "smooth"), help=argparse.SUPPRESS)  # a single run, as JSON
    args = ap.parse_args()
    if args.one:
        hull, disp = _hull()
        print(json.dumps(one_run(hull, disp, args.one == "smooth")))
        return 0
    hull, _ = _hull()
    print(f"hull faces {len(hull.faces)}; load average {os.getloadavg()[0]:.2f} at start")
    runs: dict[str, list[list[float]]] = {"plain": [], "smooth": []}
    for _ in range(args.repeat):
        for variant in runs:
            out = subprocess.run([sys.executable, __file__, "--one", variant], check=True, capture_output=True,
                                 text=True).stdout
            runs[variant].append(json.loads(out.strip().splitlines()[-1]))
    for variant, rs in runs.items():
        solve = statistics.median(r[0] for r in rs)
        out = statistics.median(r[1] for r in rs)
        cpu = statistics.median(r[2] for r in rs)
        total = solve + out
        name = "anti-aliased (--smooth-edges)" if variant == "smooth" else "default frames"
        print(f"{name:30s} solve {solve:5.2f} s  draw+encode {out:5.2f} s  total {total:5.2f} s  CPU {cpu:5.2f} s"
              + ("" if variant == "smooth" else f"  ratio to the {FLOOR:g} s floor {total / FLOOR:.2f}"
                 f" ({'met' if total <= FLOOR else 'NOT met'})"))
    print(f"load average {os.getloadavg()[0]:.2f} at end")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
