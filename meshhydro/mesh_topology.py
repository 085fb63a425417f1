"""Mesh topology from one edge table: bodies joined through edges, rims, winding, duplicates.

Pure functions over index arrays; no geometry beyond what is asked. Bodies are the
components of faces that share a *manifold* edge (exactly two faces), so bodies that
touch at a vertex or along an edge stay separate and each is checked on its own.
Faces with a repeated vertex index are left out by the caller.
"""
from __future__ import annotations

from dataclasses import dataclass
from functools import cached_property

import numpy as np

from . import mesh_compiled


@dataclass(frozen=True, eq=False)
class EdgeTable:
    """Undirected edges of a triangle mesh, built with one sort of the half-edges.

    Attributes
    ----------
    lo, hi : (e,) int64
        Vertex indices of each edge, ``lo < hi``.
    n_fwd, n_tot : (e,) int64
        Half-edges running lo -> hi, and all half-edges on the edge (faces using it).
    first_face : (e,) int64
        Lowest index of a face using the edge.
    edge_of : (3m,) int64
        Edge id of each half-edge; half-edge ``3i + k`` runs from corner k to corner
        k + 1 of face i.
    second_face : (e,) int64
        For an edge used by exactly two faces, the other one (-1 for an edge used once).
    fwd : (3m,) bool
        Whether the half-edge runs lo -> hi.
    """

    lo: np.ndarray
    hi: np.ndarray
    n_fwd: np.ndarray
    n_tot: np.ndarray
    first_face: np.ndarray
    second_face: np.ndarray
    edge_of: np.ndarray
    fwd: np.ndarray

    @cached_property
    def pairs(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Edges used by exactly two faces (k,) and those two faces (k,), (k,) (computed once)."""
        return self.face_pairs()

    def face_pairs(self) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        """Edges used by exactly two faces (k,) and those two faces (k,), (k,)."""
        e2 = np.flatnonzero(self.n_tot == 2)
        return e2, self.first_face[e2], self.second_face[e2]


def degenerate_faces(faces: np.ndarray) -> np.ndarray:
    """Bool (m,): faces with two or three identical vertex indices (they bound nothing)."""
    f = np.asarray(faces)
    return (f[:, 0] == f[:, 1]) | (f[:, 1] == f[:, 2]) | (f[:, 0] == f[:, 2])


def edge_table(faces: np.ndarray, n_vertices: int | None = None, *, compiled: bool = True) -> EdgeTable:
    """The edge table of ``faces`` (m, 3) int (no repeated index within a face).

    With ``compiled`` (and numba) one hash-table pass; otherwise one sort of the
    half-edges. Both give the same table up to the numbering of the edges.
    """
    f = np.asarray(faces, dtype=np.int64)
    nv = int(n_vertices if n_vertices is not None else (f.max() + 1 if len(f) else 0))
    if compiled and mesh_compiled.AVAILABLE and len(f):
        lo, hi, n_fwd, n_tot, ff, sf, edge_of, fwd = mesh_compiled.edge_buckets(f, nv)
        sf[n_tot != 2] = -1
        return EdgeTable(lo, hi, n_fwd, n_tot, ff, sf, edge_of, fwd)
    a = f.reshape(-1)
    b = np.roll(f, -1, axis=1).reshape(-1)
    fwd = a < b
    key = np.where(fwd, a, b) * max(nv, 1) + np.where(fwd, b, a)
    del a, b
    order = np.argsort(key)
    ks = key[order]
    del key
    new = np.empty(len(ks), dtype=bool)
    new[:1] = True
    np.not_equal(ks[1:], ks[:-1], out=new[1:])
    start = np.flatnonzero(new)
    edge_of = np.empty(len(ks), dtype=np.int64)
    edge_of[order] = np.cumsum(new) - 1
    head = ks[start]
    del ks, new
    n_tot = np.diff(np.append(start, len(order))).astype(np.int64)
    first = np.minimum.reduceat(order // 3, start) if len(start) else np.zeros(0, np.int64)
    two = n_tot == 2
    second = np.full(len(start), -1, dtype=np.int64)
    second[two] = order[start[two]] // 3 + order[start[two] + 1] // 3 - first[two]
    return EdgeTable(
        lo=head // max(nv, 1),
        hi=head % max(nv, 1),
        n_fwd=np.add.reduceat(fwd[order].astype(np.int64), start) if len(start) else np.zeros(0, np.int64),
        n_tot=n_tot,
        first_face=first,
        second_face=second,
        edge_of=edge_of,
        fwd=fwd,
    )


def bodies_by_edges(n_faces: int, et: EdgeTable, *, compiled: bool = True) -> np.ndarray:
    """Body label (m,) of each face: components through edges used by exactly two faces.

    Labels are numbered in order of each body's lowest face index (union-find when
    compiled, else scipy's connected components).
    """
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    _, fa, fb = et.pairs
    if compiled and mesh_compiled.AVAILABLE:
        return mesh_compiled.components(n_faces, fa, fb)
    g = coo_matrix((np.ones(len(fa), np.int8), (fa, fb)), shape=(n_faces, n_faces)).tocsr()
    nb, lab = connected_components(g, directed=False)
    if nb == 1:
        return np.zeros(n_faces, dtype=np.int64)
    first = np.full(nb, n_faces, dtype=np.int64)
    np.minimum.at(first, lab, np.arange(n_faces))
    rank = np.empty_like(first)
    rank[np.argsort(first, kind="stable")] = np.arange(nb)
    return rank[lab]


@dataclass(frozen=True, eq=False)
class EdgeUse:
    """How each body uses each edge (a body's half-edges on one edge form one group).

    Attributes
    ----------
    edge, body : (g,) int64
        Edge id and body label of each group.
    count, fwd : (g,) int64
        Half-edges in the group, and those running lo -> hi.
    """

    edge: np.ndarray
    body: np.ndarray
    count: np.ndarray
    fwd: np.ndarray

    @property
    def boundary(self) -> np.ndarray:
        """(g,) bool: the body uses the edge once (an open rim)."""
        return self.count == 1

    @property
    def unbalanced(self) -> np.ndarray:
        """(g,) bool: used more than once, not equally often each way (winding or non-manifold)."""
        return (self.count > 1) & (2 * self.fwd != self.count)


def edge_use(et: EdgeTable, labels: np.ndarray) -> EdgeUse:
    """Per-body edge groups; manifold edges (two faces, one body) are read off the table."""
    two = et.n_tot == 2
    e2 = np.flatnonzero(two)
    # each manifold edge lies within one body: the body of its first face
    b2 = labels[et.first_face[e2]] if labels.max(initial=0) > 0 else np.zeros(len(e2), np.int64)
    # half-edges on boundary or non-manifold edges (none in a closed manifold mesh)
    other = np.flatnonzero(~two[et.edge_of]) if len(e2) < len(two) else np.zeros(0, np.int64)
    nb = int(labels.max()) + 1 if len(labels) else 1
    key = et.edge_of[other] * nb + labels[other // 3]
    uk, inv = np.unique(key, return_inverse=True)
    cnt = np.bincount(inv, minlength=len(uk))
    fw = np.bincount(inv, weights=et.fwd[other], minlength=len(uk)).astype(np.int64)
    return EdgeUse(
        edge=np.concatenate([e2, uk // nb]),
        body=np.concatenate([b2, uk % nb]),
        count=np.concatenate([np.full(len(e2), 2, np.int64), cnt]),
        fwd=np.concatenate([et.n_fwd[e2], fw]),
    )


def duplicate_faces(faces: np.ndarray, et: EdgeTable) -> np.ndarray:
    """Indices (sorted) of faces that repeat an earlier face's three vertices (either winding)."""
    f = np.asarray(faces, dtype=np.int64)
    # two faces on one edge are the same face when their third vertices agree, that is
    # when their vertex-index sums agree
    _, fa, fb = et.pairs
    if mesh_compiled.AVAILABLE:
        same = mesh_compiled.same_third_vertex(f, fa, fb)
    else:
        fsum = f.sum(axis=1)
        same = fsum[fa] == fsum[fb]
    found = [np.maximum(fa, fb)[same]]
    # faces on edges used three or more times: compare their sorted vertex triples
    many = np.flatnonzero(et.n_tot[et.edge_of] > 2) // 3 if np.any(et.n_tot > 2) else np.zeros(0, np.int64)
    if len(many):
        cand = np.unique(many)
        srt = np.sort(f[cand], axis=1)
        _, first = np.unique(srt, axis=0, return_index=True)
        mask = np.ones(len(cand), bool)
        mask[first] = False
        found.append(cand[mask])
    return np.unique(np.concatenate(found))


def rim_chains(et: EdgeTable, use: EdgeUse, n_vertices: int) -> list[tuple[np.ndarray, int, int]]:
    """Open rims: for each chain of boundary edges, its vertex indices, its number of
    edges and a face on it (the lowest index)."""
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    be = use.edge[use.boundary]
    if len(be) == 0:
        return []
    bl, bh = et.lo[be], et.hi[be]
    g = coo_matrix((np.ones(len(bl), np.int8), (bl, bh)), shape=(n_vertices, n_vertices))
    _, lab = connected_components(g, directed=False)
    el = lab[bl]
    out = []
    order = np.argsort(el, kind="stable")
    cuts = np.flatnonzero(np.diff(el[order])) + 1
    for grp in np.split(order, cuts):
        verts = np.unique(np.concatenate([bl[grp], bh[grp]]))
        out.append((verts, len(grp), int(et.first_face[be[grp]].min())))
    return out


def body_sums(v: np.ndarray, f: np.ndarray, lab: np.ndarray, nb: int, *, compiled: bool = True) -> tuple[
    np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray
]:
    """Per body (labels ``lab`` (m,), -1 skipped): signed volume [m³] (nb,) about the middle
    of the bounding box, least and greatest coordinates (nb, 3), face count and first face (nb,)."""
    centre = 0.5 * (v.min(axis=0) + v.max(axis=0))
    if compiled and mesh_compiled.AVAILABLE:
        det6, lo, hi, counts, first = mesh_compiled.body_sums(v, f, lab, nb, centre)
        return det6 / 6.0, lo, hi, counts, first
    lo, hi, first = _body_bounds(v, f, lab, nb)
    return _signed_volumes(v, f, lab, nb), lo, hi, np.bincount(lab[lab >= 0], minlength=nb), first


def _signed_volumes(v: np.ndarray, f: np.ndarray, labels: np.ndarray, nb: int) -> np.ndarray:
    """Signed enclosed volume [m³] (nb,) of each labelled body (divergence theorem), about
    the middle of the bounding box; in chunks to bound the temporary memory."""
    c = 0.5 * (v.min(axis=0) + v.max(axis=0))
    vc = v - c
    out = np.zeros(nb)
    step = 1 << 20
    for i in range(0, len(f), step):
        fs, lab = f[i:i + step], labels[i:i + step]
        a, b, cc = vc[fs[:, 0]], vc[fs[:, 1]], vc[fs[:, 2]]
        det = (a[:, 0] * (b[:, 1] * cc[:, 2] - b[:, 2] * cc[:, 1]) + a[:, 1] * (b[:, 2] * cc[:, 0] - b[:, 0] * cc[:, 2])
               + a[:, 2] * (b[:, 0] * cc[:, 1] - b[:, 1] * cc[:, 0]))
        ok = lab >= 0
        out += np.bincount(lab[ok], weights=det[ok], minlength=nb)
    return out / 6.0


def _body_bounds(v: np.ndarray, f: np.ndarray, lab: np.ndarray, nb: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per body: least and greatest coordinates (nb, 3) and the first face (nb,)."""
    if nb == 1:
        sel = lab == 0
        used = np.zeros(len(v), bool)
        used[f[sel].ravel()] = True
        return v[used].min(axis=0)[None], v[used].max(axis=0)[None], np.flatnonzero(sel)[:1]
    order = np.argsort(lab, kind="stable")
    order = order[lab[order] >= 0]
    corners = v[f[order]]
    starts = np.flatnonzero(np.r_[True, np.diff(lab[order]) != 0])
    lo = np.minimum.reduceat(corners.min(axis=1), starts, axis=0)
    hi = np.maximum.reduceat(corners.max(axis=1), starts, axis=0)
    return lo, hi, order[starts]


def capped_volumes_below(v: np.ndarray, f: np.ndarray, lab: np.ndarray, nb: int, z0: np.ndarray) -> np.ndarray:
    """Signed volume [m³] (nb,) of each body's part below its plane z = ``z0[b]`` (nb,), capped by that
    plane (divergence theorem with the apex on the plane, so the cap adds nothing; straddling faces are
    clipped exactly). For an open body capped below its lowest rim point this is the volume of a closed
    part: positive for outward winding, negative when the body is inside out.

    v : (n, 3) [m]; f : (m, 3) int; lab : (m,) body label, -1 skipped.
    """
    out = np.zeros(nb)
    keep = lab >= 0
    tri = v[f[keep]]  # (k, 3, 3)
    lb = lab[keep]
    zc = z0[lb]
    apex = np.zeros((len(tri), 3))
    apex[:, 2] = zc
    below = np.all(tri[:, :, 2] <= zc[:, None], axis=1)
    a, b, c = (tri[below, i] - apex[below] for i in range(3))
    np.add.at(out, lb[below], np.einsum("ij,ij->i", a, np.cross(b, c)) / 6.0)
    straddle = ~below & np.any(tri[:, :, 2] < zc[:, None], axis=1)
    for k in np.flatnonzero(straddle):
        poly = _clip_below(tri[k], float(zc[k]))
        p = poly - apex[k]
        for i in range(1, len(p) - 1):
            out[lb[k]] += float(p[0] @ np.cross(p[i], p[i + 1])) / 6.0
    return out


def _clip_below(t: np.ndarray, z0: float) -> np.ndarray:
    """The part (k, 3) of triangle ``t`` (3, 3) with z <= z0, as a polygon in the triangle's order."""
    pts = []
    for i in range(3):
        p, q = t[i], t[(i + 1) % 3]
        if p[2] <= z0:
            pts.append(p)
        if (p[2] - z0) * (q[2] - z0) < 0:
            s = (z0 - p[2]) / (q[2] - p[2])
            pts.append(p + s * (q - p))
    return np.array(pts)
