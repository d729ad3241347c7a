"""Line lists (CSV): strict reading of the text into typed rows in SI.

A line list is CSV text with a header row naming its columns (any order, each at most once)::

    tag,flow,liquid,temperature,length,rise,duty,standard,schedule,material,condition,k_total

``tag``, ``flow`` and ``length`` are required; the other columns may be left out, and an empty
cell in them takes the default of :data:`DEFAULTS`. Every quantity is a number with its unit
(``350 gpm``, ``1450 ft``, ``60 degF``); ``k_total`` is a plain number (the row's total K);
``liquid`` is a catalogue key (``water``, ``propylene_glycol_aq:0.35`` with the mass fraction)
or ``scenario`` for the scenario's own liquid.

Row numbers are counted as a spreadsheet shows them: the file's line numbers, so the header is
row 1 and the first data row is row 2 (blank lines still count, and are otherwise ignored).

Method
------
1. File level: at most :data:`MAX_BYTES` bytes of UTF-8 text (a UTF-8 byte-order mark at the
   start is **tolerated** and dropped; UTF-16, other encodings and NUL bytes are refused) and
   at most :data:`MAX_ROWS` data rows.
2. Structure (refuses the whole list with a :class:`~kit.errors.ScenarioError` naming the
   row): the header's names must be known columns (an unknown one is refused with the nearest
   valid name by :func:`difflib.get_close_matches` and the valid list), none repeated, the
   required ones present; every data row must hold exactly as many values as the header has
   columns; a quote left open (which would make the csv module swallow the rows after it into
   one field) or a field spanning lines is refused with its row; a field over
   :data:`MAX_FIELD` characters, an empty tag, a control character in a tag and a repeated tag
   (naming both rows) are refused.
3. Values (per row): each cell is read with :func:`kit.units.parse`'s rules for its kind,
   range-checked, and each key checked against its registry
   (:data:`kit.core.criteria.DUTY_CLASSES`, :data:`kit.core.pipes.STANDARDS` and its schedules,
   :data:`kit.core.roughness.ROUGHNESS`, :data:`kit.core.liquids.LIQUIDS`). A bad value makes
   that row a :class:`RowError` (its message names ``batch row N (tag T): column``) and the
   other rows go on; ``strict=True`` raises the first one instead.

The work is column by column, so time is linear in the rows with a small constant: text without
quotes is split on line ends and commas at once (the csv module reads quoted text); each
distinct cell of a quantity column is split into number and unit by one regular-expression
pass over the column, each distinct unit converted once through :func:`kit.units.parse` (every
conversion here is affine, ``a + b·x``), and the ranges and registries checked with numpy and
sets. Only a row that this fast reading doubts is read again cell by cell through
:func:`kit.units.parse`, which gives its exact error (or accepts it).

Example
-------
>>> ll = read_line_list("tag,flow,length,rise\\nL-1,150 gpm,100 m,2 m\\nL-2,abc,5 m,\\n")
>>> r = ll.rows[0]
>>> r.tag, r.row, round(r.Q, 6), r.L, r.rise, r.duty
('L-1', 2, 0.009464, 100.0, 2.0, 'general_transfer')
>>> print(ll.errors[0].message)
'batch row 3 (tag L-2): flow' must be a number with a unit of volumetric flow..., not 'abc'
"""

from __future__ import annotations

import csv
import difflib
import gc
import io
import math
import re
from contextlib import contextmanager
from dataclasses import dataclass
from functools import cached_property, lru_cache
from itertools import compress
from operator import methodcaller
from pathlib import Path

import numpy as np

from kit import units
from kit.errors import (
    HeadlineError,
    InputError,
    OutOfRangeError,
    ScenarioError,
    ScenarioFileError,
    UnitParseError,
    UnknownChoiceError,
    UnknownKeyError,
    check_choice,
)

__all__ = [
    "LINE_LIST_COLUMNS", "REQUIRED_COLUMNS", "DEFAULTS", "RANGES", "MAX_BYTES", "MAX_ROWS",
    "MAX_FIELD", "LineRow", "RowError", "LineList", "read_line_list", "read_line_list_file",
    "decode_line_list", "write_line_list", "gc_paused",
]

#: Columns of a line list, in their usual order.
LINE_LIST_COLUMNS = ("tag", "flow", "liquid", "temperature", "length", "rise", "duty",
                     "standard", "schedule", "material", "condition", "k_total")
#: Columns the header must hold.
REQUIRED_COLUMNS = ("tag", "flow", "length")
#: Text taken for an optional column that is absent or whose cell is empty.
DEFAULTS = {"liquid": "scenario", "temperature": "20 degC", "rise": "0 m",
            "duty": "general_transfer", "standard": "asme_b36_10m", "schedule": "40",
            "material": "carbon_steel", "condition": "new", "k_total": "0"}
