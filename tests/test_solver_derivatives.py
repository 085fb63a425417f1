"""The solver's Newton Jacobian and its small linear solves, against independent computations.

References: a central difference of the residuals (numerical differentiation, common practice) for the
exact Jacobian, with a fixed G and with tank fluid that shifts with the attitude; numpy.linalg.solve
(LAPACK, a general-purpose library) for the 1×1 to 3×3 solves written out with Cramer's rule.
"""
from __future__ import annotations

import math

import numpy as np
import pytest

from meshhydro import load_hull
from meshhydro.fluid import FluidLoad
from meshhydro.forms import wigley
from meshhydro.load import FixedLoad
from meshhydro.solver import Evaluator, _solve_small, jacobian, residuals
from meshhydro.tank_load import TankLoad
from meshhydro.tanks import tank_from_box

from conftest import tm


@pytest.fixture(scope="module")
def hull():
    return load_hull(tm(*wigley(16.0, 3.0, 1.0, depth=2.0, stations=60, waterlines=24, above=6)), x_ref=0.0)


def _central(ev, load, v0, depth, heel, trim, h=1e-5):
    """Central differences (3, 3) of the residuals per (depth [m], heel [rad], trim [rad])."""
    cols = []
    for k in range(3):
        q = np.array([depth, heel, trim], dtype=float)
        step = h if k == 0 else math.degrees(h)  # angles are stepped in degrees, differentiated per rad
        q_hi, q_lo = q.copy(), q.copy()
        q_hi[k] += step
        q_lo[k] -= step
        r_hi = residuals(ev.state(*q_hi), v0, load, ev.L)
        r_lo = residuals(ev.state(*q_lo), v0, load, ev.L)
        cols.append((r_hi - r_lo) / (2 * h))
    return np.column_stack(cols)


@pytest.mark.parametrize("heel, trim", [(0.0, 0.0), (12.0, 1.5), (-35.0, -2.0), (70.0, 3.0)])
def test_jacobian_matches_central_differences_fixed_g(hull, heel, trim):
    ev = Evaluator(hull)
    load = FixedLoad(20.0, np.array([0.4, 0.05, 0.9]), 0.0)
    v0 = 20.0 / 1.025
    J = jacobian(ev.state(0.7, heel, trim), v0, load, ev.K, ev.L)
    num = _central(ev, load, v0, 0.7, heel, trim)
    assert np.allclose(J, num, rtol=1e-5, atol=1e-7 * np.abs(num).max())


def test_jacobian_matches_central_differences_with_shifting_fluid(hull):
    # a slack tank: G moves with heel and trim, so the lever rows carry dG/dq too
    tank = tank_from_box("slack", [[-2.0, -0.6, 0.3], [2.0, 0.4, 1.1]], density=1.0)
    fluid = FluidLoad.from_fills([tank], {"slack": 0.45})
    load = TankLoad(18.0, np.array([0.3, 0.0, 0.8]) * 18.0, fluid)
    ev = Evaluator(hull)
    v0 = load.displacement / 1.025
    J = jacobian(ev.state(0.65, 18.0, 1.0), v0, load, ev.K, ev.L)
    num = _central(ev, load, v0, 0.65, 18.0, 1.0)
    assert np.abs(load.centre_derivatives(18.0, 1.0)).max() > 1e-3  # the fluid does move
    assert np.allclose(J, num, rtol=1e-5, atol=1e-7 * np.abs(num).max())


def test_small_solves_match_lapack():
    rng = np.random.default_rng(11)
    for n in (1, 2, 3):
        for _ in range(300):
            m = rng.normal(size=(n, n)) * 10.0 ** rng.uniform(-4, 4, size=(n, 1))  # rows of unlike scale
            b = rng.normal(size=n)
            x = np.array(_solve_small(m.tolist(), b.tolist()))
            ref = np.linalg.solve(m, b)
            # forward error bounded by the condition number times a few units of rounding
            assert np.abs(x - ref).max() <= 1e-13 * np.linalg.cond(m) * np.abs(ref).max()
    assert _solve_small([[1.0, 2.0], [2.0, 4.0]], [1.0, 1.0]) is None  # singular
    assert _solve_small([[0.0]], [1.0]) is None
    assert _solve_small([[1.0, 2.0, 3.0], [2.0, 4.0, 6.0], [0.0, 1.0, 1.0]], [1.0, 2.0, 3.0]) is None
