"""Section commands of the CLI: sections (from a mesh) and offsets (from a table)."""
from __future__ import annotations

import argparse
import os
import sys
from typing import Any

import numpy as np

from ..criteria import CAUTION
from ..errors import InputError
from ..output import text_table, to_csv, to_json, write_atomic
from ..sections import SECTION_FIELDS as S_FIELDS
from .common import check_figure, density as _density, load_mesh as _load, mesh_args, out_args, parse_range, \
    refuse, water_args, write as _emit

CMP_UNITS = {"draft": "m", "exact": "", "estimate": "", "difference": "", "percent": "%"}
SECTION_UNITS = {"draft": "m", "volume": "m3", "displacement": "t", "lcb": "m", "vcb": "m", "awp": "m2",
                 "lcf": "m", "bmt": "m", "bml": "m", "tpc": "t/cm", "tcb": "m", "body": ""}
#: file suffixes a lofted mesh can be written as
LOFT_FORMATS = ("stl", "obj", "ply", "off")


def _body_table(body_rows: list[dict[str, Any]]) -> list[str]:
    """Text lines of the per-body estimates (empty for a single body)."""
    if not body_rows:
        return []
    keys = ["body"] + list(S_FIELDS)
    return ["", "per body (each about its own centreline):",
            text_table(body_rows, keys, SECTION_UNITS, {**{k: 4 for k in keys}, "body": 0}).rstrip()]


def _meta(vessel: str, rho: float, units: dict[str, str]) -> dict[str, Any]:
    """The JSON meta block: program, vessel, density [t/m³], units by key, caution."""
    from .. import __version__

    return {"program": f"meshhydro {__version__}", "vessel": vessel, "density": rho,
            "units": {k: u for k, u in units.items() if u}, "caution": CAUTION}


def _loft_format(path: str) -> str:
    """The mesh format of a --loft file from its suffix, checked before computing."""
    if os.path.isdir(path):
        raise InputError(f"--loft {path}: is a folder; give a mesh file name (.stl, .obj, .ply or .off)")
    ext = os.path.splitext(path)[1].lower().lstrip(".")
    if ext not in LOFT_FORMATS:
        got = f"suffix .{ext}" if ext else "no suffix"
        raise InputError(f"--loft {path}: cannot write a mesh with {got}; use "
                         f"{', '.join('.' + f for f in LOFT_FORMATS)}")
    return ext


