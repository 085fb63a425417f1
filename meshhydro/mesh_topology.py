"""Mesh topology from one edge table: bodies joined through edges, rims, winding, duplicates.

Pure functions over index arrays; no geometry beyond what is asked. Bodies are the
components of faces that share a *manifold* edge (exactly two faces), so bodies that
touch at a vertex or along an edge stay separate and each is checked on its own.
Faces with a repeated vertex index are left out by the caller.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np


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
    fwd : (3m,) bool
        Whether the half-edge runs lo -> hi.
    """

    lo: np.ndarray
    hi: np.ndarray
    n_fwd: np.ndarray
    n_tot: np.ndarray
    first_face: np.ndarray
    edge_of: np.ndarray
    fwd: np.ndarray


def degenerate_faces(faces: np.ndarray) -> np.ndarray:
    """Bool (m,): faces with two or three identical vertex indices (they bound nothing)."""
    f = np.asarray(faces)
    return (f[:, 0] == f[:, 1]) | (f[:, 1] == f[:, 2]) | (f[:, 0] == f[:, 2])


def edge_table(faces: np.ndarray, n_vertices: int | None = None) -> EdgeTable:
    """The edge table of ``faces`` (m, 3) int (no repeated index within a face)."""
    f = np.asarray(faces, dtype=np.int64)
    a = f.reshape(-1)
    b = np.roll(f, -1, axis=1).reshape(-1)
    lo = np.minimum(a, b)
    hi = np.maximum(a, b)
    nv = int(n_vertices if n_vertices is not None else (f.max() + 1 if len(f) else 0))
    key = lo * max(nv, 1) + hi
    order = np.argsort(key, kind="stable")
    ks = key[order]
    start = np.ones(len(ks), dtype=bool)
    start[1:] = ks[1:] != ks[:-1]
    gid = np.cumsum(start) - 1
    edge_of = np.empty(len(key), dtype=np.int64)
    edge_of[order] = gid
    first = np.flatnonzero(start)
    fwd = a < b
    ne = len(first)
    return EdgeTable(
        lo=lo[order[first]],
        hi=hi[order[first]],
        n_fwd=np.bincount(edge_of, weights=fwd, minlength=ne).astype(np.int64),
        n_tot=np.diff(np.append(first, len(ks))).astype(np.int64),
        first_face=order[first] // 3,
        edge_of=edge_of,
        fwd=fwd,
    )


def bodies_by_edges(n_faces: int, et: EdgeTable) -> np.ndarray:
    """Body label (m,) of each face: components through edges used by exactly two faces.

    Labels are numbered in order of each body's lowest face index.
    """
    from scipy.sparse import coo_matrix
    from scipy.sparse.csgraph import connected_components

    two = np.flatnonzero(et.n_tot[et.edge_of] == 2)  # half-edges on manifold edges
    order = two[np.argsort(et.edge_of[two], kind="stable")]
    fa, fb = order[0::2] // 3, order[1::2] // 3
    g = coo_matrix((np.ones(len(fa), np.int8), (fa, fb)), shape=(n_faces, n_faces))
    _, lab = connected_components(g, directed=False)
    first = np.full(lab.max() + 1 if len(lab) else 0, n_faces, dtype=np.int64)
    np.minimum.at(first, lab, np.arange(n_faces))
    rank = np.empty_like(first)
    rank[np.argsort(first, kind="stable")] = np.arange(len(first))
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
    b2 = labels[et.first_face[e2]]
    other = np.flatnonzero(~two[et.edge_of])  # half-edges on boundary or non-manifold edges
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
    found = []
    # two faces on one manifold edge are the same face when their third vertices agree
    two = np.flatnonzero(et.n_tot[et.edge_of] == 2)
    order = two[np.argsort(et.edge_of[two], kind="stable")]
    ha, hb = order[0::2], order[1::2]
    fa, fb = ha // 3, hb // 3
    ends = et.lo[et.edge_of[ha]] + et.hi[et.edge_of[ha]]
    same = f[fa].sum(axis=1) - ends == f[fb].sum(axis=1) - ends
    found.append(np.maximum(fa, fb)[same & (fa != fb)])
    # faces on edges used three or more times: compare their sorted vertex triples
    many = np.flatnonzero(et.n_tot[et.edge_of] > 2) // 3
    if len(many):
        cand = np.unique(many)
        srt = np.sort(f[cand], axis=1)
        _, first = np.unique(srt, axis=0, return_index=True)
        mask = np.ones(len(cand), bool)
        mask[first] = False
        found.append(cand[mask])
    return np.unique(np.concatenate(found)) if found else np.zeros(0, np.int64)


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
