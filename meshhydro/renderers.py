"""Renderers: a :class:`~meshhydro.document.Document` as text, CSV or JSON.

Text: the title and header lines, then the sections separated by blank lines (a section is its
title, its key values, its tables, its sub-sections and its notes, one under the other), then
the verdict and the cautions. CSV: the document's primary table (every column), or the values of
its primary section as ``quantity,value,unit`` rows. JSON: the analysis' own payload when it has
one, else the whole document. Renderers format; they decide nothing.
"""
from __future__ import annotations

import dataclasses
from typing import Callable

from .document import Document, Quantity, Section, Table
from .errors import InputError
from . import __version__
from .output import CSV_DECIMALS, csv_number, key_values, text_table, to_csv, to_json


def _values_text(values: list[Quantity]) -> str:
    return key_values([(q.label, q.value, q.unit) for q in values]).rstrip()


def table_text(t: Table) -> str:
    """An aligned text table with a units line when any column has a unit."""
    cols = {c.key: c for c in t.columns}
    keys = t.text_keys if t.text_keys is not None else [c.key for c in t.columns]
    units = {k: cols[k].unit for k in keys if cols[k].unit}
    digits = {k: cols[k].digits for k in keys}
    heads = {k: cols[k].label for k in keys}
    lines = [t.title] if t.title else []
    lines.append(text_table(t.rows, keys, units, digits, heads).rstrip())
    return "\n".join(lines + t.notes)


def section_text(s: Section) -> str:
    parts = [s.title] if s.title else []
    parts += [_values_text(s.values)] if s.values else []
    parts += [table_text(t) for t in s.tables]
    parts += [section_text(x) for x in s.sections]
    parts += s.notes
    return "\n".join(parts)


def render_text(doc: Document) -> str:
    """The document as plain text (ends with a newline)."""
    parts = [doc.title] + doc.header
    if doc.sections:
        parts.append("\n\n".join(section_text(s) for s in doc.sections))
    if doc.verdict is not None and doc.verdict_text:
        parts.append(f"verdict: {doc.verdict_text}")
    return "\n".join(parts + doc.cautions) + "\n"


def render_csv(doc: Document) -> str:
    """The primary table (all columns) or the primary section's values as CSV, numbers rounded by their
    unit (:data:`~meshhydro.output.CSV_DECIMALS`: lengths to 1e-6 m), then the verdict and the caution as
    lines starting with ``#`` (after the table, so that the first line stays the header; readers skip them
    as comments, e.g. ``pandas.read_csv(..., comment="#")``)."""
    try:
        t = doc.table(doc.primary)
        return to_csv(t.rows, [c.key for c in t.columns], units={c.key: c.unit for c in t.columns}) + _tail(doc)
    except KeyError:
        pass
    try:
        s = doc.section(doc.primary)
    except KeyError:
        raise InputError(f"{doc.title}: this output has no table to write as CSV") from None
    rows = [{"quantity": q.label, "value": _csv_value(q), "unit": q.unit} for q in s.values]
    return to_csv(rows, ["quantity", "value", "unit"]) + _tail(doc)


def _tail(doc: Document) -> str:
    """The verdict (when the document has one) and the cautions as ``#`` lines."""
    lines = [f"# verdict: {doc.verdict_text}"] if doc.verdict is not None and doc.verdict_text else []
    return "".join(f"{line}\n" for line in lines + [f"# {c}" for c in doc.cautions])


def _csv_value(q: Quantity) -> object:
    """A quantity's value for CSV: a float as text rounded by its unit, anything else as is."""
    if isinstance(q.value, float):
        return csv_number(q.value, CSV_DECIMALS.get(q.unit))
    return q.value


def units_of(doc: Document) -> dict[str, str]:
    """Unit of every column and quantity of the document, by key (those with a unit)."""
    units: dict[str, str] = {}
    stack = list(doc.sections)
    while stack:
        s = stack.pop(0)
        units.update({q.key: q.unit for q in s.values if q.unit})
        for t in s.tables:
            units.update({c.key: c.unit for c in t.columns if c.unit})
        stack[0:0] = s.sections
    return units


def meta_of(doc: Document) -> dict[str, object]:
    """What a reader of the JSON needs besides the numbers: program, vessel, density, units, caution."""
    return {"program": f"meshhydro {__version__}", "vessel": doc.vessel, **doc.meta, "units": units_of(doc),
            "caution": doc.cautions[0] if doc.cautions else None}


def render_json(doc: Document) -> str:
    """The analysis' payload as JSON with a ``meta`` block (program, vessel, density, units), or the whole
    document when it has no payload. A payload that is a list goes under ``rows``."""
    if doc.data is not None:
        data = doc.data if isinstance(doc.data, dict) else {"rows": doc.data}
        return to_json({"meta": meta_of(doc), **data})
    return to_json(dataclasses.asdict(doc))


#: format name -> renderer; a new format adds an entry here
RENDERERS: dict[str, Callable[[Document], str]] = {"text": render_text, "csv": render_csv, "json": render_json}


def render(doc: Document, fmt: str) -> str:
    """``doc`` in format ``fmt`` (a key of :data:`RENDERERS`)."""
    fn = RENDERERS.get(fmt)
    if fn is None:
        raise InputError(f"unknown output format {fmt!r}; known: {', '.join(RENDERERS)}")
    return fn(doc)
