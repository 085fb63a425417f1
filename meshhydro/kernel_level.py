"""Lean cuts for a level search: many parallel planes through one small mesh.

A level solve (:func:`meshhydro.tanks.solve_level`) cuts one closed mesh with a series of
parallel planes and needs only the volume and the waterplane area below each, until the
last plane, whose whole :class:`~meshhydro.kernel.Cut` it keeps. For small meshes the
fixed cost of :func:`meshhydro.kernel.cut` (normalising the normal, the in-plane axes,
assembling every property) outweighs the compiled pass itself, so :class:`PlaneFamily`
normalises the normal and builds the axes once, and :meth:`PlaneFamily.probe` runs the
same pass and forms the volume and area with the same arithmetic as ``kernel.cut``; the
whole cut of a probe is finished from the same pass on demand. Every number equals that
of ``kernel.cut(prep, point, normal)`` bit for bit; planes through faces of the mesh and
the numpy backend take the full path at once.
"""
from __future__ import annotations

import numpy as np

from . import kernel, kernel_compiled
from .kernel_clip import plane_axes

__all__ = ["Level", "PlaneFamily", "Probe"]


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


class PlaneFamily:
    """Planes with one normal through one prepared mesh (hull frame, m).

    Parameters
    ----------
    prep : kernel.Prepared
    normal : (3,) float64
        Upward normal, normalised here exactly as :func:`kernel.cut` does.
    backend : {"compiled", "numpy"}, optional
        As in :func:`kernel.cut`; the numpy pass always takes the full cut.
    """

    def __init__(self, prep: kernel.Prepared, normal: np.ndarray, *, backend: str | None = None) -> None:
        self.prep = prep
        self.given = normal
        self.normal = kernel.unit_normal(normal)
        self.u, self.v = plane_axes(self.normal)
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
        # as in kernel._finish without faces in the plane
        a_in = float(green[0])
        vol = float(sums[0]) / 6.0 + a_in * d / 3.0
        if not vol > self._tol:
            vol = max(vol, 0.0)
        return Probe(float(vol), a_in if a_in > 0.0 else 0.0, (p_hull, d, o, r), None)

    def level(self, probe: Probe) -> "Level | kernel.Cut":
        """The fluid fields of a probe (a :class:`Level`, or the whole cut where it is at hand),
        formed as in ``kernel._finish`` (a plane without faces lying in it)."""
        if probe._cut is not None:
            return probe._cut
        p_hull, d, o, r = probe._pass
        u, v, org = self.u.tolist(), self.v.tolist(), self.prep.origin.tolist()
        oo = o.tolist()
        _, s1, s2, s3, _ = r.sums.tolist()
        a, su, sv, suu, svv, suv = r.green.tolist()
        vol = probe.volume
        # per element, the same operations in the same order as kernel._finish's array expressions
        if vol > self._tol:
            centroid = np.array([(sm / 24.0 + d * (a * oi + su * ui + sv * vi) / 4.0) / vol + ci
                                 for sm, oi, ui, vi, ci in zip((s1, s2, s3), oo, u, v, org)])
        else:
            centroid = p_hull.copy()
        if a > 0.0:
            cu, cv = su / a, sv / a
            c_wp = np.array([oi + cu * ui + cv * vi + ci for oi, ui, vi, ci in zip(oo, u, v, org)])
            i_l, i_t, i_uv = suu - a * cu * cu, svv - a * cv * cv, suv - a * cu * cv
        else:
            a, c_wp, i_l, i_t, i_uv = 0.0, p_hull.copy(), 0.0, 0.0, 0.0
        return Level(vol, centroid, a, c_wp, self.u, self.v, i_t, i_l, i_uv)

    def cut(self, probe: Probe) -> kernel.Cut:
        """The whole :class:`~meshhydro.kernel.Cut` of a probe of this family."""
        if probe._cut is None:
            p_hull, d, o, r = probe._pass
            probe._cut = kernel.finish_compiled(self.prep, p_hull, self.normal, d, self.u, self.v, o, r, False)
        return probe._cut
