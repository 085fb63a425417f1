"""Severe wind and rolling (weather) criterion: IMO 2008 IS Code, Part A, 2.3.

Source: International Code on Intact Stability 2008, resolution MSC.267(85), Part A, 2.3;
the roll-angle formula and the factor tables as in the US regulation 46 CFR 28.575 (which
uses the same ones) and the roll-period table as in IMO MSC.1/Circ.1200. Where this
module relies on a value the project's reference list marks as not confirmed against the
printed Code it says so: the layout of the wind-lever formula (units checked), the
16° / 80 % deck-edge limit on the steady heel, the X2 value at Cb = 0.65 and the s value
at 20 s.

The criterion, in our words:

* a steady beam wind gives the constant lever lw1 = P·A·Z / (1000·g·Δ) [m] (P = 504 N/m²
  unless the user sets another pressure, e.g. for restricted service; A [m²] the lateral
  windage above the waterline; Z [m] from the centre of A down to the centre of the
  underwater lateral area, or to half the draught; Δ [t]); a gust gives lw2 = 1.5·lw1;
* under lw1 the vessel heels to θ0, the first angle where GZ reaches lw1; θ0 may be at
  most 16° or 80 % of the deck-edge immersion angle, whichever is less;
* from θ0 it rolls to windward by θ1 = 109·k·X1·X2·√(r·s) [deg];
* area a lies between lw2 (above) and GZ from θ0 − θ1 to the first intercept of lw2
  with GZ; area b lies between GZ (above) and lw2 from that intercept to θ2, the least
  of the downflooding angle, 50° and θc (the second intercept of lw2 with GZ);
  area b must be at least area a.

Angles in degrees, positive heel = starboard down: the wind blows from port and heels the
vessel to positive angles; the windward roll goes to negative angles, so the GZ curve must
reach θ0 − θ1 on the port side (a curve with both sides, or ``mirror=True`` for a hull and
load symmetric about the centreplane).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Any

import numpy as np

from .arms import GZCurve, HeelingArm, arm_analysis
from .errors import InputError

#: Standard gravity used by the Code's lever formula [m/s²].
G = 9.81
#: Wind pressure of the Code for unrestricted service [N/m²].
PRESSURE = 504.0
#: Limits on θ0 and θ2 [deg]; the 16° / 80 % rule is from memory (REFERENCES.md).
THETA0_MAX, DECK_EDGE_SHARE, THETA2_MAX = 16.0, 0.8, 50.0

# Factor tables (key, value); linear between keys, end values held beyond the ends
# (common practice). Source: 46 CFR 28.575, matching IMO 2008 IS Code, Part A, 2.3.
#: X1 against B/d.
X1_TABLE = ((2.4, 1.00), (2.5, 0.98), (2.6, 0.96), (2.7, 0.95), (2.8, 0.93), (2.9, 0.91), (3.0, 0.90),
            (3.1, 0.88), (3.2, 0.86), (3.3, 0.84), (3.4, 0.82), (3.5, 0.80))
#: X2 against Cb (0.97 at 0.65: the CFR's key is misprinted; value from memory of the Code).
X2_TABLE = ((0.45, 0.75), (0.50, 0.82), (0.55, 0.89), (0.60, 0.95), (0.65, 0.97), (0.70, 1.00))
#: k against 100·Ak/(L·B) for a round-bilged hull.
K_TABLE = ((0.0, 1.00), (1.0, 0.98), (1.5, 0.95), (2.0, 0.88), (2.5, 0.79), (3.0, 0.74), (3.5, 0.72),
           (4.0, 0.70))
#: s against the roll period T [s] (to 18 s also MSC.1/Circ.1200; 0.035 at 20 s from the CFR and memory).
S_TABLE = ((6.0, 0.100), (7.0, 0.098), (8.0, 0.093), (12.0, 0.065), (14.0, 0.053), (16.0, 0.044),
           (18.0, 0.038), (20.0, 0.035))
#: k for sharp bilges.
K_SHARP = 0.7
BILGES = ("round", "sharp")


def table_value(table: tuple[tuple[float, float], ...], x: float) -> float:
    """Linear interpolation in a (key, value) table, end values held beyond the ends."""
    k = np.array([t[0] for t in table])
    v = np.array([t[1] for t in table])
    return float(np.interp(float(x), k, v))


def _positive(name: str, v: float) -> float:
    x = float(v)
    if not (math.isfinite(x) and x > 0):
        raise InputError(f"weather: {name} must be a positive number, got {v!r}")
    return x


@dataclass(frozen=True)
class RollAngle:
    """The roll to windward θ1 [deg] and the factors it comes from.

    ``ratio_bd`` = B/d, ``ak_ratio`` = 100·Ak/(L·B), ``OG`` = KG − d [m] (positive when G
    is above the waterline), ``roll_period`` T [s], ``C`` the period coefficient.
    """

    theta1: float
    X1: float
    X2: float
    k: float
    s: float
    r: float
    OG: float
    roll_period: float
    C: float
    ratio_bd: float
    ak_ratio: float


def roll_angle(*, breadth: float, draft: float, lwl: float, cb: float, kg: float, gm: float,
               bilge: str = "round", bilge_keel_area: float = 0.0) -> RollAngle:
    """θ1 = 109·k·X1·X2·√(r·s) [deg] (IMO 2008 IS Code, Part A, 2.3; 46 CFR 28.575).

    Parameters
    ----------
    breadth : float [m]   moulded breadth B
    draft : float [m]     mean moulded draught d
    lwl : float [m]       waterline length L
    cb : float [-]        block coefficient
    kg : float [m]        height of G above the keel, corrected for free surface
    gm : float [m]        metacentric height, corrected for free surface (> 0)
    bilge : "round" | "sharp"
        Sharp bilges give k = 0.7 whatever the keels.
    bilge_keel_area : float [m²]
        Ak, total area of bilge keels plus the lateral projection of a bar keel (0 when none).
    """
    B, d, L = _positive("breadth", breadth), _positive("draft", draft), _positive("lwl", lwl)
    cb, gm = _positive("cb", cb), float(gm)
    if not (math.isfinite(gm) and gm > 0):
        raise InputError(f"weather: the roll period needs a positive GM, got {gm!r} m")
    if bilge not in BILGES:
        raise InputError(f"weather: bilge must be one of {', '.join(BILGES)}, got {bilge!r}")
    ak = float(bilge_keel_area)
    if not (math.isfinite(ak) and ak >= 0):
        raise InputError(f"weather: bilge_keel_area must be a number ≥ 0, got {bilge_keel_area!r}")
    ak_ratio = 100.0 * ak / (L * B)
    k = K_SHARP if bilge == "sharp" else table_value(K_TABLE, ak_ratio)
    og = float(kg) - d
    r = 0.73 + 0.6 * og / d
    C = 0.373 + 0.023 * (B / d) - 0.043 * (L / 100.0)
    T = 2.0 * C * B / math.sqrt(gm)
    x1, x2, s = table_value(X1_TABLE, B / d), table_value(X2_TABLE, cb), table_value(S_TABLE, T)
    if r * s < 0:
        raise InputError(f"weather: r = 0.73 + 0.6·OG/d = {r:.4g} is negative (G far below the waterline); "
                         "the roll formula does not apply")
    th1 = 109.0 * k * x1 * x2 * math.sqrt(r * s)
    return RollAngle(th1, x1, x2, k, s, r, og, T, C, B / d, ak_ratio)


def wind_levers(area: float, z: float, displacement: float, pressure: float = PRESSURE) -> tuple[float, float]:
    """(lw1, lw2) [m]: lw1 = P·A·Z / (1000·g·Δ), lw2 = 1.5·lw1 (P [N/m²], A [m²], Z [m], Δ [t]).

    Formula layout from memory, units checked (REFERENCES.md): N·m / 1000 = kN·m, / g = t·m,
    / Δ = m."""
    a = float(area)
    if not (math.isfinite(a) and a >= 0):
        raise InputError(f"weather: windage area must be ≥ 0, got {area!r} m²")
    zz = float(z)
    if not (math.isfinite(zz) and zz >= 0):
        raise InputError(f"weather: lever Z must be a number ≥ 0 (windage centre above the underwater centre), "
                         f"got {z!r} m")
    lw1 = _positive("pressure", pressure) * a * zz / (1000.0 * G * _positive("displacement", displacement))
    return lw1, 1.5 * lw1


@dataclass(frozen=True)
class WeatherResult:
    """Outcome of the weather criterion (angles deg, levers m, areas m·rad, area m²).

    ``margins``: id → margin (positive passes): "2.3 heel" = θ0 limit − θ0,
    "2.3 areas" = area_b − area_a. ``shade`` holds the arrays to shade areas a and b
    (name → (angles, gz, lw2)).
    """

    lw1: float
    lw2: float
    theta0: float | None
    theta0_limit: float
    theta1: float
    theta_r: float | None
    theta2: float | None
    theta2_reason: str
    theta_c: float | None
    area_a: float | None
    area_b: float | None
    windage_area: float
    windage_centroid: tuple[float, float] | None
    z: float
    roll: RollAngle
    pressure: float
    passed: bool
    margins: dict[str, float | None]
    notes: tuple[str, ...] = ()
    shade: dict[str, Any] = field(default_factory=dict)

    # the roll factors by name (from ``roll``)
    roll_period = property(lambda self: self.roll.roll_period, doc="roll period T [s]")
    X1 = property(lambda self: self.roll.X1, doc="factor X1 (B/d table)")
    X2 = property(lambda self: self.roll.X2, doc="factor X2 (Cb table)")
    k = property(lambda self: self.roll.k, doc="factor k (bilge keels / sharp bilge)")
    s = property(lambda self: self.roll.s, doc="factor s (roll-period table)")
    r = property(lambda self: self.roll.r, doc="r = 0.73 + 0.6·OG/d")
    OG = property(lambda self: self.roll.OG, doc="OG = KG − d [m]")

    def to_dict(self) -> dict[str, Any]:
        """Plain values for renderers (which add the project's caution text)."""
        out = {k: getattr(self, k) for k in ("lw1", "lw2", "theta0", "theta0_limit", "theta1", "theta_r",
                                             "theta2", "theta2_reason", "theta_c", "area_a", "area_b",
                                             "windage_area", "windage_centroid", "z", "pressure", "passed")}
        out.update({k: getattr(self.roll, k) for k in ("roll_period", "X1", "X2", "k", "s", "r", "OG")})
        out["margins"] = dict(self.margins)
        out["notes"] = list(self.notes)
        return out


def weather_criterion(gz: GZCurve, *, lw1: float, roll: RollAngle, windage_area: float, z: float,
                      deck_edge_angle: float | None, downflooding_angle: float | None,
                      windage_centroid: tuple[float, float] | None = None,
                      pressure: float = PRESSURE, samples: int = 60) -> WeatherResult:
    """Evaluate the weather criterion on a GZ curve.

    Parameters
    ----------
    gz : GZCurve
        GZ [m] against heel [deg]; must cover θ0 − θ1 on the windward (negative) side and
        reach θ2 (50°, or the downflooding angle or θc if less) on the lee side.
    lw1 : float [m]           steady wind lever (see :func:`wind_levers`)
    roll : RollAngle          from :func:`roll_angle`
    windage_area, z : float   A [m²] and Z [m], reported with the result
    deck_edge_angle : float or None [deg]
        None when the hull has no deck edge; then only the 16° limit applies, with a note.
    downflooding_angle : float or None [deg]
        None when no opening immerses within the curve.
    """
    lw2 = 1.5 * lw1
    notes: list[str] = []
    if deck_edge_angle is None:
        limit0 = THETA0_MAX
        notes.append("no deck edge found on the mesh: the steady heel was held to 16° only, "
                     "not to 80 % of the deck-edge immersion angle")
    else:
        limit0 = min(THETA0_MAX, DECK_EDGE_SHARE * float(deck_edge_angle))
    steady = arm_analysis(gz, HeelingArm("lw1", "constant", a=lw1), start=0.0, limit=gz.hi)
    th0 = steady.equilibrium
    base = dict(lw1=lw1, lw2=lw2, theta0=th0, theta0_limit=limit0, theta1=roll.theta1,
                windage_area=float(windage_area), windage_centroid=windage_centroid, z=float(z), roll=roll,
                pressure=float(pressure))
    if th0 is None:
        notes.append("GZ never reaches the steady wind lever lw1: the vessel does not survive the wind")
        return WeatherResult(theta_r=None, theta2=None, theta2_reason="", theta_c=None, area_a=None, area_b=None,
                             passed=False, margins={"2.3 heel": None, "2.3 areas": None}, notes=tuple(notes),
                             **base)
    start = th0 - roll.theta1
    if start < gz.lo - 1e-9:
        raise InputError(f"weather: the windward roll reaches {start:.2f}° but the GZ curve starts at {gz.lo:g}°; "
                         "compute the port side too (or mirror a symmetric curve)")
    gust = arm_analysis(gz, HeelingArm("lw2", "constant", a=lw2), start=start, limit=THETA2_MAX,
                        flooding=downflooding_angle, samples=samples)
    if gust.end_reason == "end of the GZ curve":
        raise InputError(f"weather: the GZ curve ends at {gz.hi:g}°, before 50°, the downflooding angle and "
                         "the second intercept of lw2")
    if gust.equilibrium is None:
        notes.append("GZ never reaches the gust lever lw2")
        a = b = None
    else:
        a, b = gust.area_before, gust.residual_area
    m_heel = limit0 - th0
    m_area = None if a is None or b is None else b - a
    passed = m_heel >= -1e-12 and m_area is not None and m_area >= -1e-12
    return WeatherResult(theta_r=gust.equilibrium, theta2=gust.end, theta2_reason=gust.end_reason,
                         theta_c=gust.second_intercept, area_a=a, area_b=b, passed=bool(passed),
                         margins={"2.3 heel": m_heel, "2.3 areas": m_area}, notes=tuple(notes),
                         shade={"a": gust.shade.get("before"), "b": gust.shade.get("residual")}, **base)


def weather_for_condition(hull: Any, *, displacement: float, cog: Any, fsm: float = 0.0, density: float = 1.025,
                          openings: Any = (), step: float = 1.0, **spec: Any) -> tuple[WeatherResult, Any]:
    """The weather criterion for one loading condition of a loaded Hull, using the public API.

    A free-trim GZ curve is solved from −90° to 90° in ``step`` [deg] (G raised by
    ``fsm`` [t·m] / Δ); ``spec`` takes the keywords of :func:`weather_on_curve` (items,
    bilge, bilge_keel_area, pressure, lever_to, side). Returns (WeatherResult, Windage).
    """
    n = int(round(90.0 / step))
    if n < 1 or abs(n * step - 90.0) > 1e-9:
        raise InputError(f"weather: step must divide 90°, got {step!r}")
    heels = np.linspace(-90.0, 90.0, 2 * n + 1)
    curve = hull.righting_curve(displacement, cog, heels=heels, density=density, fsm=fsm, openings=openings)
    return weather_on_curve(hull, curve, **spec)


def weather_on_curve(hull: Any, curve: Any, *, items: Any = (), bilge: str = "round", bilge_keel_area: float = 0.0,
                     pressure: float = PRESSURE, lever_to: str = "underwater_centre", side: int = 1,
                     windage_result: Any = None, mirror: bool = False) -> tuple[WeatherResult, Any]:
    """The weather criterion on a solved RightingCurve of ``hull`` (needs 0° and enough port angles).

    The wind blows from port (``side`` = +1, heel to starboard) or from starboard (−1).
    The upright free-trim waterline of the curve gives the windage
    (:func:`meshhydro.windage.windage`, unless ``windage_result`` is given); the roll
    factors use the upright hydrostatics (B = waterline breadth, d = draft at the
    reference point, L = waterline length, Cb as in :mod:`meshhydro.hydrostatics`) and
    the curve's G and upright GM, both corrected for free surface. ``mirror``: when the curve has no
    angle on the windward side, extend it by GZ(−φ) = −GZ(φ) (only for a hull and load symmetric
    about the centreplane; the caller decides).
    """
    if side not in (1, -1):
        raise InputError(f"weather: side must be 1 (wind from port) or -1 (from starboard), got {side!r}")
    w = windage_result or curve_windage(hull, curve, items=items, lever_to=lever_to)
    hs = hull.hydrostatics(w.draft, trim=w.trim, density=curve.density)
    gm = curve.gm_upright if curve.gm_upright is not None else curve.gm_from_slope()
    roll = roll_angle(breadth=hs.bwl, draft=w.draft, lwl=hs.lwl, cb=hs.cb, kg=float(curve.cog[2]), gm=gm,
                      bilge=bilge, bilge_keel_area=bilge_keel_area)
    lw1, _ = wind_levers(w.area, w.z, curve.displacement, pressure)
    if mirror and not np.any(side * curve.heel < -1e-9):
        gz = GZCurve(*curve.side(side), mirror=True)
    else:
        gz = GZCurve(side * curve.heel, side * curve.gz)
    res = weather_criterion(gz, lw1=lw1, roll=roll, windage_area=w.area, z=w.z,
                            windage_centroid=(float(w.centroid[0]), float(w.centroid[1])),
                            deck_edge_angle=curve.deck_edge_angle(side),
                            downflooding_angle=curve.downflooding_angle(side)[0], pressure=pressure)
    return res, w


def curve_windage(hull: Any, curve: Any, *, items: Any = (), lever_to: str = "underwater_centre") -> Any:
    """Windage (:func:`meshhydro.windage.windage`) at the upright free-trim waterline of a RightingCurve.

    The curve's draft is T along the hull z axis at (x_ref, 0), as windage takes it."""
    from .windage import windage

    k0 = int(np.argmin(np.abs(curve.heel)))
    if abs(curve.heel[k0]) > 1e-12:
        raise InputError("weather: the GZ curve must include the upright position (0°)")
    trim = float(curve.trim[k0])
    draft = float(curve.draft[k0])
    return windage(hull.vertices, hull.faces, draft=draft, trim=trim, x_ref=hull.x_ref, items=items,
                   lever_to=lever_to, closed=bool(hull.report.closed))


def weather_margins(hull: Any, curve: Any, **spec: Any) -> dict[str, float | None]:
    """{"2.3 heel": margin [deg], "2.3 areas": margin [m·rad]} on a curve, for KG limits.

    Without a positive upright GM the roll period is undefined and both margins are None
    (the criterion cannot pass)."""
    gm = curve.gm_upright if curve.gm_upright is not None else curve.gm_from_slope()
    if gm is None or not gm > 0:
        return {"2.3 heel": None, "2.3 areas": None}
    return dict(weather_on_curve(hull, curve, **spec)[0].margins)


@dataclass(eq=False)
class WindSetup:
    """A case's wind data bound to its hull, as the criteria :class:`~meshhydro.criteria.Context` wants it.

    ``result(curve, sign)`` is the weather criterion on a RightingCurve of ``hull`` with the wind
    heeling towards ``sign`` (+1 starboard: wind from port); the windage of an upright waterline is
    worked out once and reused (it does not depend on KG), and the last results are kept so that the
    two parts of the criterion share one computation. ``mirror``: hull and load are symmetric, so a
    one-sided curve may be mirrored for the windward roll. ``last`` maps side name → (WeatherResult,
    Windage) of the latest evaluation (for reports).
    """

    hull: Any
    items: tuple[Any, ...] = ()
    bilge: str = "round"
    bilge_keel_area: float = 0.0
    pressure: float = PRESSURE
    lever_to: str = "underwater_centre"
    mirror: bool = False
    last: dict[str, tuple[WeatherResult, Any]] = field(default_factory=dict)
    _windage: dict[tuple[float, float], Any] = field(default_factory=dict)
    _recent: list[tuple[Any, int, tuple[WeatherResult, Any]]] = field(default_factory=list)

    def windage(self, curve: Any) -> Any:
        """Windage at the curve's upright waterline (cached by draft and trim)."""
        k0 = int(np.argmin(np.abs(curve.heel)))
        key = (float(curve.draft[k0]), float(curve.trim[k0]))
        if key not in self._windage:
            self._windage[key] = curve_windage(self.hull, curve, items=self.items, lever_to=self.lever_to)
        return self._windage[key]

    def result(self, curve: Any, sign: int) -> WeatherResult:
        for c, s, out in self._recent:
            if c is curve and s == sign:
                return out[0]
        out = weather_on_curve(self.hull, curve, bilge=self.bilge, bilge_keel_area=self.bilge_keel_area,
                               pressure=self.pressure, lever_to=self.lever_to, side=sign,
                               windage_result=self.windage(curve), mirror=self.mirror)
        self._recent = [*self._recent[-3:], (curve, sign, out)]
        self.last["starboard" if sign > 0 else "port"] = out
        return out[0]
