"""Intact-stability criteria as data, evaluated against a righting-lever curve with margins.

Shipped sets: the general intact-stability criteria of the IMO International Code on
Intact Stability 2008 (resolution MSC.267(85)), Part A, 2.2 (``imo2008``), and the same
with the severe wind and rolling criterion of 2.3 (``imo2008-weather``). Limits as printed
in the code; the clause numbers 2.2.1 to 2.2.4 are given from memory and match several
reproductions of the code (2.2.1 holds the three area limits). "(heel)" and "(areas)"
after 2.3 are our own labels for its two parts, not clause numbers.

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
    # "range" (range of positive stability [deg]), "vanishing" (angle of vanishing stability [deg]),
    # "arm_equilibrium" [deg], "arm_residual_area" [m·rad], "arm_area_ratio" [-] (keys `arm`, `to`,
    # `to_flooding`; the arm is a case's [[arm]]), "weather" (IS Code 2.3 on the case's [weather]
    # and [[windage]]; no keys, gives two results "<id> (heel)" and "<id> (areas)").
    # Every kind but weather takes `minimum` or `maximum` (one of them).

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
import math
import os
from dataclasses import dataclass, field
from typing import Any, Callable, Mapping

import numpy as np

from . import tolerances as tol
from .arms import GZCurve, arm_analysis, limit_margin
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
        The wind model of the weather criterion: an object with ``result(curve, sign)`` returning a
        :class:`meshhydro.weather.WeatherResult` (the analysis layer gives a
        :class:`meshhydro.weather.WindSetup`); None when the case has no [weather] data.
    heeling_arms : mapping name -> HeelingArm
        The case's heeling arms (:class:`meshhydro.arms.HeelingArm`: arm [m] as a function of heel
        [deg], heeling towards the side checked).
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
    #: a limit worked out by the check itself (e.g. the weather criterion's θ0 limit), replacing the set's
    required: float | None = None
    #: the unit of ``attained`` when it is not the kind's (the weather kind's parts)
    unit: str | None = None


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
class ArmParams:
    """A named heeling arm of the case; the residual area ends at ``end`` [deg] and/or the downflooding
    angle (``to_flooding``), and always at the second intercept of arm and GZ."""

    arm: str = _toml("arm")
    end: float | None = _toml("to", required=False, default=None)
    to_flooding: bool = _toml("to_flooding", required=False, default=False)


@dataclass(frozen=True)
class WeatherParams:
    """Which part of the weather criterion (IS Code 2.3) a result reports: ``heel`` (steady-wind heel θ0
    against its limit) or ``areas`` (area b against area a). A user's ``kind = "weather"`` gives both."""

    part: str = "heel"


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
    swamp = ctx.curve.swamping.get(ctx.sign)
    if swamp is not None and end > swamp:  # an open boat: nothing rights beyond the swamping angle
        return Outcome(ctx.curve.area(ctx.sign * p.start, ctx.sign * swamp) if swamp > p.start else 0.0,
                       f"the open boat swamps at {swamp:.2f}°: area counted to there")
    if end > ctx.top + tol.ANGLE_SLACK:
        return Outcome(None, f"curve computed only to {ctx.top:g}°")
    # for either side this is the righting energy: positive when GZ rights
    return Outcome(ctx.curve.area(ctx.sign * p.start, ctx.sign * end), note)


@register("gz_at", unit="m", params=AngleParams)
def _gz_at(ctx: Context, p: AngleParams) -> Outcome:
    swamp = ctx.curve.swamping.get(ctx.sign)
    if swamp is not None and p.angle > swamp:
        return Outcome(None, f"the open boat swamps at {swamp:.2f}°, before {p.angle:g}°")
    return Outcome(ctx.sign * ctx.curve.gz_at(ctx.sign * p.angle))


