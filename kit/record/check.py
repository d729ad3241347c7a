"""Re-check a record: re-run its scenario with the installed kit and compare every result.

``python -m kit check RECORD.json`` reads the record's JSON file, verifies that it is whole
and unedited, recomputes the scenario it carries with :func:`kit.results.compute`, and
compares every reported value by key, then every finding. It prints one table row per
value (key, recorded, recomputed, difference, verdict) and an overall verdict.

Tolerance
---------
A value matches when ``|recomputed - recorded| <= RTOL * max(|recorded|, |recomputed|) +
ABS_FLOOR[kind]`` with ``RTOL = 1e-6`` and the absolute floors of :data:`ABS_FLOOR` (SI
units, e.g. 1e-9 m for lengths and heads, 1e-3 Pa for pressures, 1e-12 m³/s for flows).
Both NaN, or the same infinity, match. ``--rtol`` changes the relative part.

Findings match by (subject, quantity) when their severity is the same and their values
agree within ``RTOL`` plus ``1e-9`` in their SI unit.

Software versions
-----------------
Values decide. The stamp of the record is compared with the installed software and every
difference is listed: a different kit **major** version, or a different fluids or CoolProp
version, is a *warning* (these change numbers); any other difference (numpy, scipy, pint,
plotly, Python, platform, kit minor version) is a *note*. Neither changes the verdict when
every value matches; ``--strict-versions`` turns warnings into a failure.

Exit codes
----------
====  ============================================================================
0     every value and finding matches
1     a value or finding differs, is missing or is extra (or a warning under
      ``--strict-versions``)
2     the record is unreadable, damaged or edited: not JSON, wrong ``format``, missing
      fields, an input or result hash that does not match, a header or inputs table that
      does not match the scenario it carries
3     the installed kit cannot recompute the scenario (its error is printed)
====  ============================================================================

Example
-------
>>> values_match(1.0, 1.0 + 5e-7, "head")
True
>>> values_match(1.0, 1.0 + 5e-6, "head")
False
"""

from __future__ import annotations

import argparse
import json
import math
import sys
import time
from dataclasses import dataclass, field
from pathlib import Path

from kit.errors import HeadlineError, RecordError

__all__ = [
    "RTOL", "ABS_FLOOR", "DEFAULT_FLOOR", "EXIT", "Row", "VersionNote", "CheckReport",
    "values_match", "compare_selection", "read_record", "validate_record", "check_record", "check_data",
    "format_report", "check_main", "check_tolerance", "outside_files", "MAX_RECORD_BYTES",
    "RTOL_MAX", "ENTRY_POINT_NOTE",
]

#: Relative tolerance of the comparison [-].
RTOL = 1e-6

#: Absolute floor of the comparison per kind, in the kind's SI unit (kit.units.KINDS).
ABS_FLOOR: dict[str, float] = {
    "length": 1e-9, "diameter": 1e-9, "roughness": 1e-12, "head": 1e-9, "elevation": 1e-9,
    "area": 1e-12, "volume": 1e-12, "flow": 1e-12, "velocity": 1e-9,
    "pressure": 1e-3, "pressure_difference": 1e-3, "pressure_per_length": 1e-6,
    "temperature": 1e-6, "temperature_difference": 1e-6, "density": 1e-6,
    "viscosity": 1e-12, "kinematic_viscosity": 1e-15, "power": 1e-3, "energy": 1e-3,
    "time": 1e-6, "time_short": 1e-6, "speed": 1e-6, "fraction": 1e-9, "dimensionless": 1e-9,
}
#: Largest record file read [bytes]; a line list of 100,000 rows carried inline fits.
MAX_RECORD_BYTES = 64_000_000

#: Largest relative tolerance accepted by ``--rtol`` [-].
RTOL_MAX = 0.1

