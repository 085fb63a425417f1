"""KG limit curves: the largest KG (free-surface corrected) at which every criterion passes,
over a range of displacements, with the criterion that governs each point.

Does KN depend on KG? GZ = KN − KG·sin φ + TCG·cos φ holds exactly for any solved
attitude (``stability.righting_curve`` takes GZ = (G − B)·(0, cos φ, −sin φ)). But the
free-trim solve (``equilibrium.residuals``) balances (B − G)·e_long = 0 with the
earth-horizontal fore-and-aft direction e_long = (cos θ, sin φ sin θ, cos φ sin θ):
G's height enters it through cos φ·sin θ. So KN (B's position) is independent of KG only
where the solved trim θ is zero at every angle (the zero-trim attitude then balances for
any KG); wherever the vessel trims as it heels, KN changes with KG. The code therefore
uses KN computed once per displacement (G at K) for a cheap scan and bracket, and
accepts that result only when every trim on that curve is zero; otherwise it refines the
bracket with curves solved at the trial KG (``exact_margins``), so the reported KG is
the one the full free-trim calculation gives.

The search is by bracketing, never by linear guesses: the margins are scanned on a KG
grid from ``kg_min`` upwards, the first grid step where something fails brackets the
limit, and Brent's method finds each failing criterion's crossing in it; the least
crossing is the limit and its criterion governs. The limit is the top of the passing
range that starts at ``kg_min``. A failure that starts and ends between two grid points
is not seen: the grid (``steps``) must be fine against the KG span of any such pocket.
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Any, Callable, Mapping, Sequence

import numpy as np

from .errors import InputError

Margins = Mapping[str, "float | None"]
#: Trims [deg] at or below this on every angle make KN independent of KG (see the module docstring).
ZERO_TRIM = 1e-9


@dataclass(frozen=True)
class KNCurve:
    """KN data for one displacement: heels (n,) [deg], kn (n,) [m], trim (n,) [deg] of the
    solved attitudes, km [m] (KMt upright, or None), and ``curve`` (whatever
    ``evaluate_margins`` needs, e.g. the RightingCurve with G at K)."""

    displacement: float
    heels: np.ndarray
    kn: np.ndarray
    trim: np.ndarray
    km: float | None = None
    curve: Any = None

    @property
    def kg_independent(self) -> bool:
        """True when every solved trim is zero, so GZ = KN − KG sin φ (+ TCG cos φ) is exact for any KG."""
        return bool(np.all(np.abs(self.trim) <= ZERO_TRIM))


@dataclass(frozen=True)
class KGLimitRow:
    """One point of the KG limit curve: displacement [t], kg_max [m] (None when a criterion
    fails even at ``kg_min``), governing criterion id, gm_required [m] (GM at kg_max),
    method ("kn" exact KN model, "refined" full curves), margins at kg_max."""

    displacement: float
    kg_max: float | None
    governing: str | None
    gm_required: float | None
    method: str
    note: str = ""
    margins: dict[str, float | None] = field(default_factory=dict)


def _passes(m: Margins) -> bool:
    return all(v is not None and math.isfinite(v) and v >= 0 for v in m.values())


def _signed(m: Margins, key: str) -> float:
    v = m.get(key)
    return -1.0 if v is None or not math.isfinite(v) else float(v)


def kg_limit(margins: Callable[[float], Margins], kg_min: float, kg_max: float, *, steps: int = 40,
             xtol: float = 1e-6) -> tuple[float | None, str | None, str]:
    """Top of the passing KG range starting at ``kg_min`` [m], searched up to ``kg_max``.

    ``margins(kg)`` returns criterion id → margin (≥ 0 passes; None fails). Returns
    (kg limit or None when something fails at kg_min, governing id, note). When all pass
    up to ``kg_max`` the limit is ``kg_max`` with a note saying the search stopped there.
    """
    from scipy.optimize import brentq

    if not (math.isfinite(kg_min) and math.isfinite(kg_max) and kg_max > kg_min) or steps < 1:
        raise InputError(f"KG limits: need kg_min < kg_max and steps ≥ 1, got {kg_min!r}, {kg_max!r}, {steps!r}")
    grid = np.linspace(kg_min, kg_max, steps + 1)
    prev = margins(float(grid[0]))
    if not _passes(prev):
        bad = min(prev, key=lambda k: _signed(prev, k))
        return None, bad, f"fails already at KG {kg_min:g} m"
    for a, b in zip(grid[:-1], grid[1:], strict=False):
        cur = margins(float(b))
        if _passes(cur):
            prev = cur
            continue
        best: tuple[float, str] | None = None
        for key in cur:
            if _signed(cur, key) >= 0 or _signed(prev, key) < 0:
                continue
            r = brentq(lambda kg, key=key: _signed(margins(kg), key), float(a), float(b), xtol=xtol, maxiter=200)
            if best is None or r < best[0]:
                best = (float(r), key)
        if best is None:  # failing at b by a key that failed at a too is impossible (a passed)
            raise InputError("KG limits: no criterion crosses in the bracket")
        return _passing_side(margins, best[0], float(a), xtol), best[1], ""
    return float(kg_max), None, f"all criteria pass up to the search limit KG {kg_max:g} m"


def _passing_side(margins: Callable[[float], Margins], r: float, a: float, xtol: float) -> float:
    """The root ``r`` if every criterion passes there, else the nearest KG below it (within
    a few xtol, never below the passing end ``a``) where they all do."""
    step = 0.5 * xtol
    while r > a and not _passes(margins(r)):
        r, step = max(a, r - step), 2.0 * step
    return r


def kg_limits(kn_curve_provider: Callable[[float], KNCurve], displacements: Sequence[float],
              evaluate_margins: Callable[[KNCurve, float], Margins], *, kg_range: tuple[float, float],
              exact_margins: Callable[[float, float], Margins] | None = None,
              gm_at: Callable[[KNCurve, float], float | None] | None = None,
              steps: int = 40, xtol: float = 1e-6, progress: Callable[[], Any] | None = None) -> list[KGLimitRow]:
    """KG limit rows for each displacement [t].

    Parameters
    ----------
    kn_curve_provider : displacement [t] -> KNCurve (solved once per displacement)
    evaluate_margins : (KNCurve, kg [m]) -> {criterion id: margin}; cheap (uses KN)
    kg_range : (kg_min, kg_max) [m]   the search interval
    exact_margins : (displacement, kg) -> margins from a curve solved at that KG; used to
        refine where the KN curve trims (see the module docstring). Without it such
        points raise InputError rather than return a value that may be wrong.
    gm_at : (KNCurve, kg) -> GM [m] at the limit (default km − kg)
    progress : called once per displacement done
    """
    rows = []
    lo, hi = float(kg_range[0]), float(kg_range[1])
    for d in displacements:
        kn = kn_curve_provider(float(d))
        kg, gov, note = kg_limit(lambda k, kn=kn: evaluate_margins(kn, k), lo, hi, steps=steps, xtol=xtol)
        method = "kn"
        if not kn.kg_independent:
            if exact_margins is None:
                raise InputError(f"KG limits: at {d:g} t the vessel trims as it heels, so KN depends on KG; "
                                 "give exact_margins to refine")
            kg, gov, note = _refine(lambda k, d=d: exact_margins(float(d), k), kg, lo, hi, steps, xtol)
            method = "refined"
        m = {} if kg is None else dict((exact_margins(float(d), kg) if method == "refined"
                                        else evaluate_margins(kn, kg)))
        gm = None
        if kg is not None:
            gm = gm_at(kn, kg) if gm_at is not None else (None if kn.km is None else kn.km - kg)
        rows.append(KGLimitRow(float(d), kg, gov, gm, method, note, m))
        if progress is not None:
            progress()
    return rows


def _refine(margins: Callable[[float], Margins], kg: float | None, lo: float,
            hi: float, steps: int, xtol: float) -> tuple[float | None, str | None, str]:
    """Bracket the exact limit near the KN estimate ``kg`` and solve it by Brent's method."""
    m_lo = margins(lo)
    if not _passes(m_lo):
        return None, min(m_lo, key=lambda k: _signed(m_lo, k)), f"fails already at KG {lo:g} m"
    if kg is None:
        return kg_limit(margins, lo, hi, steps=steps, xtol=xtol)
    step = max(0.01 * (hi - lo), 100 * xtol)
    a = max(lo, kg - step)
    while not _passes(margins(a)):
        step *= 2.0
        a = max(lo, kg - step)
    b = min(hi, kg + step)
    while _passes(margins(b)) and b < hi:
        a, step = b, step * 2.0
        b = min(hi, kg + step)
    if _passes(margins(b)):
        return hi, None, f"all criteria pass up to the search limit KG {hi:g} m"
    return kg_limit(margins, a, b, steps=1, xtol=xtol)


