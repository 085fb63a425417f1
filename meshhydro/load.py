"""The load a hull carries, as the solver sees it: a weight and a centre of gravity that may
depend on the attitude (fluid that shifts in a tank).

The solver asks a :class:`Load` for G at each trial attitude and never knows what makes it up,
so a tank model plugs in by implementing the protocol. :class:`FixedLoad` is a solid load with
the textbook free-surface correction: G raised along the hull z axis by FSM / Δ (virtual rise).
"""
from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Protocol, runtime_checkable

import numpy as np

from .errors import InputError


@runtime_checkable
class Load(Protocol):
    """What the solver needs of a load (hull frame, SI; angles in degrees).

    Attributes
    ----------
    displacement : float [t]
    """

    displacement: float

    def centre(self, heel: float, trim: float) -> np.ndarray:
        """G (3,) [m, hull frame] at this heel and trim [deg], fluid shift included."""
        ...

    def centre_derivatives(self, heel: float, trim: float) -> np.ndarray:
        """dG/d(heel), dG/d(trim) as a (3, 2) array [m per rad]; zeros for a fixed G."""
        ...


def virtual_cog(cog: np.ndarray | tuple[float, float, float], fsm: float, displacement: float) -> np.ndarray:
    """G (3,) [m] raised along the hull z axis by the free-surface correction FSM / Δ (virtual rise)."""
    return np.asarray(cog, dtype=float) + np.array([0.0, 0.0, float(fsm) / float(displacement)])


_NO_SHIFT = np.zeros((3, 2))
_NO_SHIFT.flags.writeable = False


@dataclass(frozen=True, eq=False)
class FixedLoad:
    """A load whose G does not move with the attitude: solid G plus the virtual rise FSM / Δ.

    Parameters
    ----------
    displacement : float [t], positive
    cog : (3,) [m, hull frame]
        Solid centre of gravity.
    fsm : float [t·m], not negative
        Total free-surface moment.
    """

    displacement: float
    cog: np.ndarray
    fsm: float = 0.0
    _g: np.ndarray = field(init=False, repr=False)

    def __post_init__(self) -> None:
        d = float(self.displacement)
        if not math.isfinite(d) or d <= 0:
            raise InputError(f"displacement must be a positive number of tonnes, got {self.displacement!r}")
        g = np.array(self.cog, dtype=float).reshape(-1)
        if g.shape != (3,) or not np.all(np.isfinite(g)):
            raise InputError(f"cog must be three finite numbers, got {self.cog!r}")
        f = float(self.fsm)
        if not math.isfinite(f) or f < 0:
            raise InputError(f"fsm must be a non-negative number of t·m, got {self.fsm!r}")
        g.flags.writeable = False
        fluid = virtual_cog(g, f, d)
        fluid.flags.writeable = False
        object.__setattr__(self, "displacement", d)
        object.__setattr__(self, "cog", g)
        object.__setattr__(self, "fsm", f)
        object.__setattr__(self, "_g", fluid)

    @property
    def cog_fluid(self) -> np.ndarray:
        """G (3,) [m] raised by FSM / Δ."""
        return self._g

    def centre(self, heel: float, trim: float) -> np.ndarray:
        return self._g

    def centre_derivatives(self, heel: float, trim: float) -> np.ndarray:
        return _NO_SHIFT
