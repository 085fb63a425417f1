"""The self-contained HTML report and the report figures.

Checks against things outside the program: the XML parser of the standard library (the page is
written as well-formed polyglot HTML, so any unbalanced or unescaped markup fails to parse), the
W3C Content Security Policy directives (default-src 'none' forbids every load not allowed
explicitly), hashlib's SHA-256 (FIPS 180-4) for the input checksums, matplotlib's own layout
engine for label positions, and the document's own values as the expected text.
"""
from __future__ import annotations

import os
import re
import xml.etree.ElementTree as ET

import numpy as np
import pytest

from meshhydro import figures
from meshhydro.criteria import CAUTION
from meshhydro.document import Document, Figure, Section, Table, Column
from meshhydro.errors import InputError
from meshhydro.html import CSP, inline_svg, render_html

import report_docs as R


@pytest.fixture(scope="module")
def hand():
    doc = R.hand_document()
    return doc, render_html(doc, draw=R.draw_hand)


@pytest.fixture(scope="module")
def real():
    doc = R.real_document()
    return doc, render_html(doc, draw=figures.draw)


def _tree(text: str) -> ET.Element:
    return ET.fromstring(text.split("\n", 1)[1])  # past <!DOCTYPE html>


@pytest.mark.parametrize("which", ["hand", "real"])
def test_well_formed_and_escaped(which, request):
    doc, text = request.getfixturevalue(which)
    assert text.startswith("<!DOCTYPE html>\n")
    root = _tree(text)  # raises on any unbalanced tag or stray '<' / '&'
    assert root.tag == "html"
    assert not list(root.iter("script"))  # "<script>" in a table cell stays text
    h1 = root.find("body/header/h1")
    assert h1 is not None and h1.text == doc.title


@pytest.mark.parametrize("which", ["hand", "real"])
def test_every_section_in_contents(which, request):
    doc, text = request.getfixturevalue(which)
    root = _tree(text)
    nav = root.find(".//nav")
    links = [a.get("href") for a in nav.iter("a")]
    titles = [a.text for a in nav.iter("a")]
    sections = {s.get("id"): s for s in root.iter("section")}
    assert [t for t in titles[:-1]] == [s.title for s in R.all_sections(doc)]
    assert titles[-1] == "Program and inputs"
    assert len(links) == len(set(links)) == len(sections)
    for href in links:
        assert href.startswith("#") and href[1:] in sections
    ids = [e.get("id") for e in root.iter() if e.get("id")]
    assert len(ids) == len(set(ids))  # ids are unique, figures' SVG ids included


@pytest.mark.parametrize("which", ["hand", "real"])
def test_no_network_reference(which, request):
    _, text = request.getfixturevalue(which)
    root = _tree(text)
    csp = [m.get("content") for m in root.iter("meta") if m.get("http-equiv") == "Content-Security-Policy"]
    assert csp == [CSP] and CSP.startswith("default-src 'none';")
    for e in root.iter():
        for k, v in e.attrib.items():
            if k in ("src", "href") or k.endswith("}href"):
                assert v.startswith("#") or v.startswith("data:image/"), (e.tag, k, v[:60])
    assert not re.search(r"https?:|ftp:|@import|\burl\(\s*['\"]?(?!#|data:)", text)
    assert not re.search(r"""(?:src|href)\s*=\s*["']?//""", text)


def test_units_with_every_number(real):
    doc, text = real
    root = _tree(text)
    secs = list(root.iter("section"))[:-1]  # document order; the last one is "Program and inputs"
    for s, sec in zip(R.all_sections(doc), secs, strict=True):
        assert "".join(sec[0].itertext()) == s.title
        rows = {tr.find("th").text: [td.text for td in tr.findall("td")]
                for tr in sec.findall("./table[@class='mh-values']/tbody/tr")}
        for q in s.values:
            assert rows[q.label][1] == q.unit  # the unit stands beside the value
        for t, tab in zip(s.tables, sec.findall("./table[@class='mh-table']"), strict=True):
            heads = ["".join(th.itertext()) for th in tab.iter("th")]
            assert heads == [c.label + (f"[{c.unit}]" if c.unit else "") for c in t.columns]
    # the printed maximum and the figure's annotation are the same number (Quantity digits 4 = gz_digits 4)
    gmax = doc.section("gz").values[2]
    assert f"GZmax {gmax.value:.4f} m" in text and f">{gmax.value:.4f}<" in text


