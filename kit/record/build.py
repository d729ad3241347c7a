"""Build the checker's record from a scenario and its results, and write it to disk.

A :class:`Record` holds one JSON-ready document (``Record.data``) and the plotly figures
that go into the HTML sheet only. The document's layout (``format = "headline-record/1"``)::

    format    "headline-record/1"
    header    project, calc_number, title, revision, prepared_by, date, checked_by (blank),
              checked_date (blank), kind, display_system, source
    scenario  the full scenario document, as read
    inputs    [{key, text}]        the document flattened: "discharge.segments[0].length" -> "24 m"
    methods   [{name, reference}]
    results   [{key, label, value, kind, si_unit, display}]   value in SI; display in the
              scenario's display system (kit.units.fmt)
    findings  [{severity, subject, quantity, value, unit, limit, rule, source}]
    cautions  [text]               always starts with CAUTIONS["general"]
    tables    {name: [row dict]}   the study's display tables (SI values)
    figures   [title]              titles of the figures drawn in the HTML sheet
    selection {selected, verdict, reason, counts, alternatives: [{name, reason, verdict,
              subjects}]}     the overall verdict and the design it belongs to
    edits     {file, rows: [{key, file, notebook}]}   inputs changed in the notebook against
              the scenario file (absent when the record was built from the file as it is)
    stamp     kit, libraries, python, platform, built_utc
    hashes    {algorithm: "sha256", inputs, results}

``hashes.inputs`` is the digest of the scenario document; ``hashes.results`` the digest of
``{kind, results, findings, methods, cautions, tables, stamp}`` (see :data:`RESULT_PARTS`)
plus ``selection`` and ``edits`` where the record has them (:data:`OPTIONAL_PARTS`), all
over canonical JSON (:func:`kit.record.stamp.canonical_json`).

The scenario is stored *self-contained* (:meth:`kit.scenario.Scenario.self_contained`): a
line list named by ``[batch] file`` travels inline as ``text``, so ``kit check`` reads
nothing outside the record.

Example
-------
>>> from kit.results import Results
>>> from kit.scenario import Scenario
>>> sc = Scenario({"schema": "headline-scenario/1", "kind": "line_sizing", "title": "t",
...                "project": {"name": "P"}, "design": {"flow": "12 m3/h"}})
>>> r = Results("line_sizing"); r.add("design.flow", "design flow", 12 / 3600, "flow")
>>> rec = build_record(sc, r)
>>> rec.data["results"][0]["display"]
'12.0 m³/h'
>>> rec.data["inputs"][-1]
{'key': 'design.flow', 'text': '12 m3/h'}
"""

from __future__ import annotations

import json
import math
import os
from dataclasses import dataclass, field
from pathlib import Path

from kit.record.stamp import jsonable, sha256_of, stamp

__all__ = [
    "FORMAT", "RESULT_PARTS", "OPTIONAL_PARTS", "Record", "RecordFiles", "build_record",
    "flatten_inputs", "header_of", "input_hash", "result_hash", "write_record",
    "write_if_requested", "save_record", "record_json", "input_edits", "selection_of",
    "RECORDS_FOLDER",
]

FORMAT = "headline-record/1"

#: Parts of the record covered by ``hashes.results``.
RESULT_PARTS = ("kind", "results", "findings", "methods", "cautions", "tables", "stamp")
#: Parts covered by ``hashes.results`` when the record has them (records of kit 0.1 lack them).
OPTIONAL_PARTS = ("selection", "edits")

#: Folder beside the notebook that :func:`save_record` writes into by default.
RECORDS_FOLDER = "records"

@dataclass
class Record:
    """A checker's record: the JSON document and the figures for the HTML sheet."""

    data: dict
    figures: tuple = field(default=(), repr=False)

    @property
    def header(self) -> dict:
        return self.data["header"]

    def to_json(self) -> str:
        """The record as JSON text (indented, UTF-8, no NaN tokens)."""
        return record_json(self.data)

    def to_html(self) -> str:
        """The record as one self-contained HTML page (see :mod:`kit.record.html`)."""
        from kit.record.html import render_html

        return render_html(self.data, self.figures)


