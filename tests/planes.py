"""Cutting planes for invariant checks, and reference results from outside libraries.

Planes: random ones across the mesh's extent, and degenerate ones (through a vertex,
containing an edge, coplanar with a face, axis-aligned through a vertex row, at the exact
bottom and top). References: manifold3d (``trim_by_plane``, ``slice`` after a rotation)
and trimesh (``slice_plane`` with cap, ``section`` polygons measured by shapely).
"""
from __future__ import annotations

import numpy as np

from grids import grid_box

DEGENERATE_KINDS = ("vertex", "edge", "face", "axis", "extreme")


def _unit(x: np.ndarray) -> np.ndarray:
    return x / np.linalg.norm(x, axis=-1, keepdims=True)


def plane_set(v: np.ndarray, f: np.ndarray, count: int, rng: np.random.Generator,
              degenerate_share: float = 1.0 / 3.0) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Points (k, 3), unit normals (k, 3) and kinds (k,) of ``count`` planes."""
    nd = int(round(count * degenerate_share))
    nr = count - nd
    nrm = _unit(rng.normal(size=(nr, 3)))
    s = v @ nrm.T  # (n, nr)
    t = rng.uniform(0.01, 0.99, size=nr)
    depth = s.min(axis=0) + t * (s.max(axis=0) - s.min(axis=0))
    pts = [v.mean(axis=0) + (depth - v.mean(axis=0) @ nrm.T)[:, None] * nrm]
    nrms = [nrm]
    kinds = [np.full(nr, "random", dtype=object)]
    kind = rng.choice(len(DEGENERATE_KINDS), size=nd)
    for k, name in enumerate(DEGENERATE_KINDS):
        m = int(np.count_nonzero(kind == k))
        if m == 0:
            continue
        p, n = _degenerate(name, v, f, m, rng)
        pts.append(p)
        nrms.append(n)
        kinds.append(np.full(m, name, dtype=object))
    return np.concatenate(pts), np.concatenate(nrms), np.concatenate(kinds)


def _degenerate(name: str, v: np.ndarray, f: np.ndarray, m: int, rng: np.random.Generator):
    sign = rng.choice([-1.0, 1.0], size=(m, 1))
    if name == "vertex":
        return v[rng.integers(len(v), size=m)], _unit(rng.normal(size=(m, 3)))
    if name == "edge":
        tri = v[f[rng.integers(len(f), size=m)]]
        k = rng.integers(3, size=m)
        a, b = tri[np.arange(m), k], tri[np.arange(m), (k + 1) % 3]
        return a, _unit(np.cross(b - a, rng.normal(size=(m, 3))))
    if name == "face":
        tri = v[f[rng.integers(len(f), size=m)]]
        n = np.cross(tri[:, 1] - tri[:, 0], tri[:, 2] - tri[:, 0])
        ok = np.linalg.norm(n, axis=1) > 0
        n[~ok] = (0.0, 0.0, 1.0)
        return tri[:, 0], sign * _unit(n)
    if name == "axis":
        n = np.eye(3)[rng.integers(3, size=m)] * sign
        return v[rng.integers(len(v), size=m)], n
    p = np.tile(v.mean(axis=0), (m, 1))  # extreme: at the bottom or the top, either way up
    p[:, 2] = np.where(rng.random(m) < 0.5, v[:, 2].min(), v[:, 2].max())
    return p, np.tile([0.0, 0.0, 1.0], (m, 1)) * sign


def _rotation_to_z(n: np.ndarray) -> np.ndarray:
    """A rotation matrix (3, 3) taking the unit vector n to +z."""
    z = np.array([0.0, 0.0, 1.0])
    ax = np.cross(n, z)
    s = np.linalg.norm(ax)
    c = float(n @ z)
    if s < 1e-12:
        return np.eye(3) if c > 0 else np.diag([1.0, -1.0, -1.0])
    k = np.array([[0, -ax[2], ax[1]], [ax[2], 0, -ax[0]], [-ax[1], ax[0], 0]])
    return np.eye(3) + k + k @ k * ((1 - c) / s ** 2)


class ManifoldReference:
    """manifold3d results for one closed mesh (built once)."""

    def __init__(self, v: np.ndarray, f: np.ndarray) -> None:
        import manifold3d as m3d

        v = np.asarray(v, np.float64)
        # work about the middle of the bounding box (the subtraction is exact for a mesh
        # far from the origin), so manifold3d keeps its digits
        self.centre = 0.5 * (v.min(axis=0) + v.max(axis=0))
        self.solid = m3d.Manifold(m3d.Mesh64(vert_properties=v - self.centre,
                                             tri_verts=np.asarray(f, np.uint32)))
        if self.solid.status() != m3d.Error.NoError:
            raise ValueError(f"manifold3d refuses the mesh: {self.solid.status()}")

    def below(self, p: np.ndarray, n: np.ndarray) -> tuple[float, np.ndarray]:
        """Volume (manifold3d) and first moment (3,) about ``centre`` of the part with
        n . x <= n . p; the moment is the divergence-theorem sum over manifold3d's trimmed
        mesh (textbook: sum of det(a, b, c) (a + b + c) / 24)."""
        q = np.asarray(p, np.float64) - self.centre
        part = self.solid.trim_by_plane(list(-n), float(-n @ q))
        vol = float(part.volume())
        if vol <= 0.0:
            return 0.0, np.zeros(3)
        mm = part.to_mesh64()
        t = np.asarray(mm.vert_properties)[:, :3][np.asarray(mm.tri_verts)]
        c = t.reshape(-1, 3).mean(axis=0)
        a, b, cc = t[:, 0] - c, t[:, 1] - c, t[:, 2] - c
        det = np.einsum("ij,ij->i", a, np.cross(b, cc))
        return vol, det @ (a + b + cc) / 24.0 + vol * c

    def section_area(self, p: np.ndarray, n: np.ndarray, shift: float = 0.0) -> float:
        """Area of the section by the plane moved ``shift`` along n."""
        r = _rotation_to_z(n)
        rot = self.solid.transform(np.hstack([r, np.zeros((3, 1))]))
        return float(rot.slice(float(n @ (np.asarray(p, np.float64) - self.centre)) + shift).area())

    def flat_area(self, v: np.ndarray, f: np.ndarray, p: np.ndarray, n: np.ndarray, tol: float) -> float:
        """Total area (trimesh) of the faces whose corners all lie within ``tol`` of the plane."""
        import trimesh

        s = (v - p) @ n
        on = np.all(np.abs(s[f]) <= tol, axis=1)
        return float(trimesh.Trimesh(v, f[on], process=False).area) if on.any() else 0.0


def compare_planes(hull, count: int, seed: int, *, cull_share: float = 0.2) -> dict[str, tuple[float, object]]:
    """Cut ``hull`` by ``count`` planes (a third degenerate) and compare with manifold3d.

    Returns, per quantity, the worst error (relative to the total volume, to total volume
    times hull size for moments, to size² for areas) and the plane (point, normal, kind)
    where it occurred. ``cull`` compares the kernel with block culling off, on every
    degenerate plane and on a share ``cull_share`` of the random ones.
    """
    from meshhydro import kernel

    ref = ManifoldReference(hull.vertices, hull.faces)
    rng = np.random.default_rng(seed)
    P, N, K = plane_set(hull.vertices, hull.faces, count, rng)
    total, size = hull.total_volume, hull.size
    worst: dict[str, tuple[float, object]] = {k: (0.0, None) for k in ("volume", "moment", "cull", "area")}

    def note(key, value, where):
        if value > worst[key][0]:
            worst[key] = (float(value), where)

    for p, n, k in zip(P, N, K, strict=True):
        where = (p.tolist(), n.tolist(), k)
        c = kernel.cut(hull.prepared, p, n)
        vol, mom = ref.below(p, n)
        my_mom = c.volume * (c.centroid - ref.centre)
        note("volume", abs(c.volume - vol) / total, where)
        if vol > 1e-9 * total:
            note("moment", np.max(np.abs(my_mom - mom)) / (total * size), where)
        if k != "random" or rng.random() < cull_share:
            b = kernel.cut(hull.prepared, p, n, cull=False)
            note("cull", max(abs(b.volume - c.volume) / total,
                             np.max(np.abs(b.volume * (b.centroid - ref.centre) - my_mom)) / (total * size),
                             abs(b.waterplane_area - c.waterplane_area) / size ** 2), where)
        note("area", _area_error(hull, ref, c.waterplane_area, p, n, k) / size ** 2, where)
    return worst


def _area_error(hull, ref: ManifoldReference, area: float, p: np.ndarray, n: np.ndarray, kind: str) -> float:
    """Distance of the kernel's waterplane area from the reference.

    In general position the reference is manifold3d's section. Where faces lie in the
    plane the waterplane is the closed section: the sections just below (A-) and just above
    (A+) and the faces F lying in the plane give (A- + A+ + F) / 2 (each flat face bounds
    the solid on one side only). A plane set up coplanar with a face in rounded arithmetic
    may instead cross that face, and then lies anywhere between the one-sided sections.
    """
    if kind in ("random", "vertex", "edge"):
        return abs(area - ref.section_area(p, n))
    size = hull.size
    # one-sided limits by Richardson extrapolation from shifts h and 2h (the section area
    # is a quadratic in the shift while no vertex level is crossed)
    h = 1e-8 * size
    raw = {t: ref.section_area(p, n, t * h) for t in (-2.0, -1.0, 1.0, 2.0)}
    lo, hi = 2.0 * raw[-1.0] - raw[-2.0], 2.0 * raw[1.0] - raw[2.0]
    flat = ref.flat_area(hull.vertices, hull.faces, p, n, 1e-12 * size)
    closed = 0.5 * (lo + hi + flat)
    if kind == "face":
        # faces next to the chosen one may lie within h of the plane, so the samples are
        # not quadratic in the shift: bracket by all of them and the section at the plane
        span = [lo, hi, closed, ref.section_area(p, n), *raw.values()]
        return max(min(span) - area, area - max(span), 0.0)
    return abs(area - closed)


def section_polygon_area(mesh, p: np.ndarray, n: np.ndarray) -> float:
    """Area of trimesh's section of ``mesh`` by the plane, its loops filled even-odd by shapely."""
    from functools import reduce

    from shapely.geometry import Polygon

    sec = mesh.section(plane_origin=p, plane_normal=n)
    if sec is None:
        return 0.0
    planar, _ = sec.to_2D()
    polys = [Polygon(loop) for loop in planar.discrete if len(loop) >= 3]
    return float(reduce(lambda a, b: a.symmetric_difference(b), polys).area) if polys else 0.0


