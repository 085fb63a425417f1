"""The submergence command: a body ballasted down from floating to fully submerged (table and figure)."""
from __future__ import annotations

import argparse

from ..errors import InputError
from ..submergence import submergence_analysis
from .common import load_hull_source, mesh_args, out_args, output, parse_range, water_args


def cmd_submergence(args: argparse.Namespace) -> int:
    if (args.drafts is None) == (args.displacements is None):
        raise InputError("give either --drafts or --displacements")
    hull, rho = load_hull_source(args)
    drafts = None if args.drafts is None else parse_range(args.drafts, "--drafts")
    disps = None if args.displacements is None else parse_range(args.displacements, "--displacements")
    _, doc = submergence_analysis(hull, drafts=drafts, displacements=disps, density=rho, kg=args.kg)
    output(args, doc, args.plot)
    return 0


def register(sub: argparse._SubParsersAction) -> None:
    """Add the ``submergence`` sub-command."""
    p = sub.add_parser("submergence", help="ballasting down: KB, BM, KM (KG limit), GM from floating to fully "
                                           "submerged, and where the waterplane is small")
    p.add_argument("source", help="mesh file or case file (for the mesh and density)")
    p.add_argument("--drafts", help="START:STOP:STEP [m] or a list (upright, level trim)")
    p.add_argument("--displacements", help="START:STOP:STEP [t] or a list (instead of --drafts)")
    p.add_argument("--kg", type=float, help="KG [m] for GMt at each step")
    p.add_argument("--plot", help="draw the sequence to this PNG, SVG or PDF")
    water_args(p)
    mesh_args(p)
    out_args(p)
    p.set_defaults(func=cmd_submergence)
