"""The fluid of several tanks as one load whose centre moves with attitude.

:class:`FluidLoad` is what the solver's load object calls: ``mass`` [t], ``centre(up)``
(hull frame, m) or ``moment(up)`` (t·m) at the attitude whose upward vertical is
``up`` (:func:`meshhydro.frames.up_vector`), and ``fsm_upright()``, the usual-practice
free-surface moment Σ ρ i_t [t·m] of the upright fills (virtual rise of G = FSM/Δ),
so the exact curve and the FSM curve come from the same objects.
"""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Mapping, Sequence

import numpy as np

from .errors import InputError
from .kernel_level import LevelSet, family_axes
from .tanks import (LEVEL_MAX_CUTS, LEVEL_VOLUME_RTOL, UP_UPRIGHT, Tank, TankState, checked_state, tank_state,
                    unit_vertical)


@dataclass(frozen=True)
class _Warm:
    """Warm start of one tank's level: the last surface centroid, its normal and the last correction.

    Tilting a level surface about its own centroid keeps the volume to first order, so
    the plane with the new normal through the last surface centroid is a first-order
    guess; its error grows with the square of the tilt, so the last correction along
    the normal, scaled by the squared ratio of the tilts, is added (capped).
    """

    point: np.ndarray
    normal: np.ndarray
    shift: float
    tilt: float

    def guess(self, n: np.ndarray, tilt: float) -> np.ndarray:
        """A point near the level at normal ``n``, ``tilt`` [rad] away from this one's normal."""
        if self.tilt > 0.0 and tilt > 0.0:
            k = min((tilt / self.tilt) ** 2, 4.0)
            return self.point + k * self.shift * n
        return self.point

    @staticmethod
    def after(prev: "_Warm | None", st: TankState, tilt: float) -> "_Warm":
        if prev is None:
            return _Warm(st.level_point, st.normal, 0.0, 0.0)
        shift = float(st.normal @ (st.level_point - prev.point))
        return _Warm(st.level_point, st.normal, shift, tilt)


def _angle(a: np.ndarray, b: np.ndarray) -> float:
    """Angle [rad] between unit vectors (3,), exact for small angles."""
    (a0, a1, a2), (b0, b1, b2) = a.tolist(), b.tolist()
    d0, d1, d2, s0, s1, s2 = a0 - b0, a1 - b1, a2 - b2, a0 + b0, a1 + b1, a2 + b2
    return 2.0 * math.atan2(math.sqrt(d0 * d0 + d1 * d1 + d2 * d2), math.sqrt(s0 * s0 + s1 * s1 + s2 * s2))


