"""A report document rendered as one self-contained HTML file.

:func:`render_html` turns a :class:`meshhydro.document.Document` into a single HTML page that needs
nothing else: styles inline, line art as inline SVG, raster images (PNG, GIF) as base64 ``data:``
URIs, and a Content-Security-Policy that forbids every network load. It opens offline in any
browser and prints on A4 or letter (``@page size: auto``; each top-level section starts a page;
table rows, figures and value lists are not split). All text is escaped. Figures are drawn by the
``draw`` callable the caller passes (the views own plotting; nothing here imports matplotlib).
"""
from __future__ import annotations

import base64
import html
import math
import re
from typing import Any, Callable, Mapping

import numpy as np

from .criteria import CAUTION
from .document import Column, Document, Figure, Quantity, Section, Table
from .errors import InputError

#: Forbids every load except the page's own inline styles and data: images.
CSP = ("default-src 'none'; img-src data:; style-src 'unsafe-inline'; font-src data:; "
       "base-uri 'none'; form-action 'none'")

STYLE = """
:root { --ink: #1d2330; --muted: #5b6473; --rule: #c9cfd8; --band: #f2f4f7; --pass: #1e6b3a;
  --fail: #a32020; --none: #6b5a12; }
* { box-sizing: border-box; }
body { margin: 0 auto; max-width: 62rem; padding: 1.5rem 1.25rem 3rem; color: var(--ink);
  font: 15px/1.45 system-ui, "Segoe UI", "DejaVu Sans", Arial, sans-serif; }
h1 { font-size: 1.6rem; margin: 0 0 .2rem; }
h2 { font-size: 1.25rem; margin: 2rem 0 .6rem; padding-bottom: .2rem; border-bottom: 2px solid var(--ink); }
h3 { font-size: 1.05rem; margin: 1.4rem 0 .5rem; }
h4 { font-size: .95rem; margin: 1rem 0 .4rem; }
.vessel { color: var(--muted); margin: 0 0 1rem; }
.mh-caution { border: 2px solid #b8860b; background: #fff8e1; padding: .6rem .9rem; margin: 1rem 0;
  font-weight: 600; }
.mh-caution p { margin: .2rem 0; }
.mh-verdict { padding: .55rem .9rem; margin: 1rem 0; font-weight: 700; font-size: 1.1rem; color: #fff; }
.mh-verdict.pass { background: var(--pass); }
.mh-verdict.fail { background: var(--fail); }
.mh-verdict.none { background: var(--none); }
nav.mh-toc { background: var(--band); padding: .6rem 1rem; margin: 1rem 0; }
nav.mh-toc ol { margin: .2rem 0 .2rem 1.2rem; padding: 0; }
nav.mh-toc a { color: var(--ink); }
table { border-collapse: collapse; margin: .5rem 0 1rem; font-variant-numeric: tabular-nums; }
caption { text-align: left; font-weight: 600; padding: .2rem 0; }
th, td { border-bottom: 1px solid var(--rule); padding: .22rem .6rem; vertical-align: top; }
th { background: var(--band); text-align: left; font-weight: 600; }
td.num, th.num { text-align: right; white-space: nowrap; }
th .unit { display: block; font-weight: 400; color: var(--muted); font-size: .85em; }
td.unit { color: var(--muted); }
table.mh-values td:first-child { padding-left: 0; }
td.mh-pass { color: var(--pass); font-weight: 600; }
td.mh-fail { color: var(--fail); font-weight: 700; }
.mh-note { color: var(--muted); font-size: .92em; margin: .3rem 0; }
figure { margin: 1rem 0; }
figure svg, figure img { max-width: 100%; height: auto; display: block; }
figcaption { color: var(--muted); font-size: .92em; margin-top: .3rem; }
.mh-meta td { font-size: .9em; }
.mh-meta code { word-break: break-all; }
footer { margin-top: 2.5rem; border-top: 1px solid var(--rule); padding-top: .6rem; color: var(--muted);
  font-size: .88em; }
@page { size: auto; margin: 16mm 14mm 18mm; }
@media print {
  body { max-width: none; padding: 0; font-size: 10.5pt; }
  nav.mh-toc a { text-decoration: none; }
  main > section.mh-major:not(:first-child) { break-before: page; }
  h2, h3, h4 { break-after: avoid; }
  tr, figure, .mh-caution, .mh-verdict, table.mh-values { break-inside: avoid; }
  thead { display: table-header-group; }
  .mh-caution { border-width: 1.5pt; }
  .mh-verdict { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
"""