# --------------------------------------------------------------------------- convenience on the public API
def margins_of_report(report: Any) -> dict[str, float | None]:
    """{``id`` or ``id side``: margin} from a :class:`meshhydro.criteria.Report` (failed
    results without a value map to None). Results sharing an id (the three area limits of
    clause 2.2.1) give their least margin: the clause passes when all of its limits do."""
    sides = {r.side for r in report.results}
    out: dict[str, float | None] = {}
    for r in report.results:
        key = r.id if len(sides) == 1 else f"{r.id} {r.side}"
        m = r.margin if (r.margin is not None or not r.passed) else 0.0
        if key in out:
            prev = out[key]
            m = None if prev is None or m is None else min(prev, m)
        out[key] = m
    return out


def _probe_at(curve: Any, g: np.ndarray) -> Any:
    """The curve's true-geometry probe with G moved to ``g`` (3,) [m]: the refined maximum GZ and angles of
    a KN-shifted curve are solved for the trial KG, never for the KN curve's own G."""
    from .curve_probe import CurveProbe
    from .load import FixedLoad

    p = curve.probe
    if p is None:
        return None
    out = CurveProbe(p.ev, p.v0, FixedLoad(curve.displacement, g), p.free_trim, p.heels, p.states)
    out.points.update(p.points)
    return out