#: Allowed ranges in SI (low, high, low inclusive); ``rise`` is bounded by ±length.
RANGES = {"flow": (0.0, 100.0, False), "length": (0.0, 1.0e6, False),
          "temperature": (0.0, 1000.0, False), "k_total": (0.0, 1.0e4, True)}
#: Largest line list read [bytes of UTF-8] (the inline limit of a scenario's ``[batch] text``).
MAX_BYTES = 20_000_000
#: Most data rows read.
MAX_ROWS = 200_000
#: Longest field [characters].
MAX_FIELD = 1_000

_KIND = {"flow": "flow", "length": "length", "rise": "length", "temperature": "temperature"}
_PLAIN = re.compile(r"^\s*[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?\s*$")
_CONTROL = re.compile(r"[\x00-\x08\x0b\x0c\x0e-\x1f\x7f]")


@dataclass(frozen=True, slots=True)
class LineRow:
    """One line of a line list, checked and in SI.

    ``row`` is the spreadsheet row (header = 1); ``liquid`` is a catalogue key, or None for the
    scenario's liquid, with ``concentration`` the solute mass fraction of a solution [kg/kg].
    """

    tag: str
    row: int
    Q: float            # flow [m³/s]
    L: float            # length [m]
    rise: float         # elevation gain inlet to outlet [m]
    T: float            # temperature [K]
    K: float            # total K of the line's fittings [-]
    duty: str           # key of kit.core.criteria.DUTY_CLASSES
    standard: str       # key of kit.core.pipes.STANDARDS
    schedule: str       # a schedule or class of that standard
    material: str       # key of kit.core.roughness.ROUGHNESS
    condition: str      # 'new' or 'aged'
    liquid: str | None  # key of kit.core.liquids.LIQUIDS, or None: the scenario's liquid
    concentration: float | None = None


@dataclass(frozen=True, slots=True)
class RowError:
    """A data row whose values could not be read: its row, tag and the kit's error."""

    tag: str
    row: int
    error: HeadlineError

    @property
    def message(self) -> str:
        return str(self.error)


_COLS = ("tag", "row", "Q", "L", "rise", "T", "K", "duty", "standard", "schedule", "material",
         "condition", "liquid", "concentration")


@dataclass(frozen=True, eq=False)
class LineList:
    """A read line list, held by column (numpy arrays in SI, tuples of keys), and its refused
    rows. :attr:`rows` gives the same content as :class:`LineRow` objects in row order.

    Build one from typed rows with :meth:`from_rows`.
    """

    columns: tuple[str, ...]  # the header's columns, as written
    tag: tuple[str, ...]
    row: np.ndarray           # spreadsheet row numbers [-]
    Q: np.ndarray             # [m³/s]
    L: np.ndarray             # [m]
    rise: np.ndarray          # [m]
    T: np.ndarray             # [K]
    K: np.ndarray             # [-]
    duty: tuple[str, ...]
    standard: tuple[str, ...]
    schedule: tuple[str, ...]
    material: tuple[str, ...]
    condition: tuple[str, ...]
    liquid: tuple[str | None, ...]
    concentration: tuple[float | None, ...]
    errors: tuple[RowError, ...] = ()

    def __len__(self) -> int:
        return len(self.tag) + len(self.errors)

    @cached_property
    def rows(self) -> tuple[LineRow, ...]:
        """The good rows as :class:`LineRow` objects, in row order."""
        with gc_paused():
            return tuple(map(LineRow, self.tag, self.row.tolist(), self.Q.tolist(),
                             self.L.tolist(), self.rise.tolist(), self.T.tolist(),
                             self.K.tolist(), self.duty, self.standard, self.schedule,
                             self.material, self.condition, self.liquid, self.concentration))

    def items(self) -> list:
        """Rows and row errors together, in row order."""
        return sorted(self.rows + self.errors, key=lambda x: x.row)

    def raise_first(self) -> None:
        """Raise the error of the first refused row, if any."""
        if self.errors:
            raise self.errors[0].error

    @classmethod
    def from_rows(cls, rows, errors=(), columns=LINE_LIST_COLUMNS) -> LineList:
        """A line list of typed rows (and :class:`RowError` items, given in ``rows`` or
        ``errors``), ordered by row."""
        good, bad = [], list(errors)
        for r in rows:
            (bad if isinstance(r, RowError) else good).append(r)
        good.sort(key=lambda r: r.row)
        bad.sort(key=lambda r: r.row)
        cols = list(zip(*[tuple(getattr(r, c) for c in _COLS) for r in good],
                        strict=True)) or [()] * len(_COLS)
        f = {c: v for c, v in zip(_COLS, cols, strict=True)}
        arr = {c: np.array(f[c], dtype=float) for c in ("Q", "L", "rise", "T", "K")}
        return cls(tuple(columns), tuple(f["tag"]), np.array(f["row"], dtype=int), **arr,
                   **{c: tuple(f[c]) for c in ("duty", "standard", "schedule", "material",
                                               "condition", "liquid", "concentration")},
                   errors=tuple(bad))


