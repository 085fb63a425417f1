"""Stability commands of the CLI: float, righting, cross-curves, criteria.

Each takes either a case file (``.toml``) or a mesh with ``--displacement`` and
``--cog`` for a quick check.
"""
from __future__ import annotations

import argparse
import os
import sys
from dataclasses import dataclass
from typing import Any, Callable

import numpy as np

from .cli import _density, _emit, _load, _progress, _vec
from .criteria import CAUTION
from .errors import InputError
from .output import key_values, text_table, to_csv, to_json


@dataclass
class Loaded:
    hull: Any
    condition: Any
    openings: tuple
    density: float
    label: str


def _source_args(p: argparse.ArgumentParser, mesh_args: Callable, water_args: Callable) -> None:
    p.add_argument("source", help="case file (.toml) or a mesh file with --displacement and --cog")
    p.add_argument("--condition", help="name of the condition in the case file (default the first)")
    g = p.add_argument_group("quick check without a case file")
    g.add_argument("--displacement", type=float, help="displacement [t]")
    g.add_argument("--cog", help="centre of gravity X,Y,Z [m], hull frame (Z is KG)")
    g.add_argument("--fsm", type=float, default=0.0, help="free-surface moment [t·m] (raises G by FSM/Δ)")
    g.add_argument("--opening", action="append", default=[], metavar="NAME=X,Y,Z",
                   help="an opening for the downflooding angle (repeatable)")
    water_args(p)
    mesh_args(p)


def _load_source(args: argparse.Namespace) -> Loaded:
    from .loading import Opening, condition as make_condition, read_case

    if args.source.lower().endswith(".toml"):
        if args.displacement is not None or args.cog:
            raise InputError("give either a case file or --displacement/--cog with a mesh, not both")
        case = read_case(args.source)
        cond = case.condition(args.condition)
        hull = case.load_hull()
        rho = _density(args, case.density)
        ops = case.openings
        label = f"{os.path.basename(args.source)}: {cond.name}"
    else:
        if args.displacement is None or not args.cog:
            raise InputError(f"{args.source}: a mesh needs --displacement T and --cog X,Y,Z (or use a case file)")
        hull = _load(args, args.source)
        cond = make_condition(args.displacement, _vec(args.cog, "--cog"), name="quick check", fsm=args.fsm)
        rho = _density(args)
        ops = []
        for spec in args.opening:
            if "=" not in spec:
                raise InputError(f"--opening {spec!r} is not NAME=X,Y,Z")
            name, xyz = spec.split("=", 1)
            ops.append(Opening(name.strip(), _vec(xyz, f"--opening {name}")))
        label = f"{os.path.basename(args.source)}: Δ {cond.displacement:g} t"
    return Loaded(hull, cond, tuple(ops), rho, label)


def _condition_text(cond: Any) -> str:
    lines = [f"condition: {cond.name}"]
    if cond.items:
        rows = [{"item": i.name, "mass": i.mass, "x": i.at[0], "y": i.at[1], "z": i.at[2], "fsm": i.fsm}
                for i in cond.items]
        lines.append(text_table(rows, ["item", "mass", "x", "y", "z", "fsm"],
                                {"mass": "t", "x": "m", "y": "m", "z": "m", "fsm": "t.m"}).rstrip())
    lines.append(key_values([
        ("displacement", cond.displacement, "t"), ("LCG", cond.cog[0], "m"), ("TCG", cond.cog[1], "m"),
        ("VCG (KG)", cond.cog[2], "m"), ("free-surface moment", cond.fsm, "t·m"),
        ("KG corrected (fluid)", cond.kg_fluid, "m"),
    ]).rstrip())
    return "\n".join(lines)


# ---------------------------------------------------------------------------- float


