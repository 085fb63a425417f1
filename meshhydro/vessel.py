"""The hull users hold: geometry (:class:`meshhydro.hull.Hull`) plus floating and stability methods.

It sits above the solver, equilibrium and stability and forwards to them, so nothing below
imports it. :func:`load_hull` builds one from a mesh file.
"""
from __future__ import annotations

import math
from typing import Any, Sequence

from .equilibrium import Equilibrium, draft_for_volume, solve
from .errors import InputError, InvalidMeshError
from .frames import SEA_WATER
from .hull import Hull, vec3
from .mesh import check_mesh
from .stability import RightingCurve, righting_curve


class FloatingHull(Hull):
    """A :class:`~meshhydro.hull.Hull` that also floats: equilibrium and righting curves."""

    def draft_for_volume(self, volume: float, heel: float = 0.0, trim: float = 0.0) -> float:
        """Draft [m] at which the submerged volume equals ``volume`` [m³] (fixed attitude)."""
        return draft_for_volume(self, volume, heel=heel, trim=trim)

    def equilibrium(self, displacement: float, cog: Sequence[float], density: float = SEA_WATER,
                    **options: Any) -> Equilibrium:
        """Free-floating position for a load: see :func:`meshhydro.equilibrium.solve`."""
        return solve(self, displacement=displacement, cog=vec3(cog, "cog"), density=density, **options)

    def righting_curve(self, displacement: float, cog: Sequence[float], heels: Sequence[float] | None = None,
                       free_trim: bool = True, density: float = SEA_WATER, **options: Any) -> RightingCurve:
        """Righting-lever curve: see :func:`meshhydro.stability.righting_curve`."""
        return righting_curve(self, displacement=displacement, cog=vec3(cog, "cog"), heels=heels,
                              free_trim=free_trim, density=density, **options)


def load_hull(source: Any, units: str = "m", *, forward: str = "+x", up: str = "+z",
              offset: Sequence[float] = (0.0, 0.0, 0.0), flip_inside_out: bool = False,
              merge_overlaps: bool = False, name: str | None = None, x_ref: float | None = None,
              x_aft: float | None = None, x_fore: float | None = None, close_holes: bool = False,
              progress: Any = None) -> FloatingHull:
    """Load and check a hull mesh; raise if it cannot be used.

    Parameters
    ----------
    source : path or trimesh.Trimesh
        STL, OBJ, PLY, OFF, GLB or anything trimesh reads.
    units : str
        m, mm, cm, ft or in.
    forward, up : str
        File axes pointing forward and up, e.g. ``up='+y'`` for a Y-up export.
    offset : (3,) [m]
        Added to hull-frame coordinates after scaling and rotation.
    flip_inside_out, merge_overlaps, close_holes : bool
        Explicit repairs; nothing is repaired otherwise.
    name : str, optional
    x_ref : float, optional [m]
        x of the draft reference point; default the middle of the hull's length.
    x_aft, x_fore : float, optional [m]
        x of the aft and fore perpendiculars or draft marks where drafts aft and fore are read;
        default the hull's ends.
    progress : callable(stage, done, total), optional
        Called as reading and checking advance (see :func:`meshhydro.mesh.check_mesh`).

    Raises
    ------
    InputError, InvalidMeshError
    """
    md, rep = check_mesh(source, units=units, forward=forward, up=up, offset=tuple(offset),
                         flip_inside_out=flip_inside_out, merge_overlaps=merge_overlaps, close_holes=close_holes,
                         progress=progress)
    if not rep.usable:
        n = len(rep.problems) - 1
        more = f" (and {n} more problems; see the mesh health report)" if n else ""
        raise InvalidMeshError(rep.problems[0] + more)
    if x_ref is not None and not math.isfinite(float(x_ref)):
        raise InputError(f"x_ref must be finite, got {x_ref!r}")
    return FloatingHull(md, rep, name=name, x_ref=x_ref, x_aft=x_aft, x_fore=x_fore)
