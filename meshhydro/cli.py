"""Command-line interface: parse, call the library, format text/CSV/JSON, map errors to exit codes.

Exit codes: 0 success; 1 a criteria check failed (``criteria`` only); 2 bad input;
3 unusable mesh; 4 waterplane reaches an open rim; 5 the load cannot float;
6 a solver did not converge; 130 interrupted.
"""
from __future__ import annotations

import argparse
import os
import sys
import traceback
from typing import Sequence

from . import __version__
from .errors import InputError, MeshHydroError
from .output import emit, key_values, text_table, to_csv, to_json
from .criteria import CAUTION

# ---------------------------------------------------------------------------- helpers


def _vec(text: str, what: str) -> tuple[float, float, float]:
    try:
        parts = [float(x) for x in text.replace(" ", "").split(",")]
    except ValueError:
        raise InputError(f"{what} {text!r} is not three numbers X,Y,Z") from None
    if len(parts) != 3:
        raise InputError(f"{what} {text!r} is not three numbers X,Y,Z")
    return parts[0], parts[1], parts[2]


def _mesh_args(p: argparse.ArgumentParser) -> None:
    g = p.add_argument_group("mesh input")
    g.add_argument("--units", default="m", help="length unit of the mesh file: m, mm, cm, ft, in (default m)")
    g.add_argument("--forward", default="+x", help="file axis pointing forward, e.g. +x, -y (default +x)")
    g.add_argument("--up", default="+z", help="file axis pointing up, e.g. +z, +y for Y-up exports (default +z)")
    g.add_argument("--offset", default="0,0,0", help="X,Y,Z added after scaling and axes [m]")
    g.add_argument("--flip-inside-out", action="store_true", help="flip bodies found inside out (explicit repair)")
    g.add_argument("--merge-overlaps", action="store_true", help="union overlapping bodies (explicit repair)")


def _out_args(p: argparse.ArgumentParser, formats: Sequence[str] = ("text", "csv", "json")) -> None:
    p.add_argument("--format", choices=formats, default="text", help="output format (default text)")
    p.add_argument("--out", help="write the output to this file (atomically) instead of standard output")


def _density(args: argparse.Namespace, default: float | None = None) -> float:
    from .frames import FRESH_WATER, SEA_WATER

    if getattr(args, "density", None) is not None:
        return float(args.density)
    w = getattr(args, "water", None)
    if w == "fresh":
        return FRESH_WATER
    if w == "sea":
        return SEA_WATER
    return SEA_WATER if default is None else default


def _water_args(p: argparse.ArgumentParser) -> None:
    p.add_argument("--density", type=float, help="water density [t/m³] (default sea water 1.025)")
    p.add_argument("--water", choices=("sea", "fresh"), help="sea (1.025 t/m³) or fresh (1.000 t/m³) water")


def _load(args: argparse.Namespace, path: str | None = None):
    from .vessel import load_hull

    return load_hull(path or args.mesh, units=args.units, forward=args.forward, up=args.up,
                     offset=_vec(args.offset, "--offset"), flip_inside_out=args.flip_inside_out,
                     merge_overlaps=args.merge_overlaps)


def _emit(args: argparse.Namespace, text: str) -> None:
    emit(getattr(args, "out", None), text)


def _progress(args: argparse.Namespace, total: int, label: str):
    """A progress bar on a terminal, none with --quiet."""
    from .progress import Progress

    return Progress(total, label, enabled=False if getattr(args, "quiet", False) else None)


# ---------------------------------------------------------------------------- check


def cmd_check(args: argparse.Namespace) -> int:
    from .mesh import check_mesh

    md, rep = check_mesh(args.mesh, units=args.units, forward=args.forward, up=args.up,
                         offset=_vec(args.offset, "--offset"), flip_inside_out=args.flip_inside_out,
                         merge_overlaps=args.merge_overlaps)
    if args.format == "json":
        _emit(args, to_json(rep.to_dict()))
    else:
        lines = [f"mesh check: {rep.source}"]
        lo, hi = rep.bounds
        lines.append(key_values([
            ("vertices", rep.n_vertices, ""),
            ("faces", rep.n_faces, ""),
            ("welded duplicates", rep.welded_vertices, "vertices"),
            ("extent x, y, z", "  ".join(f"{e:.4f}" for e in rep.extent), "m"),
            ("z range", f"{lo[2]:.4f} to {hi[2]:.4f}", "m"),
            ("closed", rep.closed, ""),
            ("consistent winding", rep.consistent_winding, ""),
            ("degenerate faces", len(rep.degenerate_faces), ""),
            ("duplicate faces", len(rep.duplicate_faces), ""),
            ("bodies", len(rep.bodies), ""),
            ("total volume", rep.volume, "m³"),
        ]).rstrip())
        for b in rep.bodies:
            vol = "open" if b.volume is None else f"{b.volume:.6g} m³"
            lines.append(f"  body {b.index}: {b.n_faces} faces, volume {vol}, "
                         f"x {b.bounds[0][0]:.3f}..{b.bounds[1][0]:.3f}, y {b.bounds[0][1]:.3f}..{b.bounds[1][1]:.3f}, "
                         f"z {b.bounds[0][2]:.3f}..{b.bounds[1][2]:.3f} m")
        for i, r in enumerate(rep.rims):
            lines.append(f"  rim {i}: {r.n_edges} edges, z {r.z_min:.4f} to {r.z_max:.4f} m (face {r.first_face})")
        for w in rep.warnings:
            lines.append(f"warning: {w}")
        for pr in rep.problems:
            lines.append(f"problem: {pr}")
        lines.append("verdict: usable" if rep.usable else "verdict: NOT usable")
        _emit(args, "\n".join(lines) + "\n")
    if not rep.usable:
        print(f"meshhydro: {rep.problems[0]}", file=sys.stderr)
        return 3
    return 0


