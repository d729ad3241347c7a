"""Scenario files: TOML calc-input sheets, every quantity a string with its unit.

A :class:`Scenario` keeps the document exactly as read (nested dicts of strings, numbers
and lists), so saving writes back everything the file held — nothing is lost or rounded.
The ``build_*`` functions turn parts of the document into core objects (SI) and name the
key of anything malformed in a :class:`~kit.errors.ScenarioError`.

Layout (keys common to every kind)::

    schema = "headline-scenario/1"
    kind = "pump_selection"          # line_sizing | pump_selection | tank_drainage
    title = "..."
    [project]  name, calc_number, revision, prepared_by, date, checked_by, checked_date
    [site]     elevation = "85 m"    (or barometric_pressure = "100.3 kPa(a)")
    [display]  system = "SI"         (or "US")
    [liquid]   key, concentration, temperature_min, temperature_max   (or [liquid.user])
    [source] / [destination]   name, level_low, level_high, pressure, discharge
    [suction] / [discharge]    name, start_station, start_elevation, [[….segments]]

A segment::

    [[discharge.segments]]
    name = "riser"
    length = "24 m"
    rise = "18 m"
    pipe = { standard = "asme_b36_10m", nominal = "4", schedule = "40",
             material = "carbon_steel", condition = "new" }
    fittings = [ { kind = "fixed_k", K = 0.5, count = 2, label = "strainer" },
                 { kind = "bend", angle = 90, R_D = 1.5 } ]

Example
-------
>>> sc = loads('schema = "headline-scenario/1"\\nkind = "line_sizing"\\ntitle = "t"\\n')
>>> sc.kind
'line_sizing'
"""

from __future__ import annotations

import copy
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from kit.errors import ScenarioError, ScenarioFileError
from kit.inputs.common import (
    KINDS,
    build_endpoint,
    build_fitting,
    build_line,
    build_liquid,
    build_pipe,
    build_segment,
    build_site,
    build_temperatures,
    get,
    quantity,
)
from kit.inputs.common import SCHEMA_ID as SCHEMA

__all__ = [
    "SCHEMA", "KINDS", "Scenario", "load", "loads", "dumps", "save", "get", "quantity",
    "build_site", "build_liquid", "build_temperatures", "build_pipe", "build_fitting",
    "build_segment", "build_line", "build_endpoint", "build_system",
]

#: Largest scenario file read [bytes] (a calc sheet is a few kB; a line list inline is more).
MAX_BYTES = 5_000_000
#: Deepest nesting of tables and lists any scenario kind has.
MAX_DEPTH = 8


@dataclass
class Scenario:
    """A scenario document and where it came from."""

    doc: dict
    source: str = "<memory>"
    _built: dict = field(default_factory=dict, repr=False, compare=False)
    #: The text the document was read from: a save keeps its comments and layout.
    text: str | None = field(default=None, repr=False, compare=False)

    @property
    def kind(self) -> str:
        return self.doc["kind"]

    @property
    def title(self) -> str:
        return self.doc.get("title", "")

    @property
    def display_system(self) -> str:
        return self.doc.get("display", {}).get("system", "SI")

    def copy(self) -> Scenario:
        return Scenario(copy.deepcopy(self.doc), self.source, text=self.text)

    def set(self, path: str, value) -> None:
        """Set a dotted key (``"liquid.temperature_max"``) in the document."""
        node = self.doc
        *head, last = path.split(".")
        for k in head:
            node = node.setdefault(k, {})
        node[last] = value
        self._built.clear()

    def get(self, path: str, default=None):
        return get(self.doc, path, default)

    def self_contained(self) -> Scenario:
        """A copy whose files referred to by name (``[batch] file``) are carried inline as
        ``text``, so the scenario recomputes anywhere (the record stores this form)."""
        out = self.copy()
        file = get(out.doc, "batch.file")
        if file and "text" not in out.doc.get("batch", {}):
            base = Path(self.source).parent if self.source not in ("<memory>", "<string>") \
                else Path.cwd()
            try:
                out.doc["batch"]["text"] = (base / file).read_text(encoding="utf-8")
                out.doc["batch"]["source_file"] = out.doc["batch"].pop("file")
            except OSError as exc:
                raise ScenarioError("batch.file", f"cannot be read: {exc.strerror}",
                                    self.source) from None
        return out


