"""Mesh input and the health report: report, don't repair.

Loading goes through trimesh with ``process=False`` so that nothing is merged,
removed or re-wound behind the user's back. The one step always taken is welding
vertices whose coordinates are *bit-identical*: STL stores every triangle with its own
three corners, so topology can only be recovered that way; geometry is unchanged.
Everything else (flipping an inside-out body, merging overlapping bodies) happens only
when asked and is reported.
"""
from __future__ import annotations

import os
from dataclasses import asdict, dataclass, field, replace
from typing import Any

import numpy as np

from .errors import InputError, InvalidMeshError
from .frames import axis_matrix, unit_scale

#: A hull larger than this in its longest extent [m] is taken as a unit mistake.
MAX_PLAUSIBLE_LENGTH = 1000.0
#: Smaller than this [m] is suspicious (but accepted with a warning).
MIN_PLAUSIBLE_LENGTH = 0.05


@dataclass(frozen=True)
class Rim:
    """An open boundary loop (or chain) of the mesh.

    Attributes
    ----------
    n_edges : int
    z_min, z_max : float [m], hull frame
    first_face : int
        A face on the rim, for locating it.
    """

    n_edges: int
    z_min: float
    z_max: float
    first_face: int


@dataclass(frozen=True)
class Body:
    """A connected component of the mesh.

    Attributes
    ----------
    index : int
    n_faces : int
    closed : bool
        Every edge is matched by one edge running the other way.
    volume : float or None [m³]
        Enclosed volume (positive for outward orientation); None when open.
    bounds : tuple of two (3,) lists [m]
        Bounding box (min, max), hull frame.
    first_face : int
    """

    index: int
    n_faces: int
    closed: bool
    volume: float | None
    bounds: tuple[list[float], list[float]]
    first_face: int


@dataclass(frozen=True)
class HealthReport:
    """What is right and wrong with a mesh, in hull-frame metres.

    ``usable`` is False when any entry of ``problems`` is present; ``warnings`` do
    not stop the hull from being used.
    """

    source: str
    units: str
    n_vertices: int
    n_faces: int
    welded_vertices: int
    bounds: tuple[list[float], list[float]]
    extent: list[float]
    closed: bool
    rims: list[Rim]
    consistent_winding: bool
    inconsistent_edges: int
    non_manifold_edges: int
    degenerate_faces: list[int]
    duplicate_faces: list[int]
    bodies: list[Body]
    inside_out_bodies: list[int]
    overlaps: list[tuple[int, int, float]]
    overlap_checked: bool
    flipped_bodies: list[int]
    merged: bool
    problems: list[str] = field(default_factory=list)
    warnings: list[str] = field(default_factory=list)

    @property
    def usable(self) -> bool:
        return not self.problems

    @property
    def volume(self) -> float:
        """Total enclosed volume [m³] of the closed bodies."""
        return float(sum(b.volume for b in self.bodies if b.volume is not None))

    def to_dict(self) -> dict[str, Any]:
        d = asdict(self)
        d["usable"] = self.usable
        d["volume"] = self.volume
        return d


@dataclass(frozen=True, eq=False)
class MeshData:
    """Vertices and faces in the hull frame after units, axes and offset.

    Attributes
    ----------
    vertices : (n, 3) float64 [m], hull frame
    faces : (m, 3) int64
    source : str
    units : str
    welded : int
        Number of bit-identical duplicate vertices welded on load.
    """

    vertices: np.ndarray
    faces: np.ndarray
    source: str
    units: str
    welded: int


