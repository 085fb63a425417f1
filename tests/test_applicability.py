"""Applicability notes: the IS Code's general and weather criteria are written for ships of 24 m
and over (IMO 2008 IS Code, Part A, 2.2 and 2.3; REFERENCES.md) and framed for monohulls."""
from __future__ import annotations

import numpy as np
import pytest
import trimesh

from meshhydro import InputError, load_hull
from meshhydro.applicability import applicability_notes, hull_applicability_notes
from meshhydro.forms import box


def test_length_and_bodies():
    assert applicability_notes(24.0, 1) == []
    short = applicability_notes(23.9, 1)
    assert len(short) == 1 and short[0].startswith("shorter than 24 m")
    multi = applicability_notes(30.0, 2)
    assert len(multi) == 1 and multi[0].startswith("framed for monohulls")
    assert len(applicability_notes(10.0, 3)) == 2
    assert "2.3" in applicability_notes(10.0, 1, clauses=("2.3",))[0]


def test_hull_wrapper_counts_bodies():
    v, f = box(8.0, 1.0, 1.0)
    v2 = v + np.array([0.0, 3.0, 0.0])
    cat = load_hull(trimesh.Trimesh(np.vstack([v, v2]), np.vstack([f, f + len(v)]), process=False))
    notes = hull_applicability_notes(cat)
    assert any(n.startswith("shorter than 24 m") for n in notes)
    assert any(n.startswith("framed for monohulls") for n in notes)


def test_bad_values_refused():
    with pytest.raises(InputError, match="length"):
        applicability_notes(-1.0, 1)
    with pytest.raises(InputError, match="bodies"):
        applicability_notes(30.0, 0)
