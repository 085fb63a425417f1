"""Intact-stability criteria as data, evaluated against a righting-lever curve with margins.

Shipped set: the general intact-stability criteria of the IMO International Code on
Intact Stability 2008 (resolution MSC.267(85)), Part A, 2.2. Limits as printed in the
code; the clause numbers 2.2.1 to 2.2.4 are given from memory and match several
reproductions of the code.

A user set is a TOML file of our own format::

    name = "Harbour launch set"
    source = "where these limits come from"

    [[criterion]]
    id = "A1"
    kind = "area"            # area under GZ between two angles [m·rad]
    from = 0.0
    to = 30.0
    to_flooding = false      # true: stop at the downflooding angle if that is smaller
    minimum = 0.055

    [[criterion]]
    kind = "gz_at"           # GZ at one angle [m]
    angle = 30.0
    minimum = 0.20

    # other kinds: "gz_max_beyond" (largest GZ at or beyond `angle` [m]),
    # "angle_of_max" (angle of largest GZ [deg]), "gm" (initial GM [m]),
    # "range" (range of positive stability [deg]), "vanishing" (angle of vanishing stability [deg])

Every report carries :data:`CAUTION`.
"""
from __future__ import annotations

import math
import os
from dataclasses import dataclass, field
from typing import Any

from .errors import InputError
from .loading import read_toml

#: The caution that every output a safety decision could rest on carries.
CAUTION = ("CAUTION: a design aid, not an approval. The flag administration, class rules, local codes and a "
           "qualified naval architect decide whether a vessel complies and is fit to go to sea.")
#: The same in short, for figures.
CAUTION_SHORT = ("Design aid, not an approval: flag administration, class rules, local codes "
                 "and a qualified naval architect decide.")

KINDS = {
    "area": "m·rad",
    "gz_at": "m",
    "gz_max_beyond": "m",
    "angle_of_max": "deg",
    "gm": "m",
    "range": "deg",
    "vanishing": "deg",
}


@dataclass(frozen=True)
class Criterion:
    """One requirement: ``kind`` (see :data:`KINDS`), its angles and the minimum value."""

    id: str
    kind: str
    minimum: float
    text: str = ""
    start: float = 0.0
    end: float = 0.0
    angle: float = 0.0
    to_flooding: bool = False

    @property
    def unit(self) -> str:
        return KINDS[self.kind]


@dataclass(frozen=True)
class CriteriaSet:
    name: str
    source: str
    items: tuple[Criterion, ...]


IMO_2008_GENERAL = CriteriaSet(
    name="IMO 2008 IS Code, Part A, 2.2 - general intact stability criteria",
    source=("International Code on Intact Stability 2008, resolution MSC.267(85), Part A, 2.2 "
            "(clause numbers from memory; limits as printed)"),
    items=(
        Criterion("2.2.1.1", "area", 0.055, "area under the GZ curve from 0° to 30°", start=0.0, end=30.0),
        Criterion("2.2.1.2", "area", 0.090, "area from 0° to 40°, or to the downflooding angle if less",
                  start=0.0, end=40.0, to_flooding=True),
        Criterion("2.2.1.3", "area", 0.030, "area from 30° to 40°, or to the downflooding angle if less",
                  start=30.0, end=40.0, to_flooding=True),
        Criterion("2.2.2", "gz_max_beyond", 0.20, "GZ at an angle of heel equal to or greater than 30°",
                  angle=30.0),
        Criterion("2.2.3", "angle_of_max", 25.0,
                  "maximum GZ at an angle of heel not less than 25° (preferably more than 30°)"),
        Criterion("2.2.4", "gm", 0.15, "initial metacentric height GM0"),
    ),
)

BUILTIN = {"imo2008": IMO_2008_GENERAL}