def test_round_off_prints_as_zero(real):
    _, text = real
    assert not re.search(r">-?\d\.\d+e-\d+<", text)  # trims of 1e-15 deg print as 0.000, not in exponent form


def test_checksums_version_caution_verdict(hand, real):
    doc, text = real
    assert R.sha256(R.BARGE) in text  # hashlib SHA-256 of the mesh file
    assert doc.meta["version"] in text
    assert "ab" * 32 in hand[1]
    for t in (hand[1], text):
        assert t.count(re.sub("'", "&#x27;", CAUTION)) >= 1
        body = _tree(t).find("body/header")
        assert "CAUTION" in "".join(body.find("./div[@class='mh-caution']").itertext())
    assert "Extra caution: the loading is assumed." in hand[1]
    assert "NOT every check met" in hand[1] and "nothing was judged" in text


def test_raster_figure_embedded(hand):
    _, text = hand
    img = [e for e in _tree(text).iter("img")]
    assert len(img) == 1 and img[0].get("src").startswith("data:image/png;base64,")


def test_gif_embedded_as_data_uri():
    f = Figure("g", "G", "raster")
    gif = b"GIF89a" + bytes(20)  # the GIF signature (GIF89a specification) is what is sniffed
    text = render_html(Document("x", "y", sections=[Section("s", "S", figures=[f])]), draw=lambda _: gif)
    (img,) = list(_tree(text).iter("img"))
    assert img.get("src").startswith("data:image/gif;base64,R0lGODlh")  # base64 of "GIF89a"


def test_bad_inputs_refused():
    t = Table("t", "T", [Column("a", "a", "m")], rows=[{"a": 1.0, "b": 2.0}])
    with pytest.raises(InputError, match="table 't', row 0: key 'b'"):
        render_html(Document("x", "y", sections=[Section("s", "S", tables=[t])]), draw=R.draw_hand)
    f = Figure("f", "F", "raster")
    with pytest.raises(InputError, match="neither PNG nor GIF"):
        render_html(Document("x", "y", sections=[Section("s", "S", figures=[f])]), draw=lambda _: b"JFIF")
    with pytest.raises(InputError, match="refers to 'http"):
        inline_svg('<svg><use href="http://example.org/a.svg#x"/></svg>', "p-", "f")
    with pytest.raises(InputError, match="scripts"):
        inline_svg("<svg><script>alert(1)</script></svg>", "p-", "f")
    with pytest.raises(InputError, match="no view named 'nope'"):
        figures.draw(Figure("k", "K", "nope", {}))
    with pytest.raises(InputError, match="unknown key 'colour'"):
        figures.gz_curve({"vessel": "v", "sides": [], "colour": "red"})
    with pytest.raises(InputError, match=r"side 0: 'heel' must be increasing"):
        figures.gz_curve({"vessel": "v", "sides": [{"name": "s", "heel": [0, 2, 1], "gz": [0, 1, 2]}]})


# ------------------------------------------------------------------ figures
def _side(gm: float = 1.0):
    """A wall-sided box curve: GZ = sin φ (GM + ½ BM tan² φ) (Barrass & Derrett), to 40°."""
    h = np.arange(0.0, 41.0, 1.0)
    r = np.radians(h)
    return {"name": "starboard", "heel": h, "gz": np.sin(r) * (gm + 0.5 * 1.5 * np.tan(r) ** 2)}


def _text_boxes(fig, ax):
    fig.canvas.draw()
    rend = fig.canvas.get_renderer()
    return [t.get_window_extent(rend) for t in ax.texts if t.get_text()], rend


