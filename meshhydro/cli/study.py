"""The study command: every case of a design-study file on Dask, one results table."""
from __future__ import annotations

import argparse
import sys

from ..criteria import CAUTION


def cmd_study(args: argparse.Namespace) -> int:
    from ..schemas import read_toml, validate_study
    from ..study import run_study

    spec = validate_study(read_toml(args.study), args.study)
    summary = run_study(spec, args.out, scheduler=args.scheduler, workers=args.workers,
                        progress=False if args.quiet else None)
    print(f"cases {summary.cases}: ran {summary.run}, reused {summary.skipped} from an earlier run, "
          f"{summary.failed} with an error; {summary.seconds:.1f} s", file=sys.stderr)
    for f in summary.files:
        print(f"wrote {f}", file=sys.stderr)
    print(CAUTION, file=sys.stderr)
    return 0


def register(sub: argparse._SubParsersAction) -> None:
    """Add the study sub-command."""
    s = sub.add_parser("study", help="run a design study (a grid of hulls and loads) on Dask")
    s.add_argument("study", help="study file (TOML)")
    s.add_argument("--out", required=True, help="results folder (results.csv, results.parquet, plots)")
    s.add_argument("--scheduler", help="address of a running Dask scheduler (default: a local cluster)")
    s.add_argument("--workers", type=int, help="worker processes of the local cluster (default 2)")
    s.add_argument("--quiet", action="store_true", help="no progress bar")
    s.set_defaults(func=cmd_study)