def cmd_float(args: argparse.Namespace) -> int:
    src = _load_source(args)
    c = src.condition
    eq = src.hull.equilibrium(c.displacement, c.cog, density=src.density, fsm=c.fsm)
    if args.format == "json":
        _emit(args, to_json({"condition": c.to_dict(), "equilibrium": eq.to_dict(), "caution": CAUTION}))
        return 0
    pairs = [
        ("draft at reference", eq.draft, "m"), ("reference x", src.hull.x_ref, "m"),
        ("draft fore (x = %.3f)" % eq.x_fore, eq.draft_fore, "m"),
        ("draft aft (x = %.3f)" % eq.x_aft, eq.draft_aft, "m"),
        ("heel (+ starboard down)", eq.heel, "deg"), ("trim (+ bow down)", eq.trim, "deg"),
        ("volume", eq.volume, "m³"), ("LCB", eq.cob[0], "m"), ("TCB", eq.cob[1], "m"), ("VCB (KB)", eq.cob[2], "m"),
        ("BMt", eq.hydrostatics.bmt, "m"), ("KMt", eq.hydrostatics.kmt, "m"),
        ("GMt (fluid)", eq.gmt, "m"), ("GMl (fluid)", eq.gml, "m"),
        ("TPC", eq.hydrostatics.tpc, "t/cm"), ("MCT 1 cm", eq.hydrostatics.mct, "t·m/cm"),
        ("stable", eq.stable, ""),
        ("solver", f"{eq.iterations} Newton steps, {eq.evaluations} kernel evaluations", ""),
        ("residual volume (relative)", f"{eq.residual_volume:.1e}", ""),
        ("residual lever", f"{eq.residual_lever:.1e}", "m"),
    ]
    if args.format == "csv":
        rows = [{"quantity": k, "value": v, "unit": u} for k, v, u in pairs]
        _emit(args, to_csv(rows, ["quantity", "value", "unit"]))
        return 0
    text = [f"floating position: {src.label}  (density {src.density:g} t/m³)", _condition_text(c), "",
            "equilibrium:", key_values(pairs).rstrip()]
    if eq.note:
        text.append(f"note: {eq.note}")
    text.append(CAUTION)
    _emit(args, "\n".join(text) + "\n")
    return 0


# ---------------------------------------------------------------------------- righting


def _heels(args: argparse.Namespace, hull: Any, cond: Any) -> tuple[np.ndarray, tuple[int, ...]]:
    from .hydrostatics import parse_range

    hs = parse_range(args.heels, "--heels")
    if np.any(hs < 0) or np.any(hs > 180):
        raise InputError("--heels takes angles from 0 to 180°; use --direction for the side")
    d = args.direction
    if d == "auto":
        d = "starboard" if hull.is_symmetric and abs(cond.cog[1]) < 1e-12 else "both"
    sides = {"starboard": (1,), "port": (-1,), "both": (1, -1)}[d]
    allh = np.unique(np.concatenate([hs * s for s in sides] + ([np.array([0.0])])))
    return allh, sides


def _curve(args: argparse.Namespace, src: Loaded):
    hs, sides = _heels(args, src.hull, src.condition)
    c = src.condition
    bar = _progress(args, len(hs), "righting curve")
    curve = src.hull.righting_curve(c.displacement, c.cog, heels=hs, free_trim=not args.fixed_trim,
                                    density=src.density, fsm=c.fsm, openings=src.openings, progress=bar)
    bar.close()
    return curve, sides


SUMMARY_UNITS = {
    "gm_upright": "m", "gm_from_slope": "m", "max_gz": "m", "angle_of_max_gz": "deg", "equilibrium_angle": "deg",
    "vanishing_angle": "deg", "range_of_stability": "deg", "deck_edge_angle": "deg", "downflooding_angle": "deg",
    "area_0_30": "m·rad", "area_0_40": "m·rad", "area_30_40": "m·rad",
}


def _summary_text(curve: Any, sides: tuple[int, ...]) -> str:
    out = []
    for s in sides:
        sm = curve.summary(s)
        out.append(f"derived values, heeling to {sm['side']}:")
        pairs = [(k.replace("_", " "), sm.get(k), SUMMARY_UNITS[k]) for k in SUMMARY_UNITS if k in sm]
        if sm.get("downflooding_opening"):
            pairs.append(("downflooding opening", sm["downflooding_opening"], ""))
        out.append(key_values(pairs).rstrip())
    out.append("areas: exact integrals of the not-a-knot cubic spline through the computed points.")
    return "\n".join(out)