#: What every check prints: run the installed entry point from a folder of your own.
ENTRY_POINT_NOTE = (
    "run the installed entry point `headline check RECORD.json`: a plain `python -m kit` run "
    "puts the current folder first on the import path, so Python modules lying beside a "
    "record (a folder named kit, a numpy.py, ...) could be imported in place of the kit")

#: Floor for a kind not listed in :data:`ABS_FLOOR` and for findings [SI].
DEFAULT_FLOOR = 1e-9

#: Exit codes of ``python -m kit check``.
EXIT = {"match": 0, "mismatch": 1, "bad_record": 2, "cannot_recompute": 3}

_REQUIRED = {
    "format": str, "header": dict, "scenario": dict, "inputs": list, "kind": str,
    "methods": list, "results": list, "findings": list, "cautions": list, "stamp": dict,
    "hashes": dict,
}
_RESULT_FIELDS = {"key": str, "label": str, "kind": str, "si_unit": str, "display": str}
_FINDING_FIELDS = ("severity", "subject", "quantity", "value", "unit")
_WARN_LIBS = ("fluids", "CoolProp")


# ------------------------------------------------------------------ comparison


def _num(x) -> float:
    """A recorded number: a JSON number or one of "NaN", "Infinity", "-Infinity"."""
    if isinstance(x, bool):
        raise ValueError("a boolean is not a number")
    if isinstance(x, (int, float)):
        return float(x)
    if isinstance(x, str) and x in ("NaN", "Infinity", "-Infinity"):
        return float(x)
    raise ValueError(f"{x!r} is not a number")


def values_match(recorded: float, recomputed: float, kind: str, rtol: float = RTOL) -> bool:
    """Whether two SI values agree within ``rtol`` and the kind's absolute floor."""
    a, b = float(recorded), float(recomputed)
    if math.isnan(a) or math.isnan(b):
        return math.isnan(a) and math.isnan(b)
    if math.isinf(a) or math.isinf(b):
        return a == b
    floor = ABS_FLOOR.get(kind, DEFAULT_FLOOR)
    return abs(b - a) <= rtol * max(abs(a), abs(b)) + floor


@dataclass(frozen=True)
class Row:
    """One compared item: a value (by key) or a finding (by subject / quantity)."""

    key: str
    recorded: str
    recomputed: str
    difference: str
    verdict: str  # "match" | "MISMATCH" | "MISSING" (not recomputed) | "EXTRA" (new)

    @property
    def ok(self) -> bool:
        return self.verdict == "match"


@dataclass(frozen=True)
class VersionNote:
    """A difference between the record's stamp and the installed software."""

    item: str
    recorded: str
    installed: str
    level: str  # "warning" | "note"


@dataclass
class CheckReport:
    """Everything ``kit check`` found."""

    path: str
    rows: list[Row] = field(default_factory=list)
    finding_rows: list[Row] = field(default_factory=list)
    versions: list[VersionNote] = field(default_factory=list)
    notes: list[str] = field(default_factory=list)
    strict_versions: bool = False
    rtol: float = RTOL
    elapsed: float = 0.0

    @property
    def mismatches(self) -> int:
        return sum(not r.ok for r in (*self.rows, *self.finding_rows))

    @property
    def warnings(self) -> int:
        return sum(v.level == "warning" for v in self.versions)

    @property
    def exit_code(self) -> int:
        if self.mismatches or (self.strict_versions and self.warnings):
            return EXIT["mismatch"]
        return EXIT["match"]


def _si(x: float, unit: str) -> str:
    return f"{x:.10g} {unit}".strip()


def _diff(a: float, b: float, unit: str) -> str:
    if not (math.isfinite(a) and math.isfinite(b)):
        return "" if (a == b or (math.isnan(a) and math.isnan(b))) else "n/a"
    d = b - a
    if d == 0:
        return "0"
    rel = abs(d) / max(abs(a), abs(b)) if max(abs(a), abs(b)) > 0 else 0.0
    return f"{d:+.3g} {unit} ({rel:.1e} rel)".replace("  ", " ")


