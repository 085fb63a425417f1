"""Command-line interface: parse, call the analyses, render their documents, map errors to exit codes.

One module per topic (``stability``, ``sweep``, ``sections``) and ``common`` for shared options,
loading and output; this module holds ``check``, ``table`` and ``main``.

Exit codes: 0 success; 1 a criteria check failed (``criteria`` only); 2 bad input;
3 unusable mesh; 4 waterplane reaches an open rim; 5 the load cannot float;
6 a solver did not converge; 130 interrupted.
"""
from __future__ import annotations

import argparse
import sys
import traceback
from typing import Sequence

from .. import __version__
from ..errors import MeshHydroError
from . import sections as cli_sections
from . import stability as cli_stability
from . import sweep as cli_sweep
from .common import load_mesh, mesh_args, out_args, output, parse_range, parse_vec, water_args, write
from ..analysis import check_analysis, table_analysis
from ..criteria import CAUTION

# ---------------------------------------------------------------------------- check


def cmd_check(args: argparse.Namespace) -> int:
    from ..mesh import check_mesh

    md, rep = check_mesh(args.mesh, units=args.units, forward=args.forward, up=args.up,
                         offset=parse_vec(args.offset, "--offset"), flip_inside_out=args.flip_inside_out,
                         merge_overlaps=args.merge_overlaps)
    output(args, check_analysis(rep))
    if not rep.usable:
        print(f"meshhydro: {rep.problems[0]}", file=sys.stderr)
        return 3
    return 0


# ---------------------------------------------------------------------------- table


def cmd_table(args: argparse.Namespace) -> int:
    from .common import density

    drafts = parse_range(args.drafts, "--drafts")
    hull = load_mesh(args)
    _, doc = table_analysis(hull, drafts, heel=args.heel, trim=args.trim, density=density(args))
    output(args, doc, args.plot)
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
    mesh_args(c)
    out_args(c, ("text", "json"))
    c.set_defaults(func=cmd_check)

    t = sub.add_parser("table", help="hydrostatic table over a range of drafts")
    t.add_argument("mesh")
    t.add_argument("--drafts", required=True, help="START:STOP:STEP [m] (STOP included) or a list 0.5,1,1.5")
    t.add_argument("--heel", type=float, default=0.0, help="heel [deg], positive starboard down")
    t.add_argument("--trim", type=float, default=0.0, help="trim [deg], positive bow down")
    water_args(t)
    mesh_args(t)
    out_args(t)
    t.add_argument("--plot", help="also draw the hydrostatic curves to this PNG")
    t.set_defaults(func=cmd_table)

    cli_stability.register(sub)
    cli_sweep.register(sub)
    cli_sections.register(sub)
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