def _read_trimesh(source: Any) -> tuple[np.ndarray, np.ndarray, str]:
    import trimesh

    if isinstance(source, trimesh.Trimesh):
        return np.asarray(source.vertices, float), np.asarray(source.faces, np.int64), "<trimesh>"
    path = os.fspath(source)
    if not os.path.exists(path):
        raise InputError(f"{path}: no such file")
    if os.path.isdir(path):
        raise InputError(f"{path}: is a folder, not a mesh file")
    try:
        loaded = trimesh.load(path, process=False, force="mesh")
    except Exception as exc:  # trimesh raises many kinds; all mean "not a mesh we can read"
        msg = str(exc).strip().splitlines()[0] if str(exc).strip() else type(exc).__name__
        raise InvalidMeshError(f"{path}: not a readable mesh ({msg})") from None
    if not isinstance(loaded, trimesh.Trimesh):
        raise InvalidMeshError(f"{path}: contains no triangle mesh")
    v = np.asarray(loaded.vertices, dtype=float)
    f = np.asarray(loaded.faces, dtype=np.int64)
    return v, f, path


def read_mesh(
    source: Any,
    *,
    units: str = "m",
    forward: str = "+x",
    up: str = "+z",
    offset: tuple[float, float, float] | np.ndarray = (0.0, 0.0, 0.0),
) -> MeshData:
    """Read a mesh file (STL/OBJ/PLY/OFF/GLB) or a ``trimesh.Trimesh`` into the hull frame.

    Parameters
    ----------
    source : path or trimesh.Trimesh
    units : str
        Length unit of the file: m, mm, cm, ft or in.
    forward, up : str
        File axes pointing forward and up (``'+x'``, ``'-y'``, ...). Y-up exports
        typically need ``forward='+x', up='+y'`` or similar.
    offset : (3,) [m]
        Added to the hull-frame coordinates after scaling and rotation (for example
        to put the baseline at z = 0).

    Raises
    ------
    InputError, InvalidMeshError
        Missing file, unreadable or empty mesh, non-finite coordinates, bad face indices.
    """
    scale = unit_scale(units)
    rot = axis_matrix(forward, up)
    off = np.asarray(offset, dtype=float).reshape(-1)
    if off.shape != (3,) or not np.all(np.isfinite(off)):
        raise InputError(f"offset must be three finite numbers, got {offset!r}")
    v, f, src = _read_trimesh(source)
    if len(f) == 0 or len(v) == 0:
        raise InvalidMeshError(f"{src}: the mesh is empty (no faces)")
    if f.ndim != 2 or f.shape[1] != 3:
        raise InvalidMeshError(f"{src}: faces are not triangles (shape {f.shape})")
    bad = ~np.all(np.isfinite(v), axis=1)
    if bad.any():
        k = int(np.flatnonzero(bad)[0])
        raise InvalidMeshError(
            f"{src}: vertex {k} has a non-finite coordinate {v[k].tolist()} "
            f"({int(bad.sum())} such vertices)"
        )
    if f.min() < 0 or f.max() >= len(v):
        k = int(np.flatnonzero((f < 0).any(axis=1) | (f >= len(v)).any(axis=1))[0])
        raise InvalidMeshError(f"{src}: face {k} refers to a vertex that does not exist")
    # weld bit-identical vertices (STL stores each triangle separately)
    uniq, inv = np.unique(v, axis=0, return_inverse=True)
    welded = len(v) - len(uniq)
    f = inv.reshape(-1)[f]
    vh = (uniq * scale) @ rot.T + off
    return MeshData(vertices=vh, faces=f, source=src, units=units, welded=int(welded))


# --------------------------------------------------------------------------- topology


def _edges(faces: np.ndarray) -> dict[str, np.ndarray]:
    """Undirected-edge table: for each edge its vertices, forward/backward counts."""
    e = np.concatenate([faces[:, [0, 1]], faces[:, [1, 2]], faces[:, [2, 0]]])
    fid = np.tile(np.arange(len(faces)), 3)
    lo = np.minimum(e[:, 0], e[:, 1])
    hi = np.maximum(e[:, 0], e[:, 1])
    fwd = e[:, 0] < e[:, 1]
    key = lo * (int(e.max()) + 1) + hi
    uk, inv = np.unique(key, return_inverse=True)
    nf = np.bincount(inv, weights=fwd, minlength=len(uk)).astype(np.int64)
    nt = np.bincount(inv, minlength=len(uk))
    first = np.full(len(uk), -1, dtype=np.int64)
    first[inv[::-1]] = fid[::-1]
    ulo = np.zeros(len(uk), dtype=np.int64)
    uhi = np.zeros(len(uk), dtype=np.int64)
    ulo[inv] = lo
    uhi[inv] = hi
    return {"lo": ulo, "hi": uhi, "n_fwd": nf, "n_tot": nt, "first_face": first}