# ------------------------------------------------------------------ registries (cached)

def _duty_keys():
    from kit.core.criteria import DUTY_CLASSES

    return tuple(DUTY_CLASSES)


def _standard_keys():
    from kit.core.pipes import STANDARDS

    return tuple(STANDARDS)


@lru_cache(maxsize=64)
def _schedules_of(standard: str) -> tuple[str, ...]:
    """Every schedule or class that ``standard`` tabulates at some size, in table order."""
    from kit.core import pipes

    seen = {}
    for nom in pipes.nominal_sizes(standard):
        for s in pipes.schedules(standard, nom):
            seen.setdefault(s, None)
    return tuple(seen)


def _materials():
    from kit.core.roughness import ROUGHNESS

    return tuple(ROUGHNESS)


def _conditions():
    from kit.core.roughness import CONDITIONS

    return tuple(CONDITIONS)


@lru_cache(maxsize=512)
def _affine(unit: str, kind: str) -> tuple[float, float] | None:
    """(a, b) with ``parse(f"{x} {unit}") = a + b·x`` (every conversion here is affine), or
    None when :func:`kit.units.parse` refuses the unit."""
    try:
        a = units.parse(f"0 {unit}", kind, "unit")
        return a, units.parse(f"1 {unit}", kind, "unit") - a
    except HeadlineError:
        return None


# ------------------------------------------------------------------ file level

def decode_line_list(data: bytes, source: str = "batch") -> str:
    """Line-list bytes as text: UTF-8 only, at most :data:`MAX_BYTES`; a UTF-8 byte-order mark
    is dropped; UTF-16 and binary files are refused saying so.

    >>> decode_line_list(b"\\xef\\xbb\\xbftag,flow\\n")
    'tag,flow\\n'
    """
    if len(data) > MAX_BYTES:
        raise ScenarioFileError(source, f"the line list is {len(data):,} bytes; at most "
                                f"{MAX_BYTES:,} bytes are read")
    if data[:2] in (b"\xff\xfe", b"\xfe\xff"):
        raise ScenarioFileError(source, "the line list is UTF-16 text; save it as UTF-8 CSV")
    if b"\x00" in data:
        raise ScenarioFileError(source, "the line list holds NUL bytes: it is not a text file "
                                "(save it as UTF-8 CSV)")
    if data[:3] == b"\xef\xbb\xbf":
        data = data[3:]
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise ScenarioFileError(source, f"the line list is not UTF-8 text (byte {exc.start} "
                                "cannot be read); save it as UTF-8 CSV") from None


def read_line_list_file(path, *, key: str = "batch", strict: bool = False,
                        defaults: dict | None = None) -> LineList:
    """:func:`read_line_list` of a file, its size checked before it is read.

    Parameters
    ----------
    path : str or Path
        The CSV file [-]
    key : str
        Key path that messages start with [-]
    strict : bool
        Raise the first bad row's error instead of collecting row errors [-]
    defaults : dict, optional
        As for :func:`read_line_list` [-]
    """
    p = Path(path)
    try:
        size = p.stat().st_size
        if size > MAX_BYTES:
            raise ScenarioFileError(key, f"the line list {p.name} is {size:,} bytes; at most "
                                    f"{MAX_BYTES:,} bytes are read")
        data = p.read_bytes()
    except OSError as exc:
        raise ScenarioError(key, f"line list {p.name} cannot be read: {exc.strerror}") from None
    return read_line_list(data, key=key, strict=strict, defaults=defaults)


def _check_text(text: str, key: str) -> str:
    if len(text) > MAX_BYTES:
        raise ScenarioFileError(key, f"the line list is {len(text):,} characters; at most "
                                f"{MAX_BYTES:,} are read")
    if text.startswith("\ufeff"):
        text = text[1:]
    if "\x00" in text:
        line = text.count("\n", 0, text.index("\x00")) + 1
        raise ScenarioFileError(key, f"row {line} holds a NUL byte: the line list is not CSV "
                                "text (save it as UTF-8 CSV)")
    n = text.count("\n") + text.count("\r")
    if n > 2 * MAX_ROWS + 2:  # \r\n counted twice; refined below on the rows themselves
        raise ScenarioFileError(key, f"the line list has more than {MAX_ROWS:,} rows")
    return text


