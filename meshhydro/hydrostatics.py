"""Named hydrostatic quantities at a draft, and tables of them.

Formulas (all SI; heel and trim as in :mod:`meshhydro.frames`):

* volume V [m³] and centre of buoyancy B = (LCB, TCB, VCB) from the exact cut;
  VCB is KB, the height of B above the baseline z = 0.
* displacement Δ = ρ V [t].
* Awp, centre of flotation F = (LCF, TCF); TPC = Awp ρ / 100 [t/cm].
* BMt = I_T / V and BMl = I_L / V, with I_T, I_L the second moments of the waterplane
  about its own longitudinal and transverse axes through F.
* KMt = KB + BMt, KMl = KB + BMl [m above the baseline].
* MCT 1 cm = Δ BMl / (100 LWL) [t·m/cm] (BMl in place of GMl, as is usual when KG
  is not known; textbook).
* LWL, BWL: extents of the waterline along the waterplane's longitudinal and
  transverse axes (over all hulls of a multihull).
* Immersed depth T_i: from the waterplane down to the lowest point of the hull,
  perpendicular to the waterplane. Coefficients use it, so they do not depend on
  where the baseline is: Cb = V / (LWL BWL T_i), Cwp = Awp / (LWL BWL),
  Cm = Am / (BWL T_i), Cp = V / (Am LWL), where Am is the immersed area of the
  transverse section at the middle of the waterline length.
* WSA: wetted surface area of the hull below the waterplane.
"""
from __future__ import annotations

import math
from dataclasses import asdict, dataclass

import numpy as np

from . import kernel
from . import tolerances as tol
from .errors import CannotFloatError, InputError
from .frames import SEA_WATER, up_vector

#: Keys of a hydrostatics row, in table order (the API attribute names).
FIELDS = (
    "draft", "heel", "trim", "volume", "displacement", "lcb", "tcb", "vcb", "awp", "lcf", "tcf",
    "tpc", "mct", "bmt", "bml", "kmt", "kml", "cb", "cp", "cm", "cwp", "wsa", "lwl", "bwl",
)

#: Units of each field, for headers.
UNITS = {
    "draft": "m", "heel": "deg", "trim": "deg", "volume": "m3", "displacement": "t",
    "lcb": "m", "tcb": "m", "vcb": "m", "awp": "m2", "lcf": "m", "tcf": "m", "tpc": "t/cm",
    "mct": "t.m/cm", "bmt": "m", "bml": "m", "kmt": "m", "kml": "m", "cb": "-", "cp": "-",
    "cm": "-", "cwp": "-", "wsa": "m2", "lwl": "m", "bwl": "m",
}


@dataclass(frozen=True)
class Hydrostatics:
    """Hydrostatic particulars at one draft, heel and trim (hull frame, SI).

    See the module docstring for every formula. ``density`` is in t/m³.
    """

    draft: float
    heel: float
    trim: float
    density: float
    volume: float
    displacement: float
    lcb: float
    tcb: float
    vcb: float
    awp: float
    lcf: float
    tcf: float
    tpc: float
    mct: float
    bmt: float
    bml: float
    kmt: float
    kml: float
    cb: float
    cp: float
    cm: float
    cwp: float
    wsa: float
    lwl: float
    bwl: float

    def to_dict(self) -> dict[str, float]:
        """Plain dict with the API attribute names (and ``density``)."""
        return asdict(self)


def check_density(density: float) -> float:
    rho = float(density)
    if not math.isfinite(rho) or rho <= 0:
        raise InputError(f"water density must be a positive number of t/m³, got {density!r}")
    if rho > 2.0:
        raise InputError(f"water density {rho} t/m³ is implausible (sea water is {SEA_WATER} t/m³; is it in kg/m³?)")
    return rho