def _components(n_vertices: int, faces: np.ndarray) -> np.ndarray:
    """Component label per face (connected through shared vertices)."""
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    m = len(faces)
    rows = np.repeat(np.arange(m), 3)
    g = coo_matrix((np.ones(3 * m), (rows, faces.ravel())), shape=(m, n_vertices)).tocsr()
    # bipartite face-vertex graph
    from scipy.sparse import bmat

    big = bmat([[None, g], [g.T, None]]).tocsr()
    _, labels = connected_components(big, directed=False)
    lab = labels[:m]
    _, lab = np.unique(lab, return_inverse=True)
    return lab.reshape(-1)


def _signed_volume(v: np.ndarray, f: np.ndarray) -> float:
    c = v.mean(axis=0)
    a, b, cc = v[f[:, 0]] - c, v[f[:, 1]] - c, v[f[:, 2]] - c
    return float(np.einsum("ij,ij->i", a, np.cross(b, cc)).sum() / 6.0)


def _overlaps(v: np.ndarray, f: np.ndarray, labels: np.ndarray, bodies: list[Body]) -> tuple[
    list[tuple[int, int, float]], bool
]:
    """Pairs of closed bodies whose interiors overlap, with the shared volume [m³]."""
    closed = [b for b in bodies if b.closed and b.volume and b.volume > 0]
    pairs = []
    for i, bi in enumerate(closed):
        for bj in closed[i + 1:]:
            lo = np.maximum(bi.bounds[0], bj.bounds[0])
            hi = np.minimum(bi.bounds[1], bj.bounds[1])
            if np.all(hi > lo):
                pairs.append((bi, bj))
    if not pairs:
        return [], True
    try:
        import manifold3d as m3d
    except ImportError:  # pragma: no cover - a declared dependency
        return [], False
    found = []
    checked = True
    cache: dict[int, Any] = {}

    def manifold(b: Body):
        if b.index not in cache:
            sel = f[labels == b.index]
            used, local = np.unique(sel, return_inverse=True)
            mesh = m3d.Mesh64(
                vert_properties=np.asarray(v[used], np.float64),
                tri_verts=np.asarray(local.reshape(-1, 3), np.uint32),
            )
            cache[b.index] = m3d.Manifold(mesh)
        return cache[b.index]

    for bi, bj in pairs:
        try:
            inter = manifold(bi) ^ manifold(bj)
            vol = float(inter.volume())
        except Exception:
            checked = False
            continue
        tol = 1e-6 * min(bi.volume, bj.volume)
        if vol > tol:
            found.append((bi.index, bj.index, vol))
    return found, checked


