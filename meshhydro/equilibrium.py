"""Free-floating equilibrium: draft, heel and trim for a load, with the solver of :mod:`meshhydro.solver`.

Unknowns are the sinkage, heel and trim; B must lie on the vertical through G and the
volume must carry the displacement. When upright GM is negative the position lolls to the
nearest stable heel. The load is a :class:`meshhydro.load.Load` (G may move with the attitude).
"""
from __future__ import annotations

from dataclasses import dataclass
from dataclasses import replace
from typing import Any, Sequence

import numpy as np

from . import tolerances as tol
from .errors import CannotFloatError, CapsizeError, MeshHydroError, NotConvergedError, OpenRimError
from .frames import SEA_WATER
from .hull import Hull
from .hydrostatics import Hydrostatics
from .load import FixedLoad, Load
from . import submerged as sub
from .solver import (
    Evaluator,
    State,
    check_load,
    find_loll,
    is_neutral,
    load_metacentric_heights,
    newton,
    residuals,
    solve_volume,
    upright_free_trim,
)
from .settle import check_centre, settle


@dataclass(frozen=True, eq=False)
class Equilibrium:
    """Free-floating position for a load (hull frame, SI, degrees).

    Attributes
    ----------
    draft : float [m]
        Draft at the reference point (x_ref, 0), above the baseline z = 0.
    draft_fore, draft_aft : float [m]
        Drafts T along hull z on the centreline at ``x_fore`` and ``x_aft``: the hull's ends, or the
        perpendiculars / draft marks given to the hull (``hull.x_fore``, ``hull.x_aft``). Negative
        when that end is out of the water.
    trim_m : float [m]
        Trim in metres, draft fore minus draft aft (positive bow down).
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
    hydrostatics : Hydrostatics or None
        The particulars at this draft, heel and trim; None when fully submerged (no waterplane).
    iterations, evaluations, residual_volume, residual_lever
        Solver report: relative volume error and the largest lever of B off the
        vertical through G [m]. A position that misses the tolerances is never returned
        (NotConvergedError is raised instead).
    note : str
        Plain words on anything the user must know (loll, list, fully submerged, ...).
    submerged : bool
        A neutral load (equal to the hull's whole buoyancy): fully submerged, no waterplane, BM = 0;
        ``draft`` is then the depth of the reference point at the depth the caller chose.
    """

    displacement: float
    density: float
    draft: float
    draft_fore: float
    draft_aft: float
    x_fore: float
    x_aft: float
    trim_m: float
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
    hydrostatics: Hydrostatics | None
    iterations: int
    evaluations: int
    residual_volume: float
    residual_lever: float
    note: str = ""
    submerged: bool = False

    def to_dict(self) -> dict[str, Any]:
        d = {k: getattr(self, k) for k in (
            "displacement", "density", "draft", "draft_fore", "draft_aft", "x_fore", "x_aft", "trim_m", "heel", "trim",
            "volume", "gmt", "gml", "stable", "loll", "iterations", "evaluations",
            "residual_volume", "residual_lever", "note", "submerged")}
        d["cob"] = self.cob.tolist()
        d["up"] = self.up.tolist()
        d["cog"] = self.cog.tolist()
        d["cog_fluid"] = self.cog_fluid.tolist()
        d["hydrostatics"] = None if self.hydrostatics is None else self.hydrostatics.to_dict()
        return d


def draft_for_volume(hull: Hull, volume: float, *, heel: float = 0.0, trim: float = 0.0) -> float:
    """Draft [m] at (x_ref, 0) giving ``volume`` [m³] at a fixed heel and trim [deg]."""
    return solve_volume(Evaluator(hull), float(volume), heel, trim).draft