ROW_KEYS = ["heel", "gz", "kn", "draft", "trim", "lcb", "tcb", "vcb", "up_x", "up_y", "up_z", "bm"]
ROW_UNITS = {"heel": "deg", "gz": "m", "kn": "m", "draft": "m", "trim": "deg", "lcb": "m", "tcb": "m", "vcb": "m",
             "bm": "m", "deck_freeboard": "m"}


def cmd_righting(args: argparse.Namespace) -> int:
    src = _load_source(args)
    curve, sides = _curve(args, src)
    if args.plot:
        from .plots import righting_curve as plot_gz

        c = src.condition
        plot_gz(curve, args.plot, title=f"GZ: {src.label} (Δ {c.displacement:.3f} t, KG fluid {c.kg_fluid:.3f} m, "
                                        f"{'free' if curve.free_trim else 'fixed'} trim)")
        print(f"wrote {args.plot}", file=sys.stderr)
    rows = curve.rows()
    keys = ROW_KEYS + (["deck_freeboard"] if curve.deck_freeboard is not None else [])
    for name, fb in curve.openings.items():
        for r, v in zip(rows, fb, strict=False):
            r[f"opening:{name}"] = float(v)
        keys.append(f"opening:{name}")
    if args.format == "json":
        _emit(args, to_json({"condition": src.condition.to_dict(), "free_trim": curve.free_trim,
                             "density": curve.density, "rows": rows,
                             "summary": [curve.summary(s) for s in sides], "caution": CAUTION}))
    elif args.format == "csv":
        _emit(args, to_csv(rows, keys + ["evaluations"]))
    else:
        digits = {k: 4 for k in keys}
        digits.update({"heel": 1, "trim": 3})
        text = [f"righting levers: {src.label}  ({'free' if curve.free_trim else 'fixed'} trim, "
                f"density {src.density:g} t/m³)", _condition_text(src.condition), "",
                text_table(rows, keys, ROW_UNITS, digits).rstrip(), "", _summary_text(curve, sides),
                f"kernel evaluations per angle: {curve.evaluations.mean():.2f} on average", CAUTION]
        _emit(args, "\n".join(text) + "\n")
    return 0


# ---------------------------------------------------------------------------- cross curves


def cmd_cross(args: argparse.Namespace) -> int:
    from .hydrostatics import parse_range
    from .stability import cross_curves

    if args.source.lower().endswith(".toml"):
        from .loading import read_case

        case = read_case(args.source)
        hull = case.load_hull()
        rho = _density(args, case.density)
    else:
        hull = _load(args, args.source)
        rho = _density(args)
    ds = parse_range(args.displacements, "--displacements")
    hs = parse_range(args.heels, "--heels")
    bar = _progress(args, len(ds) * len(hs), "cross curves")
    cc = cross_curves(hull, ds, hs, density=rho, lcg=args.lcg, progress=bar)
    bar.close()
    if args.plot:
        from .plots import cross_curves as plot_cc

        plot_cc(cc, args.plot, title=f"Cross curves (KN, free trim): {os.path.basename(hull.name)}, ρ {rho:g} t/m³")
        print(f"wrote {args.plot}", file=sys.stderr)
    rows = []
    for i, d in enumerate(cc.displacements):
        r: dict[str, Any] = {"displacement": float(d), "lcg": float(cc.lcg[i])}
        for j, h in enumerate(cc.heels):
            r[f"kn_{h:g}"] = float(cc.kn[i, j])
        rows.append(r)
    keys = ["displacement", "lcg"] + [f"kn_{h:g}" for h in cc.heels]
    if args.format == "json":
        _emit(args, to_json({"density": rho, "heels": cc.heels, "displacements": cc.displacements,
                             "lcg": cc.lcg, "kn": cc.kn, "note": "G at K (KG = 0) on the centreline; free trim",
                             "caution": CAUTION}))
    elif args.format == "csv":
        _emit(args, to_csv(rows, keys))
    else:
        units = {"displacement": "t", "lcg": "m", **{k: "m" for k in keys[2:]}}
        text = [f"cross curves KN [m]: {hull.name}  (free trim, G at K, LCG for level upright flotation"
                f"{'' if args.lcg is None else ' overridden'}; density {rho:g} t/m³)",
                "GZ = KN - KG sin(heel) for a centre of gravity on the centreline", "",
                text_table(rows, keys, units, 4).rstrip(), CAUTION]
        _emit(args, "\n".join(text) + "\n")
    return 0


