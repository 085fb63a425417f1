"""Free-floating equilibrium: draft, heel and trim for a load, with the solver of :mod:`meshhydro.solver`.

Unknowns are the sinkage, heel and trim; B must lie on the vertical through G and the
volume must carry the displacement. When upright GM is negative the position lolls to the
nearest stable heel. The load is a :class:`meshhydro.load.Load` (G may move with the attitude).
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Any

import numpy as np

from . import tolerances as tol
from .errors import NotConvergedError
from .frames import SEA_WATER
from .hull import Hull
from .hydrostatics import Hydrostatics
from .load import FixedLoad, Load
from .solver import (
    Evaluator,
    State,
    check_load,
    find_loll,
    load_metacentric_heights,
    newton,
    residuals,
    solve_volume,
)


@dataclass(frozen=True, eq=False)
class Equilibrium:
    """Free-floating position for a load (hull frame, SI, degrees).

    Attributes
    ----------
    draft : float [m]
        Draft at the reference point (x_ref, 0), above the baseline z = 0.
    draft_fore, draft_aft : float [m]
        Drafts on the centreline at the fore and aft ends of the waterline
        (``x_fore``, ``x_aft``).
    heel, trim : float [deg]
        Positive starboard down, positive bow down.
    volume : float [m³]
    cob : (3,) [m]
        Centre of buoyancy.
    up : (3,)
        Earth's upward vertical in the hull frame.
    cog, cog_fluid : (3,) [m]
        Centre of gravity (the load's solid ``cog`` when it has one), and G as the solver
        used it at this position (raised by the free-surface correction, fluid shifted).
    gmt, gml : float [m]
        Metacentric heights at the equilibrium (with the free-surface correction, "fluid").
    stable : bool
        Both GMt and GMl are positive at this position.
    loll : bool
        Upright was unstable (negative GM) and the vessel lolls to this angle.
    hydrostatics : Hydrostatics
        The particulars at this draft, heel and trim.
    iterations, evaluations, residual_volume, residual_lever
        Solver report: relative volume error and the largest lever of B off the
        vertical through G [m]. A position that misses the tolerances is never returned
        (NotConvergedError is raised instead).
    note : str
        Plain words on anything the user must know (loll, list, ...).
    """

    displacement: float
    density: float
    draft: float
    draft_fore: float
    draft_aft: float
    x_fore: float
    x_aft: float
    heel: float
    trim: float
    volume: float
    cob: np.ndarray
    up: np.ndarray
    cog: np.ndarray
    cog_fluid: np.ndarray
    gmt: float
    gml: float
    stable: bool
    loll: bool
    hydrostatics: Hydrostatics
    iterations: int
    evaluations: int
    residual_volume: float
    residual_lever: float
    note: str = ""

    def to_dict(self) -> dict[str, Any]:
        d = {k: getattr(self, k) for k in (
            "displacement", "density", "draft", "draft_fore", "draft_aft", "x_fore", "x_aft", "heel", "trim",
            "volume", "gmt", "gml", "stable", "loll", "iterations", "evaluations",
            "residual_volume", "residual_lever", "note")}
        d["cob"] = self.cob.tolist()
        d["up"] = self.up.tolist()
        d["cog"] = self.cog.tolist()
        d["cog_fluid"] = self.cog_fluid.tolist()
        d["hydrostatics"] = self.hydrostatics.to_dict()
        return d


def draft_for_volume(hull: Hull, volume: float, *, heel: float = 0.0, trim: float = 0.0) -> float:
    """Draft [m] at (x_ref, 0) giving ``volume`` [m³] at a fixed heel and trim [deg]."""
    return solve_volume(Evaluator(hull), float(volume), heel, trim).draft


def solve(hull: Hull, *, displacement: float, cog: np.ndarray, density: float = SEA_WATER, fsm: float = 0.0,
          start_heel: float = 0.0, start_trim: float = 0.0) -> Equilibrium:
    """Find draft, heel and trim so that buoyancy equals weight and B is under G.

    Parameters
    ----------
    hull : Hull
    displacement : float [t]
    cog : (3,) [m], hull frame
        Centre of gravity (solid).
    density : float [t/m³]
    fsm : float [t·m]
        Total free-surface moment; G is raised by fsm / displacement.
    start_heel, start_trim : float [deg]
        Starting attitude (default upright, level).

    Raises
    ------
    InputError, CannotFloatError, OpenRimError, NotConvergedError
    """
    check_load(hull, displacement, density)
    return solve_load(hull, FixedLoad(displacement, cog, fsm), density=density, start_heel=start_heel,
                      start_trim=start_trim)


def _loll(ev: Evaluator, v0: float, load: Load, upright: State) -> tuple[State, str]:
    """The loll position and its note, from an upright position with negative GMt."""
    st = find_loll(ev, v0, load, upright)
    if st is None:
        raise NotConvergedError("upright GM is negative and no stable heeled position was found: the vessel capsizes")
    gm0 = load_metacentric_heights(upright, load)[0]
    side = "starboard" if st.heel > 0 else "port"
    g = load.centre(0.0, 0.0)
    # either side only when hull and load are both port-starboard symmetric
    either = " (either side: hull and load are symmetric)" if (
        ev.hull.is_symmetric and abs(float(g[1])) < tol.CENTRELINE) else ""
    note = (f"upright GM is negative ({gm0:.4f} m): the vessel lolls to "
            f"{abs(st.heel):.2f}° to {side}{either}; this is not a stable upright condition")
    return st, note


def solve_load(hull: Hull, load: Load, *, density: float = SEA_WATER, start_heel: float = 0.0,
               start_trim: float = 0.0) -> Equilibrium:
    """Equilibrium for any :class:`~meshhydro.load.Load` (see :func:`solve`)."""
    rho, v0 = check_load(hull, load.displacement, density)
    ev = Evaluator(hull)
    st = solve_volume(ev, v0, start_heel, start_trim)
    res = newton(ev, v0, load, st, free_heel=True, free_trim=True)
    if not res.converged:
        raise NotConvergedError(
            f"equilibrium not found within tolerances after {res.iterations} iterations "
            f"(volume residual {res.residual[0]:.2e}, levers {abs(res.residual[1]) * ev.L:.2e} m, "
            f"{abs(res.residual[2]) * ev.L:.2e} m)")
    st = res.state
    note = ""
    loll = bool(load_metacentric_heights(st, load)[0] < 0)
    if loll:
        st, note = _loll(ev, v0, load, st)
    elif abs(st.heel) > tol.LIST_NOTE:
        note = f"lists {abs(st.heel):.2f}° to {'starboard' if st.heel > 0 else 'port'}"
    return _result(hull, ev, load, st, rho, v0, res.iterations, loll, note)


def _result(hull: Hull, ev: Evaluator, load: Load, st: State, rho: float, v0: float, iterations: int,
            loll: bool, note: str) -> Equilibrium:
    g = load.centre(st.heel, st.trim)
    gmt, gml = load_metacentric_heights(st, load)
    r = residuals(st, v0, load, ev.L)
    n = st.cut.normal
    xa, xf = float(st.cut.waterline_x[0]), float(st.cut.waterline_x[1])

    def draft_at(x: float) -> float:  # z of the waterplane on the centreline at x
        return float((st.depth + n[0] * (hull.x_ref - x)) / n[2])

    solid = np.array(getattr(load, "cog", g), dtype=float)
    hs = hull.hydrostatics(st.draft, heel=st.heel, trim=st.trim, density=rho)
    return Equilibrium(
        displacement=float(load.displacement), density=rho, draft=float(st.draft), draft_fore=draft_at(xf),
        draft_aft=draft_at(xa), x_fore=xf, x_aft=xa, heel=st.heel, trim=st.trim, volume=st.cut.volume,
        cob=st.cut.centroid.copy(), up=n.copy(), cog=solid, cog_fluid=np.array(g, dtype=float),
        gmt=float(gmt), gml=float(gml), stable=bool(gmt > 0 and gml > 0), loll=loll, hydrostatics=hs,
        iterations=iterations, evaluations=ev.count, residual_volume=float(abs(r[0])),
        residual_lever=float(max(abs(r[1]), abs(r[2])) * ev.L), note=note,
    )