def cmd_sections(args: argparse.Namespace) -> int:
    from .. import sections as S

    check_figure(args.plot)
    rho = _density(args)
    hull = _load(args)
    if args.stations < 2:
        raise InputError("--stations must be at least 2")
    if args.waterlines < 1:
        raise InputError("--waterlines must be at least 1")
    lo, hi = hull.bounds
    drafts = parse_range(args.drafts, "--drafts") if args.drafts else np.array([lo[2] + 0.5 * (hi[2] - lo[2])])
    xs = np.linspace(lo[0], hi[0], args.stations + 1)
    comparison: list[dict[str, Any]] = []
    bodies: list[dict[str, Any]] = []
    notes: set[str] = set()
    for t in drafts:
        ex = hull.hydrostatics(float(t), density=rho).to_dict()
        zs = np.linspace(lo[2], float(t), args.waterlines + 1)
        off = S.offsets_from_mesh(hull, args.stations, zs)  # each body over its own length
        sh = S.section_hydrostatics(off, rule=args.rule, density=rho, upto=[float(t)])
        bodies += sh.body_rows
        notes.update(n for n in sh.notes if n.startswith("longitudinal") or f"{float(t):g} m" in n)
        comparison += S.compare_rows([ex], sh.rows, scale=hull.length)
    bj = S.bonjean(hull, xs, drafts)
    areas = {f"{t:g}": bj.area[:, j].tolist() for j, t in enumerate(drafts)}  # the sectional area curves
    conv = S.convergence(hull, float(drafts[-1]), waterlines=args.waterlines, density=rho)
    if args.export:
        off_all = S.offsets_from_mesh(hull, args.stations, np.linspace(lo[2], hi[2], args.waterlines + 1))
        write_atomic(args.export, off_all.to_csv())
        print(f"wrote {args.export}", file=sys.stderr)
    if args.bonjean:
        write_atomic(args.bonjean, to_csv(bj.rows(), ["station_x", "draft", "area", "vertical_moment"]))
        print(f"wrote {args.bonjean}", file=sys.stderr)
    if args.plot:
        from ..figures import convergence_plot

        convergence_plot({"vessel": hull.name, "rows": conv,
                          "title": f"Section estimates vs exact at draft {drafts[-1]:g} m: {hull.name}"},
                         path=args.plot)
        print(f"wrote {args.plot}", file=sys.stderr)
    if args.format == "json":
        units = {**SECTION_UNITS, **CMP_UNITS, "stations": "m", "drafts": "m", "sectional_areas": "m2"}
        _emit(args, to_json({"meta": _meta(hull.name, rho, units), "stations": xs, "drafts": drafts,
                             "rule": args.rule, "comparison": comparison, "sectional_areas": areas,
                             "bonjean": bj.rows(), "convergence": conv, "notes": sorted(notes),
                             **({"bodies": bodies} if bodies else {})}))
    elif args.format == "csv":
        _emit(args, to_csv(comparison, ["draft", "quantity", "exact", "estimate", "difference", "percent"],
                           units={"draft": "m"}))
    else:
        out = [f"section-based ({args.rule}, {args.stations} station intervals, {args.waterlines} waterline "
               f"intervals) vs exact mesh: {hull.name}", "",
               text_table(comparison, ["draft", "quantity", "exact", "estimate", "difference", "percent"],
                          CMP_UNITS, {"draft": 3, "exact": 5, "estimate": 5, "difference": 5, "percent": 4}).rstrip(),
               "(percent: of the exact value; for LCB and LCF, of the hull length)"]
        out += _body_table(bodies) + [""]
        sa = [{"station_x": float(x), **{f"area at {k} m": areas[k][i] for k in areas}} for i, x in enumerate(xs)]
        out.append("sectional area curve [m²] (exact):")
        out.append(text_table(sa, list(sa[0].keys()), {"station_x": "m"}, 4).rstrip())
        out.append("")
        out.append(f"convergence with the number of stations at draft {drafts[-1]:g} m (error, %):")
        keys = ["stations", "rule"] + [k for k in conv[0] if k.endswith("_percent")]
        heads = {k: k.replace("_error_percent", "") for k in keys}
        out.append(text_table(conv, keys, None, 4, heads).rstrip())
        out += [f"note: {n}" for n in sorted(notes)]
        out.append(CAUTION)
        _emit(args, "\n".join(out) + "\n")
    return 0


