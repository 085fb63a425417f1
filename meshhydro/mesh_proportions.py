"""Plausibility of a mesh's size and proportions: a unit mistake is refused, unusual axes are hinted.

A hull far too long or too short for its unit is a problem (the health check refuses it); a hull whose
proportions suggest its file used other axes than x forward, z up (a Y-up export, another forward axis)
gets a warning that names the option to read it with, since such a mesh is valid and would pass.
"""
from __future__ import annotations

import numpy as np

#: A hull larger than this in its longest extent [m] is taken as a unit mistake.
MAX_PLAUSIBLE_LENGTH = 1000.0
#: A hull smaller than this in its longest extent [m] is taken as a unit mistake (a 5 cm model is the least
#: we accept; common practice: towing-tank and radio-controlled models are larger).
MIN_PLAUSIBLE_LENGTH = 0.05


def scale_findings(src: str, size: float, units: str) -> tuple[list[str], list[str]]:
    """(problems, warnings) for a hull of largest extent ``size`` [m] read in ``units``."""
    if size > MAX_PLAUSIBLE_LENGTH:
        return [f"{src}: the hull is {size:.6g} m long in unit {units!r}; that looks like a unit "
                f"mistake (try --units mm)"], []
    if size < MIN_PLAUSIBLE_LENGTH:
        return [f"{src}: the hull is only {size:.4g} m long in unit {units!r}; that looks like a unit "
                f"mistake (try --units m)"], []
    return [], []


#: a hull's height over its breadth above which the axes are queried (a Y-up export read as Z-up stands
#: the hull on its side: height/breadth becomes breadth/depth, typically 2-4; deep-keeled monohulls reach
#: about 1.2-1.4; common practice)
TALL_RATIO = 1.5
#: an extent across or up over the length above which the forward axis is queried (common practice)
SHORT_RATIO = 1.2


def axis_findings(extent: np.ndarray) -> list[str]:
    """Hints (warnings) when the hull's proportions suggest its file used other axes than x forward, z up."""
    ex, ey, ez = (float(e) for e in extent)
    notes = []
    if not (ex > 0.0 and ey > 0.0):  # a flat or degenerate mesh: its proportions say nothing about axes
        return notes
    if max(ey, ez) > SHORT_RATIO * ex:
        axis, e = ("y", ey) if ey >= ez else ("z", ez)
        notes.append(f"the longest extent is along {axis} ({e:.4g} m; x only {ex:.4g} m): if x is not forward "
                     f"in the file, read it with --forward (case files: [hull] forward)")
    if ez > TALL_RATIO * ey:
        notes.append(f"the hull is {ez / ey:.2g} times as tall as it is wide (z {ez:.4g} m, y {ey:.4g} m): if the "
                     f"file is Y-up, as many CAD and scan exports are, read it with --up +y (case files: [hull] up)")
    return notes