class FluidLoad:
    """The fluid of several tanks with fixed volumes: a load whose centre moves with attitude.

    The solver's load object calls ``mass``, ``centre(up)`` (or ``moment(up)``) and
    ``fsm_upright()``. Each call to :meth:`states` solves one level per slack tank,
    warm-started from the same tank's surface at the previous call (the object keeps
    that one point per tank; it is not meant to be shared between threads).

    Parameters
    ----------
    tanks : sequence of Tank
    volumes : sequence of float [m³], one per tank
    """

    def __init__(self, tanks: Sequence[Tank], volumes: Sequence[float]) -> None:
        if len(tanks) != len(volumes):
            raise InputError(f"{len(tanks)} tanks but {len(volumes)} volumes")
        names = [t.name for t in tanks]
        dup = sorted({x for x in names if names.count(x) > 1})
        if dup:
            raise InputError(f"tank name {dup[0]!r} is used twice")
        self.tanks = tuple(tanks)
        self.volumes = tuple(t.volume_for(volume=v) for t, v in zip(tanks, volumes))
        self.cuts = 0
        self._warm: list[_Warm | None] = [None] * len(self.tanks)
        self._upright: list[TankState] | None = None
        self._set: _SlackSet | None = None

    @classmethod
    def from_fills(cls, tanks: Sequence[Tank], fills: Mapping[str, float]) -> "FluidLoad":
        """From fractions of capacity by tank name; tanks not named are empty, unknown names are errors."""
        by = {t.name: t for t in tanks}
        for k in fills:
            if k not in by:
                raise InputError(f"fills: no tank named {k!r} (tanks: {', '.join(by) or 'none'})")
        return cls(tanks, [t.volume_for(fraction=fills.get(t.name, 0.0)) for t in tanks])

    @property
    def mass(self) -> float:
        """Total fluid mass [t] (independent of attitude)."""
        return float(sum(t.density * v for t, v in zip(self.tanks, self.volumes)))

    def states(self, up: Any) -> list[TankState]:
        """Every tank's fluid at attitude ``up`` (3,) [hull frame]."""
        n = unit_vertical(up)
        axes = family_axes(n)  # the planes' axes, the same for every tank at this attitude
        out = []
        for i, (t, v) in enumerate(zip(self.tanks, self.volumes)):
            w = self._warm[i]
            tilt = 0.0 if w is None else _angle(w.normal, n)
            st = checked_state(t, n, v, None if w is None else w.guess(n, tilt), axes)  # n, v checked already
            if st.cuts:
                self._warm[i] = _Warm.after(w, st, tilt)
            self.cuts += st.cuts
            out.append(st)
        return out

    def levelled(self, up: Any) -> tuple[np.ndarray, np.ndarray]:
        """(Σ mass · centroid (3,) [t·m], Σ ρ J (3, 3) [t·m]) at attitude ``up`` (3,), hull frame: what a
        load needs of :meth:`states` (J each free surface's second-moment tensor about its centroid),
        with every slack tank levelled in one compiled call (:class:`meshhydro.kernel_level.LevelSet`;
        tank by tank through :meth:`states` where that is not available)."""
        if self._set is None:
            self._set = _SlackSet(self.tanks, self.volumes)
        if not self._set.levels.usable:
            mom, rho_j = np.zeros(3), np.zeros((3, 3))
            for t, st in zip(self.tanks, self.states(up)):
                mom += st.mass * st.centroid
                rho_j += t.density * st.inertia_tensor
            return mom, rho_j
        mom, rho_j, cuts = self._set.at(unit_vertical(up))
        self.cuts += cuts
        return mom, rho_j

    def moment(self, up: Any) -> np.ndarray:
        """Σ mass · centroid (3,) [t·m], hull frame, at attitude ``up``."""
        m = np.zeros(3)
        for st in self.states(up):
            m += st.mass * st.centroid
        return m

    def centre(self, up: Any) -> np.ndarray:
        """Centre (3,) [m] of all the fluid at attitude ``up`` (3,), hull frame.

        Raises InputError when there is no fluid (the centre is undefined).
        """
        if not self.mass > 0.0:
            raise InputError("no fluid in any tank: its centre is undefined")
        return self.moment(up) / self.mass

    def upright_states(self) -> list[TankState]:
        """The states upright (cached)."""
        if self._upright is None:
            self._upright = [tank_state(t, UP_UPRIGHT, v) for t, v in zip(self.tanks, self.volumes)]
        return self._upright

    def fsm_upright(self) -> float:
        """Σ ρ i_t [t·m]: the transverse free-surface moment of the upright fills (usual practice)."""
        return float(sum(t.density * s.i_t for t, s in zip(self.tanks, self.upright_states())))

    def fsm_upright_longitudinal(self) -> float:
        """Σ ρ i_l [t·m]: the longitudinal free-surface moment of the upright fills."""
        return float(sum(t.density * s.i_l for t, s in zip(self.tanks, self.upright_states())))