# --------------------------------------------------------------------------- formatting
def format_value(value: Any, digits: int) -> str:
    """One value as text: fixed decimals for floats, 'yes'/'no' for booleans, '—' for none or not finite."""
    if value is None:
        return "—"
    if isinstance(value, (bool, np.bool_)):
        return "yes" if value else "no"
    if isinstance(value, (int, np.integer)):
        return str(int(value))
    if isinstance(value, (float, np.floating)):
        f = float(value)
        if not math.isfinite(f):
            return "—"
        if abs(f) < 0.5 * 10 ** (-digits):  # round-off (and -0) shows as zero, never as a stray exponent
            return f"{0.0:.{digits}f}"
        if abs(f) >= 1e9:
            return f"{f:.{max(digits, 1)}e}"
        return f"{f:.{digits}f}"
    if isinstance(value, (list, tuple, np.ndarray)):
        return ", ".join(format_value(v, digits) for v in np.asarray(value, dtype=object).ravel())
    return str(value)


def _is_number(v: Any) -> bool:
    return isinstance(v, (int, float, np.integer, np.floating)) and not isinstance(v, (bool, np.bool_))


def _e(text: Any) -> str:
    return html.escape(str(text), quote=True)


#: Table cells whose text is a check result get a colour (and keep their words, for print in black).
RESULT_CLASS = {"pass": "mh-pass", "fail": "mh-fail", "yes": "", "no": ""}


class _Ids:
    """Unique, safe element ids from section keys."""

    def __init__(self) -> None:
        self.used: set[str] = set()

    def make(self, key: str) -> str:
        base = "s-" + (re.sub(r"[^A-Za-z0-9_-]+", "-", key).strip("-") or "part")
        out, n = base, 2
        while out in self.used:
            out, n = f"{base}-{n}", n + 1
        self.used.add(out)
        return out


# --------------------------------------------------------------------------- pieces
def _values(values: list[Quantity]) -> str:
    rows = []
    for q in values:
        v = format_value(q.value, q.digits)
        cls = "num" if _is_number(q.value) else ""
        rows.append(f'<tr><th scope="row">{_e(q.label)}</th><td class="{cls}">{_e(v)}</td>'
                    f'<td class="unit">{_e(q.unit)}</td></tr>')
    return '<table class="mh-values"><tbody>' + "".join(rows) + "</tbody></table>"


def _header(c: Column, numeric: bool) -> str:
    unit = f'<span class="unit">[{_e(c.unit)}]</span>' if c.unit else ""
    return f'<th scope="col" class="{"num" if numeric else ""}">{_e(c.label)}{unit}</th>'


def _table(t: Table, tid: str) -> str:
    for i, r in enumerate(t.rows):
        extra = sorted(set(r) - {c.key for c in t.columns})
        if extra:
            raise InputError(f"table {t.key!r}, row {i}: key {extra[0]!r} is not a column")
    numeric = {c.key: any(_is_number(r.get(c.key)) for r in t.rows) for c in t.columns}
    head = "".join(_header(c, numeric[c.key]) for c in t.columns)
    body = []
    for r in t.rows:
        cells = []
        for c in t.columns:
            v = r.get(c.key)
            cls = "num" if _is_number(v) else RESULT_CLASS.get(str(v).strip().lower(), "")
            cells.append(f'<td class="{cls}">{_e(format_value(v, c.digits))}</td>')
        body.append("<tr>" + "".join(cells) + "</tr>")
    notes = "".join(f'<p class="mh-note">{_e(n)}</p>' for n in t.notes)
    return (f'<table class="mh-table" id="{tid}"><caption>{_e(t.title)}</caption><thead><tr>{head}</tr>'
            f"</thead><tbody>{''.join(body)}</tbody></table>{notes}")


