"""Parametric hull generators: invented vessel families built as closed, outward-oriented triangle meshes.

Every generator returns ``(vertices, faces)``: vertices (n, 3) float64 [m] in the hull frame (x forward,
y to port, z up, baseline z = 0), faces (m, 3) int64 outward-oriented. Lengths are metres; ``stations``
counts the intervals between lofted sections along the length. The demo vessels in ``meshes/`` are these
generators at their default parameters (``scripts/make_demo_hulls.py``):

* :func:`barge`      - "Brindle", a flat-bottomed work barge with raked ends;
* :func:`catamaran`  - "Twinfin", two slender canoe demihulls side by side;
* :func:`outrigger`  - "Kestrel", a canoe with a smaller float (ama) to one side;
* :func:`sloop`      - "Tern", a narrow sloop with fin keel and bulb (fixed form, not a study family).

:func:`make_mesh` / :func:`make_hull` build a family member from a dict of parameters, refusing unknown
names (with the nearest valid name) and impossible geometry (overlapping demihulls, a float inside the
main hull, rakes longer than the hull) with a one-line :class:`~meshhydro.errors.InputError`.
"""
from __future__ import annotations

import difflib
import math
from dataclasses import dataclass
from typing import Any, Callable, Mapping

import numpy as np

from .errors import InputError
from .hull_shapes import bulb, canoe, concat, fin, union
from .loft import loft

__all__ = ["barge", "catamaran", "outrigger", "sloop", "make_mesh", "make_hull", "GENERATORS", "PARAMETERS",
           "Parameter", "check_parameters", "did_you_mean"]


@dataclass(frozen=True)
class Parameter:
    """One generator parameter: its default, unit and meaning; ``whole`` for counts, ``signed`` when it
    may be negative or zero (otherwise it must be > 0)."""

    default: float
    unit: str
    text: str
    whole: bool = False
    signed: bool = False


#: generator name -> parameter name -> :class:`Parameter` (defaults give the demo vessel).
PARAMETERS: dict[str, dict[str, Parameter]] = {
    "barge": {
        "length": Parameter(12.0, "m", "overall length"),
        "beam": Parameter(4.8, "m", "overall breadth (wall-sided)"),
        "depth": Parameter(1.6, "m", "deck height above the flat bottom"),
        "rake_length": Parameter(1.5, "m", "length of each raked end, measured from the end"),
        "rake_height": Parameter(0.7, "m", "rise of the bottom at the very ends"),
        "stations": Parameter(48, "-", "station intervals along the length", whole=True),
    },
    "catamaran": {
        "length": Parameter(10.0, "m", "length of each demihull"),
        "demihull_beam": Parameter(0.8, "m", "greatest breadth of each demihull"),
        "canoe_depth": Parameter(0.45, "m", "depth of the rounded canoe body below its wall side (keel at z = 0)"),
        "depth": Parameter(1.25, "m", "deck height of the demihulls above the keel"),
        "spacing": Parameter(4.4, "m", "distance between the demihull centrelines"),
        "transom": Parameter(0.6, "-", "transom breadth as a fraction of the greatest breadth"),
        "stations": Parameter(60, "-", "station intervals along each demihull", whole=True),
    },
    "outrigger": {
        "length": Parameter(8.0, "m", "length of the main hull"),
        "beam": Parameter(0.7, "m", "greatest breadth of the main hull"),
        "canoe_depth": Parameter(0.35, "m", "depth of the main hull's rounded body (keel at z = 0)"),
        "depth": Parameter(0.95, "m", "deck height of the main hull above the keel"),
        "float_length": Parameter(4.5, "m", "length of the float"),
        "float_beam": Parameter(0.36, "m", "greatest breadth of the float"),
        "float_deck": Parameter(0.68, "m", "height of the float's deck above the main keel"),
        "float_keel": Parameter(0.2, "m", "height of the float's keel above the main keel (reached at its fullest section)", signed=True),
        "float_offset": Parameter(3.0, "m", "y of the float centreline (+ to port, - to starboard)",
                                  signed=True),
        "float_x": Parameter(1.9, "m", "x of the float's aft end", signed=True),
        "stations": Parameter(60, "-", "station intervals along the main hull (float: 2/3 as many)", whole=True),
    },
}


def did_you_mean(word: str, options: list[str]) -> str:
    close = difflib.get_close_matches(word, options, n=1, cutoff=0.6)
    return f"; did you mean {close[0]}?" if close else "; valid: " + ", ".join(options)


