#!/usr/bin/env python3
"""Benchmark: load and check a large binary STL (default about 5.2M faces) with progress shown.

The mesh (a Wigley hull, see meshhydro.forms) is generated into a temporary folder and
written as binary STL with numpy. The load runs in a fresh child process so that its peak
memory (ru_maxrss) is its own: read, weld, health check (edge table, bodies, volumes) and
the kernel's block preparation, i.e. everything ``load_hull`` does. Floors: ≤ 12 s and
≤ 2.5 GB peak at 5.2M faces.
"""
from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
import time

import numpy as np

ROOT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..")
sys.path.insert(0, ROOT)

CHILD = r"""
import json, resource, sys, time
sys.path.insert(0, {root!r})
from tqdm import tqdm
from meshhydro.hull import Hull
from meshhydro.mesh import check_mesh

bars = {{}}
def progress(stage, done, total):
    bar = bars.get(stage)
    if bar is None:
        bar = bars[stage] = tqdm(total=total, desc=stage, unit="face", unit_scale=True,
                                 disable=not sys.stderr.isatty(), leave=False)
    bar.update(done - bar.n)
cpu0 = resource.getrusage(resource.RUSAGE_SELF).ru_utime + resource.getrusage(resource.RUSAGE_SELF).ru_stime
t = time.perf_counter()
md, rep = check_mesh({path!r}, progress=progress if {with_progress} else None)
hull = Hull(md, rep)  # what load_hull does after the check: the kernel's block preparation
el = time.perf_counter() - t
for bar in bars.values():
    bar.close()
print(json.dumps(dict(seconds=el, faces=len(hull.faces), vertices=len(hull.vertices),
                      volume=hull.total_volume, usable=hull.report.usable,
                      cpu=resource.getrusage(resource.RUSAGE_SELF).ru_utime + resource.getrusage(resource.RUSAGE_SELF).ru_stime - cpu0,
                      peak_mb=resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0)))
"""


def write_binary_stl(path: str, v: np.ndarray, f: np.ndarray) -> None:
    rec = np.zeros(len(f), dtype=[("normal", "<f4", (3,)), ("corners", "<f4", (3, 3)), ("attr", "<u2")])
    rec["corners"] = v[f].astype(np.float32)
    with open(path, "wb") as fh:
        fh.write(b"meshhydro benchmark hull".ljust(80, b" "))
        fh.write(np.uint32(len(f)).tobytes())
        rec.tofile(fh)


def main(argv: list[str] | None = None) -> int:
    from meshhydro.forms import wigley

    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--stations", type=int, default=2000)
    ap.add_argument("--waterlines", type=int, default=640)
    ap.add_argument("--progress", action="store_true", help="pass a tqdm progress callback to check_mesh")
    args = ap.parse_args(argv)
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "big.stl")
        t = time.perf_counter()
        v, f = wigley(100.0, 10.0, 6.25, stations=args.stations, waterlines=args.waterlines, above=10)
        write_binary_stl(path, v, f)
        n = len(f)
        del v, f
        print(f"generated {n} faces ({os.path.getsize(path) / 1e6:.0f} MB) in {time.perf_counter() - t:.1f} s",
              file=sys.stderr)
        code = CHILD.format(root=os.path.abspath(ROOT), path=path, with_progress=bool(args.progress))
        out = subprocess.run([sys.executable, "-c", code], capture_output=False, stdout=subprocess.PIPE,
                             text=True, check=True)
        r = json.loads(out.stdout.strip().splitlines()[-1])
    print(f"{'faces':>9} {'vertices':>9} {'load s':>7} {'cpu s':>6} {'peak MB':>8} {'volume m3':>11} usable")
    print(f"{r['faces']:>9} {r['vertices']:>9} {r['seconds']:>7.2f} {r['cpu']:>6.2f} {r['peak_mb']:>8.0f} "
          f"{r['volume']:>11.3f} {r['usable']}")
    print("(cpu s: processor time of the load; a wall time well above it means the machine was busy)", file=sys.stderr)
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
