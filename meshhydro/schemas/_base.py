"""Shared pieces of the input schemas: strict value types, the unknown-key check and one-line errors.

Every scalar is strict (no coercion: the string ``"false"`` is not a bool, ``"1.0"`` is not a number);
lists of TOML are accepted where a vector is meant and turned into tuples. Numbers must be finite.
Errors name the file, the table and the key: ``file.toml: [condition 2] items[1].mass: must be a positive
number, got -3``. Entries of arrays of tables (``[condition 2]``) and of inline lists (``items[1]``) are
counted from 1, as a reader of the file counts them.
"""
from __future__ import annotations

import difflib
import os
import re
import tomllib
from typing import Annotated, Any, Sequence

from pydantic import BaseModel, BeforeValidator, ConfigDict, Field, Strict, ValidationError, model_validator
from pydantic_core import PydanticCustomError

from ..errors import InputError

#: A finite number; a TOML integer is a number too, a bool or a string is not.
Num = Annotated[float, Strict(), Field(allow_inf_nan=False)]
#: A number > 0.
Pos = Annotated[float, Strict(), Field(allow_inf_nan=False, gt=0)]
#: A number >= 0.
NonNeg = Annotated[float, Strict(), Field(allow_inf_nan=False, ge=0)]
#: A fraction 0 <= f <= 1.
Fraction = Annotated[float, Strict(), Field(allow_inf_nan=False, ge=0, le=1)]
#: A permeability 0 < μ <= 1.
Permeability = Annotated[float, Strict(), Field(allow_inf_nan=False, gt=0, le=1)]
#: A heel angle of a curve [deg], 0..180.
Angle = Annotated[float, Strict(), Field(allow_inf_nan=False, ge=0, le=180)]
#: Text in quotes.
Text = Annotated[str, Strict(), Field(min_length=1)]
#: true or false.
Flag = Annotated[bool, Strict()]
#: A whole number >= 0.
Index = Annotated[int, Strict(), Field(ge=0)]


def _vector(n: int, axes: str):
    def check(v: Any) -> Any:
        if not isinstance(v, list) or len(v) != n:
            raise PydanticCustomError("vector", "must be a list of {n} numbers [{axes}], got {got}",
                                      {"n": n, "axes": axes, "got": _show(v)})
        return v
    return BeforeValidator(check)


#: A point [x, y, z] [m, hull frame] as a tuple of 3 floats.
Vec3 = Annotated[tuple[Num, Num, Num], _vector(3, "x, y, z")]
#: A point [x, z] [m, hull frame] as a tuple of 2 floats.
Vec2 = Annotated[tuple[Num, Num], _vector(2, "x, z")]


class SchemaTable(BaseModel):
    """Base of every schema table: frozen, and unknown keys refused with the nearest valid key."""

    model_config = ConfigDict(frozen=True, extra="forbid", populate_by_name=False)

    @model_validator(mode="before")
    @classmethod
    def _no_unknown_keys(cls, data: Any) -> Any:
        if isinstance(data, dict):
            known = [f.alias or name for name, f in cls.model_fields.items()]
            for k in data:
                if k not in known:
                    raise PydanticCustomError("unknown_key", "unknown key{hint}",
                                              {"key": k, "hint": suggest(str(k), known)})
        return data


def conflict(key: str, message: str) -> PydanticCustomError:
    """An error about ``key`` of the table being validated (raised from a model validator)."""
    return PydanticCustomError("conflict", message, {"key": key})


def suggest(word: str, options: Sequence[str]) -> str:
    """``'; did you mean X?'`` for the closest option, or the list of valid options."""
    close = difflib.get_close_matches(word, list(options), n=1, cutoff=0.6)
    if close:
        return f"; did you mean {close[0]}?"
    return "; valid keys: " + ", ".join(options) if options else ""


def _g(v: Any) -> str:
    return format(v, "g") if isinstance(v, (int, float)) and not isinstance(v, bool) else str(v)


def _show(v: Any, limit: int = 60) -> str:
    s = repr(v) if isinstance(v, str) else str(v).replace("True", "true").replace("False", "false")
    return s if len(s) <= limit else s[:limit - 3] + "..."