def record_json(data: dict) -> str:
    """JSON text of a record document."""
    return json.dumps(jsonable(data), indent=1, ensure_ascii=False, allow_nan=False) + "\n"


def _text(value) -> str:
    """A scalar of the scenario document as written in TOML."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, float):
        return repr(value) if math.isfinite(value) else str(jsonable(value))
    if hasattr(value, "isoformat"):
        return value.isoformat()
    return str(value)


def flatten_inputs(doc: dict, prefix: str = "") -> list[dict]:
    """The scenario document as rows ``{key, text}``, in document order.

    Tables nest with dots, arrays of tables with ``[i]``; an array of plain values is one
    row (``"[10 degC, 40 degC]"``).

    >>> flatten_inputs({"a": {"b": "1 m"}, "s": [{"x": 1}], "t": ["1 K", "2 K"]})
    [{'key': 'a.b', 'text': '1 m'}, {'key': 's[0].x', 'text': '1'}, {'key': 't', 'text': '[1 K, 2 K]'}]
    """
    rows: list[dict] = []
    for k, v in doc.items():
        key = f"{prefix}{k}"
        _flatten(v, key, rows)
    return rows


def _flatten(v, key: str, rows: list) -> None:
    if isinstance(v, dict):
        if not v:
            rows.append({"key": key, "text": "{}"})
        for k, sub in v.items():
            _flatten(sub, f"{key}.{k}", rows)
    elif isinstance(v, (list, tuple)):
        if v and all(not isinstance(x, (dict, list, tuple)) for x in v):
            rows.append({"key": key, "text": "[" + ", ".join(_text(x) for x in v) + "]"})
        elif not v:
            rows.append({"key": key, "text": "[]"})
        else:
            for i, sub in enumerate(v):
                _flatten(sub, f"{key}[{i}]", rows)
    else:
        rows.append({"key": key, "text": _text(v)})


def header_of(doc: dict, source: str = "<memory>") -> dict:
    """The record header from the scenario's ``[project]`` table; checked-by fields blank."""
    project = doc.get("project") if isinstance(doc.get("project"), dict) else {}
    out = {"project": _text(project.get("name", "")),
           "calc_number": _text(project.get("calc_number", "")),
           "title": _text(doc.get("title", ""))}
    for k in ("revision", "prepared_by", "date"):
        out[k] = _text(project.get(k, ""))
    out["checked_by"] = ""
    out["checked_date"] = ""
    out["kind"] = _text(doc.get("kind", ""))
    disp = doc.get("display")
    out["display_system"] = _text(disp.get("system", "SI")) if isinstance(disp, dict) else "SI"
    out["source"] = os.path.basename(str(source))
    return out


def input_hash(doc: dict) -> str:
    """SHA-256 of the canonical JSON of the scenario document."""
    return sha256_of(doc)


def result_hash(data: dict) -> str:
    """SHA-256 of the canonical JSON of the record's :data:`RESULT_PARTS` (and of its
    :data:`OPTIONAL_PARTS` that are present)."""
    parts = {k: data.get(k) for k in RESULT_PARTS}
    parts.update({k: data[k] for k in OPTIONAL_PARTS if k in data})
    return sha256_of(parts)


def input_edits(file_doc: dict, notebook_doc: dict) -> list[dict]:
    """Inputs that differ between the scenario file and the notebook's scenario.

    Both documents are flattened (:func:`flatten_inputs`); every key path whose text differs,
    or that only one of them has, is one row ``{key, file, notebook}`` (``None`` where a side
    lacks the key), in the notebook's order, then keys only the file has. Texts are compared
    with runs of white space folded.

    >>> input_edits({"sizing": {"flow_design": "50 m3/h", "duty": "x"}},
    ...             {"sizing": {"flow_design": "54 m3/h", "duty": "x"}})
    [{'key': 'sizing.flow_design', 'file': '50 m3/h', 'notebook': '54 m3/h'}]
    """
    def rows(doc):
        return {r["key"]: r["text"] for r in flatten_inputs(jsonable(doc or {}))}

    def same(a, b):
        return a is not None and b is not None and " ".join(a.split()) == " ".join(b.split())

    f, n = rows(file_doc), rows(notebook_doc)
    out = [{"key": k, "file": f.get(k), "notebook": v} for k, v in n.items()
           if not same(f.get(k), v)]
    out += [{"key": k, "file": v, "notebook": None} for k, v in f.items() if k not in n]
    return out


