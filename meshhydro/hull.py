"""The thin object: a checked hull mesh with its cached products, forwarding to the kernels."""
from __future__ import annotations

import math
from functools import cached_property
from typing import Any, Sequence

import numpy as np

from . import hydrostatics as _hs
from . import kernel
from .errors import InputError, InvalidMeshError
from .frames import SEA_WATER, up_vector
from .mesh import HealthReport, MeshData, check_mesh


def _vec3(value: Any, name: str) -> np.ndarray:
    try:
        a = np.asarray(value, dtype=float).reshape(-1)
    except (TypeError, ValueError):
        raise InputError(f"{name} must be three numbers, got {value!r}") from None
    if a.shape != (3,) or not np.all(np.isfinite(a)):
        raise InputError(f"{name} must be three finite numbers, got {value!r}")
    return a


class Hull:
    """A usable hull: vertices and faces in the hull frame plus cached kernel products.

    Build it with :func:`load_hull`. Coordinates are metres in the hull frame
    (x forward, y to port, z up); angles are degrees (see :mod:`meshhydro.frames`).

    Attributes
    ----------
    vertices : (n, 3) float64 [m]
    faces : (m, 3) int64
    report : HealthReport
    name : str
    x_ref : float [m]
        Longitudinal position of the draft reference point ``(x_ref, 0, T)``.
    """

    def __init__(self, mesh: MeshData, report: HealthReport, *, name: str | None = None,
                 x_ref: float | None = None) -> None:
        if not report.usable:
            raise InvalidMeshError(report.problems[0])
        self.vertices = mesh.vertices
        self.faces = mesh.faces
        self.report = report
        self.name = name or mesh.source
        lo, hi = np.asarray(report.bounds[0]), np.asarray(report.bounds[1])
        self.bounds = (lo, hi)
        self.x_ref = float(0.5 * (lo[0] + hi[0]) if x_ref is None else x_ref)
        rim_vertices = self._rim_vertices()
        self._prep = kernel.prepare(self.vertices, self.faces, rim_vertices=rim_vertices)
        #: volume [m³] and centroid (3,) of the whole mesh; meaningful only when the mesh is closed
        self.total_volume, self.total_centroid = kernel.total_volume(self._prep)

    def _rim_vertices(self) -> np.ndarray:
        if self.report.closed:
            return np.zeros(0, dtype=np.int64)
        from .mesh import _edges

        e = _edges(self.faces)
        b = (e["n_tot"] == 1) | (e["n_fwd"] != e["n_tot"] - e["n_fwd"])
        return np.unique(np.concatenate([e["lo"][b], e["hi"][b]]))

    # ---------------------------------------------------------------- geometry
    @property
    def length(self) -> float:
        """Overall length of the mesh along x [m]."""
        return float(self.bounds[1][0] - self.bounds[0][0])

    @property
    def breadth(self) -> float:
        """Overall breadth along y [m]."""
        return float(self.bounds[1][1] - self.bounds[0][1])

    @property
    def depth(self) -> float:
        """Overall height along z [m]."""
        return float(self.bounds[1][2] - self.bounds[0][2])

    @property
    def size(self) -> float:
        return float(max(self.length, self.breadth, self.depth))

    @cached_property
    def is_symmetric(self) -> bool:
        """True when the mesh is its own mirror image in y (to 1e-6 of its size)."""
        from scipy.spatial import cKDTree

        v = self.vertices
        d, _ = cKDTree(v).query(v * np.array([1.0, -1.0, 1.0]), k=1)
        return bool(np.max(d) <= 1e-6 * max(self.size, 1e-9))

    @cached_property
    def deck_edge(self) -> np.ndarray:
        """Deck-edge vertices (k, 3) [m]: see :func:`meshhydro.stability.deck_edge_points`."""
        from .stability import deck_edge_points

        return deck_edge_points(self)

    @property
    def prepared(self) -> kernel.Prepared:
        return self._prep

    def plane(self, draft: float, heel: float = 0.0, trim: float = 0.0) -> tuple[np.ndarray, np.ndarray]:
        """Point (3,) and unit normal (3,) of the waterplane at draft, heel, trim."""
        return np.array([self.x_ref, 0.0, float(draft)]), up_vector(heel, trim)

    def cut(self, point: Sequence[float] = (0.0, 0.0, 0.0), normal: Sequence[float] = (0.0, 0.0, 1.0),
            *, segments: bool = False) -> kernel.Cut:
        """Exact properties of the part of the hull below a plane.

        Parameters
        ----------
        point : (3,) [m], hull frame
            A point on the plane.
        normal : (3,), hull frame
            Upward normal; water lies on the side opposite it.
        segments : bool
            Also return the waterline segments.
        """
        p = _vec3(point, "point")
        n = _vec3(normal, "normal")
        if not np.any(n):  # kernel.cut scales before normalising
            raise InputError("normal must not be the zero vector")
        return kernel.cut(self._prep, p, n, segments=segments)

    def hydrostatics(self, draft: float, heel: float = 0.0, trim: float = 0.0,
                     density: float = SEA_WATER) -> _hs.Hydrostatics:
        """Hydrostatic particulars at ``draft`` [m], heel and trim [deg], density [t/m³]."""
        return _hs.compute(self._prep, draft, heel=heel, trim=trim, density=density, x_ref=self.x_ref)

    def table(self, drafts: Sequence[float], heel: float = 0.0, trim: float = 0.0,
              density: float = SEA_WATER) -> list[_hs.Hydrostatics]:
        """Hydrostatics at each draft of ``drafts`` [m]."""
        return [self.hydrostatics(float(t), heel, trim, density) for t in drafts]

    def draft_for_volume(self, volume: float, heel: float = 0.0, trim: float = 0.0) -> float:
        """Draft [m] at which the submerged volume equals ``volume`` [m³] (fixed attitude)."""
        from .equilibrium import draft_for_volume

        return draft_for_volume(self, volume, heel=heel, trim=trim)

    # ---------------------------------------------------------------- stability (forwarded)
    def equilibrium(self, displacement: float, cog: Sequence[float], density: float = SEA_WATER,
                    **options: Any):
        """Free-floating position for a load: see :func:`meshhydro.equilibrium.solve`."""
        from .equilibrium import solve

        return solve(self, displacement=displacement, cog=_vec3(cog, "cog"), density=density, **options)

    def righting_curve(self, displacement: float, cog: Sequence[float], heels: Sequence[float] | None = None,
                       free_trim: bool = True, density: float = SEA_WATER, **options: Any):
        """Righting-lever curve: see :func:`meshhydro.stability.righting_curve`."""
        from .stability import righting_curve

        return righting_curve(self, displacement=displacement, cog=_vec3(cog, "cog"), heels=heels,
                              free_trim=free_trim, density=density, **options)

    def __repr__(self) -> str:
        return (f"Hull({self.name!r}, faces={len(self.faces)}, L={self.length:.3f} m, "
                f"B={self.breadth:.3f} m, D={self.depth:.3f} m)")


def load_hull(source: Any, units: str = "m", *, forward: str = "+x", up: str = "+z",
              offset: Sequence[float] = (0.0, 0.0, 0.0), flip_inside_out: bool = False,
              merge_overlaps: bool = False, name: str | None = None, x_ref: float | None = None) -> Hull:
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
    flip_inside_out, merge_overlaps : bool
        Explicit repairs; nothing is repaired otherwise.
    name : str, optional
    x_ref : float, optional [m]
        x of the draft reference point; default the middle of the hull's length.

    Raises
    ------
    InputError, InvalidMeshError
    """
    md, rep = check_mesh(source, units=units, forward=forward, up=up, offset=tuple(offset),
                         flip_inside_out=flip_inside_out, merge_overlaps=merge_overlaps)
    if not rep.usable:
        more = f" (and {len(rep.problems) - 1} more problems; run 'meshhydro check')" if len(rep.problems) > 1 else ""
        raise InvalidMeshError(rep.problems[0] + more)
    if x_ref is not None and not math.isfinite(float(x_ref)):
        raise InputError(f"x_ref must be finite, got {x_ref!r}")
    return Hull(md, rep, name=name, x_ref=x_ref)
