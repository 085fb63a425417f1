"""The neutral report document that every analysis returns and every renderer reads.

An analysis (hydrostatic table, floating position, righting curve, criteria, tanks, ...) builds a
:class:`Document`; renderers turn it into text, CSV, JSON or HTML. Nothing here formats or draws:
a document holds values with their units, and figures as *data* plus the name of the view that draws
them, so the library below the views never imports a plotting package.

Shapes and units are carried explicitly: every :class:`Quantity` and every table :class:`Column` has a
unit string (``"m"``, ``"t"``, ``"deg"``, ``"m·rad"``, ``""`` for a pure number or text).
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any


@dataclass(frozen=True)
class Quantity:
    """One named value: ``key`` is the machine name (JSON/CSV), ``label`` the human one."""

    key: str
    label: str
    value: Any
    unit: str = ""
    digits: int = 4


@dataclass(frozen=True)
class Column:
    """A table column: machine key, human label, unit and the digits shown in text."""

    key: str
    label: str
    unit: str = ""
    digits: int = 3


@dataclass
class Table:
    """Rows of values under typed columns; each row is a dict keyed by ``Column.key``."""

    key: str
    title: str
    columns: list[Column]
    rows: list[dict[str, Any]] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    #: column keys shown in text, in that order (None: every column); CSV and JSON carry every column
    text_keys: list[str] | None = None


@dataclass
class Figure:
    """A figure as data: ``view`` names the drawing function in the views, ``data`` is its input."""

    key: str
    title: str
    view: str
    data: Any = None
    caption: str = ""


@dataclass
class Section:
    """A titled part of a document: key values, tables, figures, notes and sub-sections."""

    key: str
    title: str
    values: list[Quantity] = field(default_factory=list)
    tables: list[Table] = field(default_factory=list)
    figures: list[Figure] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    sections: list["Section"] = field(default_factory=list)


@dataclass
class Document:
    """What an analysis returns.

    Attributes
    ----------
    title : str
    vessel : str
        The hull's name (mesh file or the case's name).
    sections : list[Section]
    cautions : list[str]
        Shown with every output a safety decision could rest on.
    verdict : bool | None
        True when every check passed, False when one failed, None when nothing was judged.
    meta : dict
        Program version, input files with their SHA-256, density, units; carried into JSON and HTML.
    """

    title: str
    vessel: str
    sections: list[Section] = field(default_factory=list)
    cautions: list[str] = field(default_factory=list)
    verdict: bool | None = None
    meta: dict[str, Any] = field(default_factory=dict)
    #: lines shown under the title (source, vessel, ...)
    header: list[str] = field(default_factory=list)
    #: the verdict in words ("all criteria met"); shown when ``verdict`` is not None
    verdict_text: str = ""
    #: key of the table (or of the section whose values) a one-table format such as CSV exports
    primary: str = ""
    #: the analysis' own machine-readable payload, when it has one (JSON renders it as is)
    data: Any = None

    def section(self, key: str) -> Section:
        """The first section (at any depth) with ``key``; KeyError when none."""
        stack = list(self.sections)
        while stack:
            s = stack.pop(0)
            if s.key == key:
                return s
            stack[0:0] = s.sections
        raise KeyError(key)

    def table(self, key: str) -> Table:
        """The first table (in any section, at any depth) with ``key``; KeyError when none."""
        stack = list(self.sections)
        while stack:
            s = stack.pop(0)
            for t in s.tables:
                if t.key == key:
                    return t
            stack[0:0] = s.sections
        raise KeyError(key)