def _file_doc(scenario, base):
    """The scenario file's document to compare with: ``base`` (a Scenario or a dict), else
    the file named by ``scenario.source`` read as plain TOML, else None."""
    if base is not None:
        return getattr(base, "doc", base), str(getattr(base, "source", "") or "")
    source = str(getattr(scenario, "source", "") or "")
    if not source or source.startswith("<") or not source.endswith(".toml"):
        return None, source
    try:
        import tomllib

        p = Path(source)
        if not p.is_file() or p.stat().st_size > 5_000_000:
            return None, source
        return tomllib.loads(p.read_text(encoding="utf-8")), source
    except (OSError, ValueError):
        return None, source


def selection_of(results) -> dict:
    """The record's ``selection`` part: the overall verdict and the design it belongs to."""
    v = results.verdict()
    return {"selected": v.selected, "verdict": v.severity, "reason": v.reason,
            "counts": dict(v.counts),
            "alternatives": [a.as_dict() for a in getattr(results, "alternatives", [])]}


def _display(value: float, kind: str, system: str) -> str:
    from kit import units

    try:
        return units.fmt(value, kind, system)
    except (KeyError, ValueError, TypeError, ArithmeticError):
        return f"{value:.6g}"


def _result_row(v, system: str) -> dict:
    d = v.as_dict()
    return {"key": d["key"], "label": d["label"], "value": jsonable(float(d["value"])),
            "kind": d["kind"], "si_unit": d["si_unit"],
            "display": _display(float(d["value"]), d["kind"], system)}


def _figure_title(fig) -> str:
    try:
        text = fig.layout.title.text
    except AttributeError:
        try:
            text = fig["layout"]["title"]["text"]
        except (KeyError, TypeError):
            text = None
    return "" if text is None else str(text)


def build_record(scenario, results, *, figures=(), base=None) -> Record:
    """The checker's record of ``results`` computed from ``scenario``.

    Parameters
    ----------
    scenario : kit.scenario.Scenario
        The scenario (its ``doc`` is stored whole).
    results : kit.results.Results
        What the study reported.
    figures : sequence of plotly figures
        ``go.Figure``/``FigureWidget`` objects drawn (statically) in the HTML sheet.
    base : Scenario or dict, optional
        The scenario as read from its file, to list the inputs edited in the notebook
        (:func:`input_edits`). Default: the file named by ``scenario.source``, when it is a
        readable ``.toml`` file.

    Returns
    -------
    record : Record
    """
    from kit.core.findings import CAUTIONS

    file_doc, file_name = _file_doc(scenario, base)
    edits = input_edits(file_doc, scenario.doc) if file_doc is not None else []
    if hasattr(scenario, "self_contained"):  # carry referenced files (a line list) inline
        scenario = scenario.self_contained()
    doc = jsonable(scenario.doc)
    header = header_of(doc, getattr(scenario, "source", "<memory>"))
    system = header["display_system"]
    cautions = [str(c) for c in results.cautions]
    if CAUTIONS["general"] not in cautions:
        cautions.insert(0, CAUTIONS["general"])
    data = {
        "format": FORMAT,
        "header": header,
        "scenario": doc,
        "inputs": flatten_inputs(doc),
        "kind": results.kind,
        "methods": [{"name": m.name, "reference": m.reference} for m in results.methods],
        "results": [_result_row(v, system) for v in results.values],
        "findings": [jsonable(f.as_dict()) for f in results.findings],
        "cautions": cautions,
        "tables": jsonable(results.tables or {}),
        "figures": [_figure_title(f) for f in figures],
        "selection": selection_of(results),
        "stamp": stamp(),
    }
    if edits:
        data["edits"] = {"file": os.path.basename(file_name), "rows": jsonable(edits)}
    data["hashes"] = {"algorithm": "sha256", "inputs": input_hash(doc),
                      "results": result_hash(data)}
    return Record(data, tuple(figures))


