#!/usr/bin/env python3
"""Benchmark a design study: the same cases serially in this process, then on a local Dask cluster.

Run: ``python scripts/bench_study.py [STUDY.toml] [--workers 2]``. Default: the example study of
meshes/studies/ with the spacing swept in 0.05 m steps (41 spacings x 3 KG = 123 cases, KG limits on).
Prints both wall times, the speed-up and whether both runs gave the same figures. The cluster time
includes starting the cluster and each worker's imports; the serial run imports everything first (warm).
It also measures what this machine gives in parallel: the same pure-Python loop in one process, then
in as many processes as workers at once; their ratio is the most any parallel run can gain here.
"""
from __future__ import annotations

import argparse
import math
import multiprocessing
import os
import sys
import tempfile
import time

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

from meshhydro.schemas import read_toml, validate_study  # noqa: E402
from meshhydro.study import clear_caches, expand_cases, run_case, run_study  # noqa: E402
from meshhydro.study_table import read_results  # noqa: E402

DEFAULT = os.path.join(os.path.dirname(__file__), "..", "meshes", "studies", "twinfin_spacing_kg.toml")


def _same(a: dict, b: dict) -> bool:
    for k, v in a.items():
        if k == "seconds":
            continue
        w = b.get(k)
        if isinstance(v, float) and isinstance(w, float):
            if not (math.isclose(v, w, rel_tol=1e-12, abs_tol=1e-12)):
                return False
        elif v != w and not (v in (None, "") and w in (None, "")):
            return False
    return True


def _spin(_: int = 0) -> float:
    """Seconds for a fixed pure-Python loop (one core's worth of work)."""
    t = time.perf_counter()
    s = 0
    for i in range(10_000_000):
        s += i
    return time.perf_counter() - t


def parallel_capacity(workers: int) -> float:
    """How many times one process's work this machine does with ``workers`` processes at once."""
    one = _spin()
    with multiprocessing.get_context("spawn").Pool(workers) as pool:
        many = max(pool.map(_spin, range(workers)))
    return workers * one / many


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("study", nargs="?", default=None)
    ap.add_argument("--workers", type=int, default=2)
    args = ap.parse_args(argv)
    data = read_toml(args.study or DEFAULT)
    if args.study is None:
        data["parameters"]["spacing"] = {"start": 2.4, "stop": 4.4, "step": 0.05}  # a study worth spreading
    spec = validate_study(data, args.study or DEFAULT)
    cases = expand_cases(spec)
    load = os.getloadavg()
    run_case(cases[0])  # warm imports (numba, scipy) so the serial time is the work itself
    clear_caches()
    t0 = time.perf_counter()
    serial = [run_case(c) for c in cases]
    t_serial = time.perf_counter() - t0
    with tempfile.TemporaryDirectory() as out:
        t0 = time.perf_counter()
        summary = run_study(spec, out, workers=args.workers, progress=False)
        t_cluster = time.perf_counter() - t0
        table = read_results(out)
    same = all(_same(r, table[r["case_id"]]) for r in serial)
    print(f"study {spec.study.name!r}: {len(cases)} cases, {summary.failed} failed; "
          f"{os.cpu_count()} cores, load average before {load[0]:.2f}, after {os.getloadavg()[0]:.2f}")
    print(f"serial, one process        {t_serial:8.2f} s")
    print(f"local cluster, {args.workers} workers   {t_cluster:8.2f} s (cluster start, tables and plots included)")
    busy_serial = sum(r["seconds"] for r in serial)
    busy_workers = sum(r["seconds"] or 0.0 for r in table.values())
    print(f"case time summed           {busy_serial:8.2f} s serial, {busy_workers:.2f} s on the workers "
          "(more on the workers = cores shared with other load)")
    capacity = parallel_capacity(args.workers)
    print(f"speed-up                   {t_serial / t_cluster:8.2f}x (this machine gives at most {capacity:.2f}x "
          f"with {args.workers} processes: a pure-Python loop, one process against {args.workers} at once)")
    print(f"same figures both ways     {'yes' if same else 'NO'}")
    return 0 if same else 1


if __name__ == "__main__":
    raise SystemExit(main())
