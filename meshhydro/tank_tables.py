"""Tables built from tanks: the calibration (sounding) table and the weight groups.

Both return plain rows (lists of dicts) with a units dict, for CSV/JSON renderers
and plots elsewhere. Hull frame (x forward, y to port, z up), SI units (m, m², m³,
m⁴, t, t·m). Nothing here prints or draws.
"""
from __future__ import annotations

import math
from typing import Any, Sequence

import numpy as np

from .errors import InputError
from .frames import up_vector
from .fluid import FluidLoad
from .tanks import Tank, at_top, sounding_cut

#: Units of the calibration table's columns.
CALIBRATION_UNITS: dict[str, str] = {
    "sounding": "m", "volume": "m3", "fraction": "-", "mass": "t", "lcg": "m", "tcg": "m", "vcg": "m",
    "fs_area": "m2", "i_t": "m4", "i_l": "m4", "fsm_t": "t.m", "fsm_l": "t.m",
}

#: Units of the weight-group table's columns.
WEIGHT_UNITS: dict[str, str] = {
    "group": "", "name": "", "mass": "t", "lcg": "m", "tcg": "m", "vcg": "m", "fsm": "t.m",
}


def calibration_table(tank: Tank, soundings: Sequence[float], *, heel: float = 0.0,
                      trim: float = 0.0) -> list[dict[str, Any]]:
    """Sounding → volume, centroid and free-surface inertia rows at a fixed heel and trim [deg].

    A sounding [m] is the vertical depth of fluid above the tank's sounding point
    (by default its lowest point upright), measured along the earth vertical of the
    attitude. Columns and units: :data:`CALIBRATION_UNITS`; ``i_t``/``i_l`` are the free
    surface's second moments about its own centroid (axes along and across the hull x
    projected on the surface), ``fsm_t = ρ i_t``, ``fsm_l = ρ i_l``. The centre of an
    empty tank is undefined and left ``None``. An empty tank and a full one have no free surface
    (zero area and moments); just above the bottom and just under the top the surface is whole.
    """
    up = up_vector(float(heel), float(trim))
    rows = []
    for h in soundings:
        c = sounding_cut(tank, h, up)
        full = c.volume >= tank.capacity or at_top(tank, h, up)  # a level at the top fills the tank
        vol = tank.capacity if full else c.volume
        cen = tank.centroid_full if full else c.centroid
        area, i_t, i_l = (0.0, 0.0, 0.0) if full or not vol > 0.0 else (c.waterplane_area, c.inertia_t,
                                                                           c.inertia_l)
        rows.append({
            "sounding": float(h), "volume": vol, "fraction": vol / tank.capacity, "mass": tank.density * vol,
            "lcg": float(cen[0]) if vol > 0 else None, "tcg": float(cen[1]) if vol > 0 else None,
            "vcg": float(cen[2]) if vol > 0 else None, "fs_area": area, "i_t": i_t, "i_l": i_l,
            "fsm_t": tank.density * i_t, "fsm_l": tank.density * i_l,
        })
    return rows


def sounding_steps(tank: Tank, step: float, *, heel: float = 0.0, trim: float = 0.0) -> list[float]:
    """Soundings [m] from 0 to the tank's depth above its sounding point in steps of ``step`` [m] (last one the top)."""
    if not (math.isfinite(step) and step > 0):
        raise InputError(f"tank {tank.name!r}: sounding step must be positive, got {step!r}")
    up = up_vector(float(heel), float(trim))
    base = float(up @ tank.sounding_point)
    s = tank.vertices @ up - base
    lo, top = max(float(s.min()), 0.0), float(s.max())
    n = int(math.floor((top - lo) / step + 1e-9))
    out = [lo + k * step for k in range(n + 1)]
    if top - out[-1] > 1e-9 * max(top, 1.0):
        out.append(top)
    else:  # the last step lands on the top, perhaps a rounding above it (29 x 0.05 > 1.45): take the top itself
        out[-1] = top
    return out


def _centre(mass: float, at: Any, what: str) -> tuple[float, np.ndarray]:
    try:
        m = float(mass)
        a = np.asarray(at, dtype=float).reshape(-1)
    except (TypeError, ValueError):
        raise InputError(f"{what}: mass and centre must be numbers, got {mass!r}, {at!r}") from None
    if not math.isfinite(m) or m < 0 or a.shape != (3,) or not np.all(np.isfinite(a)):
        raise InputError(f"{what}: needs a finite mass >= 0 t and three finite coordinates, got {mass!r}, {at!r}")
    return m, a


def weight_groups(lightship: tuple[float, Sequence[float]],
                  items: Sequence[tuple[str, float, Sequence[float]]] = (),
                  fluid: FluidLoad | None = None) -> dict[str, Any]:
    """Lightship, deadweight items and tank contents with totals and fluid-corrected KG.

    Parameters
    ----------
    lightship : (mass [t], centre (3,) [m])
    items : sequence of (name, mass [t], centre (3,) [m]) deadweight items
    fluid : FluidLoad, optional
        Tank contents, listed upright with their free-surface moments ρ i_t [t·m].

    Returns
    -------
    dict with ``rows`` (group, name, mass, lcg, tcg, vcg, fsm; the centre of an empty
    tank is ``None``), ``units`` (:data:`WEIGHT_UNITS`) and ``totals``: displacement [t],
    lcg, tcg, vcg (= KG) [m], fsm [t·m], ``free_surface_rise`` = FSM/Δ [m] and
    ``kg_fluid`` = KG + FSM/Δ [m] (textbook virtual rise of G).
    """
    rows: list[dict[str, Any]] = []

    def add(group: str, name: str, m: float, c: np.ndarray | None, fsm: float) -> None:
        rows.append({"group": group, "name": name, "mass": m,
                     "lcg": None if c is None else float(c[0]), "tcg": None if c is None else float(c[1]),
                     "vcg": None if c is None else float(c[2]), "fsm": fsm})

    m, c = _centre(*lightship, "lightship")
    add("lightship", "lightship", m, c, 0.0)
    for it in items:
        if len(it) != 3:
            raise InputError(f"deadweight item {it!r}: give (name, mass, centre)")
        m, c = _centre(it[1], it[2], f"deadweight item {it[0]!r}")
        add("deadweight", str(it[0]), m, c, 0.0)
    if fluid is not None:
        for t, st in zip(fluid.tanks, fluid.upright_states()):
            add("tank", t.name, st.mass, st.centroid if st.mass > 0 else None, t.density * st.i_t)
    total = sum(r["mass"] for r in rows)
    if not total > 0:
        raise InputError("weight groups: the total mass is zero")
    mom = sum((np.array([r["lcg"], r["tcg"], r["vcg"]]) * r["mass"] for r in rows if r["lcg"] is not None),
              np.zeros(3))
    g = mom / total
    fsm = float(sum(r["fsm"] for r in rows))
    totals = {"displacement": total, "lcg": float(g[0]), "tcg": float(g[1]), "vcg": float(g[2]), "fsm": fsm,
              "free_surface_rise": fsm / total, "kg_fluid": float(g[2]) + fsm / total}
    return {"rows": rows, "units": dict(WEIGHT_UNITS), "totals": totals}