def draft_normal(heel: float, trim: float) -> np.ndarray:
    """The waterplane normal (3,) at heel and trim [deg], or InputError where a draft T (along hull z)
    cannot fix the waterplane (the hull z axis lies in it: heel or trim of 90°)."""
    n = up_vector(heel, trim)
    if abs(n[2]) < tol.DRAFT_DEFINED:
        raise InputError(f"a draft does not fix the waterplane at heel {heel:g}°, trim {trim:g}°: the hull z axis "
                         f"lies in the waterplane there (draft T is measured along it)")
    return n


def _no_waterplane(prep: kernel.Prepared, n: np.ndarray, volume: float, draft: float, heel: float,
                   trim: float) -> CannotFloatError:
    """The error for a draft where the plane misses the hull: nothing, or everything, under water."""
    s = prep.vertices @ n
    lowest, highest = float(s.min() + prep.origin @ n), float(s.max() + prep.origin @ n)
    if volume <= 0.0:
        return CannotFloatError(
            f"nothing is submerged at draft {draft:.4f} m (heel {heel:g}°, trim {trim:g}°): "
            f"the waterplane is at or below the lowest point of the hull (level {lowest:.4f} m)")
    return CannotFloatError(
        f"the hull is fully submerged at draft {draft:.4f} m (no waterplane): the waterplane is at or above "
        f"the highest point of the hull (level {highest:.4f} m); hydrostatic particulars "
        f"of a waterplane do not exist there (a submerged body's values come from the submergence sequence)")


def compute(
    prep: kernel.Prepared,
    draft: float,
    *,
    heel: float = 0.0,
    trim: float = 0.0,
    density: float = SEA_WATER,
    x_ref: float,
) -> Hydrostatics:
    """Hydrostatics of a prepared mesh at ``draft`` [m] with heel and trim [deg].

    The waterplane passes through ``(x_ref, 0, draft)`` with normal
    :func:`meshhydro.frames.up_vector` (heel, trim).

    Raises
    ------
    CannotFloatError
        Nothing is submerged at that draft.
    OpenRimError
        The waterplane reaches an open rim.
    """
    for name, val in (("draft", draft), ("heel", heel), ("trim", trim)):
        if not math.isfinite(float(val)):
            raise InputError(f"{name} must be a finite number, got {val!r}")
    rho = check_density(density)
    n = draft_normal(heel, trim)
    p = np.array([x_ref, 0.0, float(draft)])
    c = kernel.cut(prep, p, n)
    if c.volume <= 0.0 or c.waterplane_area <= 0.0:
        raise _no_waterplane(prep, n, c.volume, draft, heel, trim)
    v = c.volume
    d = float(n @ p)
    t_i = d - float((prep.vertices @ n).min() + prep.origin @ n)
    x_mid = 0.5 * (c.waterline_x[0] + c.waterline_x[1])
    am, _ = kernel.section_area(prep, x_mid, p, n)
    lwl, bwl = c.waterline_length, c.waterline_breadth
    disp = rho * v
    bmt = c.inertia_t / v
    bml = c.inertia_l / v

    def ratio(a: float, b: float) -> float:
        return a / b if b > 0 else 0.0

    return Hydrostatics(
        draft=float(draft),
        heel=float(heel),
        trim=float(trim),
        density=rho,
        volume=v,
        displacement=disp,
        lcb=float(c.centroid[0]),
        tcb=float(c.centroid[1]),
        vcb=float(c.centroid[2]),
        awp=c.waterplane_area,
        lcf=float(c.waterplane_centroid[0]),
        tcf=float(c.waterplane_centroid[1]),
        tpc=c.waterplane_area * rho / 100.0,
        mct=ratio(disp * bml, 100.0 * lwl),
        bmt=bmt,
        bml=bml,
        kmt=float(c.centroid[2]) + bmt,
        kml=float(c.centroid[2]) + bml,
        cb=ratio(v, lwl * bwl * t_i),
        cp=ratio(v, am * lwl),
        cm=ratio(am, bwl * t_i),
        cwp=ratio(c.waterplane_area, lwl * bwl),
        wsa=c.wetted_area,
        lwl=lwl,
        bwl=bwl,
    )
