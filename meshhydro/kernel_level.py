"""Lean cuts for a level search: many parallel planes through one small mesh.

A level solve (:func:`meshhydro.tanks.solve_level`) cuts one closed mesh with a series of
parallel planes and needs only the volume and the waterplane area below each, until the
last plane, whose whole :class:`~meshhydro.kernel.Cut` it keeps. For small meshes the
fixed cost of :func:`meshhydro.kernel.cut` (normalising the normal, the in-plane axes,
assembling every property) outweighs the compiled pass itself, so :class:`PlaneFamily`
normalises the normal and builds the axes once, and :meth:`PlaneFamily.probe` runs the
same pass and forms the volume and area with the same arithmetic as ``kernel.cut``; the
whole cut of a probe is finished from the same pass on demand. Every number of a probe equals
that of ``kernel.cut(prep, point, normal)`` bit for bit; planes through faces of the mesh and
the numpy backend take the full path at once.

:meth:`PlaneFamily.search` and :class:`LevelSet` run the whole level search compiled; they form
the plane's offset by explicit products rather than numpy's dot, so their numbers equal the
plane-by-plane search's to rounding (measured within 1.3e-15 relative), not bit for bit.
"""
from __future__ import annotations

from typing import Sequence

import numpy as np

from . import kernel, kernel_compiled
from .kernel_clip import plane_axes
from .errors import InputError
from .kernel_prep import ROUNDING

__all__ = ["Level", "LevelSet", "PlaneFamily", "Probe", "family_axes"]


class Level:
    """The fluid part of a cut: the :class:`~meshhydro.kernel.Cut` fields a level solve keeps
    (same names, units and frames; equal to them bit for bit)."""

    __slots__ = ("volume", "centroid", "waterplane_area", "waterplane_centroid", "axis_u", "axis_v",
                 "inertia_t", "inertia_l", "inertia_uv")

    def __init__(self, volume: float, centroid: np.ndarray, waterplane_area: float,
                 waterplane_centroid: np.ndarray, axis_u: np.ndarray, axis_v: np.ndarray,
                 inertia_t: float, inertia_l: float, inertia_uv: float) -> None:
        self.volume, self.centroid, self.waterplane_area = volume, centroid, waterplane_area
        self.waterplane_centroid, self.axis_u, self.axis_v = waterplane_centroid, axis_u, axis_v
        self.inertia_t, self.inertia_l, self.inertia_uv = inertia_t, inertia_l, inertia_uv


class Probe:
    """Volume [m³] and waterplane area [m²] below one plane of a :class:`PlaneFamily`.

    ``volume`` and ``waterplane_area`` equal the :class:`~meshhydro.kernel.Cut` fields of
    the same plane; :meth:`PlaneFamily.cut` gives that whole cut.
    """

    __slots__ = ("volume", "waterplane_area", "_pass", "_cut")

    def __init__(self, volume: float, waterplane_area: float, pass_: tuple | None,
                 cut: kernel.Cut | None) -> None:
        self.volume = volume
        self.waterplane_area = waterplane_area
        self._pass = pass_
        self._cut = cut


