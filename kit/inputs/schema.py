"""Declarative scenario schema: every key once, with its type, unit kind, range and help.

A schema is a tree of :class:`Table` (a TOML table), :class:`Tables` (an array of tables,
``[[pumps]]``) and :class:`Key` (a value). :func:`check` walks a parsed TOML document against
it and refuses, with a typed error naming the key path:

- an unknown key — suggesting where it belongs when the schema has it in another table (the
  TOML trap of a top-level key written after a ``[table]`` header), else the nearest key;
- a value of the wrong type — never coerced: ``"false"`` is not false, ``2.7`` is not ``2``,
  ``true`` is not a number, a number is not a quantity (it needs its unit);
- a quantity whose text does not parse as its unit kind (:func:`kit.units.parse`), or a value
  outside the key's range;
- a missing required key, and keys given together that exclude each other.

The same tree writes the key reference for users (:func:`reference`), so the documentation
cannot drift from what the reader accepts.

Example
-------
>>> t = Table("pump", "a pump", keys=(Key("speed", "quantity", kind="speed", help="rated speed"),))
>>> check({"speed": "1480 rpm"}, t)
>>> check({"sped": "1480 rpm"}, t)
Traceback (most recent call last):
...
kit.errors.UnknownKeyError: scenario key 'sped': is not a key of [pump]; did you mean 'speed'? \
(keys of [pump]: speed)
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Callable
from dataclasses import dataclass, field
from functools import lru_cache

from kit.errors import (
    DimensionError,
    HeadlineError,
    KeyTypeError,
    ScenarioError,
    UnknownKeyError,
)

__all__ = ["Key", "Table", "Tables", "check", "reference", "key_index", "TYPES"]

#: Value types a :class:`Key` may declare, with the words used in messages.
TYPES = {
    "text": "a text in quotes",
    "quantity": "a text with a number and its unit, e.g. \"10 m\"",
    "quantities": "a list of texts, each a number with its unit",
    "quantity_or_list": "a number with its unit, or a list of them",
    "number": "a plain number",
    "integer": "a whole number",
    "bool": "true or false (without quotes)",
    "choice": "one of the listed words, in quotes",
    "nominal": "a nominal size in quotes, e.g. \"4\" or \"1-1/2\"",
    "any": "a value",
}


@dataclass(frozen=True)
class Key:
    """One value of a table.

    ``kind`` is the unit kind of :mod:`kit.units` for quantities; ``low``/``high`` bound plain
    numbers (and quantities, in SI); ``choices`` is a tuple or a callable returning one;
    ``check`` an extra rule ``fn(value, path, ctx)`` that raises a kit error.
    """

    name: str
    type: str
    help: str = ""
    kind: str | None = None
    required: bool = False
    default: object = None
    choices: tuple | Callable | None = None
    low: float | None = None
    high: float | None = None
    low_inclusive: bool = True
    high_inclusive: bool = True
    check: Callable | None = None

    def __post_init__(self):
        if self.type not in TYPES:
            raise ValueError(f"Key {self.name!r}: unknown type {self.type!r}")


@dataclass(frozen=True)
class Table:
    """A TOML table: its keys, sub-tables and arrays of tables.

    ``exclusive`` lists sets of alternatives; of each set at most one group of keys may be
    given (e.g. ``((("level",), ("level_low", "level_high")),)``); ``variant`` names a key whose value selects
    the keys allowed (``variants[value]`` is a tuple of key names); ``check`` is an extra rule
    ``fn(table_dict, path, ctx)``; ``open_keys`` allows any key (its entries are checked by
    ``check``) — used where a registry, not the schema, owns the keys (fitting parameters).
    """

    name: str
    help: str = ""
    keys: tuple = ()
    required: bool = False
    exclusive: tuple = ()
    variant: str | None = None
    variants: dict = field(default_factory=dict)
    check: Callable | None = None
    open_keys: bool = False
    #: ``{key: reason}`` for keys a user may expect here that this table refuses on purpose.
    hints: dict = field(default_factory=dict)

    def entry(self, name: str):
        for k in self.keys:
            if k.name == name:
                return k
        return None

    @property
    def names(self) -> tuple:
        return tuple(k.name for k in self.keys)


@dataclass(frozen=True)
class Tables:
    """An array of tables (``[[pumps]]``, ``fittings = [ {...}, ... ]``)."""

    name: str
    table: Table
    help: str = ""
    required: bool = False
    min_items: int = 0
    max_items: int = 1000

    @property
    def keys(self) -> tuple:
        return self.table.keys


# ------------------------------------------------------------------ index and suggestions


_INDEXES: dict = {}


def key_index(root: Table) -> dict:
    """``{key name: [table path, ...]}`` over the whole schema (for "belongs in" hints)."""
    hit = _INDEXES.get(id(root))
    if hit is not None and hit[0] is root:
        return hit[1]
    out: dict = {}

    def walk(t, path):
        for k in t.keys:
            out.setdefault(k.name, []).append(path)
            if isinstance(k, Table):
                walk(k, f"{path}.{k.name}" if path else k.name)
            elif isinstance(k, Tables):
                walk(k.table, f"{path}.{k.name}" if path else k.name)

    walk(root, "")
    _INDEXES[id(root)] = (root, out)
    return out


def _where(path: str) -> str:
    return f"[{path}]" if path else "the top level"


def _unknown(name: str, table, path: str, ctx) -> UnknownKeyError:
    full = f"{path}.{name}" if path else name
    if name in getattr(table, "hints", {}):
        return UnknownKeyError(full, f"is not a key of {_where(path)}: {table.hints[name]}",
                               ctx.source)
    valid = [n for n in table.names]
    places = [p for p in ctx.index.get(name, []) if p != _strip_indices(path)]
    if places:
        target = places[0]
        if target == "":
            why = ("it is a top-level key: TOML files every key written after a [table] "
                   "header into that table, so move it above the first [table] header")
        else:
            why = f"it belongs in [{target}]"
        return UnknownKeyError(full, f"is not a key of {_where(path)}; {why}", ctx.source,
                               belongs_in=target)
    near = difflib.get_close_matches(name, valid, n=1, cutoff=0.6)
    if not near:  # a key of the same spelling family anywhere (presure -> pressure)
        near_all = difflib.get_close_matches(name, list(ctx.index), n=1, cutoff=0.75)
        if near_all:
            where = ctx.index[near_all[0]][0]
            hint = (f"; did you mean '{near_all[0]}' (a key of {_where(where)})?")
            return UnknownKeyError(full, f"is not a key of {_where(path)}{hint} (keys of "
                                   f"{_where(path)}: {', '.join(valid) or 'none'})", ctx.source,
                                   suggestion=near_all[0], belongs_in=where)
    hint = f"; did you mean '{near[0]}'?" if near else ""
    return UnknownKeyError(full, f"is not a key of {_where(path)}{hint} (keys of {_where(path)}: "
                           f"{', '.join(valid) or 'none'})", ctx.source,
                           suggestion=near[0] if near else None)


def _strip_indices(path: str) -> str:
    import re

    return re.sub(r"\[\d+\]", "", path)


# ------------------------------------------------------------------ checking


@dataclass
class Context:
    """What a check needs besides the value: the source name, the barometric pressure for
    gauge pressures, and the key index for hints."""

    source: str | None = None
    p_baro: float = 101325.0
    index: dict = field(default_factory=dict)


def check(doc, root: Table, source: str | None = None, p_baro: float = 101325.0,
          path: str = "") -> None:
    """Check ``doc`` (a parsed TOML table) against ``root``; raise the first error found.

    Errors are :class:`~kit.errors.ScenarioError` subclasses naming the key path
    (``discharge.segments[1].pipe.schedule``).
    """
    ctx = Context(source, p_baro, key_index(root))
    _table(doc, root, path, ctx)


def _table(doc, t: Table, path: str, ctx: Context) -> None:
    if not isinstance(doc, dict):
        raise KeyTypeError(path or "(file)", doc, f"a table of keys ({t.help or t.name})",
                           ctx.source)
    allowed = None
    if t.variant is not None and t.variant in doc:
        sel = doc[t.variant]
        entry = t.entry(t.variant)
        _value(sel, entry, f"{path}.{t.variant}" if path else t.variant, ctx)
        allowed = set(t.variants.get(sel, t.names)) | {t.variant}
    for name, value in doc.items():
        entry = t.entry(name)
        full = f"{path}.{name}" if path else name
        if entry is None:
            if t.open_keys:
                continue
            raise _unknown(name, t, path, ctx)
        if allowed is not None and name not in allowed:
            raise UnknownKeyError(full, f"does not apply when {t.variant} = {doc[t.variant]!r} "
                                  f"(keys for it: {', '.join(sorted(allowed))})", ctx.source)
        if isinstance(entry, Table):
            _table(value, entry, full, ctx)
        elif isinstance(entry, Tables):
            _tables(value, entry, full, ctx)
        elif name != t.variant:
            _value(value, entry, full, ctx)
    for entry in t.keys:
        if allowed is not None and entry.name not in allowed:
            continue
        if getattr(entry, "required", False) and entry.name not in doc:
            full = f"{path}.{entry.name}" if path else entry.name
            what = TYPES.get(getattr(entry, "type", ""), "a table")
            help_ = f" — {entry.help}" if entry.help else ""
            raise ScenarioError(full, f"is missing ({what}{help_})", ctx.source)
    for alternatives in t.exclusive:
        given = [g for g in alternatives if any(k in doc for k in g)]
        if len(given) > 1:
            a, b = given[0], given[1]
            bk = [k for k in b if k in doc][0]
            raise ScenarioError(f"{path}.{bk}" if path else bk,
                                f"cannot be given together with "
                                f"{', '.join(k for k in a if k in doc)} (give either "
                                f"{' + '.join(a)} or {' + '.join(b)})", ctx.source)
    if t.check is not None:
        t.check(doc, path, ctx)


def _tables(value, t: Tables, path: str, ctx: Context) -> None:
    if isinstance(value, dict):
        raise KeyTypeError(path, value, f"a list of tables ([[{path}]] blocks or "
                           "[ {...}, {...} ])", ctx.source)
    if not isinstance(value, list):
        raise KeyTypeError(path, value, f"a list of tables ({t.help or t.name})", ctx.source)
    if not t.min_items <= len(value) <= t.max_items:
        raise ScenarioError(path, f"must hold {t.min_items} to {t.max_items} entries, "
                            f"not {len(value)}", ctx.source)
    for i, item in enumerate(value):
        _table(item, t.table, f"{path}[{i}]", ctx)


def _is_number(v) -> bool:
    return isinstance(v, (int, float)) and not isinstance(v, bool)


def _value(value, k: Key, path: str, ctx: Context) -> None:
    typ = k.type
    src = ctx.source
    if typ == "any":
        pass
    elif typ == "text":
        if not isinstance(value, str):
            raise KeyTypeError(path, value, TYPES["text"], src)
        if len(value) > 2000:
            raise ScenarioError(path, f"is {len(value)} characters long; at most 2000", src)
    elif typ == "nominal":
        if isinstance(value, bool) or not isinstance(value, (str, int)):
            raise KeyTypeError(path, value, TYPES["nominal"], src)
    elif typ == "bool":
        if not isinstance(value, bool):
            raise KeyTypeError(path, value, TYPES["bool"], src)
    elif typ == "integer":
        if isinstance(value, bool) or not isinstance(value, int):
            raise KeyTypeError(path, value, TYPES["integer"], src)
        _bounds(value, k, path, ctx, unit=None)
    elif typ == "number":
        if not _is_number(value):
            raise KeyTypeError(path, value, TYPES["number"], src)
        if not math.isfinite(value):
            raise ScenarioError(path, f"must be a finite number, not {value!r}", src)
        _bounds(value, k, path, ctx, unit=None)
    elif typ == "choice":
        choices = k.choices() if callable(k.choices) else k.choices
        if not isinstance(value, str):
            raise KeyTypeError(path, value, f"{TYPES['choice']}: {', '.join(map(str, choices))}",
                               src)
        if value not in choices:
            near = difflib.get_close_matches(value, list(choices), n=1, cutoff=0.6)
            hint = f"; did you mean {near[0]!r}?" if near else ""
            raise ScenarioError(path, f"must be one of {', '.join(map(repr, choices))}, not "
                                f"{value!r}{hint}", src)
    elif typ == "quantity":
        _quantity(value, k, path, ctx)
    elif typ in ("quantities", "quantity_or_list"):
        if isinstance(value, list):
            if not value:
                raise ScenarioError(path, "must list at least one value", src)
            for i, v in enumerate(value):
                _quantity(v, k, f"{path}[{i}]", ctx)
        elif typ == "quantity_or_list":
            _quantity(value, k, path, ctx)
        else:
            raise KeyTypeError(path, value, TYPES["quantities"], src)
    if k.check is not None:
        k.check(value, path, ctx)


@lru_cache(maxsize=8192)
def _si(text: str, kind: str, p_baro: float) -> float:
    """:func:`kit.units.parse` memoised on its inputs (a pure function of them)."""
    from kit import units

    return units.parse(text, kind, "value", p_baro)


def _quantity(value, k: Key, path: str, ctx: Context) -> float:
    from kit import units

    if _is_number(value):
        raise KeyTypeError(path, value, f"a number with its unit in quotes, e.g. "
                           f"\"{value} {units.display_unit(k.kind)}\"", ctx.source)
    if not isinstance(value, str):
        raise KeyTypeError(path, value, TYPES["quantity"], ctx.source)
    try:
        try:
            x = _si(value, k.kind, ctx.p_baro)
        except (HeadlineError, DimensionError):
            x = units.parse(value, k.kind, field=path, p_baro=ctx.p_baro)  # names the key
    except (HeadlineError, DimensionError) as exc:
        raise ScenarioError(path, str(exc), ctx.source) from None
    _bounds(x, k, path, ctx, unit=units.KINDS[k.kind][0] or None, text=value)
    return x


def _bounds(x, k: Key, path: str, ctx: Context, unit, text=None) -> None:
    lo, hi = k.low, k.high
    bad = (lo is not None and (x < lo or (x == lo and not k.low_inclusive))) or \
          (hi is not None and (x > hi or (x == hi and not k.high_inclusive)))
    if not bad:
        return
    u = f" {unit}" if unit else ""
    if lo is not None and hi is not None and k.low_inclusive and k.high_inclusive:
        why = f"must be from {lo:g}{u} to {hi:g}{u}"
    elif lo is not None and hi is not None:
        why = (f"must be {'at least' if k.low_inclusive else 'more than'} {lo:g}{u} and "
               f"{'at most' if k.high_inclusive else 'less than'} {hi:g}{u}")
    elif lo is not None:
        why = f"must be {'at least' if k.low_inclusive else 'more than'} {lo:g}{u}"
    else:
        why = f"must be {'at most' if k.high_inclusive else 'less than'} {hi:g}{u}"
    shown = text if text is not None else f"{x:g}"
    raise ScenarioError(path, f"{why}, not {shown}", ctx.source)


# ------------------------------------------------------------------ reference


def reference(root: Table, title: str) -> str:
    """The key reference of a schema as Markdown (generated: it cannot drift)."""
    lines = [f"# {title}", "", root.help, ""]

    def walk(t, path, depth):
        rows = [k for k in t.keys if isinstance(k, Key)]
        head = f"[[{path}]]" if isinstance(t, Tables) else (f"[{path}]" if path else "top level")
        table = t.table if isinstance(t, Tables) else t
        if rows or not path:
            lines.append(f"{'#' * min(depth + 2, 6)} {head}")
            lines.append("")
            if table.help and path:
                lines.append(table.help)
                lines.append("")
            for alternatives in table.exclusive:
                groups = " or ".join("(" + " + ".join(g) + ")" for g in alternatives)
                lines.append(f"Give at most one of: {groups}.")
                lines.append("")
            if rows:
                lines.append("| key | type | unit kind / choices | required | help |")
                lines.append("|---|---|---|---|---|")
                for k in rows:
                    ch = k.choices() if callable(k.choices) else k.choices
                    what = k.kind or (", ".join(map(str, ch)) if ch else "")
                    if len(what) > 120:
                        what = what[:117] + "…"
                    rng = ""
                    if k.low is not None or k.high is not None:
                        rng = f" range {'' if k.low is None else f'{k.low:g}'}…" \
                              f"{'' if k.high is None else f'{k.high:g}'}"
                    req = "yes" if k.required else (f"default {k.default}"
                                                    if k.default is not None else "no")
                    lines.append(f"| `{k.name}` | {k.type} | {what}{rng} | {req} | {k.help} |")
                lines.append("")
        for k in table.keys:
            if isinstance(k, (Table, Tables)):
                walk(k, f"{path}.{k.name}" if path else k.name, depth + 1)

    walk(root, "", 0)
    return "\n".join(lines).rstrip() + "\n"
