"""Heel-sweep commands of the CLI: sweep (frames, section view, sheet, GIF, trace) and compare."""
from __future__ import annotations

import argparse
import os
import sys
from typing import Any

from ..analysis import check_angles
from ..errors import InputError
from .common import (check_figure, load_source, parse_range, parse_size, progress, refuse, source_args,
                     warn_mesh)


def cmd_sweep(args: argparse.Namespace) -> int:
    from ..sweep import condition_trace, write_sweep

    size = parse_size(args.size)
    heels = check_angles(parse_range(args.heels, "--heels"), -180.0, 180.0, what="--heels")
    if args.view == "section":
        refuse(args, ["camera", "gif", "sheet", "smooth_edges"], "these shape the 3D frames; --view section draws none")
    src = load_source(args)
    c = src.condition
    bar = progress(args, len(heels), "solving")
    tr = condition_trace(src.hull, c, heels, density=src.density, label=src.label, progress=bar,
                         submerged_depth=src.depth_option(), openings=src.openings)
    bar.close()
    n_frames = len(tr.heel) if args.view in ("3d", "both") else 0
    bar = progress(args, max(n_frames, 1), "rendering")
    timings: dict[str, float] = {}
    written = write_sweep(src.hull, tr, args.out, view=args.view, size=size, sheet=args.sheet, gif=args.gif,
                          camera=args.camera or "astern", smooth=args.smooth_edges, progress=bar, timings=timings)
    bar.close()
    frames = sum(1 for w in written if w.startswith("frames"))
    others = [w for w in written if not w.startswith("frames")]
    print(f"heel sweep of {src.label}: {len(tr.heel)} angles {tr.heel[0]:g}..{tr.heel[-1]:g}°")
    for k in range(len(tr.heel)):
        print(f"  {tr.heel[k]:7.2f}°  GZ {tr.gz[k]:+.4f} m  B ({tr.cob[k][1]:+.4f}, {tr.cob[k][2]:.4f}) m  "
              f"BM {tr.bm[k]:.4f} m")
    if tr.note:
        print(f"note: {tr.note}")
    for s in sorted({1 if h >= 0 else -1 for h in tr.heel}, reverse=True):
        flood, name = tr.curve.downflooding_angle(s)
        on_side = [k for k in range(len(tr.heel)) if tr.heel[k] * s > 0]
        if flood is not None and name in tr.curve.openings and any(name in tr.immersed(k) for k in on_side):
            print(f"  {name} goes under water at {s * flood:.2f}° (downflooding); later frames say so")
    for s, a in sorted(tr.curve.swamping.items()):
        print(f"  ends at the swamping angle {s * a:.4f}°: the water reaches the open rim there")
    print(f"wrote {args.out}: {frames} frames, " + ", ".join(others))
    return 0


def _parse_compare_source(text: str) -> tuple[str, str | None]:
    if "@" in text:
        p, name = text.split("@", 1)
        return p, name
    return text, None


def cmd_compare(args: argparse.Namespace) -> int:
    from ..loading import read_case
    from ..output import to_json, write_atomic
    from ..tank_case import resolve_condition
    from ..figure_data import compare_data
    from ..figures import compare_overlay
    from ..sweep import condition_trace

    if len(args.sources) < 2:
        raise InputError("compare needs two or more case files (CASE.toml or CASE.toml@condition)")
    check_figure(args.out, "--out")
    heels = parse_range(args.heels, "--heels")
    hulls, traces, labels = [], [], []
    cache: dict[str, Any] = {}
    for s in args.sources:
        path, name = _parse_compare_source(s)
        if not path.lower().endswith(".toml"):
            raise InputError(f"{s}: compare takes case files (CASE.toml or CASE.toml@condition)")
        case = read_case(path)
        key = os.path.abspath(case.mesh)
        if key not in cache:
            cache[key] = case.load_hull()
            warn_mesh(cache[key])
        hull = cache[key]
        cond = resolve_condition(case, hull, name)
        label = f"{os.path.splitext(os.path.basename(path))[0]}: {cond.name}"
        traces.append(condition_trace(hull, cond, heels, density=case.density, label=label))
        hulls.append(hull)
        labels.append(label)
    compare_overlay(compare_data(traces, labels, f"Heel sweeps compared: {len(traces)} cases, "
                                                 f"{heels[0]:g}..{heels[-1]:g}°"), path=args.out)
    print(f"wrote {args.out}", file=sys.stderr)
    if args.trace:
        write_atomic(args.trace, to_json([t.to_dict() for t in traces]))
        print(f"wrote {args.trace}", file=sys.stderr)
    for t in traces:
        print(f"{t.label}: B moves {abs(t.cob[-1][1] - t.cob[0][1]):.4f} m sideways over "
              f"{t.heel[0]:g}..{t.heel[-1]:g}°, BM at upright {t.bm[0]:.4f} m")
    return 0


def register(sub: argparse._SubParsersAction) -> None:
    """Add the sweep and compare sub-commands."""
    s = sub.add_parser("sweep", help="render the heel sweep: frames, section view, contact sheet, GIF, trace")
    source_args(s)
    s.add_argument("--heels", default="0:90:5", help="START:STOP:STEP [deg] (default 0:90:5); negative start as --heels=-30:30:5")
    s.add_argument("--out", required=True, help="output folder (replaced whole on a re-run)")
    s.add_argument("--view", choices=("3d", "section", "both"), default="both")
    s.add_argument("--camera", choices=("astern", "oblique"), help="viewpoint of the 3D frames (default astern)")
    s.add_argument("--gif", action="store_true", help="also write an animated GIF")
    s.add_argument("--sheet", action="store_true", help="also write a contact sheet")
    s.add_argument("--size", default="960x720", help="image size WIDTHxHEIGHT in pixels (default 960x720)")
    s.add_argument("--smooth-edges", action="store_true",
                   help="anti-alias the 3D frames (multisampling: about twice the drawing time)")
    s.add_argument("--quiet", action="store_true", help="no progress bars")
    s.set_defaults(func=cmd_sweep)

    c = sub.add_parser("compare", help="overlay B traces and metacentre loci of several cases in one figure")
    c.add_argument("sources", nargs="+", help="CASE.toml or CASE.toml@condition, two or more")
    c.add_argument("--heels", default="0:60:5", help="START:STOP:STEP [deg] (default 0:60:5)")
    c.add_argument("--out", required=True, help="figure to write (.png, .svg or .pdf)")
    c.add_argument("--trace", help="also write the traces as JSON")
    c.set_defaults(func=cmd_compare)
