"""Tank command: calibration (sounding) tables of a case file's tanks, upright or at a heel and trim."""
from __future__ import annotations

import argparse
import os

from ..analysis_tanks import tank_tables_analysis
from ..errors import InputError
from ..loading import read_case
from ..tank_case import build_tanks
from .common import out_args, output, warn_mesh


def cmd_tanks(args: argparse.Namespace) -> int:
    case = read_case(args.case)
    hull = case.load_hull()
    warn_mesh(hull)
    tanks = build_tanks(case, hull)
    if not tanks:
        raise InputError(f"{args.case}: the case has no [[tank]]")
    if args.tank:
        names = [t.name for t in tanks]
        for n in args.tank:
            if n not in names:
                raise InputError(f"--tank {n!r}: no such tank in {args.case} (tanks: {', '.join(names)})")
        tanks = tuple(t for t in tanks if t.name in args.tank)
    _, doc = tank_tables_analysis(tanks, args.step, heel=args.heel, trim=args.trim,
                                  label=os.path.basename(args.case))
    output(args, doc, args.plot)
    return 0


def register(sub: argparse._SubParsersAction) -> None:
    """Add the tanks sub-command."""
    t = sub.add_parser("tanks", help="tank calibration tables: sounding -> volume, centroid, free-surface inertia")
    t.add_argument("case", help="case file (.toml) with [[tank]] entries")
    t.add_argument("--step", type=float, default=0.1, help="sounding step [m] (default 0.1)")
    t.add_argument("--tank", action="append", default=[], metavar="NAME", help="only this tank (repeatable)")
    t.add_argument("--heel", type=float, default=0.0, help="heel [deg], positive starboard down (default 0)")
    t.add_argument("--trim", type=float, default=0.0, help="trim [deg], positive bow down (default 0)")
    t.add_argument("--plot", help="draw sounding against volume and free-surface moment to this PNG")
    out_args(t)
    t.set_defaults(func=cmd_tanks)