def family_axes(normal: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(unit normal, u, v) of the planes with ``normal``: normalised and with in-plane axes exactly as
    :func:`kernel.cut` forms them."""
    n = kernel.unit_normal(normal)
    u, v = plane_axes(n)
    return n, u, v


class PlaneFamily:
    """Planes with one normal through one prepared mesh (hull frame, m).

    Parameters
    ----------
    prep : kernel.Prepared
    normal : (3,) float64
        Upward normal, normalised here exactly as :func:`kernel.cut` does.
    backend : {"compiled", "numpy"}, optional
        As in :func:`kernel.cut`; the numpy pass always takes the full cut.
    axes : (unit normal, u, v), optional
        :func:`family_axes` of ``normal``, when several meshes are cut at one attitude.
    """

    def __init__(self, prep: kernel.Prepared, normal: np.ndarray, *, backend: str | None = None,
                 axes: tuple[np.ndarray, np.ndarray, np.ndarray] | None = None) -> None:
        self.prep = prep
        self.given = np.asarray(normal, dtype=np.float64)
        self.normal, self.u, self.v = family_axes(normal) if axes is None else axes
        self.backend = backend
        self.lean = kernel.resolve_backend(backend) == "compiled"
        self._tol = 1e-12 * max(prep.size, 1.0) ** 3
        self._blocks = (prep.group_center, prep.group_half, prep.group_sums, prep.leaf_center, prep.leaf_half,
                        prep.leaf_sums, prep.data, prep.face_index, prep.group_size)

    def probe(self, point: np.ndarray) -> Probe:
        """Volume and waterplane area below the plane through ``point`` (3,) [m, hull frame].

        Raises :class:`~meshhydro.errors.OpenRimError` as :func:`kernel.cut` does.
        """
        prep, n = self.prep, self.normal
        if not self.lean:
            c = kernel.cut(prep, point, self.given, backend=self.backend)
            return Probe(c.volume, c.waterplane_area, None, c)
        p_hull = np.asarray(point, dtype=np.float64)
        d = float(n @ (p_hull - prep.origin))
        kernel.check_rim(prep, n, d)
        o = d * n
        # the compiled pass exactly as kernel_compiled.sweep calls it (cull, no segments)
        sums, green, ext, _, _, nseg, flat = kernel_compiled._sweep(
            *self._blocks, n, d, prep.rounding(d), True, o, self.u, self.v, False)
        r = kernel_compiled.PassResult(sums, green, ext, int(nseg), None, None, flat)
        if len(flat):  # faces lie in the plane: finish the whole cut now
            c = kernel.finish_compiled(prep, p_hull, n, d, self.u, self.v, o, r, False)
            return Probe(c.volume, c.waterplane_area, None, c)
        return self._probe(sums, green, (p_hull, d, o, r))

    def _probe(self, sums: np.ndarray, green: np.ndarray, pass_: tuple) -> Probe:
        """The probe of a compiled pass's sums and moments, its volume formed as in kernel._finish (a plane
        without faces lying in it); ``pass_`` (point, d, o, the pass) finishes its fields on demand."""
        a_in = float(green[0])
        vol = kernel.cap_volume(float(sums[0]), a_in, pass_[1], self._tol)
        return Probe(float(vol), a_in if a_in > 0.0 else 0.0, pass_, None)

    def search(self, volume: float, capacity: float, s: float, a: float, b: float, tol: float,
               max_cuts: int) -> tuple[Probe, int] | None:
        """The level search of :func:`meshhydro.tanks.level_probe` run as one compiled loop: planes
        through ``origin + s given`` from ``s`` in the bracket (a, b), until the volume below is
        within ``tol`` [m³] of ``volume``. Returns (the probe of that plane, cuts taken), or None
        where the loop cannot answer (the numpy backend, a plane lying on faces of the mesh, no
        convergence in ``max_cuts``): the caller then searches plane by plane."""
        if not self.lean or len(self.prep.rim):
            return None
        prep = self.prep
        k, s, d, sums, green = kernel_compiled._level_search(
            *self._blocks, self.normal, self.given, self.u, self.v, prep.origin,
            prep.coord_bound, ROUNDING, float(volume), float(capacity), float(s), float(a), float(b), float(tol),
            self._tol, int(max_cuts))
        if k <= 0:
            return None
        p_hull = prep.origin + s * self.given
        # the loop keeps the sums and moments of its last plane, not its extents: cut() sweeps it again
        return self._probe(sums, green, (p_hull, d, d * self.normal, (sums, green))), int(k)

    def level(self, probe: Probe) -> "Level | kernel.Cut":
        """The fluid fields of a probe (a :class:`Level`, or the whole cut where it is at hand),
        formed as in ``kernel._finish`` (a plane without faces lying in it)."""
        if probe._cut is not None:
            return probe._cut
        p_hull, d, o, r = probe._pass
        ol, ul, vl, org = o.tolist(), self.u.tolist(), self.v.tolist(), self.prep.origin.tolist()
        sums, green = (r.sums, r.green) if isinstance(r, kernel_compiled.PassResult) else r
        g = green.tolist()
        vol, centroid = kernel.volume_centroid(sums.tolist(), g[:3], d, self._tol, ol, ul, vl, org, p_hull)
        a, c_wp, i_l, i_t, i_uv = kernel.waterplane_fields(g, ol, ul, vl, org, p_hull)
        return Level(vol, centroid, a, c_wp, self.u, self.v, i_t, i_l, i_uv)

    def cut(self, probe: Probe) -> kernel.Cut:
        """The whole :class:`~meshhydro.kernel.Cut` of a probe of this family."""
        if probe._cut is None:
            p_hull, d, o, r = probe._pass
            if not isinstance(r, kernel_compiled.PassResult):  # from search(): the plane's whole pass again
                r = kernel_compiled.sweep(self.prep, self.normal, d, o, self.u, self.v)
            probe._cut = kernel.finish_compiled(self.prep, p_hull, self.normal, d, self.u, self.v, o, r, False)
        return probe._cut


class LevelSet:
    """Several closed meshes (a condition's slack tanks) levelled at one attitude in one compiled call.

    Their blocks are concatenated once; :meth:`levels` runs the level search of
    :meth:`PlaneFamily.search` for every mesh and forms each fluid's fields as ``kernel._finish``
    does. ``usable`` is False where that cannot be done (the numpy backend, an open mesh, meshes
    prepared with different block sizes): the caller then levels mesh by mesh.
    """

    def __init__(self, preps: Sequence[kernel.Prepared]) -> None:
        self.preps = tuple(preps)
        self.usable = bool(self.preps) and kernel.resolve_backend(None) == "compiled" and all(
            len(p.rim) == 0 and p.group_size == self.preps[0].group_size and p.data.shape[1:] ==
            self.preps[0].data.shape[1:] for p in self.preps)
        if not self.usable:
            return
        ps = self.preps
        cat = np.concatenate
        self._arrays = (cat([p.group_center for p in ps]), cat([p.group_half for p in ps]),
                        cat([p.group_sums for p in ps]), cat([p.leaf_center for p in ps]),
                        cat([p.leaf_half for p in ps]), cat([p.leaf_sums for p in ps]), cat([p.data for p in ps]),
                        cat([p.face_index for p in ps]))
        self._g_off = np.cumsum([0] + [len(p.group_center) for p in ps]).astype(np.int64)
        self._l_off = np.cumsum([0] + [len(p.leaf_center) for p in ps]).astype(np.int64)
        self.origins = np.array([p.origin for p in ps])  # (m, 3) [m]
        self._bounds = np.array([p.coord_bound for p in ps])
        self._floors = np.array([1e-12 * max(p.size, 1.0) ** 3 for p in ps])
        self._verts = cat([p.vertices for p in ps])  # centred, per mesh
        self._v_off = np.cumsum([0] + [len(p.vertices) for p in ps])[:-1]

    def _check_usable(self) -> None:
        if not self.usable:
            raise InputError("these meshes cannot be levelled together (numpy backend, an open mesh or unlike "
                             "block sizes): level them one by one")

    def extents(self, up: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Least and greatest ``up . x`` (m,) [m] over each mesh's vertices (centred frames)."""
        self._check_usable()
        s = self._verts @ up
        return np.minimum.reduceat(s, self._v_off), np.maximum.reduceat(s, self._v_off)

    def levels(self, axes: tuple[np.ndarray, np.ndarray, np.ndarray], up: np.ndarray, volumes: np.ndarray,
               caps: np.ndarray, s0: np.ndarray, lo: np.ndarray, hi: np.ndarray, tols: np.ndarray,
               max_cuts: int) -> dict[str, np.ndarray]:
        """Level every mesh at the vertical ``up`` (axes from :func:`family_axes`): planes through
        ``origin + s up`` from ``s0`` in (lo, hi) until the volume below is within ``tols`` [m³] of
        ``volumes``. Returns arrays per mesh: ``cuts`` (int; 0 or negative where the mesh must be
        levelled alone), ``volume``, ``centroid`` (m, 3), ``waterplane_area``, ``waterplane_centroid``
        (m, 3), ``inertia_t``, ``inertia_l``, ``inertia_uv`` (hull frame, SI)."""
        self._check_usable()
        n, u, v = axes
        ks, vol, centroid, area, c_wp, inert = kernel_compiled._level_set(
            *self._arrays, self._g_off, self._l_off, self.preps[0].group_size, self.origins, self._bounds,
            self._floors, n, up, u, v, ROUNDING, volumes, caps, s0, lo, hi, tols, int(max_cuts))
        return {"cuts": ks, "volume": vol, "centroid": centroid, "waterplane_area": area,
                "waterplane_centroid": c_wp, "inertia_l": inert[:, 0], "inertia_t": inert[:, 1],
                "inertia_uv": inert[:, 2]}