# ---------------------------------------------------------------------------- table


def cmd_table(args: argparse.Namespace) -> int:
    from .hydrostatics import FIELDS, UNITS, parse_range

    drafts = parse_range(args.drafts, "--drafts")
    hull = _load(args)
    rho = _density(args)
    rows = [h.to_dict() for h in hull.table(drafts, heel=args.heel, trim=args.trim, density=rho)]
    if args.plot:
        from .plots import hydrostatic_curves

        hydrostatic_curves(rows, args.plot, title=f"Hydrostatic curves: {os.path.basename(hull.name)} "
                                                  f"(ρ = {rho:g} t/m³, heel {args.heel:g}°, trim {args.trim:g}°)")
        print(f"wrote {args.plot}", file=sys.stderr)
    if args.format == "json":
        _emit(args, to_json(rows))
    elif args.format == "csv":
        _emit(args, to_csv(rows, FIELDS))
    else:
        digits = {k: 3 for k in FIELDS}
        digits.update({"cb": 4, "cp": 4, "cm": 4, "cwp": 4, "heel": 1, "trim": 2})
        keys = [k for k in FIELDS if k not in ("heel", "trim")]
        head = (f"hydrostatics: {hull.name}  density {rho:g} t/m³  heel {args.heel:g}°  trim {args.trim:g}° "
                f"(draft at x = {hull.x_ref:.3f} m on the centreline, above z = 0)\n")
        _emit(args, head + text_table(rows, keys, UNITS, digits) + CAUTION + "\n")
    return 0


# ---------------------------------------------------------------------------- main


def build_parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="meshhydro",
        description="Exact hydrostatics and intact stability from a hull surface mesh. " + CAUTION,
    )
    p.add_argument("--version", action="version", version=f"meshhydro {__version__}")
    p.add_argument("--debug", action="store_true", help="show a traceback on errors")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    c = sub.add_parser("check", help="health report of a mesh (exit 0 when usable)")
    c.add_argument("mesh")
    _mesh_args(c)
    _out_args(c, ("text", "json"))
    c.set_defaults(func=cmd_check)

    t = sub.add_parser("table", help="hydrostatic table over a range of drafts")
    t.add_argument("mesh")
    t.add_argument("--drafts", required=True, help="START:STOP:STEP [m] (STOP included) or a list 0.5,1,1.5")
    t.add_argument("--heel", type=float, default=0.0, help="heel [deg], positive starboard down")
    t.add_argument("--trim", type=float, default=0.0, help="trim [deg], positive bow down")
    _water_args(t)
    _mesh_args(t)
    _out_args(t)
    t.add_argument("--plot", help="also draw the hydrostatic curves to this PNG")
    t.set_defaults(func=cmd_table)

    from . import cli_stability

    cli_stability.register(sub, _mesh_args, _out_args, _water_args)
    from . import cli_sweep

    cli_sweep.register(sub, _mesh_args, _out_args, _water_args)
    from . import cli_sections

    cli_sections.register(sub, _mesh_args, _out_args, _water_args)
    return p


def main(argv: Sequence[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    if not getattr(args, "func", None):
        parser.print_help()
        return 2
    try:
        return int(args.func(args) or 0)
    except MeshHydroError as exc:
        if args.debug:
            traceback.print_exc()
        print(f"meshhydro: error: {exc}", file=sys.stderr)
        return exc.exit_code
    except KeyboardInterrupt:
        print("meshhydro: interrupted", file=sys.stderr)
        return 130
    except OSError as exc:
        if args.debug:
            traceback.print_exc()
        where = f"{exc.filename}: " if getattr(exc, "filename", None) else ""
        print(f"meshhydro: error: {where}{exc.strerror or exc}", file=sys.stderr)
        return 2


if __name__ == "__main__":
    raise SystemExit(main())
