"""Frames, units and sign conventions: written once, used everywhere.

Hull frame
    Right-handed, metres: **x forward, y to port, z up**. The baseline is z = 0 of
    the hull frame; drafts, KB, KM and KG are heights above it.

Heel ``phi`` (degrees)
    Rotation of the hull about its own x axis. **Positive heel = starboard side down**
    (a right-handed rotation about +x lifts port, y, towards z).

Trim ``theta`` (degrees)
    Inclination of the hull's x axis below the earth horizontal. **Positive trim =
    bow down** (trim by the head), a right-handed rotation about the transverse axis.

Waterplane
    With heel applied first (about the hull x axis) and trim second (about the earth
    horizontal transverse axis), the earth's upward vertical seen in the hull frame is::

        up(phi, theta) = (-sin theta, sin phi cos theta, cos phi cos theta)

    The waterplane is the plane with normal ``up`` through the draft reference point
    ``(x_ref, 0, T)``: T is the draft measured along the hull's z axis on the
    centreline at x_ref (by default the middle of the hull's length). Water lies on
    the side opposite the normal. This parametrisation has no singularity at 90° heel.

Levers
    The earth-horizontal transverse direction in the hull frame is
    ``(0, cos phi, -sin phi)`` (for any trim). The righting lever is
    ``GZ = (G - B) . (0, cos phi, -sin phi)``: positive when the couple of weight and
    buoyancy turns the hull back towards upright from a positive heel. KN is the same
    lever taken about K = (x, 0, 0): ``KN = -B . (0, cos phi, -sin phi)``, so that
    ``GZ = KN - KG sin phi + TCG cos phi``.

Units
    SI: lengths in m, masses in t, densities in t/m³, areas m², volumes m³,
    moments of mass t·m, angles in degrees in the API and CLI (radians only inside
    integrals such as the area under a GZ curve, m·rad).
"""
from __future__ import annotations

import math

import numpy as np

from .errors import InputError

#: Density of sea water [t/m³], the standard value in stability practice.
SEA_WATER = 1.025
#: Density of fresh water [t/m³].
FRESH_WATER = 1.000

#: Length units accepted for mesh files, as metres per unit.
UNITS: dict[str, float] = {
    "m": 1.0,
    "mm": 1.0e-3,
    "cm": 1.0e-2,
    "ft": 0.3048,
    "in": 0.0254,
}

_AXES = {"x": 0, "y": 1, "z": 2}


def unit_scale(units: str) -> float:
    """Metres per file unit for ``units`` (one of m, mm, cm, ft, in)."""
    try:
        return UNITS[units.strip().lower()]
    except (KeyError, AttributeError):
        raise InputError(
            f"unknown length unit {units!r}: use one of {', '.join(UNITS)}"
        ) from None


def parse_axis(spec: str, what: str) -> np.ndarray:
    """Parse an axis name such as ``'+x'``, ``'-y'``, ``'z'`` into a unit vector (3,).

    Parameters
    ----------
    spec : str
        Sign (optional, ``+`` or ``-``) followed by ``x``, ``y`` or ``z``, meaning a
        direction in the *file's* coordinates.
    what : str
        Name of the option, used in the error message.
    """
    s = str(spec).strip().lower()
    sign = 1.0
    if s[:1] in "+-" and len(s) == 2:
        sign = -1.0 if s[0] == "-" else 1.0
        s = s[1:]
    if s not in _AXES:
        raise InputError(f"{what}: {spec!r} is not an axis; use +x, -x, +y, -y, +z or -z")
    v = np.zeros(3)
    v[_AXES[s]] = sign
    return v


def axis_matrix(forward: str = "+x", up: str = "+z") -> np.ndarray:
    """Rotation (3, 3) taking file coordinates to the hull frame.

    ``forward`` and ``up`` name the file axes that point forward and up; port is
    ``up x forward`` so that the hull frame stays right-handed.
    """
    f = parse_axis(forward, "forward axis")
    u = parse_axis(up, "up axis")
    if abs(float(f @ u)) > 0.5:
        raise InputError(f"forward axis {forward!r} and up axis {up!r} must differ")
    p = np.cross(u, f)
    # rows: hull x, y, z expressed in file coordinates
    return np.vstack([f, p, u])


def up_vector(heel: float, trim: float) -> np.ndarray:
    """Earth's upward vertical in the hull frame, (3,), for heel and trim in degrees."""
    ph = math.radians(heel)
    th = math.radians(trim)
    return np.array(
        [-math.sin(th), math.sin(ph) * math.cos(th), math.cos(ph) * math.cos(th)]
    )


def up_derivatives(heel: float, trim: float) -> tuple[np.ndarray, np.ndarray]:
    """Partial derivatives of :func:`up_vector` per radian of heel and of trim, each (3,)."""
    ph = math.radians(heel)
    th = math.radians(trim)
    d_phi = np.array([0.0, math.cos(ph) * math.cos(th), -math.sin(ph) * math.cos(th)])
    d_theta = np.array(
        [-math.cos(th), -math.sin(ph) * math.sin(th), -math.cos(ph) * math.sin(th)]
    )
    return d_phi, d_theta


def transverse_direction(heel: float) -> np.ndarray:
    """Earth-horizontal transverse direction (3,) in the hull frame at ``heel`` degrees."""
    ph = math.radians(heel)
    return np.array([0.0, math.cos(ph), -math.sin(ph)])


def longitudinal_direction(heel: float, trim: float) -> np.ndarray:
    """Earth-horizontal direction (3,) pointing forward, in the hull frame."""
    ph = math.radians(heel)
    th = math.radians(trim)
    return np.array([math.cos(th), math.sin(ph) * math.sin(th), math.cos(ph) * math.sin(th)])


def hull_to_earth(heel: float, trim: float) -> np.ndarray:
    """Rotation (3, 3) taking hull-frame vectors to an earth frame (x forward-horizontal, z up)."""
    ph = math.radians(heel)
    th = math.radians(trim)
    rx = np.array([[1, 0, 0], [0, math.cos(ph), -math.sin(ph)], [0, math.sin(ph), math.cos(ph)]])
    ry = np.array([[math.cos(th), 0, math.sin(th)], [0, 1, 0], [-math.sin(th), 0, math.cos(th)]])
    return ry @ rx