def test_gm_tangent_does_not_set_the_scale():
    # a catamaran's GM of tens of metres must not squash a curve whose GZ stays below 1 m
    s = _side(0.8)
    fig = figures.gz_figure({"vessel": "twin", "sides": [s], "gm": 30.0})
    lo, hi = fig.axes[0].get_ylim()
    assert hi < 1.5 * float(np.max(s["gz"])) + 0.2 and lo <= 0.0
    assert any("GM = 30.000 m" in t.get_text() for t in fig.axes[0].get_legend().get_texts())


def test_gz_figure_legend_outside_and_max_as_given():
    port = dict(_side(1.0), name="port")
    data = {"vessel": "box", "gm": 1.0,
            "sides": [dict(_side(1.2), max_gz=0.98765, angle_of_max=40.0, gz_digits=4, areas=[(0, 30), (30, 40, 0.1)]),
                      dict(port, max_gz=0.9, angle_of_max=40.0)],
            "limits": [{"kind": "gz", "value": 0.2, "from": 30, "label": "GZ 0.20 m"},
                       {"kind": "angle", "value": 25, "label": "25°"}],
            "heeling_arm": {"heel": [0, 40], "arm": [0.1, 0.05], "label": "arm", "residual": (5, 30)}}
    fig = figures.gz_figure(data)
    ax = fig.axes[0]
    fig.canvas.draw()
    rend = fig.canvas.get_renderer()
    leg = ax.get_legend()
    assert not leg.get_window_extent(rend).overlaps(ax.get_window_extent(rend))
    labels = [t.get_text() for t in leg.get_texts()]
    assert "GZmax 0.9877 m at 40.0° (starboard)" in labels  # the value given, to its printed digits
    assert any(lab.startswith("area 30–40° = 0.1000 m·rad") for lab in labels)
    assert ax.get_xlabel().endswith("[deg]") and "[m]" in ax.get_ylabel() and "box" in ax.get_title()
    styles = {line.get_linestyle() for line in ax.get_lines() if line.get_label().startswith("GZ, heeling")}
    assert len(styles) == 2  # the two sides differ in line style, not only colour


def test_section_plot_labels_do_not_pile_up(box_hull):
    from meshhydro.sweep import heel_trace

    tr = heel_trace(box_hull, 200.0, (10.0, 0.0, 2.0), np.arange(0.0, 61.0, 2.5))
    data = {"vessel": "box", "heel": tr.heel, "cob": tr.cob, "metacentre": tr.metacentre, "up": tr.up,
            "cog": tr.cog, "gz": tr.gz, "at": 30.0}
    fig = figures_plot_section(data)
    ax = fig.axes[0]
    boxes, _ = _text_boxes(fig, ax)
    assert 3 <= len(boxes) < len(tr.heel)
    for i in range(len(boxes)):
        for j in range(i + 1, len(boxes)):
            assert not boxes[i].overlaps(boxes[j])
    labels = [t.get_text() for t in ax.get_legend().get_texts()]
    k = int(np.flatnonzero(tr.heel == 30.0)[0])
    assert f"GZ {tr.gz[k]:+.3f} m at 30°" in labels and "B trace" in labels and "M locus" in labels
    assert all(len(lab) <= 40 for lab in labels)


def figures_plot_section(data):
    from meshhydro.figures_plot import section_figure

    return section_figure(data)


def test_hydrostatic_curves_units_and_longitudinal(box_hull):
    from meshhydro.figures_plot import hydrostatics_figure

    rows = [box_hull.hydrostatics(t).to_dict() for t in (1.0, 2.0, 3.0)]
    fig = hydrostatics_figure({"vessel": "Box 20 m", "rows": rows})
    axes = [a for a in fig.axes if a.get_xlabel() and a.get_legend() is not None]
    assert len(axes) == 8
    for a in axes:
        assert re.search(r"\[[^\]]+\]$", a.get_xlabel()), a.get_xlabel()
    legends = {t.get_text() for a in axes for t in a.get_legend().get_texts()}
    assert {"BMl", "KMl", "BMt", "KMt", "KB"} <= legends
    assert "Box 20 m" in fig.get_suptitle()
    # BMl = L²/(12 T) for a box (Barrass & Derrett): the drawn BMl line carries it
    bml = next(line for a in axes for line in a.get_lines() if line.get_label() == "BMl")
    assert np.allclose(bml.get_xdata(), [20.0 ** 2 / (12 * t) for t in (1.0, 2.0, 3.0)], rtol=1e-9)


