"""Stability commands: float, righting, cross-curves, criteria.

Each takes either a case file (``.toml``) or a mesh with ``--displacement`` and ``--cog``
for a quick check. The analyses decide; these functions parse, call and render.
"""
from __future__ import annotations

import argparse
import os
import sys

from .. import analysis
from ..criteria import read_criteria
from ..errors import InputError
from .common import (
    check_figure,
    check_finite,
    is_case,
    mesh_args,
    load_hull_source,
    load_source,
    marks_args,
    out_args,
    output,
    parse_range,
    progress,
    set_arg,
    source_args,
    water_args,
)

HEEL_HINT = "; use --direction for the side"


def _heels(args: argparse.Namespace):
    hs = parse_range(args.heels, "--heels")
    return analysis.check_angles(hs, 0.0, 180.0, what="--heels", hint=HEEL_HINT)


def cmd_float(args: argparse.Namespace) -> int:
    _, doc = analysis.float_analysis(load_source(args, openings=False))
    output(args, doc)
    return 0


def cmd_righting(args: argparse.Namespace) -> int:
    check_figure(args.plot)
    hs = _heels(args)
    inp = load_source(args)
    bar = progress(args, analysis.curve_count(hs, inp, args.direction), "righting curve")
    _, doc = analysis.righting_analysis(inp, hs, direction=args.direction, free_trim=not args.fixed_trim,
                                        progress=bar)
    bar.close()
    output(args, doc, args.plot)
    return 0


def cmd_cross(args: argparse.Namespace) -> int:
    check_figure(args.plot)
    check_finite(args, ("lcg",))
    ds = parse_range(args.displacements, "--displacements")
    hs = parse_range(args.heels, "--heels")
    hull, rho = load_hull_source(args)
    bar = progress(args, len(ds) * len(hs), "cross curves")
    _, doc = analysis.cross_analysis(hull, ds, hs, density=rho, lcg=args.lcg, progress=bar)
    bar.close()
    output(args, doc, args.plot)
    return 0


def criteria_set(args: argparse.Namespace):
    """The criteria set: --set, or the case file's ``[criteria] set`` (a path relative to the case file), or
    imo2008; --set and a different set in the case file are refused."""
    ref = None
    if is_case(args.source):
        from ..loading import read_case

        spec = read_case(args.source).spec
        if spec is not None and spec.criteria is not None and spec.criteria.set:
            ref = spec.criteria.set
            ref = spec.resolve(ref) if ref.endswith(".toml") else ref
    if args.set and ref and args.set != ref:
        raise InputError(f"--set {args.set}: {args.source} names the criteria set {ref} in [criteria]; "
                         f"give one of them")
    return read_criteria(args.set or ref or "imo2008")


def cmd_criteria(args: argparse.Namespace) -> int:
    check_figure(args.plot)
    cset = criteria_set(args)
    hs = _heels(args)
    inp = load_source(args)
    bar = progress(args, analysis.curve_count(hs, inp, args.direction), "righting curve")
    rep, doc = analysis.criteria_analysis(inp, cset, hs, direction=args.direction, free_trim=not args.fixed_trim,
                                          progress=bar)
    bar.close()
    fig = None
    f = doc.section("results").figures[0]
    levers = f if f.view == "criteria_gz" else None
    if args.plot and f.view in ("righting_curve", "criteria_gz"):
        # the report-grade view with the criteria drawn; heeling arms and the weather levers in a second file
        from ..document import Figure
        from ..figure_data import gz_data

        sides = analysis.choose_sides(inp.hull, inp.condition, args.direction)
        curve = f.data["curve"] if levers is not None else f.data
        fig = Figure(f.key, f.title, "gz_curve", gz_data(curve, sides, inp.hull.name, cset=cset, report=rep,
                                                        title=f.title))
    # the exact/FSM or damaged/intact pair keeps its own view
    output(args, doc, args.plot, fig)
    if args.plot and levers is not None:
        from ..plots import draw

        stem, suffix = os.path.splitext(args.plot)
        draw(levers, f"{stem}-levers{suffix}")
        print(f"wrote {stem}-levers{suffix} (heeling arms and wind levers)", file=sys.stderr)
    return 0 if rep.passed else 1


def _curve_opts(p: argparse.ArgumentParser, plot_help: str = "draw the GZ curve to this file (.png, .svg or .pdf)"
                ) -> None:
    p.add_argument("--heels", default="0:180:1", help="START:STOP:STEP from 0 to 180 [deg] (default 0:180:1)")
    p.add_argument("--direction", choices=("auto", "both", "starboard", "port"), default="auto",
                   help="heel side(s); auto = both unless hull and load are port-starboard symmetric")
    p.add_argument("--fixed-trim", action="store_true", help="keep the upright trim instead of free trim")
    p.add_argument("--plot", help=plot_help)
    p.add_argument("--quiet", action="store_true", help="no progress bar")


def register(sub: argparse._SubParsersAction) -> None:
    """Add the stability sub-commands."""
    f = sub.add_parser("float", help="free-floating position (draft, heel, trim) for a loading condition")
    source_args(f)
    marks_args(f)
    out_args(f)
    f.set_defaults(func=cmd_float)

    r = sub.add_parser("righting", help="righting-lever (GZ) curve with free trim, derived angles and areas")
    source_args(r)
    _curve_opts(r)
    out_args(r)
    r.set_defaults(func=cmd_righting)

    c = sub.add_parser("cross-curves", help="KN over displacements and heels (free trim)")
    c.add_argument("source", help="mesh file or case file (for the mesh and density)")
    c.add_argument("--displacements", required=True, help="START:STOP:STEP [t] or a list")
    c.add_argument("--heels", default="0:90:10", help="heels [deg] (default 0:90:10)")
    c.add_argument("--lcg", type=float, help="fixed LCG [m] instead of level upright flotation")
    c.add_argument("--plot", help="draw the cross curves to this file (.png, .svg or .pdf)")
    c.add_argument("--quiet", action="store_true", help="no progress bar")
    water_args(c)
    mesh_args(c)
    out_args(c)
    c.set_defaults(func=cmd_cross)

    k = sub.add_parser("criteria", help="check a condition against a criteria set (exit 1 when not met)")
    source_args(k)
    set_arg(k)
    _curve_opts(k, "draw the GZ curve with the criteria's limits to this file (.png, .svg or .pdf); with heeling "
                   "arms or the weather criterion, their levers go to FILE-levers.SUFFIX as well")
    out_args(k)
    k.set_defaults(func=cmd_criteria)