_BARE = re.compile(r"^[A-Za-z0-9_-]+$")


def where(loc: Sequence[Any], arrays: Sequence[str]) -> str:
    """Human path of a location: ``[condition 2] items[1].mass`` (counted from 1).

    ``arrays`` names the top-level keys that are arrays of tables; other top-level tables print as ``[hull]``.
    """
    loc = list(loc)
    if not loc:
        return ""
    head, rest = loc[0], loc[1:]
    if head in arrays and rest and isinstance(rest[0], int):
        out, rest = f"[{head} {rest[0] + 1}]", rest[1:]
    elif rest:
        out = f"[{head}]"
    else:
        return str(head)
    tail = ""
    for p in rest:
        if isinstance(p, int):
            tail += f"[{p + 1}]"
        else:
            s = str(p) if _BARE.match(str(p)) else '"' + str(p).replace('"', '\\"') + '"'
            tail += ("." if tail else "") + s
    return f"{out} {tail}" if tail else out


def _data_loc(loc: Sequence[Any], data: Any) -> list[Any]:
    """Drop the parts of a pydantic location that are not keys of the data (union tags, validator names)."""
    out: list[Any] = []
    cur = data
    for i, p in enumerate(loc):
        last = i == len(loc) - 1
        if not last and isinstance(cur, dict) and p == cur.get("kind"):
            continue  # the tag of a union chosen by kind
        if isinstance(cur, dict) and p in cur:
            out.append(p)
            cur = cur[p]
        elif isinstance(cur, list) and isinstance(p, int):
            out.append(p)
            cur = cur[p] if 0 <= p < len(cur) else None
        elif _is_tag(p):
            continue
        else:
            out.append(p)
            cur = None
    return out


def _is_tag(p: Any) -> bool:
    return isinstance(p, str) and (p.startswith(("function-", "list[", "dict[", "tuple[")) or p in _TAGS)


#: Tags that pydantic inserts into locations for tagged unions of this package.
_TAGS = {"range", "list"}

_ARTICLES = {"model_type": "must be a table", "dict_type": "must be a table", "model_attributes_type":
             "must be a table", "list_type": "must be a list", "tuple_type": "must be a list",
             "float_type": "must be a number", "int_type": "must be a whole number",
             "int_from_float": "must be a whole number", "bool_type": "must be true or false",
             "string_type": "must be text in quotes", "finite_number": "must be a finite number",
             "missing": "missing; this key is required"}


def _message(e: dict[str, Any]) -> str:
    t = e["type"]
    ctx = e.get("ctx") or {}
    got = _show(e.get("input"))
    if t in ("unknown_key", "conflict", "vector", "invalid"):
        return e["msg"]
    if t == "missing":
        return _ARTICLES[t]
    if t in _ARTICLES:
        return f"{_ARTICLES[t]}, got {got}"
    if t == "greater_than":
        return f"must be a positive number, got {got}" if ctx.get("gt") == 0 else \
            f"must be greater than {_g(ctx.get('gt'))}, got {got}"
    if t == "greater_than_equal":
        return f"must not be negative, got {got}" if ctx.get("ge") == 0 else \
            f"must be at least {_g(ctx.get('ge'))}, got {got}"
    if t == "less_than_equal":
        return f"must be at most {_g(ctx.get('le'))}, got {got}"
    if t == "less_than":
        return f"must be less than {_g(ctx.get('lt'))}, got {got}"
    if t == "too_short":
        if e.get("input") == "" or isinstance(e.get("input"), str):
            return f"must not be empty, got {got}"
        if ctx.get("min_length") == 1:
            return f"must not be empty, got {got}"
        return f"must hold at least {ctx.get('min_length')} entries, got {got}"
    if t == "too_long":
        return f"must hold at most {ctx.get('max_length')} entries, got {got}"
    if t == "literal_error":
        opts = re.findall(r"'([^']*)'", str(ctx.get("expected", "")))
        hint = suggest(str(e.get("input")), opts) if isinstance(e.get("input"), str) else ""
        hint = hint if hint.startswith("; did") else ""
        return f"must be {ctx.get('expected')}, got {got}{hint}"
    if t == "union_tag_invalid":
        opts = re.findall(r"'([^']*)'", str(ctx.get("expected_tags", "")))
        hint = suggest(str(ctx.get("tag")), opts)
        hint = hint if hint.startswith("; did") else ""
        return f"must be one of {', '.join(opts)}, got {ctx.get('tag')!r}{hint}"
    if t == "union_tag_not_found":
        return "missing; this key is required"
    return str(e.get("msg", t))


