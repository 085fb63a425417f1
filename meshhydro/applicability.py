"""Applicability notes for the IMO 2008 IS Code criteria, in our own words.

The general criteria (Part A, 2.2) and the weather criterion (Part A, 2.3) are written for
passenger and cargo ships of 24 m in length and over, and their limits were framed with
monohulls in mind. The notes returned here tell a user when a result falls outside that
frame; they do not change any result.
"""
from __future__ import annotations

import math
from typing import Any

from .errors import InputError

#: Length [m] from which the Code's general and weather criteria apply.
MIN_LENGTH = 24.0


def applicability_notes(length: float, bodies: int, *, clauses: tuple[str, ...] = ("2.2", "2.3")) -> list[str]:
    """Notes for a hull of ``length`` [m] (the caller's choice of length, e.g. the waterline
    length) made of ``bodies`` separate closed bodies, for the given Code clauses."""
    if not (math.isfinite(float(length)) and length > 0):
        raise InputError(f"length must be a positive number, got {length!r}")
    if int(bodies) < 1:
        raise InputError(f"bodies must be at least 1, got {bodies!r}")
    which = " and ".join(clauses)
    out = []
    if length < MIN_LENGTH:
        out.append(f"shorter than 24 m ({length:.2f} m): the Code's criteria of {which} are written for ships "
                   "of 24 m and over; a flag administration may set other rules for smaller craft")
    if bodies > 1:
        out.append(f"framed for monohulls: this hull has {int(bodies)} bodies, and the limits of {which} were "
                   "not set with multihulls in mind")
    return out


def hull_applicability_notes(hull: Any, length: float | None = None) -> list[str]:
    """:func:`applicability_notes` for a loaded Hull: ``length`` [m] defaults to the mesh's
    overall length, bodies to the number the health report found."""
    return applicability_notes(hull.length if length is None else length, len(hull.report.bodies))
