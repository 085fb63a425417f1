"""Documents for the HTML report tests: one built by hand, one from the public library API.

Not a test module: imported by test_html_report.py and test_report_browser.py.
"""
from __future__ import annotations

import hashlib
import os

import numpy as np

import meshhydro
from meshhydro.document import Column, Document, Figure, Quantity, Section, Table

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
BARGE = os.path.join(ROOT, "meshes", "brindle_barge.stl")
# Common practice: a 1×1 transparent PNG, the smallest valid raster image.
PNG_1PX = bytes.fromhex("89504e470d0a1a0a0000000d4948445200000001000000010806000000"
                        "1f15c4890000000d49444154789c6360000002000154a24f5d0000000049454e44ae426082")


def sha256(path: str) -> str:
    with open(path, "rb") as fh:
        return hashlib.sha256(fh.read()).hexdigest()


def all_sections(doc: Document) -> list[Section]:
    """Every section, depth first in document order."""
    out: list[Section] = []
    for s in doc.sections:
        stack = [s]
        while stack:
            t = stack.pop(0)
            out.append(t)
            stack[0:0] = t.sections
    return out


def hand_document() -> Document:
    """Tricky text (markup characters), nested sections, a table with units, a raster figure."""
    values = [Quantity("displacement", "Displacement <Δ>", 42.0661, "t", 3),
              Quantity("gm", "GM & fluid GM", 1.2424, "m"),
              Quantity("area", "area 0–30°", 0.16304, "m·rad"),
              Quantity("none", "vanishing angle", None, "deg")]
    tab = Table("crit", "Criteria \"as set\"", [Column("id", "id"), Column("required", "required", "m·rad"),
                                                Column("attained", "attained", "m·rad", 4), Column("result", "result")],
                rows=[{"id": "2.2.1", "required": 0.055, "attained": 0.163, "result": "pass"},
                      {"id": "<script>", "required": 0.09, "attained": 0.07, "result": "FAIL"}],
                notes=["limits paraphrased from the IMO 2008 IS Code, Part A, 2.2"])
    fig = Figure("px", "one pixel", "raster", data=None, caption="a raster figure")
    sub = Section("sub", "Details & more", values=[Quantity("kg", "KG", 1.55, "m")], notes=["sub note"])
    return Document(
        title="Stability <check>", vessel="Test & Co's barge",
        sections=[Section("summary", "Summary", values=values, notes=["note with </section> in it"]),
                  Section("criteria", "Criteria", tables=[tab], figures=[fig], sections=[sub])],
        cautions=["Extra caution: the loading is assumed."], verdict=False,
        meta={"version": meshhydro.__version__, "inputs": [{"path": "hull.stl", "sha256": "ab" * 32}],
              "density": 1.025})


def draw_hand(fig: Figure) -> bytes:
    assert fig.view == "raster"
    return PNG_1PX


def real_document() -> Document:
    """A righting-curve report of the demo barge from the public API (values and figures as data)."""
    hull = meshhydro.load_hull(BARGE)
    cog = (6.0, 0.0, 1.3)
    curve = hull.righting_curve(displacement=42.0, cog=cog, heels=np.arange(0.0, 91.0, 2.0))
    gmax, amax = curve.max_gz(1)
    v = curve.vanishing_angle(1)
    values = [Quantity("displacement", "displacement", 42.0, "t", 3),
              Quantity("gm_upright", "GM upright", curve.gm_upright, "m"),
              Quantity("max_gz", "max GZ", gmax, "m"), Quantity("angle_of_max", "angle of max GZ", amax, "deg", 1),
              Quantity("vanishing", "vanishing angle", v, "deg", 1),
              Quantity("area_0_30", "area 0–30°", curve.area(0, 30), "m·rad")]
    cols = [Column("heel", "heel", "deg", 1), Column("gz", "GZ", "m", 4), Column("kn", "KN", "m", 4),
            Column("draft", "draft", "m", 4), Column("trim", "trim", "deg", 3)]
    rows = [{c.key: r[c.key] for c in cols} for r in curve.rows()]
    side = {"name": "starboard", "heel": curve.heel.tolist(), "gz": curve.gz.tolist(), "max_gz": gmax,
            "angle_of_max": amax, "gz_digits": 4, "angle_digits": 1, "vanishing": v,
            "areas": [(0, 30, curve.area(0, 30)), (30, 40, curve.area(30, 40))]}
    gzfig = Figure("gz", "Righting-lever curve", "gz_curve",
                   data={"vessel": "Brindle", "sides": [side], "gm": curve.gm_upright,
                         "limits": [{"kind": "gz", "value": 0.2, "from": 30.0, "label": "GZ 0.20 m from 30°"}]})
    hyd = [hull.hydrostatics(t).to_dict() for t in (0.4, 0.6, 0.8, 1.0)]
    hfig = Figure("hyd", "Hydrostatic curves", "hydrostatic_curves", data={"vessel": "Brindle", "rows": hyd})
    return Document(
        title="Righting-lever curve", vessel="Brindle (brindle_barge.stl)",
        sections=[Section("gz", "Righting levers, heeling to starboard", values=values,
                          tables=[Table("curve", "GZ curve (free trim)", cols, rows)], figures=[gzfig]),
                  Section("hydrostatics", "Hydrostatics", figures=[hfig])],
        cautions=[], verdict=None,
        meta={"version": meshhydro.__version__, "inputs": [{"path": "meshes/brindle_barge.stl",
                                                            "sha256": sha256(BARGE)}]})
