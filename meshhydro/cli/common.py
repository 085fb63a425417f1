"""What every command shares: options, parsing of option text, loading, progress bars and output.

Only the CLI parses option text (ranges, vectors, sizes) and names options in messages.
"""
from __future__ import annotations

import argparse
import dataclasses
import math
import os
import sys
from typing import Sequence

import numpy as np

from ..analysis import CaseInput, from_case, from_mesh
from ..document import Document, Figure
from ..errors import InputError
from ..frames import FRESH_WATER, SEA_WATER
from ..tolerances import ANGLE_SLACK
from ..loading import Opening
from ..output import figure_format, write_atomic
from ..progress import Progress
from ..renderers import render
from ..vessel import FloatingHull, load_hull

# ---------------------------------------------------------------------------- parsing option text


def parse_vec(text: str, what: str) -> tuple[float, float, float]:
    """``'X,Y,Z'`` -> three floats; the error names the option ``what``."""
    try:
        parts = [float(x) for x in text.replace(" ", "").split(",")]
    except ValueError:
        raise InputError(f"{what} {text!r} is not three numbers X,Y,Z") from None
    if len(parts) != 3:
        raise InputError(f"{what} {text!r} is not three numbers X,Y,Z")
    return parts[0], parts[1], parts[2]


def parse_range(spec: str, what: str = "range") -> np.ndarray:
    """Parse ``START:STOP:STEP`` (STOP included when reached) or a comma list into an array.

    Raises InputError with the offending text for anything that is not such a range.
    """
    text = str(spec).strip()
    try:
        if ":" in text:
            parts = text.split(":")
            if len(parts) != 3:
                raise ValueError
            a, b, s = (float(x) for x in parts)
            if not all(math.isfinite(x) for x in (a, b, s)) or s <= 0 or b < a:
                raise ValueError
            n = int(math.floor((b - a) / s + ANGLE_SLACK)) + 1  # STOP included despite rounding
            if n > 100000:
                raise InputError(f"{what} {spec!r} has {n} values; use a coarser step")
            vals = a + s * np.arange(n)
        else:
            vals = np.array([float(x) for x in text.split(",") if x.strip()])
            if len(vals) == 0 or not np.all(np.isfinite(vals)):
                raise ValueError
    except InputError:
        raise
    except ValueError:
        raise InputError(
            f"{what} {spec!r} is not START:STOP:STEP (STOP >= START, STEP > 0) nor a list like 1,2.5,3"
        ) from None
    return np.round(vals, 12)


def parse_size(text: str, what: str = "--size") -> tuple[int, int]:
    """``'WxH'`` -> (W, H) in pixels, each 64 to 4096."""
    try:
        w, h = (int(x) for x in text.lower().split("x"))
    except ValueError:
        raise InputError(f"{what} {text!r} is not WIDTHxHEIGHT, e.g. 960x720") from None
    if not (64 <= w <= 4096 and 64 <= h <= 4096):
        raise InputError(f"{what} {text!r}: width and height must be 64 to 4096 pixels")
    return w, h


def marks_args(p: argparse.ArgumentParser) -> None:
    """Where drafts fore and aft are read, for a mesh (a case file gives them in its [hull])."""
    p.add_argument("--x-aft", type=float, help="x of the aft perpendicular / draft mark [m] (default the hull's aft end)")
    p.add_argument("--x-fore", type=float, help="x of the fore perpendicular / draft mark [m] (default the fore end)")


def parse_opening(spec: str) -> Opening:
    """``'NAME=X,Y,Z'`` -> an Opening."""
    if "=" not in spec:
        raise InputError(f"--opening {spec!r} is not NAME=X,Y,Z")
    name, xyz = spec.split("=", 1)
    return Opening(name.strip(), parse_vec(xyz, f"--opening {name}"))


# ---------------------------------------------------------------------------- shared options


#: The mesh options and the values they take when not given (None in the parsed arguments means not given).
MESH_DEFAULTS = {"units": "m", "forward": "+x", "up": "+z", "offset": "0,0,0", "flip_inside_out": False,
                 "merge_overlaps": False, "close_holes": False}


def mesh_args(p: argparse.ArgumentParser) -> None:
    g = p.add_argument_group("mesh input")
    g.add_argument("--units", help="length unit of the mesh file: m, mm, cm, ft, in (default m)")
    g.add_argument("--forward", help="file axis pointing forward, e.g. +x, -y (default +x)")
    g.add_argument("--up", help="file axis pointing up, e.g. +z, +y for Y-up exports (default +z)")
    g.add_argument("--offset", help="X,Y,Z added after scaling and axes [m] (default 0,0,0)")
    g.add_argument("--flip-inside-out", action="store_true", help="flip bodies found inside out (explicit repair)")
    g.add_argument("--merge-overlaps", action="store_true", help="union overlapping bodies (explicit repair)")
    g.add_argument("--close-holes", action="store_true",
                   help="fill one-triangle and quad holes (explicit repair; the change is reported)")