def solve(hull: Hull, *, displacement: float, cog: np.ndarray, density: float = SEA_WATER, fsm: float = 0.0,
          start_heel: float = 0.0, start_trim: float = 0.0, submerged_depth: float = 0.0) -> Equilibrium:
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
    submerged_depth : float [m]
        For a load equal to the hull's whole buoyancy (fully submerged, neutral at any depth): the
        depth of the body's highest point below the surface (default 0, just under it).

    Raises
    ------
    InputError, CannotFloatError, OpenRimError, NotConvergedError
    """
    check_load(hull, displacement, density)
    return solve_load(hull, FixedLoad(displacement, cog, fsm), density=density, start_heel=start_heel,
                      start_trim=start_trim, submerged_depth=submerged_depth)


def _loll(ev: Evaluator, v0: float, load: Load, upright: State) -> tuple[State, str]:
    """The loll position and its note, from an upright position with negative GMt."""
    st = find_loll(ev, v0, load, upright)
    gm0 = load_metacentric_heights(upright, load)[0]
    if st is None:
        return _settled(ev, v0, load, upright, f"upright GM is negative ({gm0:.4f} m)")
    side = "starboard" if st.heel > 0 else "port"
    g = load.centre(0.0, 0.0)
    # either side only when hull and load are both port-starboard symmetric
    either = " (either side: hull and load are symmetric)" if (
        ev.hull.is_symmetric and abs(float(g[1])) < tol.CENTRELINE) else ""
    note = (f"upright GM is negative ({gm0:.4f} m): the vessel lolls to "
            f"{abs(st.heel):.2f}° to {side}{either}; this is not a stable upright condition")
    return st, note


def _settled(ev: Evaluator, v0: float, load: Load, upright: State | None, why: str) -> tuple[State, str]:
    """The heeled position read from the GZ curve when none is found near upright; CapsizeError when
    GZ never turns righting, NotConvergedError naming the loll angle when Newton fails there."""
    try:
        s = settle(ev, v0, load, upright)
    except NotConvergedError as exc:
        raise NotConvergedError(f"{why}; {exc}") from None
    except OpenRimError as exc:
        raise OpenRimError(f"{why}; {exc}") from None
    if s.kind == "capsize":
        raise CapsizeError(f"{why}: {s.describe()}")
    if s.state is None:
        raise NotConvergedError(f"{why}: {s.describe()}, but the position there did not converge")
    return s.state, f"{why}: {s.describe()}"


def solve_load(hull: Hull, load: Load, *, density: float = SEA_WATER, start_heel: float = 0.0,
               start_trim: float = 0.0, submerged_depth: float = 0.0,
               compartments: Sequence[Any] = ()) -> Equilibrium:
    """Equilibrium for any :class:`~meshhydro.load.Load` (see :func:`solve`).

    ``compartments`` (:class:`meshhydro.damage.Compartment`) are flooded, open to the sea (lost
    buoyancy): the position is the damaged one and the hydrostatics those of the net body.
    """
    rho, v0 = check_load(hull, load.displacement, density)
    check_centre(hull, load)
    ev = Evaluator(hull, compartments)
    if is_neutral(hull, v0):
        st, note = sub.equilibrium_state(ev, load, submerged_depth, hull.total_volume * rho)
        return _result(hull, ev, load, st, rho, v0, 0, False, note, submerged=True)
    st = solve_volume(ev, v0, start_heel, start_trim)
    res = newton(ev, v0, load, st, free_heel=True, free_trim=True)
    if not res.converged:
        why = f"no equilibrium near heel {start_heel:g}°"
        st, note = _settled(ev, v0, load, None, why)
        gm0 = _upright_gm(ev, v0, load)
        return _result(hull, ev, load, st, rho, v0, res.iterations, gm0 is not None and gm0 < 0, note)
    st = res.state
    note = ""
    loll = bool(load_metacentric_heights(st, load)[0] < 0)
    if loll:
        st, note = _loll(ev, v0, load, st)
    elif abs(st.heel) > tol.LIST_NOTE:
        note = f"lists {abs(st.heel):.2f}° to {'starboard' if st.heel > 0 else 'port'}"
    return _result(hull, ev, load, st, rho, v0, res.iterations, loll, note)


def _upright_gm(ev: Evaluator, v0: float, load: Load) -> float | None:
    """GMt [m] at the upright free-trim position, None when it cannot be had."""
    try:
        return float(load_metacentric_heights(upright_free_trim(ev, v0, load), load)[0])
    except MeshHydroError:
        return None


def _result(hull: Hull, ev: Evaluator, load: Load, st: State, rho: float, v0: float, iterations: int,
            loll: bool, note: str, submerged: bool = False) -> Equilibrium:
    g = load.centre(st.heel, st.trim)
    gmt, gml = sub.metacentric_heights(st, load) if submerged else load_metacentric_heights(st, load)
    r = residuals(st, v0, load, ev.L)
    n = st.cut.normal
    if not submerged and abs(st.heel) > tol.CAPSIZE_ANGLE:
        raise CapsizeError(f"the only balance found is heeled {abs(st.heel):.2f}° to "
                           f"{'starboard' if st.heel > 0 else 'port'}, beyond 90°: the vessel capsizes")
    if not submerged and abs(st.trim) > tol.TRIM_LIMIT:
        raise CannotFloatError(f"the only balance found is trimmed {st.trim:.2f}°, beyond {tol.TRIM_LIMIT:g}°: the "
                               f"vessel would float on end; check the longitudinal centre of gravity")
    xa, xf = hull.x_aft, hull.x_fore

    def draft_at(x: float) -> float:  # T along hull z at (x, 0): the plane n . (p - K) = depth
        return float((st.depth + n[0] * (hull.x_ref - x)) / n[2])

    solid = np.array(getattr(load, "cog", g), dtype=float)
    hs = None if submerged else hull.hydrostatics(st.draft, heel=st.heel, trim=st.trim, density=rho)
    if hs is not None and ev.compartments:
        hs = _net_hydrostatics(hs, st.cut, rho)
    return Equilibrium(
        displacement=float(load.displacement), density=rho, draft=float(st.draft), draft_fore=draft_at(xf),
        draft_aft=draft_at(xa), x_fore=xf, x_aft=xa, trim_m=draft_at(xf) - draft_at(xa), heel=st.heel,
        trim=st.trim, volume=st.cut.volume,
        cob=st.cut.centroid.copy(), up=n.copy(), cog=solid, cog_fluid=np.array(g, dtype=float),
        gmt=float(gmt), gml=float(gml), stable=bool(gmt > 0 and gml > 0), loll=loll, hydrostatics=hs,
        iterations=iterations, evaluations=ev.count, residual_volume=float(abs(r[0])),
        residual_lever=float(max(abs(r[1]), abs(r[2])) * ev.L), note=note, submerged=submerged,
    )


def _net_hydrostatics(hs: Hydrostatics, c: Any, rho: float) -> Hydrostatics:
    """The particulars of the net buoyant body (flooded compartments lost) at the same waterplane.

    Volume, centres, waterplane area and centroid, BM and KM, TPC and MCT come from the net cut
    ``c`` (lost-buoyancy method: the intact waterplane minus the flooded spaces'); the form
    coefficients and wetted area stay those of the outer shell.
    """
    v = max(c.volume, 1e-300)
    bmt, bml = c.inertia_t / v, c.inertia_l / v
    disp = rho * c.volume
    return replace(hs, volume=c.volume, displacement=disp, lcb=float(c.centroid[0]), tcb=float(c.centroid[1]),
                   vcb=float(c.centroid[2]), awp=c.waterplane_area, lcf=float(c.waterplane_centroid[0]),
                   tcf=float(c.waterplane_centroid[1]), tpc=c.waterplane_area * rho / 100.0,
                   mct=disp * bml / (100.0 * hs.lwl) if hs.lwl > 0 else 0.0, bmt=bmt, bml=bml,
                   kmt=float(c.centroid[2]) + bmt, kml=float(c.centroid[2]) + bml)
