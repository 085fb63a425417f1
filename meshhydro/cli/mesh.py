"""Mesh commands: check (health report) and table (hydrostatics over drafts)."""
from __future__ import annotations

import argparse
import sys

from ..analysis import check_analysis, drafts_for_displacements, table_analysis
from ..errors import InputError
from .common import (check_figure, check_finite, density, load_mesh, mesh_args, mesh_option, out_args, output,
                     parse_range, parse_vec, progress, water_args)


# ---------------------------------------------------------------------------- check


def cmd_check(args: argparse.Namespace) -> int:
    from ..mesh import check_mesh

    offset = parse_vec(str(mesh_option(args, "offset")), "--offset")
    with progress(args, 1, "mesh") as bar:
        md, rep = check_mesh(args.mesh, units=mesh_option(args, "units"), forward=mesh_option(args, "forward"),
                             up=mesh_option(args, "up"), offset=offset, flip_inside_out=args.flip_inside_out,
                             merge_overlaps=args.merge_overlaps, close_holes=args.close_holes, progress=bar.stage)
    output(args, check_analysis(rep))
    if not rep.usable:
        print(f"meshhydro: {rep.problems[0]}", file=sys.stderr)
        return 3
    return 0


# ---------------------------------------------------------------------------- table


def cmd_table(args: argparse.Namespace) -> int:
    if (args.drafts is None) == (args.displacements is None):
        raise InputError("table needs exactly one of --drafts and --displacements")
    check_finite(args, ("heel", "trim"))
    check_figure(args.plot)
    rho = density(args)
    hull = load_mesh(args)
    if args.drafts is not None:
        drafts = parse_range(args.drafts, "--drafts")
    else:
        drafts = drafts_for_displacements(hull, parse_range(args.displacements, "--displacements"),
                                          heel=args.heel, trim=args.trim, density=rho)
    _, doc = table_analysis(hull, drafts, heel=args.heel, trim=args.trim, density=rho)
    output(args, doc, args.plot)
    return 0


def register(sub: argparse._SubParsersAction) -> None:
    """Add the check and table sub-commands."""
    c = sub.add_parser("check", help="health report of a mesh (exit 0 when usable)")
    c.add_argument("mesh")
    mesh_args(c)
    out_args(c, ("text", "json"))
    c.set_defaults(func=cmd_check)

    t = sub.add_parser("table", help="hydrostatic table over a range of drafts or displacements")
    t.add_argument("mesh")
    t.add_argument("--drafts", help="START:STOP:STEP [m] (STOP included) or a list 0.5,1,1.5")
    t.add_argument("--displacements", help="START:STOP:STEP [t] or a list: the table at these displacements")
    t.add_argument("--heel", type=float, default=0.0, help="heel [deg], positive starboard down")
    t.add_argument("--trim", type=float, default=0.0, help="trim [deg], positive bow down")
    water_args(t)
    mesh_args(t)
    out_args(t)
    t.add_argument("--plot", help="also draw the hydrostatic curves to this file (.png, .svg or .pdf)")
    t.set_defaults(func=cmd_table)