def option(name: str) -> str:
    """The command-line spelling of an argument's dest: ``flip_inside_out`` -> ``--flip-inside-out``."""
    return "--" + name.replace("_", "-")


def given(args: argparse.Namespace, names: Sequence[str]) -> list[str]:
    """The options among ``names`` (dests) that the user gave, spelt as on the command line."""
    out = []
    for n in names:
        v = getattr(args, n, None)
        if v is not None and v is not False and v != []:
            out.append(option(n))
    return out


def refuse(args: argparse.Namespace, names: Sequence[str], why: str) -> None:
    """An InputError when any option among ``names`` was given: ``'--a, --b: <why>'``."""
    opts = given(args, names)
    if opts:
        raise InputError(f"{', '.join(opts)}: {why}")


def mesh_option(args: argparse.Namespace, name: str) -> object:
    v = getattr(args, name, None)
    return MESH_DEFAULTS[name] if v is None else v


def check_finite(args: argparse.Namespace, names: Sequence[str]) -> None:
    """Number options among ``names`` must be finite (argparse lets ``nan`` and ``inf`` through)."""
    for n in names:
        v = getattr(args, n, None)
        if v is not None and not math.isfinite(v):
            raise InputError(f"{option(n)} {v!r} is not a finite number")


def check_figure(path: str | None, what: str = "--plot") -> None:
    """A figure file's suffix checked before any computing (PNG, SVG or PDF)."""
    if path:
        try:
            figure_format(path)
        except InputError as exc:
            raise InputError(f"{what} {exc}") from None


def out_args(p: argparse.ArgumentParser, formats: Sequence[str] = ("text", "csv", "json")) -> None:
    p.add_argument("--format", choices=formats, default="text", help="output format (default text)")
    p.add_argument("--out", help="write the output to this file (atomically) instead of standard output")


def set_arg(p: argparse.ArgumentParser) -> None:
    """The criteria set option, the same for every command that checks criteria."""
    p.add_argument("--set", help="imo2008, imo2008-weather (built-in) or a criteria TOML file "
                                 "(default the case's [criteria] set, else imo2008)")


def water_args(p: argparse.ArgumentParser) -> None:
    p.add_argument("--density", type=float, help="water density [t/m³] (default sea water 1.025)")
    p.add_argument("--water", choices=("sea", "fresh"), help="sea (1.025 t/m³) or fresh (1.000 t/m³) water")


def source_args(p: argparse.ArgumentParser) -> None:
    """A case file, or a mesh with a quick load."""
    p.add_argument("source", help="case file (.toml) or a mesh file with --displacement and --cog")
    p.add_argument("--condition", help="name of the condition in the case file (default the first)")
    g = p.add_argument_group("quick check without a case file")
    g.add_argument("--displacement", type=float, help="displacement [t]")
    g.add_argument("--cog", help="centre of gravity X,Y,Z [m], hull frame (Z is KG)")
    g.add_argument("--fsm", type=float, help="free-surface moment [t·m] (raises G by FSM/Δ; default 0)")
    g.add_argument("--opening", action="append", default=[], metavar="NAME=X,Y,Z",
                   help="an opening for the downflooding angle (repeatable)")
    p.add_argument("--submerged-depth", type=float, metavar="M",
                   help="for a load equal to the hull's whole buoyancy (fully submerged, neutral): depth of the "
                        "body's top below the surface [m] (default 0, just under it)")
    water_args(p)
    mesh_args(p)


# ---------------------------------------------------------------------------- loading


def density(args: argparse.Namespace, default: float | None = None) -> float:
    """Water density [t/m³] from --density or --water, else ``default`` (sea water when None)."""
    refuse_both_waters(args)
    check_finite(args, ("density",))
    if getattr(args, "density", None) is not None:
        return float(args.density)
    w = getattr(args, "water", None)
    if w == "fresh":
        return FRESH_WATER
    if w == "sea":
        return SEA_WATER
    return SEA_WATER if default is None else default


def refuse_both_waters(args: argparse.Namespace) -> None:
    if getattr(args, "density", None) is not None and getattr(args, "water", None) is not None:
        raise InputError(f"--water {args.water} and --density {args.density:g}: give one of them, not both")


def density_override(args: argparse.Namespace) -> float | None:
    """The density the user asked for, or None to keep a case file's."""
    if getattr(args, "density", None) is None and getattr(args, "water", None) is None:
        return None
    return density(args)