def kg_limits_for_hull(hull: Any, displacements: Sequence[float], criteria: Any = None, *,
                       kg_range: tuple[float, float] | None = None, lcg: float | None = None, tcg: float = 0.0,
                       heels: Sequence[float] | None = None, density: float = 1.025, openings: Sequence[Any] = (),
                       sides: tuple[int, ...] = (1,), weather: dict[str, Any] | None = None, steps: int = 40,
                       xtol: float = 1e-6, wind: Any = None,
                       heeling_arms: Mapping[str, Any] | None = None,
                       progress: Callable[[], Any] | None = None) -> list[KGLimitRow]:
    """KG limits of ``hull`` for a criteria set (default IMO 2008 IS Code, Part A, 2.2).

    KN comes from one free-trim curve per displacement with G = (lcg, tcg, 0); ``lcg``
    defaults to the LCB of the level flotation at that displacement (the cross-curve
    convention). ``heels`` default 0..90° in 1° (and the mirror for port when
    ``sides`` holds −1). kg is the fluid KG [m]; ``kg_range`` defaults to
    (0, hull depth). ``weather``: keywords of :func:`meshhydro.weather.weather_on_curve`
    (items, bilge, bilge_keel_area, pressure, lever_to) to include the weather criterion
    (IS Code 2.3; ids "2.3 heel" and "2.3 areas", wind from port, and from starboard too
    when ``sides`` holds −1); the curves then also cover the port angles. ``wind`` (a
    :class:`meshhydro.weather.WindSetup`) and ``heeling_arms`` (name → HeelingArm) fill the
    criteria context instead, for a set holding the registry's ``weather`` and ``arm_*`` kinds.
    ``progress`` is called once per displacement done.
    """
    from . import criteria as _crit

    cset = _crit.IMO_2008_GENERAL if criteria is None else criteria
    hs = list(heels) if heels is not None else list(range(0, 91))
    if -1 in sides or weather is not None:
        hs = sorted(set(hs) | {-h for h in hs})
    rng = (0.0, float(hull.depth)) if kg_range is None else kg_range

    def g_of(d: float) -> float:
        if lcg is not None:
            return float(lcg)
        t = hull.draft_for_volume(d / density)
        return float(hull.hydrostatics(t, density=density).lcb)

    def curve_at(d: float, kg: float) -> Any:
        return hull.righting_curve(d, (g_of(d), tcg, kg), heels=hs, density=density, openings=openings)

    def provider(d: float) -> KNCurve:
        c = curve_at(d, 0.0)
        return KNCurve(d, c.heel, c.kn, c.trim, c.gm_upright, c)

    def judge(c: Any, wind: Any = None) -> Margins:
        out = margins_of_report(_crit.evaluate(c, cset, sides=sides, windage=ctx_wind, heeling_arms=heeling_arms))
        if weather is not None:
            from .weather import weather_margins

            for sd in sides:
                m = weather_margins(hull, c, side=sd, windage_result=wind, **weather)
                out.update({(k if len(sides) == 1 else f"{k} {'starboard' if sd > 0 else 'port'}"): v
                            for k, v in m.items()})
        return out

    winds: dict[float, Any] = {}
    ctx_wind = wind

    def fast(kn: KNCurve, kg: float) -> Margins:
        c = kn.curve
        gm = None if c.gm_upright is None else c.gm_upright - kg
        g = c.cog + np.array([0.0, 0.0, kg])
        moved = replace(c, gz=c.gz - kg * np.sin(np.radians(c.heel)), cog=g, gm_upright=gm, centres=None,
                        probe=_probe_at(c, g), _memo={})
        if weather is not None and kn.displacement not in winds:  # the upright waterline does not move
            from .weather import curve_windage

            winds[kn.displacement] = curve_windage(hull, c, items=weather.get("items", ()),
                                                   lever_to=weather.get("lever_to", "underwater_centre"))
        return judge(moved, winds.get(kn.displacement))

    def exact(d: float, kg: float) -> Margins:
        return judge(curve_at(d, kg))

    def gm_at(kn: KNCurve, kg: float) -> float | None:
        if kn.kg_independent:
            return None if kn.km is None else kn.km - kg
        return curve_at(kn.displacement, kg).gm_upright

    return kg_limits(provider, displacements, fast, kg_range=rng, exact_margins=exact, gm_at=gm_at,
                     steps=steps, xtol=xtol, progress=progress)
