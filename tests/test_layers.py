"""The seams other work plugs into: read-only hulls, the load protocol, the criteria registry, renderers."""
from __future__ import annotations

import json
import math

import numpy as np
import pytest

from meshhydro import FixedLoad, InputError, Load
from meshhydro.criteria import REGISTRY, AngleParams, Criterion
from meshhydro.document import Column, Document, Quantity, Section, Table
from meshhydro.equilibrium import solve_load
from meshhydro.frames import up_derivatives, up_vector
from meshhydro.renderers import render
from meshhydro.stability import curve_for_load

RHO = 1.025


def test_hull_arrays_are_read_only(box_hull):
    for a in (box_hull.vertices, box_hull.faces, box_hull.deck_edge, box_hull.bounds[0]):
        with pytest.raises(ValueError):
            a[0] = 0


class HangingLoad:
    """A ship of mass ``m0`` at ``g0`` carrying a mass ``m1`` hung on a wire of length ``l`` from ``s``:
    the hung mass always lies vertically below its suspension point."""

    def __init__(self, m0, g0, m1, s, length):
        self.m0, self.g0, self.m1, self.s, self.l = m0, np.asarray(g0, float), m1, np.asarray(s, float), length
        self.displacement = m0 + m1

    def centre(self, heel, trim):
        hung = self.s - self.l * up_vector(heel, trim)
        return (self.m0 * self.g0 + self.m1 * hung) / self.displacement

    def centre_derivatives(self, heel, trim):
        d_phi, d_th = up_derivatives(heel, trim)
        return -self.m1 * self.l / self.displacement * np.column_stack([d_phi, d_th])


def test_a_load_whose_g_moves_plugs_into_the_solver(box_hull):
    # Textbook: a suspended weight acts at its point of suspension. Box 20 x 6 x 4 m, 150 t ship at
    # KG 2.0 plus 30 t hung 1.5 m below a derrick head at (10, 0, 3.8): effective KG = (150·2 + 30·3.8)/180.
    load = HangingLoad(150.0, (10.0, 0.0, 2.0), 30.0, (10.0, 0.0, 3.8), 1.5)
    assert isinstance(load, Load)
    kg = (150.0 * 2.0 + 30.0 * 3.8) / 180.0
    t = 180.0 / RHO / 120.0
    bm = 36.0 / (12.0 * t)
    gm = t / 2 + bm - kg
    eq = solve_load(box_hull, load, density=RHO)
    assert eq.draft == pytest.approx(t, rel=1e-9) and abs(eq.heel) < 1e-9
    assert eq.gmt == pytest.approx(gm, rel=1e-9)  # the shift of the hung mass is in GM
    heels = np.array([0.0, 5.0, 10.0])  # wall-sided: bilge emerges at atan(T / 3) > 10°
    c = curve_for_load(box_hull, load, heels=heels, density=RHO)
    phi = np.radians(heels)
    wall = np.sin(phi) * (gm + 0.5 * bm * np.tan(phi) ** 2)  # wall-sided formula, textbook
    assert np.allclose(c.gz, wall, atol=1e-9)
    assert c.gm_upright == pytest.approx(gm, rel=1e-9)


def test_fixed_load_checks_its_input():
    with pytest.raises(InputError, match="displacement"):
        FixedLoad(-1.0, (0, 0, 0))
    with pytest.raises(InputError, match="cog"):
        FixedLoad(1.0, (0, 0))
    with pytest.raises(InputError, match="fsm"):
        FixedLoad(1.0, (0, 0, 0), fsm=-2.0)
    # virtual rise FSM / Δ (textbook free-surface correction)
    assert FixedLoad(4.0, (1, 2, 3), fsm=2.0).centre(30.0, 1.0)[2] == pytest.approx(3.5)


def test_registry_kinds_units_and_typed_parameters():
    # units of the IMO 2008 IS Code 2.2 quantities: areas m·rad, levers m, angles deg
    units = {k: v.unit for k, v in REGISTRY.items()}
    # heeling arms: equilibrium angle deg, residual area m·rad, ratio of areas pure; the weather kind's
    # two parts report their own units (deg, m·rad)
    assert units == {"area": "m·rad", "gz_at": "m", "gz_max_beyond": "m", "angle_of_max": "deg", "gm": "m",
                     "range": "deg", "vanishing": "deg", "arm_equilibrium": "deg", "arm_residual_area": "m·rad",
                     "arm_area_ratio": "-", "weather": "-"}
    assert Criterion("x", "gz_at", 0.2, params=AngleParams(30.0)).unit == "m"
    with pytest.raises(InputError, match="takes AngleParams"):
        Criterion("x", "gz_at", 0.2)
    with pytest.raises(InputError, match="kind must be one of"):
        Criterion("x", "nonsense", 0.2)