def load_mesh(args: argparse.Namespace, path: str | None = None) -> FloatingHull:
    offset = parse_vec(str(mesh_option(args, "offset")), "--offset")
    with progress(args, 1, "mesh") as bar:
        hull = load_hull(path or args.mesh, units=mesh_option(args, "units"), forward=mesh_option(args, "forward"),
                         up=mesh_option(args, "up"), offset=offset, flip_inside_out=bool(args.flip_inside_out),
                         merge_overlaps=bool(args.merge_overlaps),
                         close_holes=bool(getattr(args, "close_holes", False)), x_aft=getattr(args, "x_aft", None),
                         x_fore=getattr(args, "x_fore", None), progress=bar.stage)
    warn_mesh(hull)
    return hull


def warn_mesh(hull: FloatingHull) -> None:
    """The mesh's health warnings (an open rim, degenerate faces, unusual axes, ...) on standard error, so
    that a command other than ``check`` does not pass them over in silence."""
    for w in hull.report.warnings:
        print(f"meshhydro: warning: {w}", file=sys.stderr)


def is_case(path: str) -> bool:
    return path.lower().endswith(".toml")


CASE_SETS = ("the case file's [hull] table sets the mesh options (units, forward, up, offset, flip_inside_out, "
             "merge_overlaps, close_holes); give them there")


def refuse_mesh_options(args: argparse.Namespace) -> None:
    """With a case file, the mesh options are the case file's: refuse them on the command line."""
    refuse(args, list(MESH_DEFAULTS), f"not taken with a case file; {CASE_SETS}")


def load_source(args: argparse.Namespace, *, openings: bool = True) -> CaseInput:
    """The hull and condition from a case file, or from a mesh with --displacement and --cog.

    ``openings``: whether the command uses openings (else --opening is refused).
    """
    inp = _load_source(args, openings)
    if getattr(args, "submerged_depth", None) is not None:
        inp = dataclasses.replace(inp, submerged_depth=args.submerged_depth)
    return inp


def _load_source(args: argparse.Namespace, openings: bool) -> CaseInput:
    check_finite(args, ("displacement", "fsm"))
    if not openings:
        refuse(args, ["opening"], "this command does not use openings")
    if os.path.isdir(args.source):
        raise InputError(f"{args.source}: is a folder; give a case file (.toml) or a mesh file")
    if is_case(args.source):
        refuse(args, ["displacement", "cog", "fsm", "opening"],
               f"not taken with a case file ({args.source} gives the load and openings)")
        refuse_mesh_options(args)
        refuse(args, ["x_aft", "x_fore"], f"not taken with a case file; {args.source} gives x_aft/x_fore in its [hull]")
        with progress(args, 1, "mesh") as bar:
            inp = from_case(args.source, args.condition, density=density_override(args), progress=bar.stage)
        warn_mesh(inp.hull)
        return inp
    refuse(args, ["condition"], f"{args.source} is a mesh, not a case file with conditions")
    if args.displacement is None or not args.cog:
        raise InputError(f"{args.source}: a mesh needs --displacement T and --cog X,Y,Z (or use a case file)")
    hull = load_mesh(args, args.source)
    ops = [parse_opening(s) for s in args.opening]
    return from_mesh(hull, args.source, args.displacement, parse_vec(args.cog, "--cog"), fsm=args.fsm or 0.0,
                     openings=ops, density=density(args))


def load_hull_source(args: argparse.Namespace) -> tuple[FloatingHull, float]:
    """(hull, density) from a case file (its mesh and water) or a mesh file."""
    if is_case(args.source):
        from ..loading import read_case

        refuse_mesh_options(args)
        case = read_case(args.source)
        with progress(args, 1, "mesh") as bar:
            return case.load_hull(progress=bar.stage), density(args, case.density)
    return load_mesh(args, args.source), density(args)


# ---------------------------------------------------------------------------- output


def progress(args: argparse.Namespace, total: int, label: str) -> Progress:
    """A progress bar (tqdm) on a terminal, none with --quiet or when standard error is not a terminal."""
    return Progress(total, label, enabled=False if getattr(args, "quiet", False) else None)


def write(args: argparse.Namespace, text: str) -> None:
    """Text to --out (atomically, said on standard error) or standard output."""
    path = getattr(args, "out", None)
    if path:
        write_atomic(path, text)
        print(f"wrote {path}", file=sys.stderr)
    else:
        sys.stdout.write(text)


def output(args: argparse.Namespace, doc: Document, plot: str | None = None, figure: Figure | None = None) -> None:
    """Draw ``figure`` (default the document's first) to ``plot`` when asked, then write it in --format.

    Figures the report-grade views know (GZ, hydrostatic curves, ...) are drawn by
    :mod:`meshhydro.figures`; the cross curves by :mod:`meshhydro.plots`."""
    if plot:
        from .. import figures
        from ..figure_data import as_view

        fig = figure or as_view([f for s in doc.sections for f in s.figures][0], doc.vessel)
        if fig.view in figures.VIEWS:
            figures.save(fig, plot)
        else:
            from ..plots import draw

            draw(fig, plot)
        print(f"wrote {plot}", file=sys.stderr)
    write(args, render(doc, getattr(args, "format", "text")))