def _grid_box():
    # rows at non-dyadic float64 coordinates (0.1 steps, thirds, sevenths)
    return grid_box(np.linspace(0.0, 7.0, 22), np.linspace(-1.3, 1.3, 8), np.arange(13) * 0.1)


def _torus():
    import trimesh

    t = trimesh.creation.torus(major_radius=3.0, minor_radius=1.1, major_sections=48, minor_sections=24)
    return t.vertices + np.array([4.0, 0.3, 1.2]), t.faces


def _demo(root, name, shift=(0.0, 0.0, 0.0)):
    def make():
        from meshhydro import load_hull

        h = load_hull(f"{root}/meshes/{name}.stl")
        return h.vertices + np.array(shift), h.faces
    return make


def reference_meshes(root: str) -> dict:
    """Name -> (maker returning (v, f), planes per run): box grid, torus, demo hulls, a
    multihull and outrigger, a hull far from the origin."""
    return {
        "grid_box": (_grid_box, 400),
        "torus": (_torus, 400),
        "brindle_barge": (_demo(root, "brindle_barge"), 250),
        "tern_sloop": (_demo(root, "tern_sloop"), 250),
        "twinfin_cat": (_demo(root, "twinfin_cat"), 250),  # multihull: two bodies
        "kestrel_outrigger": (_demo(root, "kestrel_outrigger"), 250),
        "far_barge": (_demo(root, "brindle_barge", (48213.7, -9371.3, 712.9)), 300),  # far from the origin
    }