def inspect(md: MeshData) -> HealthReport:
    """Build the health report of a mesh already in the hull frame."""
    v, f = md.vertices, md.faces
    problems: list[str] = []
    warnings: list[str] = []
    src = md.source
    lo, hi = v[np.unique(f)].min(axis=0), v[np.unique(f)].max(axis=0)
    extent = (hi - lo).tolist()
    # degenerate and duplicate faces
    rep = (f[:, 0] == f[:, 1]) | (f[:, 1] == f[:, 2]) | (f[:, 0] == f[:, 2])
    cr = np.cross(v[f[:, 1]] - v[f[:, 0]], v[f[:, 2]] - v[f[:, 0]])
    area2 = np.linalg.norm(cr, axis=1)
    size = max(float(np.max(extent)), 1e-300)
    degenerate = np.flatnonzero(rep | (area2 <= 1e-14 * size * size)).tolist()
    srt = np.sort(f, axis=1)
    _, first_idx, counts = np.unique(srt, axis=0, return_index=True, return_counts=True)
    dup_mask = np.ones(len(f), bool)
    dup_mask[first_idx] = False
    duplicate = np.flatnonzero(dup_mask).tolist()
    # edges
    E = _edges(f)
    n_back = E["n_tot"] - E["n_fwd"]
    boundary = E["n_tot"] == 1
    nonman = int(np.count_nonzero(E["n_tot"] > 2))
    unbalanced = (E["n_fwd"] != n_back) & ~boundary
    same_dir = int(np.count_nonzero(unbalanced))
    consistent = same_dir == 0
    # rims: chains of boundary edges
    rims: list[Rim] = []
    if boundary.any():
        from scipy.sparse import coo_matrix
        from scipy.sparse.csgraph import connected_components

        bl, bh = E["lo"][boundary], E["hi"][boundary]
        bf = E["first_face"][boundary]
        nv = len(v)
        g = coo_matrix((np.ones(len(bl)), (bl, bh)), shape=(nv, nv))
        _, lab = connected_components(g, directed=False)
        el = lab[bl]
        for r in np.unique(el):
            sel = el == r
            verts = np.unique(np.concatenate([bl[sel], bh[sel]]))
            z = v[verts, 2]
            rims.append(Rim(int(sel.sum()), float(z.min()), float(z.max()), int(bf[sel][0])))
        rims.sort(key=lambda r: r.z_min)
    # bodies
    labels = _components(len(v), f)
    bodies: list[Body] = []
    bad_edge_face = E["first_face"][boundary | unbalanced]
    open_faces = np.zeros(len(f), bool)
    open_faces[bad_edge_face] = True
    for b in range(int(labels.max()) + 1):
        sel = np.flatnonzero(labels == b)
        closed_b = not open_faces[sel].any()
        fb = f[sel]
        vb = v[np.unique(fb)]
        vol = _signed_volume(v, fb) if closed_b else None
        bodies.append(
            Body(
                index=b,
                n_faces=int(len(sel)),
                closed=bool(closed_b),
                volume=vol,
                bounds=(vb.min(axis=0).tolist(), vb.max(axis=0).tolist()),
                first_face=int(sel[0]),
            )
        )
    inside_out = [b.index for b in bodies if b.volume is not None and b.volume < 0]
    overlaps, checked = _overlaps(v, f, labels, bodies)
    closed = not boundary.any() and consistent
    # --- verdicts
    if not consistent:
        k = int(E["first_face"][unbalanced][0])
        problems.append(
            f"{src}: inconsistent winding: {same_dir} edges are run the same way by their "
            f"faces (first at face {k}); the volume would be wrong"
        )
    if nonman and consistent:
        warnings.append(f"{nonman} edges are shared by more than two faces (bodies touching along an edge)")
    for bi in inside_out:
        b = bodies[bi]
        problems.append(
            f"{src}: body {bi} (first face {b.first_face}) is inside out (volume {b.volume:.6g} m³); "
            f"flip it explicitly with --flip-inside-out / flip_inside_out=True"
        )
    for i, j, vol in overlaps:
        problems.append(
            f"{src}: bodies {i} and {j} overlap by {vol:.6g} m³ (their volume would be counted twice); "
            f"merge them explicitly with --merge-overlaps / merge_overlaps=True"
        )
    if not checked:
        warnings.append("overlap between bodies could not be checked for every pair")
    if rims:
        warnings.append(
            f"the mesh is open: {len(rims)} rim(s), lowest rim point at z = {rims[0].z_min:.4f} m; "
            f"usable only while the water stays below it"
        )
    if degenerate:
        warnings.append(f"{len(degenerate)} degenerate (zero-area) faces, first {degenerate[0]}; they add nothing")
    if duplicate:
        problems.append(
            f"{src}: {len(duplicate)} duplicate faces (first at face {duplicate[0]}): "
            f"the surface is counted twice there"
        )
    if size > MAX_PLAUSIBLE_LENGTH:
        problems.append(
            f"{src}: the hull is {size:.6g} m long in unit {md.units!r}; that looks like a unit "
            f"mistake (try --units mm)"
        )
    elif size < MIN_PLAUSIBLE_LENGTH:
        warnings.append(f"the hull is only {size:.4g} m long in unit {md.units!r}; check the unit")
    return HealthReport(
        source=src,
        units=md.units,
        n_vertices=int(len(v)),
        n_faces=int(len(f)),
        welded_vertices=md.welded,
        bounds=(lo.tolist(), hi.tolist()),
        extent=extent,
        closed=bool(closed),
        rims=rims,
        consistent_winding=bool(consistent),
        inconsistent_edges=same_dir,
        non_manifold_edges=nonman,
        degenerate_faces=degenerate[:20],
        duplicate_faces=duplicate[:20],
        bodies=bodies,
        inside_out_bodies=inside_out,
        overlaps=overlaps,
        overlap_checked=checked,
        flipped_bodies=[],
        merged=False,
        problems=problems,
        warnings=warnings,
    )