def _defaults(given) -> dict:
    """:data:`DEFAULTS` with the caller's replacements (optional columns only)."""
    if not given:
        return DEFAULTS
    for c, v in given.items():
        if c not in DEFAULTS or not isinstance(v, str) or not v.strip():
            raise ScenarioError("batch defaults", f"{c!r}: {v!r} is not a default the line "
                                f"list takes (columns with defaults: {', '.join(DEFAULTS)}; "
                                "each default is non-empty text)")
    return {**DEFAULTS, **{c: v.strip() for c, v in given.items()}}


# ------------------------------------------------------------------ structure

def _header(names: list[str], hrow: int, key: str) -> tuple[str, ...]:
    cols = [c.strip() for c in names]
    where = f"{key} header (row {hrow})"
    valid = ", ".join(LINE_LIST_COLUMNS)
    for i, c in enumerate(cols):
        if not c:
            raise ScenarioError(where, f"column {i + 1} has no name; valid "
                                f"columns: {valid}")
        if c not in LINE_LIST_COLUMNS:
            near = difflib.get_close_matches(c.lower(), LINE_LIST_COLUMNS, n=1, cutoff=0.6)
            hint = f"did you mean {near[0]!r}? " if near else ""
            raise UnknownKeyError(where, f"column {c!r} is not a line-list "
                                  f"column; {hint}valid columns: {valid}",
                                  suggestion=near[0] if near else None)
    for i, c in enumerate(cols):
        if c in cols[:i]:
            raise ScenarioError(where, f"column {c!r} appears twice "
                                f"(columns {cols.index(c) + 1} and {i + 1})")
    missing = [c for c in REQUIRED_COLUMNS if c not in cols]
    if missing:
        raise ScenarioError(where, f"required column(s) {', '.join(missing)} "
                            f"missing; the header must hold {', '.join(REQUIRED_COLUMNS)}")
    return tuple(cols)


def _csv_records(text: str, key: str) -> tuple[list[int], list[list[str]]]:
    """Row numbers and cells of each CSV record (csv module), refusing quoting faults."""
    reader = csv.reader(io.StringIO(text, newline=None), strict=True)
    rows, recs = [], []
    prev = 0
    while True:
        try:
            rec = next(reader)
        except StopIteration:
            return rows, recs
        except csv.Error as exc:
            row = prev + 1
            msg = str(exc)
            if "field larger than field limit" in msg:
                raise ScenarioError(f"{key} row {row}", f"a field is longer than "
                                    f"{MAX_FIELD:,} characters") from None
            raise ScenarioError(f"{key} row {row}", "has a quote that is not closed, or text "
                                f"after a closing quote ({msg}); a quoted field must close on "
                                "its own row") from None
        line = reader.line_num
        if line - prev > 1:
            raise ScenarioError(f"{key} row {prev + 1}", f"has a quote that is not closed on its "
                                f"row: the field runs on to row {line} (a quoted field must "
                                "close on its own row)")
        prev = line
        rows.append(line)
        recs.append(rec)


def _table(text: str, key: str) -> tuple[int, list[str], list[int], list[list[str]], int]:
    """Header row number and cells, then the data rows' numbers and their columns (lists of
    raw cells), and the longest line's length. Blank rows are dropped.

    Text without a quote character is split on line ends and commas directly (the cells the
    csv module would give), column by column, with no list per row; text with quotes goes
    through the csv module with its quoting faults refused.
    """
    if '"' in text:
        rows, recs = _csv_records(text, key)
        keep = [i for i, rec in enumerate(recs) if "".join(rec).strip()]
        rows, recs = [rows[i] for i in keep], [recs[i] for i in keep]
        if not recs:
            _empty(key)
        head, rows, recs = (rows[0], recs[0]), rows[1:], recs[1:]
        _check_shape(rows, list(map(len, recs)), len(head[1]), head[0], key)
        longest = max((sum(map(len, r)) for r in recs), default=0)
        columns = [list(c) for c in zip(*recs, strict=True)] if recs else [[]] * len(head[1])
        return head[0], head[1], rows, columns, longest
    if "\r" in text:
        text = text.replace("\r\n", "\n").replace("\r", "\n")
    lines = text.split("\n")
    if lines and lines[-1] == "":
        lines.pop()
    if ("\n\n" in text or "\n," in text or ",\n" in text or "\n " in text or "\n\t" in text
            or text[:1] in (",", " ", "\t", "\n")):  # there may be blank rows
        rows = [i + 1 for i, ln in enumerate(lines) if ln.strip(" \t,")]
        lines = [lines[i - 1] for i in rows]
    else:
        rows = list(range(1, len(lines) + 1))
    if not lines:
        _empty(key)
    hrow, hcells = rows[0], lines[0].split(",")
    rows, lines = rows[1:], lines[1:]
    ncol = len(hcells)
    counts = list(map(methodcaller("count", ","), lines))
    _check_shape(rows, [c + 1 for c in counts] if set(counts) - {ncol - 1} else [ncol],
                 ncol, hrow, key)
    longest = max(map(len, lines), default=0)
    flat = ",".join(lines).split(",") if lines else []
    return hrow, hcells, rows, [flat[c::ncol] for c in range(ncol)], longest