@register("gz_max_beyond", unit="m", params=AngleParams)
def _gz_max_beyond(ctx: Context, p: AngleParams) -> Outcome:
    x, y = ctx.curve.side(ctx.sign)
    m = x >= p.angle - tol.ANGLE_SLACK
    v = ctx.curve.vanishing_angle(ctx.sign)
    if v is not None:  # within the range of positive stability: not a second lobe (e.g. inverted, near 180°)
        m &= x <= v
    if not m.any():
        return Outcome(None, "" if v is None else f"GZ vanishes at {v:.2f}°, before {p.angle:g}°")
    attained = float(y[m].max())
    gmax, amax = ctx.curve.max_gz(ctx.sign)
    if amax >= p.angle:
        attained = max(attained, gmax)
    return Outcome(attained)


@register("angle_of_max", unit="deg")
def _angle_of_max(ctx: Context, p: NoParams) -> Outcome:
    if ctx.curve.max_beyond_range(ctx.sign):
        return Outcome(None, f"GZ still rises at {ctx.top:g}°: the maximum lies beyond the computed range",
                       at_least=ctx.top)
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

# ---------------------------------------------------------------------------- heeling arms and weather


def _arm_run(ctx: Context, p: ArmParams) -> Any:
    """The arm analysis of ``p.arm`` against the curve on this side (heels from 0 towards it)."""
    arm = ctx.heeling_arms.get(p.arm)
    if arm is None:
        have = ", ".join(ctx.heeling_arms) or "none"
        raise InputError(f"no heeling arm named {p.arm!r} in the case (arms: {have})")
    x, y = ctx.curve.side(ctx.sign)
    if p.end is not None and p.end > ctx.top + tol.ANGLE_SLACK:
        raise InputError(f"curve computed only to {ctx.top:g}°")
    flood = ctx.flooding[0] if p.to_flooding else None
    return arm_analysis(GZCurve(x, y), arm, start=0.0, limit=p.end, flooding=flood)


def _arm_note(an: Any) -> str:
    if an.equilibrium is None:
        return an.end_reason
    return f"equilibrium {an.equilibrium:.2f}°, to {an.end:.2f}° ({an.end_reason})"


@register("arm_equilibrium", unit="deg", params=ArmParams)
def _arm_equilibrium(ctx: Context, p: ArmParams) -> Outcome:
    an = _arm_run(ctx, p)
    return Outcome(an.equilibrium, "" if an.equilibrium is not None else an.end_reason)


@register("arm_residual_area", unit="m·rad", params=ArmParams)
def _arm_residual(ctx: Context, p: ArmParams) -> Outcome:
    an = _arm_run(ctx, p)
    return Outcome(an.residual_area, _arm_note(an))


@register("arm_area_ratio", unit="-", params=ArmParams)
def _arm_ratio(ctx: Context, p: ArmParams) -> Outcome:
    an = _arm_run(ctx, p)
    r = an.ratio
    return Outcome(None if r is None or not math.isfinite(r) else r, _arm_note(an),
                   at_least=r if r is not None and math.isinf(r) else None)


@register("weather", unit="-", params=WeatherParams)
def _weather(ctx: Context, p: WeatherParams) -> Outcome:
    if ctx.windage is None:
        raise InputError("the weather criterion needs the [weather] and [[windage]] data of a case file")
    w = ctx.windage.result(ctx.curve, ctx.sign)
    if p.part == "heel":
        note = f"wind from {'port' if ctx.sign > 0 else 'starboard'}; lw1 {w.lw1:.4f} m"
        return Outcome(w.theta0, note if w.theta0 is not None else "; ".join(w.notes), required=w.theta0_limit,
                       unit="deg")
    note = f"θ0−θ1 {w.theta0 - w.theta1:.2f}° to θ2 {w.theta2:.2f}° ({w.theta2_reason})" \
        if w.theta0 is not None and w.theta2 is not None else "; ".join(w.notes)
    return Outcome(w.area_b, note, required=w.area_a, unit="m·rad")