def flip_bodies(md: MeshData, report: HealthReport) -> tuple[MeshData, list[int]]:
    """Reverse the winding of the inside-out bodies (explicit repair)."""
    if not report.inside_out_bodies:
        return md, []
    labels = _components(len(md.vertices), md.faces)
    f = md.faces.copy()
    sel = np.isin(labels, report.inside_out_bodies)
    f[sel] = f[sel][:, ::-1]
    return MeshData(md.vertices, f, md.source, md.units, md.welded), list(report.inside_out_bodies)


def merge_overlapping(md: MeshData) -> MeshData:
    """Union all closed bodies with a robust boolean (manifold3d) (explicit repair)."""
    import manifold3d as m3d

    labels = _components(len(md.vertices), md.faces)
    result = None
    for b in range(int(labels.max()) + 1):
        sel = md.faces[labels == b]
        used, local = np.unique(sel, return_inverse=True)
        mesh = m3d.Mesh64(
            vert_properties=np.asarray(md.vertices[used], np.float64),
            tri_verts=np.asarray(local.reshape(-1, 3), np.uint32),
        )
        man = m3d.Manifold(mesh)
        if man.status() != m3d.Error.NoError:
            raise InvalidMeshError(
                f"{md.source}: body {b} is not a closed manifold, so it cannot be merged ({man.status()})"
            )
        result = man if result is None else result + man
    out = result.to_mesh64()
    v = np.asarray(out.vert_properties, dtype=float)[:, :3]
    f = np.asarray(out.tri_verts, dtype=np.int64)
    return MeshData(v, f, md.source, md.units, md.welded)


def check_mesh(
    source: Any,
    *,
    units: str = "m",
    forward: str = "+x",
    up: str = "+z",
    offset: tuple[float, float, float] = (0.0, 0.0, 0.0),
    flip_inside_out: bool = False,
    merge_overlaps: bool = False,
) -> tuple[MeshData, HealthReport]:
    """Read a mesh, apply only the repairs asked for, and report on it.

    Returns
    -------
    mesh : MeshData
        The (possibly repaired) mesh in the hull frame.
    report : HealthReport
        The report on that mesh; repairs made are listed in it.
    """
    md = read_mesh(source, units=units, forward=forward, up=up, offset=offset)
    rep = inspect(md)
    flipped: list[int] = []
    merged = False
    if flip_inside_out and rep.inside_out_bodies:
        md, flipped = flip_bodies(md, rep)
        rep = inspect(md)
    if merge_overlaps and rep.overlaps:
        md = merge_overlapping(md)
        merged = True
        rep = inspect(md)
    if flipped or merged:
        notes = list(rep.warnings)
        if flipped:
            notes.append(f"flipped inside-out bodies {flipped} as asked")
        if merged:
            notes.append("merged overlapping bodies with a boolean union as asked")
        rep = replace(rep, flipped_bodies=flipped, merged=merged, warnings=notes)
    return md, rep
