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
from .tanks import UP_UPRIGHT, Tank, TankState, checked_state, tank_state, unit_vertical


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
    d, s = a - b, a + b
    return float(2.0 * math.atan2(math.sqrt(float(d @ d)), math.sqrt(float(s @ s))))


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
        out = []
        for i, (t, v) in enumerate(zip(self.tanks, self.volumes)):
            w = self._warm[i]
            tilt = 0.0 if w is None else _angle(w.normal, n)
            st = checked_state(t, n, v, None if w is None else w.guess(n, tilt))  # n, v checked already
            if st.cuts:
                self._warm[i] = _Warm.after(w, st, tilt)
            self.cuts += st.cuts
            out.append(st)
        return out

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