def _empty(key: str):
    raise ScenarioError(key, "the line list is empty: it needs a header row naming "
                        f"its columns ({', '.join(REQUIRED_COLUMNS)} at least)")


def _too_long(cells, row: int, key: str) -> None:
    for i, c in enumerate(cells):
        if len(c) > MAX_FIELD:
            raise ScenarioError(f"{key} row {row}", f"field {i + 1} is {len(c):,} characters "
                                f"long; at most {MAX_FIELD:,}")


# ------------------------------------------------------------------ values

class _Reader:
    """The cell-by-cell reading of one row (the reference the column-wise reading must
    match), with per-list caches of the registry look-ups."""

    def __init__(self):
        self.cache: dict = {}

    def quantity(self, text: str, col: str, field: str) -> float:
        kind = _KIND[col]
        value, unit = units.split_text(text, field, units.KINDS[kind][1])
        ab = _affine(unit, kind) if math.isfinite(value) else None
        if ab is None:
            units.parse(text, kind, field)  # raises the kit's own message for this text
            raise UnitParseError(field, text, units.KINDS[kind][1])
        x = ab[0] + ab[1] * value
        rng = RANGES.get(col)
        if rng is not None:
            lo, hi, inc = rng
            if not (lo < x <= hi or (inc and x == lo)):
                if col == "temperature":
                    units.parse(text, kind, field)  # the kit's own refusal comes first
                raise OutOfRangeError(field, x, units.KINDS[kind][0], lo, hi, inc)
        return x

    def plain(self, text: str, field: str) -> float:
        if not _PLAIN.match(text):
            raise InputError(field, text, "must be a plain number (the row's total K)")
        x = float(text)
        lo, hi, inc = RANGES["k_total"]
        if not math.isfinite(x) or x < lo or x > hi:
            raise OutOfRangeError(field, x, "-", lo, hi, inc)
        return x

    def choice(self, text: str, col: str, field: str, choices) -> str:
        hit = self.cache.get((col, text))
        if hit is None:
            try:
                check_choice(field, text, choices)
                hit = (text, None)
            except UnknownChoiceError as exc:
                hit = (None, exc.choices)
            self.cache[(col, text)] = hit
        if hit[0] is None:
            raise UnknownChoiceError(field, text, hit[1])
        return hit[0]

    def liquid(self, text: str, field: str) -> tuple[str | None, float | None]:
        if text == "scenario":
            return None, None
        hit = self.cache.get(("liquid", text))
        if hit is None:  # only good cells are cached: a bad one is read again for its row
            hit = self._liquid(text, field)
            self.cache[("liquid", text)] = hit
        return hit

    @staticmethod
    def _liquid(text: str, field: str) -> tuple[str, float | None]:
        from kit.core.liquids import LIQUIDS, make_liquid

        key, sep, conc = text.partition(":")
        check_choice(field, key, ("scenario",) + tuple(LIQUIDS))
        if key == "scenario":
            raise InputError(field, text, "takes no concentration: 'scenario' is the "
                             "scenario's own liquid")
        x = units.parse(conc, "fraction", f"{field} (concentration)") if sep else None
        try:
            make_liquid(key, x)
        except InputError as exc:
            raise InputError(field, text, f"is not a catalogue liquid as written: {exc}") \
                from None
        return key, x