def compare_values(recorded: list[dict], recomputed, rtol: float = RTOL) -> list[Row]:
    """Rows comparing recorded result rows with recomputed :class:`~kit.results.Reported`."""
    new = {v.key: v for v in recomputed}
    rows = []
    for r in recorded:
        a = _num(r["value"])
        unit = r.get("si_unit", "")
        v = new.pop(r["key"], None)
        if v is None:
            rows.append(Row(r["key"], _si(a, unit), "—", "", "MISSING"))
            continue
        b = float(v.value)
        ok = values_match(a, b, r["kind"], rtol) and v.kind == r["kind"]
        rows.append(Row(r["key"], _si(a, unit), _si(b, unit), _diff(a, b, unit),
                        "match" if ok else "MISMATCH"))
    for key, v in new.items():
        rows.append(Row(key, "—", _si(float(v.value), v.as_dict()["si_unit"]), "", "EXTRA"))
    return rows


def _finding_key(f: dict, seen: dict) -> str:
    base = f"{f.get('subject', '')} / {f.get('quantity', '')}"
    n = seen.get(base, 0)
    seen[base] = n + 1
    return base if n == 0 else f"{base} #{n + 1}"


def _finding_text(sev: str, value: float, unit: str) -> str:
    return f"{sev.upper()} {'' if math.isnan(value) else _si(value, unit)}".strip()


def compare_findings(recorded: list[dict], recomputed, rtol: float = RTOL) -> list[Row]:
    """Rows comparing recorded findings with recomputed ones, by subject and quantity."""
    seen: dict = {}
    new = {}
    for f in recomputed:
        d = f.as_dict()
        new[_finding_key(d, seen)] = d
    seen = {}
    rows = []
    for r in recorded:
        key = _finding_key(r, seen)
        a = _num(r["value"]) if r.get("value") is not None else math.nan
        d = new.pop(key, None)
        label = f"finding: {key}"
        if d is None:
            rows.append(Row(label, _finding_text(r["severity"], a, r["unit"]), "—", "", "MISSING"))
            continue
        b = float(d["value"]) if d["value"] is not None else math.nan
        ok = d["severity"] == r["severity"] and values_match(a, b, "", rtol)
        rows.append(Row(label, _finding_text(r["severity"], a, r["unit"]),
                        _finding_text(d["severity"], b, d["unit"]),
                        "" if d["severity"] == r["severity"] else "severity differs",
                        "match" if ok else "MISMATCH"))
    for key, d in new.items():
        b = float(d["value"]) if d["value"] is not None else math.nan
        rows.append(Row(f"finding: {key}", "—", _finding_text(d["severity"], b, d["unit"]), "",
                        "EXTRA"))
    return rows


def compare_selection(recorded: dict, results) -> list[Row]:
    """Rows comparing the recorded selected design and overall verdict with the recomputed."""
    v = results.verdict()
    rows = []
    for label, a, b in (("selected design", recorded.get("selected"), v.selected),
                        ("overall verdict", recorded.get("verdict"), v.severity)):
        a_text = "—" if a is None else str(a).upper() if label == "overall verdict" else str(a)
        b_text = "—" if b is None else str(b).upper() if label == "overall verdict" else str(b)
        rows.append(Row(label, a_text, b_text, "", "match" if a == b else "MISMATCH"))
    return rows


def compare_stamp(recorded: dict) -> list[VersionNote]:
    """Differences between a recorded stamp and the installed software (policy above)."""
    from kit.record.stamp import stamp

    now = stamp()
    out = []
    rk, nk = str(recorded.get("kit", "")), now["kit"]
    if rk != nk:
        major = rk.split(".")[0] != nk.split(".")[0]
        out.append(VersionNote("kit", rk, nk, "warning" if major else "note"))
    libs = recorded.get("libraries", {}) if isinstance(recorded.get("libraries"), dict) else {}
    for name, ver in now["libraries"].items():
        rv = str(libs.get(name, "not recorded"))
        if rv != ver:
            out.append(VersionNote(name, rv, ver, "warning" if name in _WARN_LIBS else "note"))
    for item in ("python", "platform"):
        rv = str(recorded.get(item, "not recorded"))
        if rv != now[item]:
            out.append(VersionNote(item, rv, now[item], "note"))
    return out