def cmd_offsets(args: argparse.Namespace) -> int:
    from .. import sections as S

    if args.format == "csv":
        refuse(args, ["compare"], "the CSV output holds the table's estimates only; use --format text or json "
               "for the comparison")
    if not args.compare:
        refuse(args, ["units", "forward", "up", "offset", "flip_inside_out", "merge_overlaps"],
               "mesh options apply to the --compare mesh; none is given")
    if args.loft:
        _loft_format(args.loft)
    rho = _density(args)
    off = S.read_offsets(args.table)
    sh = S.section_hydrostatics(off, rule=args.rule, density=rho)
    result: dict[str, Any] = {"table": args.table, "rule": sh.rule, "rows": sh.rows, "notes": list(sh.notes)}
    if sh.body_rows:
        result["bodies"] = sh.body_rows
    lofted = None
    if args.loft or args.compare:
        import trimesh

        from ..vessel import load_hull

        v, f = S.loft_offsets(off)
        lofted = load_hull(trimesh.Trimesh(v, f, process=False), name="lofted from " + args.table)
        if args.loft:
            from ..output import save_atomic

            m = trimesh.Trimesh(v, f, process=False)
            fmt = _loft_format(args.loft)
            save_atomic(args.loft, lambda p: m.export(p, file_type=fmt))
            print(f"wrote {args.loft} ({len(f)} faces, closed: {lofted.report.closed})", file=sys.stderr)
        top = float(lofted.bounds[1][2])
        cmp_rows = [r for r in sh.rows if r["draft"] < top]  # the top waterline may touch only a ridge
        if len(cmp_rows) < len(sh.rows):
            result["notes"].append(f"drafts at or above the lofted hull's top (z = {top:g} m) are left out of "
                                   f"the comparisons")
        exact = [lofted.hydrostatics(r["draft"], density=rho).to_dict() for r in cmp_rows]
        result["lofted_vs_table"] = S.compare_rows(exact, cmp_rows, scale=lofted.length)
    if args.compare:
        ref = _load(args, args.compare)
        exact = [ref.hydrostatics(r["draft"], density=rho).to_dict() for r in cmp_rows]
        result["table_vs_mesh"] = S.compare_rows(exact, cmp_rows, scale=ref.length)
        result["lofted_vs_mesh"] = S.compare_rows(exact, [lofted.hydrostatics(r["draft"], density=rho).to_dict()
                                                          for r in cmp_rows], scale=ref.length)
    if args.format == "json":
        _emit(args, to_json({"meta": _meta(args.table, rho, SECTION_UNITS), **result}))
    elif args.format == "csv":
        _emit(args, to_csv(sh.rows, list(S.SECTION_FIELDS), units=SECTION_UNITS))
    else:
        units = SECTION_UNITS
        out = [f"section-based hydrostatics ({sh.rule}) from {args.table}: {len(off.stations)} stations, "
               f"{len(off.waterlines)} waterlines (density {rho:g} t/m³)",
               text_table(sh.rows, list(S.SECTION_FIELDS), units, 4).rstrip()] + _body_table(sh.body_rows)
        for key, title in (("lofted_vs_table", "lofted mesh (exact) vs the table's estimate"),
                           ("table_vs_mesh", f"the table's estimate vs the exact mesh {args.compare}"),
                           ("lofted_vs_mesh", f"lofted mesh vs the exact mesh {args.compare}")):
            if key in result:
                out += ["", title + ":", text_table(result[key], ["draft", "quantity", "exact", "estimate",
                                                                  "difference", "percent"], CMP_UNITS, 5).rstrip()]
        out += [f"note: {n}" for n in result["notes"] if not n.startswith("vertical (up to")] + \
               [f"note: vertical integration: {n.split(': ', 1)[1]}" for n in sorted(
                   {n for n in sh.notes if n.startswith("vertical (up to")}, key=lambda s: s)[:3]]
        out.append(CAUTION)
        _emit(args, "\n".join(out) + "\n")
    return 0


def register(sub: argparse._SubParsersAction) -> None:
    """Add the sections and offsets sub-commands."""
    s = sub.add_parser("sections", help="stations, Bonjean data and offsets from a mesh; Simpson vs exact")
    s.add_argument("mesh")
    s.add_argument("--stations", type=int, default=10, help="number of station intervals (default 10)")
    s.add_argument("--waterlines", type=int, default=8, help="number of waterline intervals (default 8)")
    s.add_argument("--drafts", help="drafts [m] START:STOP:STEP or a list (default half depth)")
    s.add_argument("--rule", choices=("simpson", "trapezoid"), default="simpson")
    s.add_argument("--export", help="write the half-breadth table (offsets CSV)")
    s.add_argument("--bonjean", help="write Bonjean data (area and moment against draft per station) as CSV")
    s.add_argument("--plot", help="convergence plot (.png, .svg or .pdf): error against number of stations")
    water_args(s)
    mesh_args(s)
    out_args(s)
    s.set_defaults(func=cmd_sections)

    o = sub.add_parser("offsets", help="section-based hydrostatics from an offsets CSV; loft it; compare")
    o.add_argument("table", help="offsets CSV: station_x, waterline_z, half_breadth [, kind][, body][, centreline_y]")
    o.add_argument("--rule", choices=("simpson", "trapezoid"), default="simpson")
    o.add_argument("--loft", help="write a closed mesh lofted through the offsets (.stl, .obj, .ply or .off)")
    o.add_argument("--compare", metavar="MESH", help="compare with the exact result of this mesh")
    water_args(o)
    mesh_args(o)
    out_args(o)
    o.set_defaults(func=cmd_offsets)