# ---------------------------------------------------------------------------- criteria


def cmd_criteria(args: argparse.Namespace) -> int:
    from .criteria import evaluate, read_criteria

    cset = read_criteria(args.set)
    src = _load_source(args)
    curve, sides = _curve(args, src)
    rep = evaluate(curve, cset, sides=sides)
    if args.plot:
        from .plots import righting_curve as plot_gz

        plot_gz(curve, args.plot, title=f"GZ and criteria: {src.label} - {'PASS' if rep.passed else 'FAIL'}")
        print(f"wrote {args.plot}", file=sys.stderr)
    rows = [{"id": r.id, "side": r.side, "criterion": r.text, "unit": r.unit, "required": r.required,
             "attained": r.attained, "margin": r.margin, "result": "pass" if r.passed else "FAIL", "note": r.note}
            for r in rep.results]
    if args.format == "json":
        d = rep.to_dict()
        d["condition"] = src.condition.to_dict()
        _emit(args, to_json(d))
    elif args.format == "csv":
        _emit(args, to_csv(rows, ["id", "side", "criterion", "unit", "required", "attained", "margin", "result",
                                  "note"]))
    else:
        text = [f"criteria: {rep.set_name}", f"source: {rep.source}", f"vessel: {src.label}",
                _condition_text(src.condition), "",
                text_table(rows, ["id", "side", "criterion", "required", "attained", "margin", "unit", "result",
                                  "note"], digits=3).rstrip()]
        text += [f"note: {n}" for n in rep.notes]
        text.append(f"verdict: {'all criteria met' if rep.passed else 'NOT all criteria met'}")
        text.append(rep.caution)
        _emit(args, "\n".join(text) + "\n")
    return 0 if rep.passed else 1


def register(sub: argparse._SubParsersAction, mesh_args: Callable, out_args: Callable, water_args: Callable) -> None:
    """Add the stability sub-commands."""
    f = sub.add_parser("float", help="free-floating position (draft, heel, trim) for a loading condition")
    _source_args(f, mesh_args, water_args)
    out_args(f)
    f.set_defaults(func=cmd_float)

    def curve_opts(p: argparse.ArgumentParser) -> None:
        p.add_argument("--heels", default="0:180:1", help="START:STOP:STEP from 0 to 180 [deg] (default 0:180:1)")
        p.add_argument("--direction", choices=("auto", "both", "starboard", "port"), default="auto",
                       help="heel side(s); auto = both unless hull and load are port-starboard symmetric")
        p.add_argument("--fixed-trim", action="store_true", help="keep the upright trim instead of free trim")
        p.add_argument("--plot", help="draw the GZ curve to this PNG")
        p.add_argument("--quiet", action="store_true", help="no progress bar")

    r = sub.add_parser("righting", help="righting-lever (GZ) curve with free trim, derived angles and areas")
    _source_args(r, mesh_args, water_args)
    curve_opts(r)
    out_args(r)
    r.set_defaults(func=cmd_righting)

    c = sub.add_parser("cross-curves", help="KN over displacements and heels (free trim)")
    c.add_argument("source", help="mesh file or case file (for the mesh and density)")
    c.add_argument("--displacements", required=True, help="START:STOP:STEP [t] or a list")
    c.add_argument("--heels", default="0:90:10", help="heels [deg] (default 0:90:10)")
    c.add_argument("--lcg", type=float, help="fixed LCG [m] instead of level upright flotation")
    c.add_argument("--plot", help="draw the cross curves to this PNG")
    c.add_argument("--quiet", action="store_true", help="no progress bar")
    water_args(c)
    mesh_args(c)
    out_args(c)
    c.set_defaults(func=cmd_cross)

    k = sub.add_parser("criteria", help="check a condition against a criteria set (exit 1 when not met)")
    _source_args(k, mesh_args, water_args)
    k.add_argument("--set", default="imo2008", help="imo2008 (built-in) or a criteria TOML file")
    curve_opts(k)
    out_args(k)
    k.set_defaults(func=cmd_criteria)