# ------------------------------------------------------------------ reading


def read_record(path) -> dict:
    """Read and validate a record JSON file; any defect raises :class:`RecordError`.

    Refused: a missing file, a folder, a file over :data:`MAX_RECORD_BYTES`, text that is not
    UTF-8 JSON, JSON nested deeper than the parser allows, and everything
    :func:`validate_record` refuses.
    """
    p = Path(path)
    if not str(path):
        raise RecordError("''", "the file name is empty")
    if p.is_dir():
        raise RecordError(str(p), "is a folder; give the record's .json file")
    try:
        size = p.stat().st_size
    except FileNotFoundError:
        raise RecordError(str(p), "does not exist") from None
    except OSError as exc:
        raise RecordError(str(p), f"cannot be read: {exc.strerror}") from None
    if size > MAX_RECORD_BYTES:
        raise RecordError(str(p), f"is {size / 1e6:.1f} MB; a record is at most "
                          f"{MAX_RECORD_BYTES / 1e6:.0f} MB (this is not a record, or it is "
                          "damaged)")
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise RecordError(str(p), "does not exist") from None
    except UnicodeDecodeError:
        raise RecordError(str(p), "is not UTF-8 text; the file is damaged or not a record") from None
    except OSError as exc:
        raise RecordError(str(p), f"cannot be read: {exc.strerror}") from None
    try:
        data = json.loads(text, parse_constant=_reject_constant)
    except json.JSONDecodeError as exc:
        raise RecordError(str(p), f"is not valid JSON (line {exc.lineno}, column {exc.colno}: "
                          f"{exc.msg}); the file is damaged or truncated") from None
    except ValueError as exc:
        raise RecordError(str(p), f"is not valid JSON ({exc})") from None
    except RecursionError:
        raise RecordError(str(p), "is nested too deeply to be a record") from None
    try:
        validate_record(data, str(p))
    except RecursionError:
        raise RecordError(str(p), "is nested too deeply to be a record") from None
    return data


def _reject_constant(name):
    raise ValueError(f"bare {name} is not allowed in a record")


