"""Binary STL read directly with numpy, and welding of bit-identical vertices with one sort.

A binary STL is an 80-byte header, a little-endian uint32 triangle count and 50 bytes per
triangle (normal, three corners as float32, a uint16 attribute). The file size must match
the count exactly; anything else is not a binary STL (the caller falls back to a general
reader). Stored normals are ignored: the winding of the corners defines orientation.
"""
from __future__ import annotations

import os
from typing import Callable

import numpy as np

from . import mesh_compiled
from .errors import InvalidMeshError

#: Triangles read per chunk (bounds the temporary memory and paces the progress calls).
CHUNK = 1 << 20
_RECORD = np.dtype([("normal", "<f4", (3,)), ("corners", "<f4", (3, 3)), ("attr", "<u2")])

Progress = Callable[[str, int, int], None]


def binary_stl_count(path: str) -> int | None:
    """Triangle count when ``path`` is a well-formed binary STL, else None."""
    size = os.path.getsize(path)
    if size < 84:
        return None
    with open(path, "rb") as fh:
        fh.seek(80)
        n = int(np.frombuffer(fh.read(4), "<u4")[0])
    return n if size == 84 + 50 * n else None


def read_binary_stl(path: str, count: int, progress: Progress | None = None) -> np.ndarray:
    """Corners (count, 3, 3) float32 [file units] of a binary STL, read in chunks."""
    out = np.empty((count, 3, 3), dtype=np.float32)
    with open(path, "rb") as fh:
        fh.seek(84)
        done = 0
        while done < count:
            k = min(CHUNK, count - done)
            rec = np.fromfile(fh, dtype=_RECORD, count=k)
            if len(rec) != k:
                raise InvalidMeshError(f"{path}: the file ends after {done + len(rec)} of {count} triangles")
            out[done:done + k] = rec["corners"]
            done += k
            if progress is not None:
                progress("read", done, count)
    return out


def weld(corners: np.ndarray, source: str, *, compiled: bool = True) -> tuple[np.ndarray, np.ndarray]:
    """Vertices (n, 3) and faces (m, 3) int64 from triangle corners (m, 3, 3) by welding
    corners whose coordinates are bit-identical (-0.0 is taken as 0.0).

    Compiled (numba): one pass through a hash table, vertices in order of first
    appearance. Otherwise one sort of a 64-bit key mixed from the coordinate bits; equal
    keys are then checked bit for bit, and only if two different points share a key is a
    full lexicographic sort used instead (vertices in the order of that sort).

    Raises
    ------
    InvalidMeshError
        A corner has a non-finite coordinate (naming the face).
    """
    pts = corners.reshape(-1, 3)
    bits = pts.view(np.uint32 if pts.dtype == np.float32 else np.uint64).reshape(len(pts), 3)
    if compiled and mesh_compiled.AVAILABLE:
        inv, first, bad = mesh_compiled.weld_points(pts, bits)
        if bad >= 0:
            _non_finite(pts, source)
        return pts[first] + pts.dtype.type(0.0), inv.reshape(-1, 3)
    if not np.isfinite(pts).all():
        _non_finite(pts, source)
    pts = pts + pts.dtype.type(0.0)  # -0.0 + 0.0 = +0.0: one point, one key
    bits = pts.view(bits.dtype).reshape(len(pts), 3)
    key = _mix(bits)
    order = np.argsort(key)
    ks = key[order]
    start = np.empty(len(ks), dtype=bool)
    start[:1] = True
    np.not_equal(ks[1:], ks[:-1], out=start[1:])
    del ks, key
    if _differs(bits, order, ~start[1:]):  # a key shared by different points
        order = np.lexsort(bits.T[::-1])
        start[1:] = False
        for j in range(3):
            c = bits[order, j]
            start[1:] |= c[1:] != c[:-1]
    gid = np.cumsum(start) - 1
    inv = np.empty(len(pts), dtype=np.int64)
    inv[order] = gid
    verts = pts[order[start]]
    return verts, inv.reshape(-1, 3)


def _non_finite(pts: np.ndarray, source: str) -> None:
    finite = np.isfinite(pts).all(axis=1)
    k = int(np.flatnonzero(~finite)[0])
    raise InvalidMeshError(
        f"{source}: face {k // 3} has a non-finite corner {pts[k].tolist()} "
        f"({int((~finite).sum())} such corners)"
    )


def _differs(bits: np.ndarray, order: np.ndarray, same: np.ndarray) -> bool:
    """Whether any neighbour pair in ``order`` marked ``same`` (k - 1,) has different bits."""
    for j in range(3):
        c = bits[order, j]
        if np.any(same & (c[1:] != c[:-1])):
            return True
    return False


def _mix(bits: np.ndarray) -> np.ndarray:
    """A 64-bit key (k,) uint64 mixing the coordinate bit patterns (k, 3)."""
    key = bits[:, 0].astype(np.uint64) * np.uint64(0x9E3779B97F4A7C15)
    key ^= bits[:, 1].astype(np.uint64) * np.uint64(0xC2B2AE3D27D4EB4F) + (key >> np.uint64(29))
    key ^= bits[:, 2].astype(np.uint64) * np.uint64(0x165667B19E3779F9) + (key >> np.uint64(32))
    return key
