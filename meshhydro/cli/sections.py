"""Section commands of the CLI: sections (from a mesh) and offsets (from a table)."""
from __future__ import annotations

import argparse
import sys
from typing import Any

import numpy as np

from ..criteria import CAUTION
from ..errors import InputError
from ..output import text_table, to_csv, to_json, write_atomic
from .common import density as _density, load_mesh as _load, mesh_args, out_args, parse_range, water_args, write as _emit

CMP_UNITS = {"draft": "m", "exact": "", "estimate": "", "difference": "", "percent": "%"}


def cmd_sections(args: argparse.Namespace) -> int:
    from .. import sections as S

    hull = _load(args)
    rho = _density(args)
    if args.stations < 2:
        raise InputError("--stations must be at least 2")
    if args.waterlines < 1:
        raise InputError("--waterlines must be at least 1")
    lo, hi = hull.bounds
    drafts = parse_range(args.drafts, "--drafts") if args.drafts else np.array([lo[2] + 0.5 * (hi[2] - lo[2])])
    xs = np.linspace(lo[0], hi[0], args.stations + 1)
    comparison: list[dict[str, Any]] = []
    notes: set[str] = set()
    for t in drafts:
        ex = hull.hydrostatics(float(t), density=rho).to_dict()
        zs = np.linspace(lo[2], float(t), args.waterlines + 1)
        off = S.offsets_from_mesh(hull, xs, zs)
        sh = S.section_hydrostatics(off, rule=args.rule, density=rho, upto=[float(t)])
        notes.update(n for n in sh.notes if n.startswith("longitudinal") or f"{float(t):g} m" in n)
        comparison += S.compare_rows([ex], sh.rows, scale=hull.length)
    bj = S.bonjean(hull, xs, drafts)
    areas = {f"{t:g}": bj.area[:, j].tolist() for j, t in enumerate(drafts)}  # the sectional area curves
    conv = S.convergence(hull, float(drafts[-1]), waterlines=args.waterlines, density=rho)
    if args.export:
        off_all = S.offsets_from_mesh(hull, xs, np.linspace(lo[2], hi[2], args.waterlines + 1))
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
        _emit(args, to_json({"stations": xs, "drafts": drafts, "rule": args.rule, "comparison": comparison,
                             "sectional_areas": areas, "bonjean": bj.rows(), "convergence": conv,
                             "notes": sorted(notes)}))
    elif args.format == "csv":
        _emit(args, to_csv(comparison, ["draft", "quantity", "exact", "estimate", "difference", "percent"]))
    else:
        out = [f"section-based ({args.rule}, {args.stations} station intervals, {args.waterlines} waterline "
               f"intervals) vs exact mesh: {hull.name}", "",
               text_table(comparison, ["draft", "quantity", "exact", "estimate", "difference", "percent"],
                          CMP_UNITS, {"draft": 3, "exact": 5, "estimate": 5, "difference": 5, "percent": 4}).rstrip(),
               "(percent: of the exact value; for LCB and LCF, of the hull length)", ""]
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

    off = S.read_offsets(args.table)
    rho = _density(args)
    sh = S.section_hydrostatics(off, rule=args.rule, density=rho)
    result: dict[str, Any] = {"table": args.table, "rule": sh.rule, "rows": sh.rows, "notes": list(sh.notes)}
    lofted = None
    if args.loft or args.compare:
        import trimesh

        from ..vessel import load_hull

        v, f = S.loft_offsets(off)
        lofted = load_hull(trimesh.Trimesh(v, f, process=False), name="lofted from " + args.table)
        if args.loft:
            from ..output import save_atomic

            m = trimesh.Trimesh(v, f, process=False)
            save_atomic(args.loft, lambda p: m.export(p))
            print(f"wrote {args.loft} ({len(f)} faces, closed: {lofted.report.closed})", file=sys.stderr)
        exact = [lofted.hydrostatics(r["draft"], density=rho).to_dict() for r in sh.rows]
        result["lofted_vs_table"] = S.compare_rows(exact, sh.rows, scale=lofted.length)
    if args.compare:
        ref = _load(args, args.compare)
        exact = [ref.hydrostatics(r["draft"], density=rho).to_dict() for r in sh.rows]
        result["table_vs_mesh"] = S.compare_rows(exact, sh.rows, scale=ref.length)
        result["lofted_vs_mesh"] = S.compare_rows(exact, [lofted.hydrostatics(r["draft"], density=rho).to_dict()
                                                          for r in sh.rows], scale=ref.length)
    if args.format == "json":
        _emit(args, to_json(result))
    elif args.format == "csv":
        _emit(args, to_csv(sh.rows, list(S.SECTION_FIELDS)))
    else:
        units = {"draft": "m", "volume": "m3", "displacement": "t", "lcb": "m", "vcb": "m", "awp": "m2",
                 "lcf": "m", "bmt": "m", "bml": "m", "tpc": "t/cm"}
        out = [f"section-based hydrostatics ({sh.rule}) from {args.table}: {len(off.stations)} stations, "
               f"{len(off.waterlines)} waterlines (density {rho:g} t/m³)",
               text_table(sh.rows, list(S.SECTION_FIELDS), units, 4).rstrip()]
        for key, title in (("lofted_vs_table", "lofted mesh (exact) vs the table's estimate"),
                           ("table_vs_mesh", f"the table's estimate vs the exact mesh {args.compare}"),
                           ("lofted_vs_mesh", f"lofted mesh vs the exact mesh {args.compare}")):
            if key in result:
                out += ["", title + ":", text_table(result[key], ["draft", "quantity", "exact", "estimate",
                                                                  "difference", "percent"], CMP_UNITS, 5).rstrip()]
        out += [f"note: {n}" for n in sh.notes if not n.startswith("vertical (up to")] + \
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
    s.add_argument("--plot", help="convergence plot PNG (error against number of stations)")
    water_args(s)
    mesh_args(s)
    out_args(s)
    s.set_defaults(func=cmd_sections)

    o = sub.add_parser("offsets", help="section-based hydrostatics from an offsets CSV; loft it; compare")
    o.add_argument("table", help="offsets CSV: station_x, waterline_z, half_breadth [, kind]")
    o.add_argument("--rule", choices=("simpson", "trapezoid"), default="simpson")
    o.add_argument("--loft", help="write a closed mesh lofted through the offsets (STL/OBJ/PLY)")
    o.add_argument("--compare", metavar="MESH", help="compare with the exact result of this mesh")
    water_args(o)
    mesh_args(o)
    out_args(o)
    o.set_defaults(func=cmd_offsets)