def decode(data: bytes, source: str = "<bytes>") -> str:
    """Scenario bytes as text: UTF-8 only (a UTF-8 byte-order mark is dropped), at most
    :data:`MAX_BYTES`; UTF-16 and binary files are refused with a message saying so.

    >>> decode("kind = 'x'".encode())
    "kind = 'x'"
    """
    if len(data) > MAX_BYTES:
        raise ScenarioFileError("(file)", f"is {len(data):,} bytes; a scenario file may hold at "
                                f"most {MAX_BYTES:,} bytes", source)
    if data[:2] in (b"\xff\xfe", b"\xfe\xff"):
        raise ScenarioFileError("(file)", "is UTF-16 text; save it as UTF-8", source)
    if b"\x00" in data:
        raise ScenarioFileError("(file)", "holds NUL bytes: it is not a text file", source)
    if data[:3] == b"\xef\xbb\xbf":
        data = data[3:]
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise ScenarioFileError("(file)", f"is not UTF-8 text (byte {exc.start} cannot be "
                                "read); save it as UTF-8", source) from None


def _depth(node, level: int = 0) -> int:
    if level > MAX_DEPTH:
        return level
    if isinstance(node, dict):
        return max((_depth(v, level + 1) for v in node.values()), default=level)
    if isinstance(node, list):
        return max((_depth(v, level + 1) for v in node), default=level)
    return level


def loads(text: str, source: str = "<string>") -> Scenario:
    """Read a scenario from TOML text and check it against its kind's schema (strict).

    Unknown or misplaced keys, wrong types, unparsable quantities, out-of-range values and
    missing required keys are refused with a :class:`~kit.errors.ScenarioError` (or a
    subclass) naming the key path; see :mod:`kit.inputs.schema`.
    """
    from kit.inputs.kinds import ROOTS
    from kit.inputs.schema import check

    if isinstance(text, bytes):
        text = decode(text, source)
    from kit.inputs.line_sizing_schema import BATCH_TEXT_MAX

    if len(text) > MAX_BYTES + BATCH_TEXT_MAX:  # a record carries its line list inline
        raise ScenarioFileError("(file)", f"is {len(text):,} characters; a scenario with its "
                                f"line list inline may hold at most "
                                f"{MAX_BYTES + BATCH_TEXT_MAX:,}", source)
    if text.startswith("\ufeff"):
        text = text[1:]
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        raise ScenarioError("(file)", f"is not valid TOML: {exc}", source) from None
    except RecursionError:
        raise ScenarioFileError("(file)", f"is nested deeper than any scenario (at most "
                                f"{MAX_DEPTH} levels)", source) from None
    if _depth(doc) > MAX_DEPTH:
        raise ScenarioFileError("(file)", f"is nested deeper than any scenario (at most "
                                f"{MAX_DEPTH} levels)", source)
    schema = doc.get("schema")
    if schema != SCHEMA:
        raise ScenarioError("schema", f"must be {SCHEMA!r}, not {schema!r}", source)
    if doc.get("kind") not in KINDS:
        raise ScenarioError("kind", f"must be one of {', '.join(KINDS)}, not {doc.get('kind')!r}",
                            source)
    p_baro = _site_pressure(doc, source)
    check(doc, ROOTS[doc["kind"]], source, p_baro)
    return Scenario(doc, source, text=text)


def _site_pressure(doc: dict, source: str) -> float:
    """The barometric pressure gauge pressures are read against (checked before the rest)."""
    from kit.inputs.common import SITE
    from kit.inputs.schema import check

    site = doc.get("site", {})
    check(site, SITE, source, path="site")
    try:
        return build_site(doc)
    except ScenarioError as exc:
        raise ScenarioError(exc.key, exc.reason, source) from None


def load(path) -> Scenario:
    """Read a scenario file (UTF-8 TOML, at most :data:`MAX_BYTES`)."""
    p = Path(path)
    try:
        if p.stat().st_size > MAX_BYTES:
            raise ScenarioFileError("(file)", f"is {p.stat().st_size:,} bytes; a scenario file "
                                    f"may hold at most {MAX_BYTES:,} bytes", str(p))
        data = p.read_bytes()
    except OSError as exc:
        raise ScenarioError("(file)", f"cannot be read: {exc.strerror}", str(p)) from None
    return loads(decode(data, str(p)), str(p))


def dumps(sc: Scenario) -> str:
    """The scenario document as TOML text; a scenario read from text keeps that text's
    comments, layout and inline tables wherever a value did not change
    (:func:`kit.inputs.writer.merge`)."""
    from kit.inputs.writer import merge

    if sc.text is not None:
        return merge(sc.text, sc.doc)
    import tomli_w

    return tomli_w.dumps(sc.doc)


def save(sc: Scenario, path) -> None:
    """Write the scenario document to ``path`` (TOML)."""
    Path(path).write_text(dumps(sc), encoding="utf-8")


# ---------------------------------------------------------------- builders


def build_system(sc):
    """The :class:`~kit.core.system.System` of a pump-selection scenario
    (:func:`kit.inputs.pump_selection.build_system`)."""
    from kit.inputs.pump_selection import build_system as build

    return build(sc)
