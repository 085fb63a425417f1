"""Where a load goes when it has no upright equilibrium: loll to a heeled position, or capsize.

Newton's method from upright fails when the nearest equilibrium is far off (an outrigger
loaded on the main hull's centreline heels until the float touches down or the main hull
lifts out) or when there is none. This module reads the answer from the free-trim GZ curve
instead: starting upright, the vessel heels to the side its upright GZ pushes it (both sides
when upright is balanced) and stops at the first angle where GZ turns righting (a stable
equilibrium: GZ crosses zero from heeling to righting, refined by Brent's method on the true
geometry). When GZ never turns righting up to 180° the vessel capsizes.

Public: :class:`Settled`, :func:`settle`, :func:`check_centre`.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from . import tolerances as tol
from .errors import InputError, MeshHydroError, NotConvergedError, OpenRimError
from .hull import Hull
from .frames import transverse_direction
from .load import Load
from .solver import Evaluator, State, newton, step_angles, upright_free_trim


@dataclass(frozen=True, eq=False)
class Settled:
    """Outcome of :func:`settle`.

    kind : "loll" (a stable heeled equilibrium within 90°) or "capsize" (none up to 180°, or only
        beyond 90°: the vessel then floats on its side or inverted; common practice calls that capsized)
    sign : int, +1 starboard down, -1 port down (the side the vessel heels to)
    angle : float [deg] or None, the heel magnitude of the stable position (loll)
    state : State or None, the converged equilibrium there (loll, when Newton converged)
    gz_upright : float [m], GZ at upright with free trim (negative heels to starboard)
    """

    kind: str
    sign: int
    angle: float | None
    state: State | None
    gz_upright: float

    @property
    def side(self) -> str:
        return "starboard" if self.sign > 0 else "port"

    def describe(self) -> str:
        """Plain words: where the vessel goes, read from its GZ curve."""
        if self.kind == "capsize" and self.angle is None:
            return (f"no stable position: heeling to {self.side}, GZ never turns righting up to 180° "
                    f"(the vessel capsizes)")
        if self.kind == "capsize":
            return (f"the vessel capsizes to {self.side}: GZ stays heeling until {self.angle:.2f}°, beyond 90°, "
                    f"where it would float on its side or inverted (from its GZ curve)")
        return f"the vessel heels to {self.angle:.2f}° to {self.side}, where GZ turns righting (from its GZ curve)"


def check_centre(hull: Hull, load: Load) -> None:
    """InputError when the load's G (upright, level) lies outside the hull's extent in x or y: B lies
    within the hull, so such a load could balance only on end or on its side (a misplaced G)."""
    g = np.asarray(load.centre(0.0, 0.0), float)
    lo, hi = hull.bounds
    for i, name, what in ((0, "x", "length"), (1, "y", "breadth")):
        slack = tol.SYMMETRY * max(hull.size, tol.TINY_LENGTH)
        if not (lo[i] - slack <= g[i] <= hi[i] + slack):
            raise InputError(f"centre of gravity {name} = {g[i]:g} m lies outside the hull's {what} "
                             f"({name} {lo[i]:.3f}..{hi[i]:.3f} m): it could balance only on end or on its side; "
                             f"check the centre of gravity")


def _gz(load: Load, st: State) -> float:
    return float((load.centre(st.heel, st.trim) - st.cut.centroid) @ transverse_direction(st.heel))


def _walk(ev: Evaluator, v0: float, load: Load, upright: State, sign: int) -> tuple[float, State] | None:
    """From upright, heel to ``sign`` in steps until GZ turns righting: (angle [deg], state near it)."""
    from scipy.optimize import brentq

    prev_st, prev_y = upright, sign * _gz(load, upright)
    for a in np.arange(tol.LOLL_STEP, 180.0 + tol.LOLL_STEP / 2, tol.LOLL_STEP):
        side = "starboard" if sign > 0 else "port"
        try:
            st = step_angles(ev, v0, load, np.array([sign * a]), prev_st, True)[0][0]
        except OpenRimError:
            raise OpenRimError(f"heeling to {side}, the water reaches the open rim near {a:g}° before GZ turns "
                               f"righting: the boat swamps") from None
        except NotConvergedError as exc:
            raise NotConvergedError(f"heeling to {side}, the GZ curve could not be followed past "
                                    f"{a - tol.LOLL_STEP:g}°: {exc}") from None
        y = sign * _gz(load, st)
        if prev_y <= 0 < y:
            lo, hi = abs(prev_st.heel), float(a)
            states = {lo: prev_st, hi: st}

            def f(x: float) -> float:
                s = step_angles(ev, v0, load, np.array([sign * x]), states[min(states, key=lambda k: abs(k - x))],
                                True)[0][0]
                states[x] = s
                return sign * _gz(load, s)

            try:
                x = float(brentq(f, lo, hi, xtol=tol.ROOT_XTOL, maxiter=tol.BRENT_MAX_ITER))
            except (MeshHydroError, ValueError):
                x = lo + (hi - lo) * (-prev_y) / (y - prev_y)
            return x, states.get(x, st)
        prev_st, prev_y = st, y
    return None


def settle(ev: Evaluator, v0: float, load: Load, upright: State | None = None) -> Settled:
    """The stable heeled position of a load with no upright equilibrium, or its capsize (see module)."""
    up = upright if upright is not None else upright_free_trim(ev, v0, load)
    g0 = _gz(load, up)
    scale = tol.LEVER_TOL * ev.L
    sides = (1,) if g0 < -scale else (-1,) if g0 > scale else (1, -1)
    best: Settled | None = None
    for s in sides:
        found = _walk(ev, v0, load, up, s)
        if found is None:
            continue
        angle, near = found
        res = newton(ev, v0, load, near, free_heel=True, free_trim=True)
        st = res.state if res.converged and abs(res.state.heel - s * angle) < tol.LOLL_STEP else None
        kind = "loll" if angle <= tol.CAPSIZE_ANGLE else "capsize"
        if best is None or angle < (best.angle or 0.0) - tol.LOLL_TIE:
            best = Settled(kind, s, angle, st, g0)
    return best if best is not None else Settled("capsize", sides[0], None, None, g0)