@dataclass(frozen=True)
class Criterion:
    """One requirement: a registered ``kind``, its typed ``params`` and its limit (kind's unit): a
    ``minimum``, or a ``maximum`` (with ``minimum`` None)."""

    id: str
    kind: str
    minimum: float | None
    text: str = ""
    params: Any = NoParams()
    maximum: float | None = None

    def __post_init__(self) -> None:
        if self.minimum is None and self.maximum is None:
            raise InputError(f"criterion {self.id}: needs a minimum or a maximum")
        if self.kind not in REGISTRY:
            raise InputError(f"criterion {self.id}: kind must be one of {', '.join(REGISTRY)}, got {self.kind!r}")
        want = REGISTRY[self.kind].params
        if not isinstance(self.params, want):
            raise InputError(f"criterion {self.id}: kind {self.kind} takes {want.__name__}, "
                             f"got {type(self.params).__name__}")

    @property
    def unit(self) -> str:
        return REGISTRY[self.kind].unit

    @property
    def limit(self) -> float:
        """The limit value: the minimum, or the maximum when there is no minimum."""
        return self.minimum if self.minimum is not None else self.maximum  # type: ignore[return-value]


@dataclass(frozen=True)
class CriteriaSet:
    """A named set of criteria; ``clauses`` names the IS Code clauses a built-in set applies (for the
    applicability notes), empty for a user's set."""

    name: str
    source: str
    items: tuple[Criterion, ...]
    clauses: tuple[str, ...] = ()

    @property
    def needs_weather(self) -> bool:
        return any(c.kind == "weather" for c in self.items)

    @property
    def arms(self) -> set[str]:
        """Names of the heeling arms the set refers to."""
        return {c.params.arm for c in self.items if isinstance(c.params, ArmParams)}


IMO_2008_GENERAL = CriteriaSet(
    name="IMO 2008 IS Code, Part A, 2.2 - general intact stability criteria",
    source=("International Code on Intact Stability 2008, resolution MSC.267(85), Part A, 2.2 "
            "(clause numbers from memory; limits as printed)"),
    items=(
        Criterion("2.2.1", "area", 0.055, "area under the GZ curve from 0° to 30°", AreaParams(0.0, 30.0)),
        Criterion("2.2.1", "area", 0.090, "area from 0° to 40°, or to the downflooding angle if less",
                  AreaParams(0.0, 40.0, to_flooding=True)),
        Criterion("2.2.1", "area", 0.030, "area from 30° to 40°, or to the downflooding angle if less",
                  AreaParams(30.0, 40.0, to_flooding=True)),
        Criterion("2.2.2", "gz_max_beyond", 0.20, "GZ at an angle of heel equal to or greater than 30°",
                  AngleParams(30.0)),
        Criterion("2.2.3", "angle_of_max", 25.0,
                  "maximum GZ at an angle of heel not less than 25° (preferably more than 30°)"),
        Criterion("2.2.4", "gm", 0.15, "initial metacentric height GM0"),
    ),
    clauses=("2.2",),
)

#: The weather criterion's two parts; "(heel)" and "(areas)" are our own labels, not clause numbers.
WEATHER_ITEMS = (
    Criterion("2.3 (heel)", "weather", None, "steady-wind heel θ0 at most 16° or 80 % of the deck-edge angle",
              WeatherParams("heel"), maximum=16.0),
    Criterion("2.3 (areas)", "weather", 0.0, "area b (beyond the gust-lever intercept) at least area a (roll)",
              WeatherParams("areas")),
)

IMO_2008_WEATHER = CriteriaSet(
    name="IMO 2008 IS Code, Part A, 2.2 and 2.3 - general criteria and severe wind and rolling",
    source=("International Code on Intact Stability 2008, resolution MSC.267(85), Part A, 2.2 and 2.3 "
            "(clause numbers and some weather values from memory, see meshhydro.weather; limits as printed)"),
    items=IMO_2008_GENERAL.items + WEATHER_ITEMS,
    clauses=("2.2", "2.3"),
)

