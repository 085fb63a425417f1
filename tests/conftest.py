"""Shared fixtures: reference forms built in memory (no demo data in the checks)."""
from __future__ import annotations

import os

import numpy as np
import pytest
import trimesh

from meshhydro import load_hull
from meshhydro.forms import box, wigley

#: The project folder (for the shipped demo meshes in meshes/).
ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))


def tm(v: np.ndarray, f: np.ndarray) -> trimesh.Trimesh:
    return trimesh.Trimesh(v, f, process=False)


@pytest.fixture(scope="session")
def box_hull():
    """Box 20 m x 6 m x 4 m, x from 0 to 20, baseline z = 0."""
    return load_hull(tm(*box(20.0, 6.0, 4.0)))


@pytest.fixture(scope="session")
def wigley_hull():
    return load_hull(tm(*wigley(10.0, 1.0, 0.625, stations=64, waterlines=24)), x_ref=0.0)


@pytest.fixture(scope="session")
def blob():
    """An irregular closed mesh: a bumpy, non-convex icosphere, far from symmetric."""
    s = trimesh.creation.icosphere(subdivisions=4, radius=1.0)
    v = s.vertices.copy()
    r = 1.0 + 0.25 * np.sin(3 * v[:, 0]) * np.cos(2 * v[:, 1]) + 0.15 * np.sin(5 * v[:, 2])
    v = v * r[:, None] * np.array([2.0, 1.0, 0.8]) + np.array([3.0, -0.4, 1.2])
    return tm(v, s.faces)


@pytest.fixture(scope="session")
def blob_hull(blob):
    return load_hull(blob)
