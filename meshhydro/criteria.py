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

Kinds live in a registry (:data:`REGISTRY`): a kind is a function of a :class:`Context`
(the curve on one side, hydrostatics, openings, and room for windage and heeling arms)
and its typed parameters (a frozen dataclass whose fields are the TOML keys). A new kind::

    @register("gz_area_ratio", unit="-", params=MyParams)
    def _ratio(ctx: Context, p: MyParams) -> Outcome:
        return Outcome(...)

Every report carries :data:`CAUTION`.
"""
from __future__ import annotations

import dataclasses
import os
from dataclasses import dataclass, field
from typing import Any, Callable, Mapping

import numpy as np

from . import tolerances as tol
from .errors import InputError
from .hydrostatics import Hydrostatics
from .loading import Opening
from .schemas import read_toml, validate_criteria
from .stability import RightingCurve

#: The caution that every output a safety decision could rest on carries.
CAUTION = ("CAUTION: a design aid, not an approval. The flag administration, class rules, local codes and a "
           "qualified naval architect decide whether a vessel complies and is fit to go to sea.")
#: The same in short, for figures.
CAUTION_SHORT = ("Design aid, not an approval: flag administration, class rules, local codes "
                 "and a qualified naval architect decide.")


# ---------------------------------------------------------------------------- context and parameters


@dataclass(frozen=True, eq=False)
class Context:
    """What a criterion may look at, for one side of one curve.

    Attributes
    ----------
    curve : RightingCurve
    sign : int
        +1 heeling to starboard, -1 to port.
    hydrostatics : Hydrostatics or None
        Upright particulars of the condition, when the caller has them.
    openings : tuple of Opening
    windage : object or None
        Room for a wind model (lateral area, its centre, pressure) for weather criteria.
    heeling_arms : mapping name -> callable
        Room for heeling-arm curves: arm [m] as a function of heel (k,) [deg] on this side.
    """

    curve: RightingCurve
    sign: int
    hydrostatics: Hydrostatics | None = None
    openings: tuple[Opening, ...] = ()
    windage: Any = None
    heeling_arms: Mapping[str, Callable[[np.ndarray], np.ndarray]] = field(default_factory=dict)

    @property
    def side(self) -> str:
        return "starboard" if self.sign > 0 else "port"

    @property
    def top(self) -> float:
        """Largest computed angle on this side [deg]."""
        return float(max(self.curve.heel * self.sign))

    @property
    def flooding(self) -> tuple[float | None, str | None]:
        """(downflooding angle [deg], opening name) on this side."""
        return self.curve.downflooding_angle(self.sign)


@dataclass(frozen=True)
class Outcome:
    """What a criterion attained (in its kind's unit; None when it cannot be had) and a note.

    ``at_least`` is a known lower bound when the value itself lies beyond the computed curve
    (e.g. GZ still positive at its last angle); the criterion is met when that bound meets the minimum.
    """

    attained: float | None
    note: str = ""
    at_least: float | None = None


def _toml(key: str, *, required: bool = True, default: Any = dataclasses.MISSING) -> Any:
    return field(default=default, metadata={"toml": key, "required": required})


@dataclass(frozen=True)
class NoParams:
    """A kind that takes no parameters."""


@dataclass(frozen=True)
class AreaParams:
    """Area under GZ from ``start`` to ``end`` [deg]; ``to_flooding`` stops at the downflooding angle if less."""

    start: float = _toml("from")
    end: float = _toml("to")
    to_flooding: bool = _toml("to_flooding", required=False, default=False)


@dataclass(frozen=True)
class AngleParams:
    """One angle [deg]."""

    angle: float = _toml("angle")


@dataclass(frozen=True)
class Kind:
    """A registered criterion kind: name, unit of its value, parameter type and the check."""

    name: str
    unit: str
    params: type
    check: Callable[[Context, Any], Outcome]


#: kind name -> Kind
REGISTRY: dict[str, Kind] = {}


def register(name: str, *, unit: str, params: type = NoParams) -> Callable[[Callable[[Context, Any], Outcome]],
                                                                           Callable[[Context, Any], Outcome]]:
    """Decorator adding a criterion kind: ``check(ctx, params) -> Outcome``."""
    def deco(fn: Callable[[Context, Any], Outcome]) -> Callable[[Context, Any], Outcome]:
        if name in REGISTRY:
            raise ValueError(f"criterion kind {name!r} is registered twice")
        REGISTRY[name] = Kind(name, unit, params, fn)
        return fn
    return deco


# ---------------------------------------------------------------------------- the kinds


@register("area", unit="m·rad", params=AreaParams)
def _area(ctx: Context, p: AreaParams) -> Outcome:
    end, note = p.end, ""
    flood, _ = ctx.flooding
    if p.to_flooding and flood is not None and flood < end:
        end = flood
        note = f"to the downflooding angle {flood:.2f}°"
    if end <= p.start:
        return Outcome(0.0, f"downflooding at {flood:.2f}° comes before {p.start:g}°")
    if end > ctx.top + tol.ANGLE_SLACK:
        return Outcome(None, f"curve computed only to {ctx.top:g}°")
    # for either side this is the righting energy: positive when GZ rights
    return Outcome(ctx.curve.area(ctx.sign * p.start, ctx.sign * end), note)


@register("gz_at", unit="m", params=AngleParams)
def _gz_at(ctx: Context, p: AngleParams) -> Outcome:
    return Outcome(ctx.sign * ctx.curve.gz_at(ctx.sign * p.angle))


@register("gz_max_beyond", unit="m", params=AngleParams)
def _gz_max_beyond(ctx: Context, p: AngleParams) -> Outcome:
    x, y = ctx.curve.side(ctx.sign)
    m = x >= p.angle - tol.ANGLE_SLACK
    if not m.any():
        return Outcome(None)
    attained = float(y[m].max())
    gmax, amax = ctx.curve.max_gz(ctx.sign)
    if amax >= p.angle:
        attained = max(attained, gmax)
    return Outcome(attained)


@register("angle_of_max", unit="deg")
def _angle_of_max(ctx: Context, p: NoParams) -> Outcome:
    return Outcome(ctx.curve.max_gz(ctx.sign)[1])


@register("gm", unit="m")
def _gm(ctx: Context, p: NoParams) -> Outcome:
    c = ctx.curve
    return Outcome(c.gm_upright if c.gm_upright is not None else c.gm_from_slope())


@register("range", unit="deg")
def _range(ctx: Context, p: NoParams) -> Outcome:
    v = ctx.curve.range_of_stability(ctx.sign)
    return Outcome(v) if v is not None else Outcome(None, "no vanishing angle within the curve", at_least=ctx.top)


@register("vanishing", unit="deg")
def _vanishing(ctx: Context, p: NoParams) -> Outcome:
    v = ctx.curve.vanishing_angle(ctx.sign)
    return Outcome(v) if v is not None else Outcome(None, "no vanishing angle within the curve", at_least=ctx.top)

@dataclass(frozen=True)
class Criterion:
    """One requirement: a registered ``kind``, its typed ``params`` and the limit (kind's unit): a lower
    limit (``minimum``), or an upper one when ``upper`` is true."""

    id: str
    kind: str
    minimum: float
    text: str = ""
    params: Any = NoParams()
    upper: bool = False

    def __post_init__(self) -> None:
        if self.kind not in REGISTRY:
            raise InputError(f"criterion {self.id}: kind must be one of {', '.join(REGISTRY)}, got {self.kind!r}")
        want = REGISTRY[self.kind].params
        if not isinstance(self.params, want):
            raise InputError(f"criterion {self.id}: kind {self.kind} takes {want.__name__}, "
                             f"got {type(self.params).__name__}")

    @property
    def unit(self) -> str:
        return REGISTRY[self.kind].unit


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
        Criterion("2.2.1.1", "area", 0.055, "area under the GZ curve from 0° to 30°", AreaParams(0.0, 30.0)),
        Criterion("2.2.1.2", "area", 0.090, "area from 0° to 40°, or to the downflooding angle if less",
                  AreaParams(0.0, 40.0, to_flooding=True)),
        Criterion("2.2.1.3", "area", 0.030, "area from 30° to 40°, or to the downflooding angle if less",
                  AreaParams(30.0, 40.0, to_flooding=True)),
        Criterion("2.2.2", "gz_max_beyond", 0.20, "GZ at an angle of heel equal to or greater than 30°",
                  AngleParams(30.0)),
        Criterion("2.2.3", "angle_of_max", 25.0,
                  "maximum GZ at an angle of heel not less than 25° (preferably more than 30°)"),
        Criterion("2.2.4", "gm", 0.15, "initial metacentric height GM0"),
    ),
)

BUILTIN = {"imo2008": IMO_2008_GENERAL}

#: keys every criterion of a file has besides its kind's parameters
_COMMON_KEYS = ("id", "kind", "minimum", "maximum", "text")


def params_from_spec(spec: Any, where: str) -> Any:
    """The registry's typed parameters of a validated criterion (:data:`meshhydro.schemas.CriterionSpec`).

    Each field of the kind's parameter dataclass takes the value of its TOML key; a key the file gives
    that the kind's evaluation does not take is refused (never ignored), as is a kind with no evaluation.
    """
    kind = spec.kind
    if kind not in REGISTRY:
        raise InputError(f"{where} kind: {kind!r} is not evaluated by this version; evaluated kinds: "
                         f"{', '.join(REGISTRY)}")
    cls = REGISTRY[kind].params
    given = {k: v for k, v in spec.model_dump(by_alias=True).items() if v is not None and k not in _COMMON_KEYS}
    kw = {}
    for f in dataclasses.fields(cls):
        key = f.metadata.get("toml", f.name)
        if key in given:
            kw[f.name] = given.pop(key)
    unused = [k for k, v in given.items() if v is not False]  # a flag left at false asks for nothing
    if unused:
        raise InputError(f"{where} {unused[0]}: not taken by kind {kind} in this version")
    try:
        return cls(**kw)
    except TypeError as exc:
        raise InputError(f"{where}: kind {kind}: {exc}") from None


def criteria_from_spec(spec: Any, source: str) -> CriteriaSet:
    """A :class:`CriteriaSet` of registry criteria from a validated :class:`~meshhydro.schemas.CriteriaSpec`."""
    items = []
    for k, c in enumerate(spec.criteria):
        where = f"{source}: [criterion {k + 1}]"
        params = params_from_spec(c, where)
        # a kind that takes no limit in the file (weather) carries its own: its check's value is a margin >= 0
        limit = getattr(c, "limit", 0.0)
        items.append(Criterion(id=str(c.id), kind=c.kind, minimum=float(limit), text=c.text or "",
                               params=params, upper=not getattr(c, "is_minimum", True)))
    return CriteriaSet(name=spec.name or os.path.basename(source), source=spec.source or "", items=tuple(items))


def read_criteria(path: str) -> CriteriaSet:
    """Read a user criteria set (TOML, validated by :func:`meshhydro.schemas.validate_criteria`), or a built-in
    one by name; every error is one line naming the file, the criterion and the key."""
    if path in BUILTIN:
        return BUILTIN[path]
    data = read_toml(path, f"no such criteria file (built-in sets: {', '.join(BUILTIN)})")
    return criteria_from_spec(validate_criteria(data, path), path)


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


def check(criterion: Criterion, ctx: Context) -> Result:
    """One criterion on one side."""
    try:
        out = REGISTRY[criterion.kind].check(ctx, criterion.params)
    except InputError as exc:
        out = Outcome(None, str(exc))
    a = out.attained
    if criterion.upper:  # an upper limit: met at or below it; a lower bound beyond it fails it
        ok = a is not None and a <= criterion.minimum + tol.CRITERION_SLACK
        margin = None if a is None else criterion.minimum - a
    elif a is not None:
        ok = a >= criterion.minimum - tol.CRITERION_SLACK
        margin = a - criterion.minimum
    else:
        ok = out.at_least is not None and out.at_least >= criterion.minimum
        margin = None
    return Result(criterion.id, criterion.text or criterion.kind, ctx.side, criterion.unit, criterion.minimum, a,
                  margin, bool(ok), out.note)


def evaluate(curve: RightingCurve, cset: CriteriaSet = IMO_2008_GENERAL, *, sides: tuple[int, ...] = (1,),
             hydrostatics: Hydrostatics | None = None, openings: tuple[Opening, ...] = ()) -> Report:
    """Evaluate ``cset`` on a righting curve for each side (+1 starboard, -1 port)."""
    results = []
    notes = []
    for sign in sides:
        ctx = Context(curve, sign, hydrostatics=hydrostatics, openings=tuple(openings))
        flood, opening = ctx.flooding
        if flood is not None:
            notes.append(f"{ctx.side}: downflooding angle {flood:.2f}° ({opening})")
        results.extend(check(c, ctx) for c in cset.items)
    return Report(cset.name, cset.source, tuple(results), CAUTION, tuple(notes))