def check_parameters(generator: str, params: Mapping[str, Any]) -> dict[str, float]:
    """All parameters of ``generator`` (defaults filled in) after checking names and values.

    Raises :class:`InputError` naming the generator, the parameter and the value: an unknown generator
    or parameter (with the nearest valid name), a value that is not a finite number, not positive, or not
    whole where a count is meant.
    """
    if generator not in PARAMETERS:
        raise InputError(f"unknown generator {generator!r}{did_you_mean(str(generator), list(PARAMETERS))}")
    spec = PARAMETERS[generator]
    out: dict[str, float] = {k: p.default for k, p in spec.items()}
    for name, value in params.items():
        if name not in spec:
            raise InputError(f"{generator}: unknown parameter {name!r}{did_you_mean(str(name), list(spec))}")
        p = spec[name]
        if isinstance(value, bool) or not isinstance(value, (int, float, np.integer, np.floating)) \
                or not math.isfinite(float(value)):
            raise InputError(f"{generator}: {name} must be a finite number [{p.unit}], got {value!r}")
        v = float(value)
        if p.whole and (v != round(v) or v < 4):
            raise InputError(f"{generator}: {name} must be a whole number of at least 4, got {value!r}")
        if not p.signed and v <= 0:
            raise InputError(f"{generator}: {name} must be positive [{p.unit}], got {value!r}")
        out[name] = int(round(v)) if p.whole else v
    return out


def _need(ok: bool, generator: str, message: str) -> None:
    if not ok:
        raise InputError(f"{generator}: {message}")


def barge(*, length: float = 12.0, beam: float = 4.8, depth: float = 1.6, rake_length: float = 1.5,
          rake_height: float = 0.7, stations: int = 48) -> tuple[np.ndarray, np.ndarray]:
    """Wall-sided barge: flat bottom at z = 0 between the rakes, bottom rising linearly to ``rake_height``
    at both ends over ``rake_length`` [m]; flat deck at ``depth``; transverse sections are rectangles.

    When ``rake_length`` falls on a station (``rake_length * stations / length`` whole) the mesh is the
    exact polyhedron of volume ``beam * (length * depth - rake_length * rake_height)``.
    """
    p = check_parameters("barge", dict(length=length, beam=beam, depth=depth, rake_length=rake_length,
                                       rake_height=rake_height, stations=stations))
    L, B, D, rl, rh = p["length"], p["beam"], p["depth"], p["rake_length"], p["rake_height"]
    _need(2 * rl <= L, "barge", f"two raked ends of rake_length {rl:g} m do not fit in length {L:g} m")
    _need(rh < D, "barge", f"rake_height {rh:g} m must be below depth {D:g} m")
    xs = np.linspace(0.0, L, p["stations"] + 1)
    halves = []
    for x in xs:
        rake = max(0.0, rl - x, x - (L - rl)) / rl
        zb = rh * rake
        ys = np.linspace(0.0, B / 2, 9)
        zs = np.linspace(zb, D, 7)[1:]
        pts = np.concatenate([np.stack([ys, np.full_like(ys, zb)], 1),
                              np.stack([np.full_like(zs, B / 2), zs], 1),
                              np.stack([ys[::-1][1:], np.full(len(ys) - 1, D)], 1)])
        halves.append(pts)
    return loft(xs, np.array(halves))


def catamaran(*, length: float = 10.0, demihull_beam: float = 0.8, canoe_depth: float = 0.45,
              depth: float = 1.25, spacing: float = 4.4, transom: float = 0.6,
              stations: int = 60) -> tuple[np.ndarray, np.ndarray]:
    """Two identical canoe demihulls (pointed bow forward, small transom aft) with centrelines at
    y = ±spacing/2 [m], keels at z = 0, x from 0 to ``length``; two separate closed bodies (no bridge deck).

    Raises :class:`InputError` when the demihulls would touch (spacing ≤ demihull_beam) or the canoe body
    is deeper than the hull.
    """
    p = check_parameters("catamaran", dict(length=length, demihull_beam=demihull_beam, canoe_depth=canoe_depth,
                                           depth=depth, spacing=spacing, transom=transom, stations=stations))
    _need(p["spacing"] > p["demihull_beam"], "catamaran",
          f"spacing {p['spacing']:g} m must exceed demihull_beam {p['demihull_beam']:g} m "
          "(the demihulls would overlap)")
    _need(p["canoe_depth"] < p["depth"], "catamaran",
          f"canoe_depth {p['canoe_depth']:g} m must be below depth {p['depth']:g} m")
    _need(p["transom"] <= 1.0, "catamaran", f"transom must be a fraction of at most 1, got {p['transom']:g}")
    b, t = p["demihull_beam"] / 2, p["canoe_depth"]
    hulls = [canoe(p["length"], b, t, t, p["depth"], stations=p["stations"], transom=p["transom"], y0=y)
             for y in (-p["spacing"] / 2, p["spacing"] / 2)]
    return concat(hulls)