BUILTIN = {"imo2008": IMO_2008_GENERAL, "imo2008-weather": IMO_2008_WEATHER}

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


def describe(kind: str, params: Any) -> str:
    """Words for a criterion its file gave no text for, from its kind and parameters (so that two limits of
    one kind, such as areas over different ranges, can be told apart in tables)."""
    words = " ".join("GZ" if w == "gz" else "GM" if w == "gm" else w for w in kind.split("_"))
    flood = ", or to the downflooding angle if less"
    if isinstance(params, AreaParams):
        return f"{words} from {params.start:g}° to {params.end:g}°" + (flood if params.to_flooding else "")
    if isinstance(params, AngleParams):
        return f"{words} {params.angle:g}°"
    if isinstance(params, ArmParams):
        end = f" to {params.end:g}°" if params.end is not None else ""
        return f"{words}, arm {params.arm}{end}" + (flood if params.to_flooding else "")
    return words


def criteria_from_spec(spec: Any, source: str) -> CriteriaSet:
    """A :class:`CriteriaSet` of registry criteria from a validated :class:`~meshhydro.schemas.CriteriaSpec`.

    A ``kind = "weather"`` entry becomes the two parts of IS Code 2.3 with the Code's own limits (its
    data come from the case's [weather] and [[windage]])."""
    items: list[Criterion] = []
    for k, c in enumerate(spec.criteria):
        where = f"{source}: [criterion {k + 1}]"
        cid, text = str(c.id), c.text or ""
        if c.kind == "weather":
            items.extend(dataclasses.replace(w, id=f"{cid} {w.id.split(' ', 1)[1]}",
                                             text=(f"{text}: " if text else "") + w.text) for w in WEATHER_ITEMS)
            continue
        params = params_from_spec(c, where)
        limit = float(c.limit)
        mn, mx = (limit, None) if c.is_minimum else (None, limit)
        items.append(Criterion(id=cid, kind=c.kind, minimum=mn, maximum=mx, text=text or describe(c.kind, params),
                               params=params))
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
    #: "minimum" or "maximum": which way ``required`` limits the attained value
    bound: str = "minimum"


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
    is_max = criterion.minimum is None
    req = criterion.limit if out.required is None else out.required
    margin = limit_margin(a, None if is_max else req, req if is_max else None)
    if margin is not None:
        ok = margin >= -tol.CRITERION_SLACK
    else:
        ok = not is_max and out.at_least is not None and out.at_least >= req
    return Result(criterion.id, criterion.text or criterion.kind, ctx.side, out.unit or criterion.unit, req, a,
                  margin, bool(ok), out.note, "maximum" if is_max else "minimum")


def evaluate(curve: RightingCurve, cset: CriteriaSet = IMO_2008_GENERAL, *, sides: tuple[int, ...] = (1,),
             hydrostatics: Hydrostatics | None = None, openings: tuple[Opening, ...] = (), windage: Any = None,
             heeling_arms: Mapping[str, Any] | None = None) -> Report:
    """Evaluate ``cset`` on a righting curve for each side (+1 starboard, -1 port); ``windage`` and
    ``heeling_arms`` fill the :class:`Context` for the weather and arm kinds."""
    results = []
    notes = []
    for sign in sides:
        ctx = Context(curve, sign, hydrostatics=hydrostatics, openings=tuple(openings), windage=windage,
                      heeling_arms=dict(heeling_arms or {}))
        flood, opening = ctx.flooding
        if flood is not None:
            notes.append(f"{ctx.side}: downflooding angle {flood:.2f}° ({opening})")
        results.extend(check(c, ctx) for c in cset.items)
    return Report(cset.name, cset.source, tuple(results), CAUTION, tuple(notes))
