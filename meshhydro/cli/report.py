"""The ``report`` command: the design-review report of a case file as one self-contained HTML file."""
from __future__ import annotations

import argparse
import os
import sys

from ..errors import InputError
from .common import parse_range, parse_size, progress, set_arg


def _options(args: argparse.Namespace):
    from .. import analysis
    from ..review import ReviewOptions

    if not args.case.lower().endswith(".toml"):
        raise InputError(f"{args.case}: report takes a case file (.toml)")
    if os.path.splitext(args.out)[1].lower() not in (".html", ".htm"):
        raise InputError(f"--out {args.out!r}: the report is HTML; give a file ending in .html")
    heels = analysis.check_angles(parse_range(args.heels, "--heels"), 0.0, 180.0, what="--heels")
    drafts = parse_range(args.drafts, "--drafts") if args.drafts else None
    sweep = None
    if not args.no_sweep:
        sweep = analysis.check_angles(parse_range(args.sweep_heels, "--sweep-heels"), -180.0, 180.0,
                                      what="--sweep-heels")
    else:
        for opt, given in (("--sweep-heels", args.sweep_heels_given), ("--sweep-condition", args.sweep_condition),
                           ("--camera", args.camera), ("--size", args.size),
                           ("--smooth-edges", args.smooth_edges)):
            if given:
                raise InputError(f"{opt} is unused with --no-sweep (the sweep is left out)")
    if args.sections is not None and args.sections < 2:
        raise InputError(f"--sections {args.sections}: give at least 2 station intervals")
    if args.sections is None and args.waterlines != 10:
        raise InputError("--waterlines applies to --sections; give --sections N as well")
    if args.waterlines < 1:
        raise InputError(f"--waterlines {args.waterlines}: give at least 1 waterline interval")
    kg_limits = None
    if args.kg_limits is not None:
        kg_limits = parse_range(args.kg_limits, "--kg-limits")
        if kg_limits.min() <= 0:
            raise InputError(f"--kg-limits {args.kg_limits}: displacements must be positive [t]")
    return ReviewOptions(heels=heels, drafts=drafts, criteria=args.set, sweep_heels=sweep,
                         sweep_condition=args.sweep_condition, sweep_size=parse_size(args.size or "800x600"),
                         camera=args.camera or "astern", smooth_edges=args.smooth_edges, stations=args.sections,
                         waterlines=args.waterlines,
                         direction=args.direction, kg_limits=kg_limits)


def cmd_report(args: argparse.Namespace) -> int:
    from ..html import render_html
    from ..output import write_atomic
    from ..report_views import ReportDrawer
    from ..review import open_review, report_document

    args.sweep_heels_given = args.sweep_heels is not None
    if args.sweep_heels is None:
        args.sweep_heels = "0:60:10"
    opts = _options(args)

    def bars(total: int, label: str):
        return progress(args, total, label)

    rv = open_review(args.case, opts, bars=bars)
    if opts.sweep_condition is not None:
        rv.case.condition(opts.sweep_condition)  # an unknown name fails before the long work
    doc = report_document(rv)
    n_fig = sum(len(s.figures) for s in _walk(doc.sections))
    bar = bars(n_fig, "drawing figures")
    try:
        text = render_html(doc, draw=ReportDrawer(bars, tick=bar))
    finally:
        bar.close()
    write_atomic(args.out, text)
    for cr in rv.runs:
        print(f"{cr.inp.condition.name}: {'all criteria met' if cr.report.passed else 'NOT all criteria met'} "
              f"({rv.cset.name})")
    print(f"wrote {args.out} ({len(text.encode('utf-8')) / 1e6:.1f} MB, {n_fig} figures)", file=sys.stderr)
    return 0 if doc.verdict else 1


def _walk(sections):
    for s in sections:
        yield s
        yield from _walk(s.sections)


def register(sub: argparse._SubParsersAction) -> None:
    """Add the report sub-command."""
    r = sub.add_parser("report", help="design-review report of a case file: one self-contained HTML file "
                                      "(exit 1 when a condition fails its criteria)")
    r.add_argument("case", help="case file (.toml)")
    r.add_argument("--out", required=True, help="HTML file to write (atomically)")
    set_arg(r)
    r.add_argument("--heels", default="0:180:1", help="GZ-curve heels START:STOP:STEP, 0 to 180 [deg] "
                                                     "(default 0:180:1)")
    r.add_argument("--direction", choices=("auto", "both", "starboard", "port"), default="auto",
                   help="heel side(s); auto = both unless hull and load are port-starboard symmetric")
    r.add_argument("--drafts", help="hydrostatic-table drafts START:STOP:STEP or a list [m] "
                                    "(default nine from 10%% to 90%% of the depth)")
    r.add_argument("--sweep-heels", help="heels of the rendered sweep [deg] (default 0:60:10); negative start "
                                         "as --sweep-heels=-30:30:10")
    r.add_argument("--sweep-condition", help="condition shown in the sweep (default the first)")
    r.add_argument("--no-sweep", action="store_true", help="leave the rendered heel sweep out")
    r.add_argument("--camera", choices=("astern", "oblique"), help="sweep camera (default astern)")
    r.add_argument("--size", help="sweep frame size WIDTHxHEIGHT in pixels (default 800x600)")
    r.add_argument("--smooth-edges", action="store_true",
                   help="anti-alias the sweep frames (multisampling: about twice the drawing time)")
    r.add_argument("--sections", type=int, metavar="N",
                   help="add the section-based (Simpson) comparison with N station intervals")
    r.add_argument("--waterlines", type=int, default=10, help="waterline intervals of --sections (default 10)")
    r.add_argument("--kg-limits", metavar="START:STOP:STEP",
                   help="add the KG-limit table and plot for the report's criteria set over these displacements "
                        "[t] (as the kg-limits command)")
    r.add_argument("--quiet", action="store_true", help="no progress bars")
    r.set_defaults(func=cmd_report)