_SVG_HEAD = re.compile(r"^.*?(?=<svg\b)", re.S)
_SVG_DROP = re.compile(r"<!--.*?-->|<metadata\b.*?</metadata>", re.S)
_XMLNS = re.compile(r'\s+xmlns(?::\w+)?="[^"]*"')
_ID = re.compile(r'\bid="([^"]+)"')
_REF = re.compile(r'(?:href|src)\s*=\s*"([^"]*)"|url\(\s*[\'"]?([^)\'"]*)')


def inline_svg(svg: str, prefix: str, where: str) -> str:
    """SVG text made fit to inline: prolog, doctype, comments and metadata dropped, namespace
    declarations removed (HTML supplies them), ids prefixed so figures cannot clash; any reference
    that is not a same-figure fragment is refused."""
    if "<svg" not in svg:
        raise InputError(f"figure {where}: the view returned text that is not SVG")
    s = _SVG_DROP.sub("", _SVG_HEAD.sub("", svg, count=1))
    s = _XMLNS.sub("", s).replace("xlink:href=", "href=")  # SVG 2 href: no namespace needed
    if re.search(r"<\s*(script|foreignObject|iframe|image)\b", s, re.I):
        raise InputError(f"figure {where}: SVG with scripts, foreign content or linked images is refused")
    ids = set(_ID.findall(s))
    for m in _REF.finditer(s):
        ref = m.group(1) if m.group(1) is not None else m.group(2)
        if not ref.startswith("#") or ref[1:] not in ids:
            raise InputError(f"figure {where}: SVG refers to {ref!r}, which is not inside the figure")
    s = _ID.sub(lambda m: f'id="{prefix}{m.group(1)}"', s)
    s = s.replace('href="#', f'href="#{prefix}')
    s = re.sub(r"url\(\s*#", f"url(#{prefix}", s)
    return s.strip()


def _raster(data: bytes, where: str, alt: str) -> str:
    if data.startswith(b"\x89PNG\r\n\x1a\n"):
        mime = "image/png"
    elif data[:6] in (b"GIF87a", b"GIF89a"):
        mime = "image/gif"
    else:
        raise InputError(f"figure {where}: the view returned bytes that are neither PNG nor GIF")
    return f'<img alt="{_e(alt)}" src="data:{mime};base64,{base64.b64encode(data).decode("ascii")}"/>'


def _figure(f: Figure, n: int, fid: str, draw: Callable[[Figure], str | bytes]) -> str:
    out = draw(f)
    body = inline_svg(out, f"f{n}-", repr(f.key)) if isinstance(out, str) else _raster(bytes(out), repr(f.key), f.title)
    if isinstance(out, str):
        body = re.sub(r"^<svg\b", f'<svg role="img" aria-label="{_e(f.title)}"', body, count=1)
    cap = _e(f.title) + (f" — {_e(f.caption)}" if f.caption else "")
    return f'<figure id="{fid}">{body}<figcaption>{cap}</figcaption></figure>'


class _Writer:
    def __init__(self, draw: Callable[[Figure], str | bytes]) -> None:
        self.draw, self.ids, self.figures = draw, _Ids(), 0

    def section(self, s: Section, depth: int) -> tuple[str, str]:
        """(HTML of the section, its table-of-contents entry)."""
        sid = self.ids.make(s.key)
        h = min(depth + 2, 6)
        parts = [f'<h{h}>{_e(s.title)}</h{h}>']
        if s.values:
            parts.append(_values(s.values))
        parts += [_table(t, self.ids.make("t-" + t.key)) for t in s.tables]
        for f in s.figures:
            self.figures += 1
            parts.append(_figure(f, self.figures, self.ids.make("f-" + f.key), self.draw))
        parts += [f'<p class="mh-note">{_e(n)}</p>' for n in s.notes]
        toc = []
        for sub in s.sections:
            body, entry = self.section(sub, depth + 1)
            parts.append(body)
            toc.append(entry)
        cls = "mh-major" if depth == 0 else "mh-sub"
        inner = f"<ol>{''.join(toc)}</ol>" if toc else ""
        return (f'<section class="{cls}" id="{sid}">{"".join(parts)}</section>',
                f'<li><a href="#{sid}">{_e(s.title)}</a>{inner}</li>')