class _SlackSet:
    """The slack tanks of a :class:`FluidLoad` levelled together (full and empty ones add a fixed
    moment and no free surface), warm-started from their surfaces at the previous call: as
    :class:`_Warm`, with the normal and tilt shared, since all are levelled at every call."""

    def __init__(self, tanks: Sequence[Tank], volumes: Sequence[float]) -> None:
        slack = [i for i, (t, v) in enumerate(zip(tanks, volumes)) if 0.0 < v < t.capacity]
        self.tanks = [tanks[i] for i in slack]
        self.levels = LevelSet([t.prepared for t in self.tanks])
        self.volumes = np.array([volumes[i] for i in slack])
        self.caps = np.array([t.capacity for t in self.tanks])
        self.tols = LEVEL_VOLUME_RTOL * self.caps
        self.mass = np.array([t.density for t in self.tanks]) * self.volumes  # (m,) [t]
        self.rho = np.array([t.density for t in self.tanks])
        self.fixed = np.zeros(3)  # full tanks: Σ mass · centroid [t·m]; empty ones add nothing
        for t, v in zip(tanks, volumes):
            if v == t.capacity:
                self.fixed = self.fixed + t.density * v * t.centroid_full
        self.points: np.ndarray | None = None  # (m, 3) last surface centroids [m]
        self.normal = np.zeros(3)
        self.shift = np.zeros(len(self.tanks))
        self.tilt = 0.0

    def _start(self, n: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray, float]:
        """(s0, lo, hi) of the searches (centred frames) and the tilt [rad] since the last call."""
        lo, hi = self.levels.extents(n)
        if self.points is None:
            return lo + (hi - lo) * self.volumes / self.caps, lo, hi, 0.0
        tilt = _angle(self.normal, n)
        pts = self.points
        if self.tilt > 0.0 and tilt > 0.0:
            pts = pts + (min((tilt / self.tilt) ** 2, 4.0) * self.shift)[:, None] * n
        return np.einsum("ij,j->i", pts - self.levels.origins, n), lo, hi, tilt

    def at(self, n: np.ndarray) -> tuple[np.ndarray, np.ndarray, int]:
        """(Σ mass · centroid (3,), Σ ρ J (3, 3), cuts taken) at the unit vertical ``n``."""
        if not self.tanks:
            return self.fixed.copy(), np.zeros((3, 3)), 0
        axes = family_axes(n)
        s0, lo, hi, tilt = self._start(n)
        f = self.levels.levels(axes, n, self.volumes, self.caps, s0, lo, hi, self.tols, LEVEL_MAX_CUTS)
        alone = np.flatnonzero(f["cuts"] <= 0)
        for i in alone:  # a plane on faces of the tank, or no convergence: level it alone
            st = checked_state(self.tanks[i], n, float(self.volumes[i]), None, axes)
            for key, val in (("centroid", st.centroid), ("waterplane_centroid", st.level_point),
                             ("inertia_t", st.i_t), ("inertia_l", st.i_l),
                             ("inertia_uv", _uv_moment(st, axes))):
                f[key][i] = val
            f["cuts"][i] = st.cuts + abs(int(f["cuts"][i]))  # the joint attempt's cuts count too
        c_wp = f["waterplane_centroid"]
        if self.points is not None:
            self.shift = (c_wp - self.points) @ n
            self.tilt = tilt
        self.points, self.normal = c_wp, n
        mom = self.fixed + self.mass @ f["centroid"]
        _, u, v = axes
        il, it, iuv = self.rho @ f["inertia_l"], self.rho @ f["inertia_t"], self.rho @ f["inertia_uv"]
        rho_j = il * np.outer(u, u) + it * np.outer(v, v) + iuv * (np.outer(u, v) + np.outer(v, u))
        return mom, rho_j, int(np.abs(f["cuts"]).sum())


def _uv_moment(st: TankState, axes: tuple[np.ndarray, np.ndarray, np.ndarray]) -> float:
    """The product moment ∫ u v dA [m⁴] of a state's free surface on the axes u, v."""
    _, u, v = axes
    return float(u @ st.inertia_tensor @ v)