def test_convergence_integer_ticks_and_floor():
    from meshhydro.figures_plot import convergence_figure

    rows = [{"stations": n, "rule": "simpson", "volume_error_percent": 1e-14, "bmt_error_percent": 10.0 / n ** 2}
            for n in (4, 8, 16, 32)]
    fig = convergence_figure({"vessel": "v", "rows": rows, "floor": 1e-9})
    ax = fig.axes[0]
    fig.canvas.draw()
    assert [t.get_text() for t in ax.get_xticklabels()] == ["4", "8", "16", "32"]
    vol = next(line for line in ax.get_lines() if line.get_label() == "volume (simpson)")
    assert np.all(vol.get_ydata() == 1e-9)  # round-off drawn on the floor, not as a plunge to 1e-14
    assert any("round-off" in t.get_text() for t in ax.get_legend().get_texts())


def test_compare_styles_and_legend_outside():
    from meshhydro.figures_plot import compare_figure

    h = np.arange(0.0, 61.0, 5.0)
    cases = [{"label": f"case {i}", "heel": h, "gz": (1 + 0.1 * i) * np.sin(np.radians(2 * h))} for i in range(4)]
    fig = compare_figure({"title": "four", "cases": cases})
    ax = fig.axes[0]
    fig.canvas.draw()
    rend = fig.canvas.get_renderer()
    leg = fig.legends[0]
    assert not leg.get_window_extent(rend).overlaps(ax.get_window_extent(rend))
    lines = [line for line in ax.get_lines() if line.get_label().startswith("case")]
    assert len({str(line.get_linestyle()) for line in lines}) == 4
    assert len({line.get_color() for line in lines}) == 4


@pytest.mark.parametrize("suffix, magic", [(".png", b"\x89PNG"), (".svg", b"<?xml"), (".pdf", b"%PDF")])
def test_figure_files_by_suffix(tmp_path, suffix, magic):
    path = os.path.join(tmp_path, "gz" + suffix)
    svg = figures.gz_curve({"vessel": "box", "sides": [_side()]}, path=path)
    with open(path, "rb") as fh:
        assert fh.read(len(magic)) == magic
    assert svg.lstrip().startswith("<?xml") and "<svg" in svg and "righting lever GZ [m]" in svg
    with pytest.raises(InputError, match=r"suffix \.jpg; use \.png, \.svg, \.pdf"):
        figures.gz_curve({"vessel": "box", "sides": [_side()]}, path=os.path.join(tmp_path, "gz.jpg"))
    assert sorted(os.listdir(tmp_path)) == ["gz" + suffix]  # nothing half-written left behind
    other = os.path.join(tmp_path, "doc" + suffix)
    figures.save(Figure("gz", "GZ", "gz_curve", {"vessel": "box", "sides": [_side()]}), other)
    with open(other, "rb") as fh:
        assert fh.read(len(magic)) == magic


def test_renderer_and_views_import_no_plotting_at_import_time():
    # layering rule of the project: the HTML renderer never imports matplotlib; the figure modules
    # import it only inside the functions that draw
    import subprocess
    import sys

    code = ("import sys, meshhydro.html, meshhydro.figures; "
            "bad = [m for m in sys.modules if m.split('.')[0] in ('matplotlib', 'pyvista')]; "
            "sys.exit(1 if bad else 0)")
    assert subprocess.run([sys.executable, "-c", code], cwd=R.ROOT).returncode == 0