def _meta_value(v: Any) -> str:
    if isinstance(v, Mapping):
        return "<table><tbody>" + "".join(f'<tr><th scope="row">{_e(k)}</th><td>{_meta_value(x)}</td></tr>'
                                           for k, x in v.items()) + "</tbody></table>"
    if isinstance(v, (list, tuple)) and v and all(isinstance(x, Mapping) for x in v):
        keys = list(dict.fromkeys(k for x in v for k in x))
        head = "".join(f'<th scope="col">{_e(k)}</th>' for k in keys)
        rows = "".join("<tr>" + "".join(f"<td>{_meta_value(x.get(k))}</td>" for k in keys) + "</tr>" for x in v)
        return f"<table><thead><tr>{head}</tr></thead><tbody>{rows}</tbody></table>"
    if isinstance(v, (list, tuple)):
        return ", ".join(_meta_value(x) for x in v)
    text = _e(f"{float(v):.10g}" if _is_number(v) else ("—" if v is None else v))
    return f"<code>{text}</code>" if isinstance(v, str) and re.fullmatch(r"[0-9a-fA-F]{40,128}", v) else text


def _meta(meta: Mapping[str, Any], mid: str) -> str:
    rows = "".join(f'<tr><th scope="row">{_e(k)}</th><td>{_meta_value(v)}</td></tr>' for k, v in meta.items())
    return (f'<section class="mh-major mh-meta" id="{mid}"><h2>Program and inputs</h2>'
            f"<table><tbody>{rows}</tbody></table></section>")


def _verdict(v: bool | None) -> str:
    if v is True:
        return '<div class="mh-verdict pass" role="status">Verdict: every check met</div>'
    if v is False:
        return '<div class="mh-verdict fail" role="alert">Verdict: NOT every check met</div>'
    return '<div class="mh-verdict none" role="status">Verdict: none (nothing was judged)</div>'


def render_html(doc: Document, *, draw: Callable[[Figure], str | bytes]) -> str:
    """The whole document as one self-contained HTML page (text, UTF-8).

    Parameters
    ----------
    doc : Document
        Sections, tables (values with their column units), figures as data, cautions, verdict
        and ``meta`` (program version, input files with their SHA-256, ...), shown as given.
    draw : callable(Figure) -> str | bytes
        Draws one figure: SVG text (inlined) or PNG/GIF bytes (embedded as a data URI).

    The standard caution (:data:`meshhydro.criteria.CAUTION`) is always shown, ahead of any other
    cautions the document carries. Raises InputError for a table row with a key that is not a
    column, or a figure that is neither SVG nor PNG/GIF or that refers outside itself.
    """
    w = _Writer(draw)
    mid = w.ids.make("about-run")
    bodies, toc = [], []
    for s in doc.sections:
        body, entry = w.section(s, 0)
        bodies.append(body)
        toc.append(entry)
    toc.append(f'<li><a href="#{mid}">Program and inputs</a></li>')
    cautions = [CAUTION] + [c for c in doc.cautions if c != CAUTION]
    caution = '<div class="mh-caution" role="note">' + "".join(f"<p>{_e(c)}</p>" for c in cautions) + "</div>"
    version = doc.meta.get("version") or doc.meta.get("program_version") or doc.meta.get("program") or ""
    return "\n".join([
        "<!DOCTYPE html>",
        '<html lang="en"><head><meta charset="utf-8"/>',
        f'<meta http-equiv="Content-Security-Policy" content="{CSP}"/>',
        '<meta name="viewport" content="width=device-width, initial-scale=1"/>',
        '<meta name="referrer" content="no-referrer"/>',
        f"<title>{_e(doc.title)} — {_e(doc.vessel)}</title>",
        f"<style>{STYLE}</style></head><body>",
        f'<header><h1>{_e(doc.title)}</h1><p class="vessel">Vessel: {_e(doc.vessel)}</p>',
        caution, _verdict(doc.verdict), "</header>",
        f'<nav class="mh-toc" aria-label="Contents"><strong>Contents</strong><ol>{"".join(toc)}</ol></nav>',
        "<main>", *bodies, _meta(doc.meta, mid), "</main>",
        f"<footer><p>meshhydro {_e(version)} — {_e(CAUTION)}</p></footer>",
        "</body></html>",
        "",
    ])