def write_record(record: Record, out_dir, stem: str) -> tuple[Path, Path]:
    """Write ``<stem>.html`` and ``<stem>.json`` into ``out_dir`` (created if needed).

    Returns
    -------
    (html_path, json_path) : tuple of Path
    """
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    html_path = out / f"{stem}.html"
    json_path = out / f"{stem}.json"
    json_path.write_text(record.to_json(), encoding="utf-8")
    html_path.write_text(record.to_html(), encoding="utf-8")
    return html_path, json_path


@dataclass(frozen=True)
class RecordFiles:
    """The two files of a written record; prints as the paths, shows as links in a notebook."""

    html: Path
    json: Path
    verdict: str = ""

    def __iter__(self):  # (html, json) = save_record(...) keeps working
        return iter((self.html, self.json))

    def __str__(self) -> str:
        v = f" (verdict {self.verdict.upper()})" if self.verdict else ""
        return f"record written{v}: {self.html} and {self.json}"

    __repr__ = __str__

    def _repr_html_(self) -> str:
        import html as _h

        v = f" — verdict <b>{_h.escape(self.verdict.upper())}</b>" if self.verdict else ""
        return (f"<p>Record written{v}: <code>{_h.escape(str(self.html))}</code> (open it in a "
                f"browser to print) and <code>{_h.escape(str(self.json))}</code> (for "
                "<code>headline check</code>).</p>")


def _stem_of(scenario, stem: str | None) -> str:
    if stem is None:
        stem = os.environ.get("HEADLINE_RECORD_STEM")
    if not stem:
        source = str(getattr(scenario, "source", ""))
        stem = Path(source).stem if source and not source.startswith("<") else scenario.kind
    return stem


def save_record(scenario, results, *, figures=(), folder=RECORDS_FOLDER, stem: str | None = None,
                base=None) -> RecordFiles:
    """Build the record and write it: the one call a notebook's last cell (or its "Build
    record" button) makes.

    The folder is ``HEADLINE_RECORD_DIR`` when set (``headline run``), else ``folder``
    (default ``records``, relative to the working folder: beside the notebook in JupyterLab
    and Voilà). ``stem`` defaults to ``HEADLINE_RECORD_STEM``, else the scenario file's stem,
    else the kind. ``base`` is the scenario as read from its file (see :func:`build_record`),
    so the record lists the inputs edited in the notebook.

    Raises :class:`~kit.errors.RecordError` when the folder cannot be written.

    Returns
    -------
    files : RecordFiles
        ``html`` and ``json`` paths and the overall verdict word.
    """
    from kit.errors import RecordError

    out_dir = os.environ.get("HEADLINE_RECORD_DIR") or folder
    if not str(out_dir).strip():
        raise RecordError("''", "the records folder name is empty")
    stem = _stem_of(scenario, stem)
    rec = build_record(scenario, results, figures=figures, base=base)
    try:
        html_path, json_path = write_record(rec, out_dir, stem)
    except OSError as exc:
        raise RecordError(str(Path(out_dir) / stem), f"cannot be written: "
                          f"{exc.strerror or exc}") from None
    return RecordFiles(html_path, json_path, rec.data["selection"]["verdict"])


def write_if_requested(scenario, results, *, figures=(), stem: str | None = None):
    """Write the record when ``HEADLINE_RECORD_DIR`` is set (as ``python -m kit run`` does).

    ``stem`` defaults to ``HEADLINE_RECORD_STEM``, else the scenario file's stem, else the
    scenario kind. Returns ``(html_path, json_path)``, or None when the variable is unset.
    """
    out_dir = os.environ.get("HEADLINE_RECORD_DIR")
    if not out_dir:
        return None
    return write_record(build_record(scenario, results, figures=figures), out_dir,
                        _stem_of(scenario, stem))