def outrigger(*, length: float = 8.0, beam: float = 0.7, canoe_depth: float = 0.35, depth: float = 0.95,
              float_length: float = 4.5, float_beam: float = 0.36, float_deck: float = 0.68,
              float_keel: float = 0.2, float_offset: float = 3.0, float_x: float = 1.9,
              stations: int = 60) -> tuple[np.ndarray, np.ndarray]:
    """Canoe main hull (keel at z = 0, x from 0 to ``length``) with a canoe-shaped float whose centreline
    is at y = ``float_offset`` [m] (+ port), keel at z = ``float_keel`` and deck at ``float_deck``, aft end at x = ``float_x``.
    The float's rounded body is as deep as its half-breadth (its wall side the rest). Two separate closed
    bodies.

    Raises :class:`InputError` when the float would touch the main hull (|float_offset| ≤ (beam +
    float_beam)/2).
    """
    p = check_parameters("outrigger", dict(length=length, beam=beam, canoe_depth=canoe_depth, depth=depth,
                                           float_length=float_length, float_beam=float_beam,
                                           float_deck=float_deck, float_keel=float_keel,
                                           float_offset=float_offset, float_x=float_x, stations=stations))
    gap = (p["beam"] + p["float_beam"]) / 2
    _need(abs(p["float_offset"]) > gap, "outrigger",
          f"|float_offset| {abs(p['float_offset']):g} m must exceed (beam + float_beam)/2 = {gap:g} m "
          "(the float would overlap the main hull)")
    _need(p["canoe_depth"] < p["depth"], "outrigger",
          f"canoe_depth {p['canoe_depth']:g} m must be below depth {p['depth']:g} m")
    n_float = max(4, int(round(p["stations"] * 2 / 3)))
    main = canoe(p["length"], p["beam"] / 2, p["canoe_depth"], p["canoe_depth"], p["depth"],
                 stations=p["stations"], transom=0.3)
    t_f = p["float_beam"] / 2  # the float's rounded body is as deep as its half-breadth
    chine = p["float_keel"] + t_f
    _need(chine < p["float_deck"], "outrigger",
          f"float_deck {p['float_deck']:g} m must be above float_keel + float_beam/2 = {chine:g} m")
    ama = canoe(p["float_length"], t_f, t_f, chine, p["float_deck"], stations=n_float,
                transom=0.2, x0=p["float_x"], y0=p["float_offset"])
    return concat([main, ama])


def sloop() -> tuple[np.ndarray, np.ndarray]:
    """The demo sloop "Tern" (fixed form): 9 m canoe body (beam 2.6 m), fin keel to 1.7 m below the canoe
    body and a lead bulb, joined into one closed body (manifold3d union)."""
    z_base = 1.75  # canoe-body keel at z = 1.75 - 0.5; keel bulb bottom near z = 0
    body = canoe(9.0, 1.3, 0.5, z_base, z_base + 1.35, stations=60, transom=0.55)
    keel = fin(3.6, 1.1, 0.11, 0.20, z_base - 0.25)
    weight = bulb(3.3, 1.8, 0.22, 0.22)
    return union([body, keel, weight])


#: generator name -> function taking the parameters of :data:`PARAMETERS` as keywords.
GENERATORS: dict[str, Callable[..., tuple[np.ndarray, np.ndarray]]] = {
    "barge": barge, "catamaran": catamaran, "outrigger": outrigger}


def make_mesh(generator: str, params: Mapping[str, Any] | None = None) -> tuple[np.ndarray, np.ndarray]:
    """``(vertices (n, 3) [m], faces (m, 3))`` of ``generator`` with ``params`` (others at their defaults)."""
    full = check_parameters(generator, params or {})
    return GENERATORS[generator](**full)


def make_hull(generator: str, params: Mapping[str, Any] | None = None, *, name: str | None = None) -> Any:
    """A :class:`~meshhydro.hull.Hull` of ``generator`` with ``params``, checked like any loaded mesh."""
    import trimesh

    from .vessel import load_hull

    v, f = make_mesh(generator, params)
    label = name or generator + "(" + ", ".join(f"{k}={v:g}" for k, v in sorted((params or {}).items())) + ")"
    return load_hull(trimesh.Trimesh(v, f, process=False), name=label)