def one_line(exc: ValidationError, data: Any, source: str, arrays: Sequence[str]) -> InputError:
    """Turn a pydantic ValidationError into one :class:`InputError` line naming file, table and key."""
    errs = exc.errors(include_url=False)
    e = errs[0]
    ctx = e.get("ctx") or {}
    raw = list(e["loc"])
    if e["type"] in ("union_tag_invalid", "union_tag_not_found"):
        raw.append("kind")
    if "key" in ctx:
        raw.append(ctx["key"])
    loc = _data_loc(raw, data)
    msg = _message(e)
    if len(loc) == 1 and e["type"] in ("list_type", "model_type", "dict_type"):
        what = f"an array of tables [[{loc[0]}]]" if loc[0] in arrays else f"a table [{loc[0]}]"
        msg = f"must be {what}, got {_show(e.get('input'))}"
    path = where(loc, arrays)
    more = f" (and {len(errs) - 1} more)" if len(errs) > 1 else ""
    return InputError(f"{source}: {path + ': ' if path else ''}{msg}{more}")


def fail(source: str, loc: Sequence[Any], message: str, arrays: Sequence[str]) -> InputError:
    """An :class:`InputError` for a cross-check, with the same path style as schema errors."""
    path = where(loc, arrays)
    return InputError(f"{source}: {path + ': ' if path else ''}{message}")


def validate(model: type[BaseModel], data: Any, source: str, arrays: Sequence[str]) -> Any:
    """``model.model_validate(data)`` with errors turned into one-line :class:`InputError`."""
    if not isinstance(data, dict):
        raise InputError(f"{source}: expected a TOML document (a table of keys), got {_show(data)}")
    try:
        return model.model_validate(data)
    except ValidationError as exc:
        raise one_line(exc, data, source, arrays) from None


_TOML_AT = re.compile(r"\s*\(at line (\d+), column (\d+)\)\s*$")


def read_toml(path: str, missing: str = "no such file") -> dict[str, Any]:
    """Parse a TOML file into a dict; every failure is a one-line :class:`InputError` naming the file.

    A missing file says ``missing``; bytes that are not UTF-8 name the byte, its offset and line;
    TOML syntax errors give line and column. A UTF-8 byte-order mark is part of the encoding and allowed.
    """
    path = str(path)
    if not os.path.exists(path):
        raise InputError(f"{path}: {missing}")
    if os.path.isdir(path):
        raise InputError(f"{path}: is a folder, not a TOML file")
    try:
        with open(path, "rb") as fh:
            raw = fh.read()
    except OSError as exc:
        raise InputError(f"{path}: cannot be read ({exc.strerror})") from None
    skip = 3 if raw.startswith(b"\xef\xbb\xbf") else 0
    try:
        text = raw[skip:].decode("utf-8")
    except UnicodeDecodeError as exc:
        off = exc.start + skip
        line = raw.count(b"\n", 0, off) + 1
        raise InputError(f"{path}: not UTF-8 text: byte 0x{raw[off]:02x} at byte offset {off} (line {line}); "
                         f"save the file as UTF-8") from None
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        msg = str(exc)
        m = _TOML_AT.search(msg)
        if m:
            return _raise(f"{path}: line {m.group(1)}, column {m.group(2)}: not valid TOML "
                          f"({msg[:m.start()].strip()})")
        return _raise(f"{path}: not valid TOML ({msg})")


def _raise(message: str) -> Any:
    raise InputError(message) from None