def validate_record(data, path: str = "<record>") -> None:
    """Check format, fields, types, hashes and the consistency of header and inputs."""
    from kit.record import build
    from kit.scenario import KINDS, SCHEMA

    if not isinstance(data, dict):
        raise RecordError(path, f"must hold a JSON object, not a {type(data).__name__}")
    fmt = data.get("format")
    if fmt != build.FORMAT:
        raise RecordError(path, f"has format {fmt!r}; expected {build.FORMAT!r} "
                          "(not a Headline record, or one this kit cannot read)")
    missing = [k for k in _REQUIRED if k not in data]
    if missing:
        raise RecordError(path, f"is missing field(s) {', '.join(missing)}; the file was "
                          "edited or damaged")
    for k, t in _REQUIRED.items():
        if not isinstance(data[k], t):
            raise RecordError(path, f"field '{k}' must be a JSON {_TYPE[t]}, not "
                              f"{type(data[k]).__name__}")
    keys = set()
    for i, r in enumerate(data["results"]):
        where = f"results[{i}]"
        if not isinstance(r, dict):
            raise RecordError(path, f"{where} must be an object")
        for k, t in {**_RESULT_FIELDS, "value": None}.items():
            if k not in r:
                raise RecordError(path, f"{where} is missing '{k}'")
            if t is not None and not isinstance(r[k], t):
                raise RecordError(path, f"{where}.{k} must be text")
        try:
            _num(r["value"])
        except ValueError as exc:
            raise RecordError(path, f"{where}.value: {exc}") from None
        if r["key"] in keys:
            raise RecordError(path, f"{where}: key {r['key']!r} appears twice")
        keys.add(r["key"])
    for i, f in enumerate(data["findings"]):
        if not isinstance(f, dict) or any(k not in f for k in _FINDING_FIELDS):
            raise RecordError(path, f"findings[{i}] must be an object with "
                              f"{', '.join(_FINDING_FIELDS)}")
        if f["severity"] not in ("pass", "check", "fail"):
            raise RecordError(path, f"findings[{i}].severity is {f['severity']!r}; expected "
                              "pass, check or fail")
        if f["value"] is not None:
            try:
                _num(f["value"])
            except ValueError as exc:
                raise RecordError(path, f"findings[{i}].value: {exc}") from None
    sel = data.get("selection")
    if sel is not None and (not isinstance(sel, dict)
                            or sel.get("verdict") not in ("pass", "check", "fail")
                            or not isinstance(sel.get("alternatives", []), list)):
        raise RecordError(path, "field 'selection' must be an object with a verdict of pass, "
                          "check or fail and a list of alternatives")
    edits = data.get("edits")
    if edits is not None and (not isinstance(edits, dict) or not isinstance(edits.get("rows"), list)):
        raise RecordError(path, "field 'edits' must be an object with a list of rows")
    hashes = data["hashes"]
    if hashes.get("algorithm") != "sha256" or not all(
            isinstance(hashes.get(k), str) for k in ("inputs", "results")):
        raise RecordError(path, "field 'hashes' must give algorithm 'sha256', inputs and results")
    doc = data["scenario"]
    if build.input_hash(doc) != hashes["inputs"]:
        raise RecordError(path, "input hash does not match: the scenario in the record was "
                          "edited or damaged after the record was built")
    if build.result_hash(data) != hashes["results"]:
        raise RecordError(path, "result hash does not match: results, findings, methods, "
                          "cautions or stamp were edited or damaged after the record was built")
    outside = outside_files(doc)
    if outside:
        key, name = outside[0]
        raise RecordError(path, f"its scenario refers to the outside file {name!r} at '{key}' "
                          "instead of carrying it inline; a record must hold everything it is "
                          "checked from (build it with kit.record.build_record, which carries "
                          "line lists inline)")
    if doc.get("schema") != SCHEMA:
        raise RecordError(path, f"scenario schema is {doc.get('schema')!r}; expected {SCHEMA!r}")
    if doc.get("kind") not in KINDS or data["kind"] != doc.get("kind"):
        raise RecordError(path, f"scenario kind {doc.get('kind')!r} is not one of "
                          f"{', '.join(KINDS)} or differs from the record's kind")
    expect = build.header_of(doc, data["header"].get("source", ""))
    for k, v in expect.items():
        if k in ("checked_by", "checked_date", "source"):
            continue
        if data["header"].get(k) != v:
            raise RecordError(path, f"header '{k}' is {data['header'].get(k)!r} but the scenario "
                              f"says {v!r}; the header was edited")
    if data["inputs"] != build.flatten_inputs(doc):
        raise RecordError(path, "the inputs table does not match the scenario document; it was "
                          "edited")


_TYPE = {str: "string", dict: "object", list: "array"}

#: keys that name a file beside the scenario; a record must carry the file's text inline
_FILE_KEYS = ("file",)


def outside_files(doc, prefix: str = "") -> list[tuple[str, str]]:
    """``[(key path, file name)]`` of every table that names a file without its ``text``.

    >>> outside_files({"batch": {"file": "list.csv"}})
    [('batch.file', 'list.csv')]
    >>> outside_files({"batch": {"file": "list.csv", "text": "tag,flow"}})
    []
    """
    out = []
    if isinstance(doc, dict):
        for k, v in doc.items():
            key = f"{prefix}.{k}" if prefix else str(k)
            if k in _FILE_KEYS and isinstance(v, str) and "text" not in doc:
                out.append((key, v))
            elif isinstance(v, (dict, list)):
                out += outside_files(v, key)
    elif isinstance(doc, list):
        for i, v in enumerate(doc):
            out += outside_files(v, f"{prefix}[{i}]")
    return out