def _row(rd: _Reader, cells: dict, row: int, key: str, defaults=DEFAULTS) -> LineRow:
    tag = cells["tag"]
    at = f"{key} row {row} (tag {tag}): "

    def get(col):
        v = cells.get(col, "")
        return v if v else defaults.get(col, "")

    Q = rd.quantity(get("flow"), "flow", at + "flow")
    L = rd.quantity(get("length"), "length", at + "length")
    rise = rd.quantity(get("rise"), "rise", at + "rise")
    if abs(rise) > L:
        raise OutOfRangeError(at + "rise", rise, "m", -L, L, True)
    T = rd.quantity(get("temperature"), "temperature", at + "temperature")
    K = rd.plain(get("k_total"), at + "k_total")
    liquid, conc = rd.liquid(get("liquid"), at + "liquid")
    duty = rd.choice(get("duty"), "duty", at + "duty", _duty_keys())
    standard = rd.choice(get("standard"), "standard", at + "standard", _standard_keys())
    schedule = rd.choice(get("schedule"), f"schedule {standard}", at + "schedule",
                         _schedules_of(standard))
    material = rd.choice(get("material"), "material", at + "material", _materials())
    condition = rd.choice(get("condition"), "condition", at + "condition", _conditions())
    return LineRow(tag, row, Q, L, rise, T, K, duty, standard, schedule, material, condition,
                   liquid, conc)


def read_line_list(text, *, key: str = "batch", strict: bool = False,
                   defaults: dict | None = None) -> LineList:
    """Read a CSV line list strictly into typed rows in SI (see the module's method).

    Parameters
    ----------
    text : str or bytes
        The CSV text (bytes are decoded by :func:`decode_line_list`) [-]
    key : str
        Key path that every message starts with (``batch row 7 (tag P-104): flow``) [-]
    strict : bool
        Raise the first bad row's error instead of collecting it as a :class:`RowError` [-]
    defaults : dict, optional
        Texts replacing some of :data:`DEFAULTS` for absent columns and empty cells, e.g.
        ``{"temperature": "60 degF"}`` for the scenario's temperature [-]

    Returns
    -------
    LineList
        ``rows`` (good rows) and ``errors`` (refused rows), each in row order.

    Raises
    ------
    ScenarioError
        A structural fault (columns, value counts, quoting, tags, sizes), naming the row.
    ScenarioFileError
        Not UTF-8 text, too large, too many rows.

    Examples
    --------
    >>> ll = read_line_list("tag,flow,length,duty\\nP-1,10 L/s,20 m,pump_suction\\n")
    >>> round(ll.rows[0].Q, 9), ll.rows[0].duty, ll.rows[0].liquid
    (0.01, 'pump_suction', None)
    """
    if isinstance(text, (bytes, bytearray)):
        text = decode_line_list(bytes(text), key)
    if not isinstance(text, str):
        raise ScenarioError(key, f"the line list must be CSV text, not {type(text).__name__}")
    text = _check_text(text, key)
    with gc_paused():
        return _read(text, key, strict, _defaults(defaults))


@contextmanager
def gc_paused():
    """Pause the cyclic garbage collector while a list is read or sized: it would otherwise
    walk the growing heap of row containers again and again (about 3× slower at 100k rows).
    Nothing built here forms a reference cycle."""
    was = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was:
            gc.enable()


def _read(text: str, key: str, strict: bool, defaults: dict) -> LineList:
    hrow, hcells, rownums, columns, longest = _table(text, key)
    _too_long(hcells, hrow, key)
    cols = _header(hcells, hrow, key)
    if len(rownums) > MAX_ROWS:
        raise ScenarioFileError(key, f"the line list has {len(rownums):,} rows; at most "
                                f"{MAX_ROWS:,} are read")
    if _spaced(text):
        data = {c: [x.strip() for x in col] for c, col in zip(cols, columns, strict=True)}
    else:  # no space or tab beside a comma or a line end: nothing to strip
        data = dict(zip(cols, columns, strict=True))
    if longest > MAX_FIELD:
        _check_lengths(data, rownums, key)
    _check_tags(data["tag"], rownums, key)
    return _read_columns(data, cols, rownums, key, strict, defaults)


def _check_shape(rownums, lens: list[int], ncol: int, hrow: int, key: str) -> None:
    """Every record holds ``ncol`` values (``lens``: the number of values of each)."""
    if lens and set(lens) != {ncol}:
        i = next(i for i, n in enumerate(lens) if n != ncol)
        n = lens[i]
        raise ScenarioError(f"{key} row {rownums[i]}", f"has {n} values; the header (row {hrow}) "
                            f"has {ncol} columns: "
                            + ("an extra value (a comma inside a number, such as 1,200 gpm, "
                               "must be quoted or left out)" if n > ncol
                               else "a value is missing (leave an empty cell between commas "
                                    "for a default)"))


def _check_lengths(data: dict, rownums, key: str) -> None:
    """No field longer than :data:`MAX_FIELD` (the first such row is named)."""
    first = None
    for col in data.values():
        if col and max(map(len, col)) > MAX_FIELD:
            i = next(i for i, v in enumerate(col) if len(v) > MAX_FIELD)
            first = i if first is None else min(first, i)
    if first is not None:
        _too_long([v[first] for v in data.values()], rownums[first], key)


