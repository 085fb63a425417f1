"""A loading condition with tanks as the solver's load: solid items plus fluid whose surface stays level.

:class:`TankLoad` implements :class:`meshhydro.load.Load`. Its G is the mass centre of the solid
items (raised by any free-surface moment typed on the items, FSM / Δ) and of the tank fluid, whose
free surface is level at every attitude (:class:`meshhydro.fluid.FluidLoad`, exact kernel cuts).

Derivatives are exact: tilting a level surface by ``dn`` about its own centroid F holds the fluid
volume to first order, and the wedge of thickness ``-dn · (x - F)`` moves the fluid's first moment
by ``-J dn``, with J = ∫ (x - F)(x - F)ᵀ dA the free surface's second-moment tensor. So

    dG/dq = -Σ ρ_i J_i (dn/dq) / Δ        (q = heel or trim, per radian)

and the loss of GM to the fluid at small angles is Σ ρ i_t / Δ, the textbook virtual rise.

Hull frame (x forward, y to port, z up), m, t, t/m³; angles in degrees, derivatives per radian.
"""
from __future__ import annotations

import math
from typing import Any

import numpy as np

from .errors import InputError
from .fluid import FluidLoad
from .frames import up_derivatives, up_vector

#: Attitudes whose fluid centre is kept (the solver asks again at each attitude when it assembles a
#: curve; an entry is 12 numbers, so a whole curve's attitudes fit).
CACHE_SIZE = 4096


class TankLoad:
    """Solid items plus tank fluid with level surfaces: G moves with the attitude (exact fluid shift).

    Parameters
    ----------
    solid_mass : float [t], not negative
    solid_moment : (3,) [t·m], hull frame
        Σ mass · centre of the solid items about the hull-frame origin.
    fluid : FluidLoad
        The tanks and their fluid volumes (one object per solve: it keeps a warm start).
    item_fsm : float [t·m], not negative
        Free-surface moment typed on solid items (not tanks), applied as a virtual rise FSM / Δ.

    Attributes
    ----------
    displacement : float [t]
    cog : (3,) [m]
        G upright (fluid level at heel 0, trim 0), without any virtual rise.
    """

    def __init__(self, solid_mass: float, solid_moment: Any, fluid: FluidLoad, *, item_fsm: float = 0.0) -> None:
        m = float(solid_mass)
        mom = np.asarray(solid_moment, dtype=float).reshape(-1)
        if not math.isfinite(m) or m < 0 or mom.shape != (3,) or not np.all(np.isfinite(mom)):
            raise InputError(f"solid items: need a finite mass >= 0 t and a finite moment, got {solid_mass!r}")
        f = float(item_fsm)
        if not math.isfinite(f) or f < 0:
            raise InputError(f"fsm of the items must be a non-negative number of t·m, got {item_fsm!r}")
        self.fluid = fluid
        self.displacement = m + fluid.mass
        if not self.displacement > 0:
            raise InputError("the condition has no mass (no items and empty tanks)")
        self._solid = mom + np.array([0.0, 0.0, f])  # the items' virtual rise, as a moment [t·m]
        self.item_fsm = f
        self._cache: dict[tuple[float, float], tuple[np.ndarray, np.ndarray]] = {}
        self.cog = self.centre(0.0, 0.0) - np.array([0.0, 0.0, f / self.displacement])

    def _at(self, heel: float, trim: float) -> tuple[np.ndarray, np.ndarray]:
        """(G (3,) [m], Σ ρ J (3, 3) [t·m]) at one attitude, cached."""
        key = (float(heel), float(trim))
        hit = self._cache.get(key)
        if hit is not None:
            return hit
        mom, rho_j = self.fluid.levelled(up_vector(*key))
        out = ((self._solid + mom) / self.displacement, rho_j)
        if len(self._cache) >= CACHE_SIZE:
            self._cache.pop(next(iter(self._cache)))
        self._cache[key] = out
        return out

    def centre(self, heel: float, trim: float) -> np.ndarray:
        """G (3,) [m, hull frame] at this heel and trim [deg]: solid items and the levelled fluid."""
        return self._at(heel, trim)[0].copy()

    def centre_derivatives(self, heel: float, trim: float) -> np.ndarray:
        """dG/d(heel), dG/d(trim) (3, 2) [m per rad], exact: -Σ ρ J dn/dq / Δ (module docstring)."""
        rho_j = self._at(heel, trim)[1]
        d_phi, d_th = up_derivatives(float(heel), float(trim))
        return -(rho_j @ np.column_stack([d_phi, d_th])) / self.displacement