def check_tolerance(rtol) -> float:
    """The relative tolerance as a float, or :class:`~kit.errors.OutOfRangeError`: it must be
    finite and between 0 and :data:`RTOL_MAX`.

    >>> check_tolerance(1e-6)
    1e-06
    """
    from kit.errors import OutOfRangeError

    try:
        x = float(rtol)
    except (TypeError, ValueError):
        raise OutOfRangeError("relative tolerance", rtol) from None
    if not math.isfinite(x):
        raise OutOfRangeError("relative tolerance", x)
    if x < 0 or x > RTOL_MAX:
        raise OutOfRangeError("relative tolerance", x, low=0.0, high=RTOL_MAX)
    return x


# ------------------------------------------------------------------ checking


def check_data(data: dict, path: str = "<record>", rtol: float = RTOL,
               strict_versions: bool = False) -> CheckReport:
    """Recompute a validated record document and compare. Errors of the study propagate."""
    from kit.results import compute
    from kit.scenario import Scenario

    rtol = check_tolerance(rtol)
    report = CheckReport(path, strict_versions=strict_versions, rtol=rtol)
    if outside_files(data["scenario"]):  # validate_record refuses these; never read beside it
        raise RecordError(path, "its scenario refers to an outside file")
    results = compute(Scenario(json.loads(json.dumps(data["scenario"])), "<record>"))
    report.rows = compare_values(data["results"], results.values, rtol)
    report.finding_rows = compare_findings(data["findings"], results.findings, rtol)
    report.versions = compare_stamp(data["stamp"])
    if isinstance(data.get("selection"), dict):
        report.finding_rows += compare_selection(data["selection"], results)
    rec_methods = [m.get("name") for m in data["methods"] if isinstance(m, dict)]
    new_methods = [m.name for m in results.methods]
    if rec_methods != new_methods:
        report.notes.append(f"methods differ: recorded {rec_methods}, installed kit {new_methods}")
    return report


def check_record(path, rtol: float = RTOL, strict_versions: bool = False) -> CheckReport:
    """Read, validate, recompute and compare the record at ``path``.

    Raises :class:`RecordError` for a bad record; errors of the study propagate.
    """
    t0 = time.perf_counter()
    data = read_record(path)
    report = check_data(data, str(path), rtol, strict_versions)
    report.elapsed = time.perf_counter() - t0
    return report


def _grid(headers, rows) -> list[str]:
    widths = [max(len(str(x)) for x in col) for col in zip(headers, *rows, strict=False)]
    line = "  ".join(f"{{:<{w}}}" for w in widths)
    out = [line.format(*headers).rstrip(), "  ".join("-" * w for w in widths)]
    out += [line.format(*r).rstrip() for r in rows]
    return out


def format_report(report: CheckReport) -> str:
    """The check as a fixed-width text table with an overall verdict."""
    heads = ("key", "recorded", "recomputed", "difference", "verdict")
    rows = [(r.key, r.recorded, r.recomputed, r.difference, r.verdict)
            for r in (*report.rows, *report.finding_rows)]
    lines = [f"record: {report.path}",
             f"tolerance: relative {report.rtol:g} plus an absolute floor per kind (SI)", ""]
    lines += _grid(heads, rows) if rows else ["(the record reports no values)"]
    if report.versions:
        lines += ["", "software differences (values decide the verdict):"]
        lines += _grid(("item", "recorded", "installed", "level"),
                       [(v.item, v.recorded, v.installed, v.level) for v in report.versions])
    lines += [f"note: {n}" for n in report.notes]
    n = len(report.rows) + len(report.finding_rows)
    bad = report.mismatches
    if bad:
        verdict = f"VERDICT: MISMATCH — {bad} of {n} items differ"
        if report.warnings:
            verdict += " (the installed software differs from the record's; see above)"
    elif report.strict_versions and report.warnings:
        verdict = (f"VERDICT: VERSION DIFFERENCE — all {n} items match, but "
                   f"{report.warnings} warning(s) under --strict-versions")
    else:
        verdict = f"VERDICT: MATCH — all {n} items agree"
        if report.warnings:
            verdict += f" ({report.warnings} software warning(s) above)"
    lines += ["", verdict, f"checked in {report.elapsed:.2f} s"]
    return "\n".join(lines)