def read_criteria(path: str) -> CriteriaSet:
    """Read a user criteria set (TOML); errors name the file and the criterion."""
    if path in BUILTIN:
        return BUILTIN[path]
    data = read_toml(path, f"no such criteria file (built-in sets: {', '.join(BUILTIN)})")
    items = []
    for k, c in enumerate(data.get("criterion", [])):
        where = f"{path}: criterion {k + 1}"
        kind = c.get("kind")
        if kind not in KINDS:
            raise InputError(f"{where}: kind must be one of {', '.join(KINDS)}, got {kind!r}")
        try:
            mn = float(c["minimum"])
        except (KeyError, TypeError, ValueError):
            raise InputError(f"{where}: needs a numeric minimum") from None
        def num(key: str, default: float = 0.0) -> float:
            try:
                v = float(c.get(key, default))
            except (TypeError, ValueError):
                raise InputError(f"{where}: {key} must be a number") from None
            if not math.isfinite(v):
                raise InputError(f"{where}: {key} must be finite")
            return v
        if kind == "area" and ("from" not in c or "to" not in c):
            raise InputError(f"{where}: an area needs from and to (degrees)")
        if kind in ("gz_at", "gz_max_beyond") and "angle" not in c:
            raise InputError(f"{where}: {kind} needs angle (degrees)")
        items.append(Criterion(id=str(c.get("id", k + 1)), kind=kind, minimum=mn, text=str(c.get("text", "")),
                               start=num("from"), end=num("to"), angle=num("angle"),
                               to_flooding=bool(c.get("to_flooding", False))))
    if not items:
        raise InputError(f"{path}: no [[criterion]] entries")
    return CriteriaSet(name=str(data.get("name", os.path.basename(path))), source=str(data.get("source", "")),
                       items=tuple(items))


@dataclass(frozen=True)
class Result:
    """Outcome of one criterion on one side."""

    id: str
    text: str
    side: str
    unit: str
    required: float
    attained: float | None
    margin: float | None
    passed: bool
    note: str = ""


@dataclass(frozen=True)
class Report:
    set_name: str
    source: str
    results: tuple[Result, ...]
    caution: str = CAUTION
    notes: tuple[str, ...] = field(default_factory=tuple)

    @property
    def passed(self) -> bool:
        return all(r.passed for r in self.results)

    def to_dict(self) -> dict[str, Any]:
        return {
            "set": self.set_name, "source": self.source, "passed": self.passed, "caution": self.caution,
            "notes": list(self.notes),
            "results": [r.__dict__ for r in self.results],
        }


def evaluate(curve: Any, cset: CriteriaSet = IMO_2008_GENERAL, *, sides: tuple[int, ...] = (1,)) -> Report:
    """Evaluate ``cset`` on a :class:`~meshhydro.stability.RightingCurve` for each side (+1 starboard, -1 port)."""
    results = []
    notes = []
    for sign in sides:
        side = "starboard" if sign > 0 else "port"
        top = float(max(curve.heel * sign))
        flood, opening = curve.downflooding_angle(sign)
        if flood is not None:
            notes.append(f"{side}: downflooding angle {flood:.2f}° ({opening})")
        for c in cset.items:
            attained: float | None = None
            note = ""
            try:
                if c.kind == "area":
                    end = c.end
                    if c.to_flooding and flood is not None and flood < end:
                        end = flood
                        note = f"to the downflooding angle {flood:.2f}°"
                    if end <= c.start:
                        attained = 0.0
                        note = f"downflooding at {flood:.2f}° comes before {c.start:g}°"
                    elif end > top + 1e-9:
                        note = f"curve computed only to {top:g}°"
                    else:
                        # for either side this is the righting energy: positive when GZ rights
                        attained = curve.area(sign * c.start, sign * end)
                elif c.kind == "gz_at":
                    attained = sign * curve.gz_at(sign * c.angle)
                elif c.kind == "gz_max_beyond":
                    x, y = curve.side(sign)
                    m = x >= c.angle - 1e-9
                    if m.any():
                        attained = float(y[m].max())
                        gmax, amax = curve.max_gz(sign)
                        if amax >= c.angle:
                            attained = max(attained, gmax)
                elif c.kind == "angle_of_max":
                    attained = curve.max_gz(sign)[1]
                elif c.kind == "gm":
                    attained = curve.gm_upright if curve.gm_upright is not None else curve.gm_from_slope()
                elif c.kind == "range":
                    attained = curve.range_of_stability(sign)
                    if attained is None:
                        note = "no vanishing angle within the curve"
                elif c.kind == "vanishing":
                    attained = curve.vanishing_angle(sign)
                    if attained is None:
                        note = "no vanishing angle within the curve"
            except InputError as exc:
                note = str(exc)
            ok = attained is not None and attained >= c.minimum - 1e-12
            if attained is None and c.kind in ("range", "vanishing") and note.startswith("no vanishing"):
                ok = top >= c.minimum  # positive to the end of the curve
            results.append(Result(c.id, c.text or c.kind, side, c.unit, c.minimum, attained,
                                  None if attained is None else attained - c.minimum, bool(ok), note))
    return Report(cset.name, cset.source, tuple(results), CAUTION, tuple(notes))
