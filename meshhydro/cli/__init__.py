"""Command-line interface: parse, call the analyses, render their documents, map errors to exit codes.

One module per topic (``mesh``, ``stability``, ``sweep``, ``sections``, ``submergence``, ``tanks``, ``limits``,
``study``, ``report``), each with a ``register``,
and ``common`` for shared options, loading and output; this module builds the parser and runs ``main``.

Exit codes: 0 success; 1 a criteria check failed (``criteria`` only); 2 bad input;
3 unusable mesh; 4 waterplane reaches an open rim; 5 the load cannot float;
6 a solver did not converge; 130 interrupted.
"""
from __future__ import annotations

import argparse
import sys
import traceback
from typing import NoReturn, Sequence

from .. import __version__
from ..errors import MeshHydroError
from ..criteria import CAUTION
from . import limits as cli_limits
from . import mesh as cli_mesh
from . import report as cli_report
from . import sections as cli_sections
from . import stability as cli_stability
from . import study as cli_study
from . import submergence as cli_submergence
from . import sweep as cli_sweep
from . import tanks as cli_tanks

# ---------------------------------------------------------------------------- main


class _Parser(argparse.ArgumentParser):
    """argparse with the CLI's one-line errors: what is wrong and where to look, no usage block."""

    def error(self, message: str) -> "NoReturn":  # type: ignore[override]
        hint = ""
        if "expected one argument" in message:
            hint = "; a value starting with '-' goes after '=', as in --heels=-30:30:5"
        self.exit(2, f"{self.prog}: error: {message}{hint} (see {self.prog} --help)\n")


def build_parser() -> argparse.ArgumentParser:
    p = _Parser(
        prog="meshhydro",
        description="Exact hydrostatics and intact stability from a hull surface mesh. " + CAUTION,
    )
    p.add_argument("--version", action="version", version=f"meshhydro {__version__}")
    p.add_argument("--debug", action="store_true", help="show a traceback on errors")
    sub = p.add_subparsers(dest="command", metavar="COMMAND")

    cli_mesh.register(sub)
    cli_stability.register(sub)
    cli_sweep.register(sub)
    cli_sections.register(sub)
    cli_study.register(sub)
    cli_limits.register(sub)
    cli_submergence.register(sub)
    cli_tanks.register(sub)
    cli_report.register(sub)
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