def _tolerance_arg(text: str) -> float:
    try:
        return check_tolerance(text)
    except (HeadlineError, ValueError) as exc:
        raise argparse.ArgumentTypeError(str(exc)) from None


def _beside_record_risk() -> str | None:
    """A warning when the current folder is first on the import path and holds Python code."""
    first = sys.path[0] if sys.path else None
    if first not in ("", "."):
        try:
            if first is None or Path(first).resolve() != Path.cwd().resolve():
                return None
        except OSError:
            return None
    import kit

    here = Path.cwd()
    own = Path(kit.__file__).resolve().parent
    stray_kit = (here / "kit").is_dir() and (here / "kit").resolve() != own
    found = [p.name for p in here.glob("*.py")][:3] + (["kit/"] if stray_kit else [])
    if not found:
        return None
    return ("warning: this run imports from the current folder, which holds "
            f"{', '.join(found)}; run `headline check` from a folder of your own")


def check_main(argv=None) -> int:
    """``headline check RECORD.json``; returns the exit code (see module docstring).

    Refusals are one line ``headline: check ... — why`` on stderr.
    """
    from kit.cli import CliError, Parser, say_error

    ap = Parser(
        prog="headline check",
        description="Re-run a record's scenario with the installed kit and compare every result. "
                    "Nothing outside the record's JSON file is read.",
        epilog="exit codes: 0 all match; 1 mismatch, missing or extra result; 2 damaged or "
               "edited record, or bad arguments; 3 the scenario cannot be recomputed")
    ap.add_argument("record", help="the record's JSON file")
    ap.add_argument("--rtol", type=_tolerance_arg, default=RTOL,
                    help=f"relative tolerance, 0 to {RTOL_MAX:g} (default {RTOL:g}); absolute "
                         "floors per kind stay")
    ap.add_argument("--strict-versions", action="store_true",
                    help="fail when the kit major version or fluids/CoolProp versions differ")
    try:
        a = ap.parse_args(argv)
    except CliError as exc:
        say_error(exc.what, exc.why)
        return exc.code
    what = f"check {a.record!r}"
    t0 = time.perf_counter()
    try:
        data = read_record(a.record)
    except RecordError as exc:
        say_error(what, str(exc))
        return EXIT["bad_record"]
    try:
        report = check_data(data, a.record, a.rtol, a.strict_versions)
    except RecordError as exc:
        say_error(what, str(exc))
        return EXIT["bad_record"]
    except HeadlineError as exc:
        say_error(what, f"the installed kit cannot recompute this scenario: {exc}")
        return EXIT["cannot_recompute"]
    except ImportError as exc:
        say_error(what, f"the installed kit has no study for kind {data['kind']!r}: {exc}")
        return EXIT["cannot_recompute"]
    except Exception as exc:  # a defect of the study: name it in one line, exit 3
        say_error(what, f"recomputing the scenario failed with {type(exc).__name__}: {exc} "
                  "(a defect of the kit: please report it with the record)")
        return EXIT["cannot_recompute"]
    report.elapsed = time.perf_counter() - t0
    if Path(sys.argv[0] if sys.argv else "").name != "headline":
        report.notes.append(ENTRY_POINT_NOTE)
    risk = _beside_record_risk()
    if risk:
        report.notes.append(risk)
    print(format_report(report))
    return report.exit_code
