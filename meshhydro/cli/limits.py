"""The kg-limits command: the largest KG at which a criteria set passes, over a range of displacements.

Takes a case file (its mesh, water, openings, [weather], [[windage]], [[arm]] and [criteria] set)
or a mesh file. The analysis decides; this parses, calls and renders.
"""
from __future__ import annotations

import argparse

from .. import limits_analysis
from ..errors import InputError
from ..loading import read_case
from .common import (check_figure, density, is_case, load_mesh, mesh_args, out_args, output, parse_range,
                     progress, refuse_mesh_options, set_arg, warn_mesh, water_args)
from .stability import criteria_set


def cmd_kg_limits(args: argparse.Namespace) -> int:
    spec, openings = None, ()
    check_figure(args.plot)
    if is_case(args.source):
        refuse_mesh_options(args)
        case = read_case(args.source)
        hull, rho, spec, openings = case.load_hull(), density(args, case.density), case.spec, case.openings
        warn_mesh(hull)
    else:
        hull, rho = load_mesh(args, args.source), density(args)
    cset = criteria_set(args)
    ds = parse_range(args.displacements, "--displacements")
    rng = None
    if args.kg_range is not None:
        lo_hi = args.kg_range.split(":")
        try:
            rng = (float(lo_hi[0]), float(lo_hi[1])) if len(lo_hi) == 2 else None
        except ValueError:
            rng = None
        if rng is None or not rng[0] < rng[1]:
            raise InputError(f"--kg-range takes LOW:HIGH [m] with LOW < HIGH, got {args.kg_range!r}")
    with progress(args, len(ds), "KG limits") as bar:
        _, doc = limits_analysis.kg_limits_analysis(hull, ds, cset, density=rho, spec=spec, openings=openings,
                                                    lcg=args.lcg, kg_range=rng, steps=args.steps, progress=bar)
    output(args, doc, args.plot)
    return 0


def register(sub: argparse._SubParsersAction) -> None:
    """Add the kg-limits sub-command."""
    k = sub.add_parser("kg-limits", help="largest KG meeting a criteria set, per displacement, and what governs")
    k.add_argument("source", help="case file (.toml) or mesh file")
    k.add_argument("--displacements", required=True, help="START:STOP:STEP [t] or a list")
    set_arg(k)
    k.add_argument("--kg-range", help="LOW:HIGH [m] searched for the limit (default 0 to the hull's depth)")
    k.add_argument("--steps", type=int, default=40, help="grid steps over the KG range that bracket a limit "
                                                         "(default 40)")
    k.add_argument("--lcg", type=float, help="fixed LCG [m] instead of the LCB of level flotation")
    k.add_argument("--plot", help="draw the KG limit curve to this file (.png, .svg or .pdf)")
    k.add_argument("--quiet", action="store_true", help="no progress bar")
    water_args(k)
    mesh_args(k)
    out_args(k)
    k.set_defaults(func=cmd_kg_limits)