def _doc():
    t = Table("t", "", [Column("a", "a", "m", 2), Column("b", "b", "", 1)], [{"a": 1.0, "b": 2.0}, {"a": 3.5, "b": None}],
              text_keys=["a"])
    s = Section("s", "values:", values=[Quantity("v", "value", 1.23456, "m")], notes=["note: n"])
    return Document("title", "ship", sections=[s, Section("tt", "", tables=[t])], cautions=["careful"],
                    verdict=True, verdict_text="ok", primary="t")


def test_csv_quotes_what_a_comment_skipping_reader_would_cut():
    # RFC 4180 quoting (read back by Python's csv module, a general-purpose reader), plus quotes round a
    # field holding "#": a reader that skips "#" comment lines must keep "hatch #2" whole
    import csv
    import io

    from meshhydro.output import to_csv

    text = to_csv([{"name": "hatch #2", "z": 1.5}, {"name": 'say "a, b"', "z": None}], ["name", "z"])
    assert text.splitlines()[1] == '"hatch #2",1.5'
    assert list(csv.reader(io.StringIO(text))) == [["name", "z"], ["hatch #2", "1.5"], ['say "a, b"', ""]]


def test_text_tables_keep_number_columns_even_when_empty():
    # an empty note column (text) is left out of a text table; a number column with no values is not
    from meshhydro.output import text_table

    rows = [{"a": 1.0, "m": None, "note": ""}, {"a": 2.0, "m": None, "note": ""}]
    head = text_table(rows, ["a", "m", "note"]).splitlines()[0].split()
    assert head == ["a", "m"]


def test_renderers_write_what_the_document_holds():
    assert render(_doc(), "text") == ("title\nvalues:\nvalue  1.2346 m\nnote: n\n\n   a\n [m]\n1.00\n3.50\n"
                                      "verdict: ok\ncareful\n")
    assert render(_doc(), "csv") == "a,b\n1.0,2.0\n3.5,\n# verdict: ok\n# careful\n"
    d = json.loads(render(_doc(), "json"))
    assert d["title"] == "title" and d["sections"][1]["tables"][0]["rows"][1] == {"a": 3.5, "b": None}
    with pytest.raises(InputError, match="unknown output format"):
        render(_doc(), "xml")
    assert math.isfinite(d["sections"][0]["values"][0]["value"])


def test_analysis_decides_sides_and_angles(box_hull):
    from meshhydro.analysis import check_angles, choose_sides, curve_angles
    from meshhydro.loading import condition

    # a port-starboard symmetric hull with G on the centreline heels the same both ways (common practice:
    # one side suffices); G off the centreline needs both
    assert choose_sides(box_hull, condition(100.0, (10.0, 0.0, 2.0))) == (1,)
    assert choose_sides(box_hull, condition(100.0, (10.0, 0.1, 2.0))) == (1, -1)
    assert choose_sides(box_hull, condition(100.0, (10.0, 0.0, 2.0)), "port") == (-1,)
    assert list(curve_angles(np.array([10.0, 20.0]), (1, -1))) == [-20.0, -10.0, 0.0, 10.0, 20.0]
    with pytest.raises(InputError, match="heels takes angles from 0 to 180°"):
        check_angles(np.array([0.0, 190.0]), 0.0, 180.0)
    with pytest.raises(InputError, match="direction must be"):
        choose_sides(box_hull, condition(100.0, (10.0, 0.0, 2.0)), "sideways")


def test_a_new_criterion_kind_sees_the_upright_hydrostatics(box_hull):
    from meshhydro.analysis import criteria_analysis, from_mesh
    from meshhydro.criteria import CriteriaSet, NoParams, Outcome, register

    @register("test_kmt", unit="m")
    def _kmt(ctx, p: NoParams) -> Outcome:
        return Outcome(ctx.hydrostatics.kmt)

    try:
        cset = CriteriaSet("t", "test", (Criterion("K", "test_kmt", 2.7),))
        inp = from_mesh(box_hull, "box.stl", RHO * 180.0, (10.0, 0.0, 2.0), density=RHO)
        rep, doc = criteria_analysis(inp, cset, np.arange(0.0, 31.0, 10.0))
        # box closed forms: T = 1.5 m, KB = T/2 = 0.75 m, BM = B²/(12 T) = 2 m, KM = 2.75 m
        assert rep.results[0].attained == pytest.approx(2.75, rel=1e-9) and rep.passed
        assert doc.verdict is True and "verdict: all criteria met" in render(doc, "text")
    finally:
        del REGISTRY["test_kmt"]