def _check_tags(tags, rownums, key: str) -> None:
    if _CONTROL.search("".join(tags)):
        i = next(i for i, t in enumerate(tags) if _CONTROL.search(t))
        raise ScenarioError(f"{key} row {rownums[i]}", f"tag {tags[i]!r} holds a control "
                            "character: the line list is not plain CSV text")
    if "" in tags:
        i = tags.index("")
        raise ScenarioError(f"{key} row {rownums[i]}", "has an empty tag: every line needs "
                            "its own tag")
    if len(set(tags)) < len(tags):
        seen: dict = {}
        for t, row in zip(tags, rownums, strict=True):
            if t in seen:
                raise ScenarioError(f"{key} row {row}", f"repeats tag {t!r} of row "
                                    f"{seen[t]}: each tag must be used once")
            seen[t] = row




def _spaced(text: str) -> bool:
    """Whether any cell may have a space or tab to strip (beside a comma or a line end)."""
    return ("\t" in text or " ," in text or ", " in text or " \n" in text or "\n " in text
            or " \r" in text or "\r " in text or text[:1] == " " or text[-1:] == " ")

_NUM_UNIT = re.compile(r"^(?:([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)\s*([^\n]*)|([^\n]*))$",
                       re.M)
_NUM_ONLY = re.compile(r"^(?:([-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?)|([^\n]*))$", re.M)


def _distinct(cells: list[str]) -> tuple[list[str], np.ndarray]:
    """The distinct cells (first-seen order) and each cell's index among them."""
    uniq = {u: i for i, u in enumerate(dict.fromkeys(cells))}
    return list(uniq), np.fromiter(map(uniq.__getitem__, cells), np.intp, len(cells))


def _column_quantity(cells: list[str], col: str) -> tuple[np.ndarray, np.ndarray]:
    """SI values of a quantity column and a mask of the cells the fast path did not accept
    (those rows are read again one by one for their exact error). Each distinct cell is
    read once."""
    cells, code = _distinct(cells)
    kind = _KIND[col]
    n = len(cells)
    found = _NUM_UNIT.findall("\n".join(cells))
    if len(found) != n:  # not one match per cell: read every cell one by one
        return np.full(len(code), np.nan), np.ones(len(code), bool)
    nums, unit_text, _ = zip(*found, strict=True) if n else ((), (), ())
    x = np.array([v or "nan" for v in nums] if "" in nums else nums, dtype=float)
    ucode = {u: i for i, u in enumerate(dict.fromkeys(unit_text))}
    uidx = np.fromiter(map(ucode.__getitem__, unit_text), np.intp, n)
    conv = [_affine(u, kind) if u else None for u in ucode]
    a = np.array([c[0] if c else np.nan for c in conv])
    b = np.array([c[1] if c else np.nan for c in conv])
    value = a[uidx] + b[uidx] * x if n else x
    bad = ~np.isfinite(value)
    limit = getattr(units, "MAX_TEXT", None)
    if limit is not None:
        bad |= np.fromiter(map(len, cells), np.intp, n) > limit
    rng = RANGES.get(col)
    if rng is not None:
        lo, hi, inc = rng
        with np.errstate(invalid="ignore"):
            bad |= ~(((value > lo) | ((value == lo) if inc else False)) & (value <= hi))
    return value[code], bad[code]


def _column_plain(cells: list[str], col: str) -> tuple[np.ndarray, np.ndarray]:
    cells, code = _distinct(cells)
    n = len(cells)
    found = _NUM_ONLY.findall("\n".join(cells))
    if len(found) != n:
        return np.full(len(code), np.nan), np.ones(len(code), bool)
    nums = [v for v, _ in found]
    x = np.array([v or "nan" for v in nums] if "" in nums else nums, dtype=float) if n \
        else np.empty(0)
    lo, hi, _ = RANGES[col]
    with np.errstate(invalid="ignore"):
        return x[code], ~((x >= lo) & (x <= hi))[code]


def _column_choice(cells: list[str], choices) -> set[int]:
    valid = set(choices)
    if set(cells) <= valid:
        return set()
    return {i for i, v in enumerate(cells) if v not in valid}


def _read_columns(data: dict, cols, rownums, key: str, strict: bool,
                  defaults: dict) -> LineList:
    n = len(rownums)
    written = dict(data)  # the cells as written, for reading a doubted row again
    for c, d in defaults.items():  # absent columns and empty cells take their default
        if c not in data:
            data[c] = [d] * n
        elif "" in data[c]:
            data[c] = [v or d for v in data[c]]
    bad = np.zeros(n, bool)
    arrays = {}
    for c, name in (("flow", "Q"), ("length", "L"), ("rise", "rise"), ("temperature", "T")):
        if c in REQUIRED_COLUMNS and "" in data[c]:
            bad |= np.array([v == "" for v in data[c]])
            data[c] = [v or "?" for v in data[c]]
        arrays[name], b = _column_quantity(data[c], c)
        bad |= b
    with np.errstate(invalid="ignore"):
        bad |= ~(np.abs(arrays["rise"]) <= arrays["L"])
    arrays["K"], b = _column_plain(data["k_total"], "k_total")
    bad |= b
    rd = _Reader()
    read = {}
    for text in set(data["liquid"]):
        try:
            read[text] = rd.liquid(text, "liquid")
        except HeadlineError:
            read[text] = (None, None)
            bad |= np.array([v == text for v in data["liquid"]])
    pairs = list(map(read.__getitem__, data["liquid"]))
    liq = [k for k, _ in pairs]
    conc = [x for _, x in pairs]
    badset = set(np.flatnonzero(bad).tolist())
    badset |= _column_choice(data["duty"], _duty_keys())
    badset |= _column_choice(data["standard"], _standard_keys())
    badset |= _column_choice(data["material"], _materials())
    badset |= _column_choice(data["condition"], _conditions())
    sched = {s: set(_schedules_of(s)) for s in set(data["standard"]) if s in _standard_keys()}
    pairs = set(zip(data["standard"], data["schedule"], strict=True))
    if any(c not in sched.get(s, ()) for s, c in pairs):
        badset |= {i for i, (s, c) in enumerate(zip(data["standard"], data["schedule"],
                                                    strict=True))
                   if c not in sched.get(s, ())}
    errors, fixed = [], {}
    for i in sorted(badset):  # the exact error of each row: read it again cell by cell
        cells = {c: v[i] for c, v in written.items()}
        try:
            fixed[i] = _row(rd, cells, rownums[i], key, defaults)
        except HeadlineError as exc:
            if strict:
                raise
            errors.append(RowError(cells["tag"], rownums[i], exc))
    keep = np.ones(n, bool)
    keep[sorted(badset - set(fixed))] = False
    for i, r in fixed.items():  # a row the fast path doubted but the full reading accepts
        arrays["Q"][i], arrays["L"][i], arrays["rise"][i] = r.Q, r.L, r.rise
        arrays["T"][i], arrays["K"][i], liq[i], conc[i] = r.T, r.K, r.liquid, r.concentration
    idx = np.flatnonzero(keep)

    mask = keep.tolist()

    def pick(seq):
        return tuple(seq) if len(idx) == n else tuple(compress(seq, mask))

    return LineList(tuple(cols), pick(data["tag"]), np.asarray(rownums, dtype=int)[idx],
                    *(arrays[c][idx] for c in ("Q", "L", "rise", "T", "K")),
                    pick(data["duty"]), pick(data["standard"]), pick(data["schedule"]),
                    pick(data["material"]), pick(data["condition"]), pick(liq), pick(conc),
                    tuple(errors))


# ------------------------------------------------------------------ writing

def write_line_list(rows, columns=LINE_LIST_COLUMNS) -> str:
    """CSV text of typed rows, every quantity in its SI unit with full precision, so that
    :func:`read_line_list` gives the same rows back (row numbers are those of the new text).

    >>> ll = read_line_list("tag,flow,length\\nA,0.5 m**3/s,3 m\\n")
    >>> print(write_line_list(ll.rows, ("tag", "flow", "length")).strip())
    tag,flow,length
    A,0.5 m**3/s,3.0 m
    """
    def cell(r: LineRow, col: str) -> str:
        if col == "tag":
            return r.tag
        if col == "flow":
            return f"{r.Q!r} m**3/s"
        if col == "length":
            return f"{r.L!r} m"
        if col == "rise":
            return f"{r.rise!r} m"
        if col == "temperature":
            return f"{r.T!r} K"
        if col == "k_total":
            return repr(r.K)
        if col == "liquid":
            if r.liquid is None:
                return "scenario"
            return r.liquid if r.concentration is None else f"{r.liquid}:{r.concentration!r}"
        return getattr(r, col)

    for c in columns:
        if c not in LINE_LIST_COLUMNS:
            raise ScenarioError("batch", f"cannot write column {c!r}; valid columns: "
                                f"{', '.join(LINE_LIST_COLUMNS)}")
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(columns)
    for r in rows:
        w.writerow([cell(r, c) for c in columns])
    return buf.getvalue()
