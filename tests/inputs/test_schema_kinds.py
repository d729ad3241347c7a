"""One schema per scenario kind: every key documented, every key given is read, demos valid,
the key reference generated from the schema, and the studies never read a key the schema does
not declare (a key the schema accepts but no reader reads would be ignored silently)."""

from __future__ import annotations

from pathlib import Path

import pytest

from kit import results
from kit import scenario as scn
from kit.inputs.kinds import ROOTS
from kit.inputs.schema import Key, Table, Tables

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "scenarios").glob("*.toml"))
FIXTURES = sorted((Path(__file__).parent / "fixtures").glob("*.toml"))
CASES = DEMOS + FIXTURES


def _walk(table, path=""):
    """(dotted path, Key) for every key of a schema, arrays shown as ``name[]``."""
    for k in table.keys:
        p = f"{path}.{k.name}" if path else k.name
        if isinstance(k, Table):
            yield from _walk(k, p)
        elif isinstance(k, Tables):
            yield from _walk(k.table, p + "[]")
        else:
            yield p, k


@pytest.mark.parametrize("kind", sorted(ROOTS))
def test_every_key_has_a_type_and_a_help_line(kind):
    for path, k in _walk(ROOTS[kind]):
        assert isinstance(k, Key)
        assert k.help.strip(), f"{kind}: {path} has no help line"
        if k.type in ("quantity", "quantities", "quantity_or_list"):
            assert k.kind, f"{kind}: {path} is a quantity without a unit kind"


@pytest.mark.parametrize("path", CASES, ids=lambda p: p.name)
def test_demos_and_fixtures_are_valid(path):
    sc = scn.load(path)
    assert sc.kind in ROOTS


# ---------------------------------------------------------------- every key given is read

_READ: set = set()


def _strip(path: str) -> str:
    import re

    return re.sub(r"\[\d+\]", "[]", path)


class Tracking(dict):
    """A dict that records which keys a reader takes the value of."""

    def __init__(self, data, path=""):
        super().__init__()
        self._path = path
        for k, v in data.items():
            dict.__setitem__(self, k, _wrap(v, f"{path}.{k}" if path else k))

    def _mark(self, key):
        _READ.add(_strip(f"{self._path}.{key}" if self._path else str(key)))

    def __getitem__(self, key):
        self._mark(key)
        return dict.__getitem__(self, key)

    def get(self, key, default=None):
        if key in self:
            self._mark(key)
        return dict.get(self, key, default)

    def items(self):
        for k in self:
            self._mark(k)
        return dict.items(self)

    def values(self):
        for k in self:
            self._mark(k)
        return dict.values(self)

    def pop(self, key, *default):
        self._mark(key)
        return dict.pop(self, key, *default)


def _wrap(v, path):
    if isinstance(v, dict):
        return Tracking(v, path)
    if isinstance(v, list):
        return [_wrap(x, f"{path}[{i}]") for i, x in enumerate(v)]
    return v


def _given(doc, path=""):
    for k, v in doc.items():
        p = f"{path}.{k}" if path else k
        yield _strip(p)
        if isinstance(v, dict):
            yield from _given(v, p)
        elif isinstance(v, list):
            for i, x in enumerate(v):
                if isinstance(x, dict):
                    yield from _given(x, f"{p}[{i}]")


#: Keys that carry text for people only (copied to the record as written, never computed).
_PEOPLE_ONLY = {"note", "title", "schema", "project", "display"}


@pytest.mark.parametrize("path", CASES, ids=lambda p: p.name)
def test_every_key_given_is_read(path):
    sc = scn.load(path)
    sc.doc = Tracking(sc.doc)
    _READ.clear()
    results.compute(sc)
    unread = sorted(p for p in set(_given(sc.doc)) if p not in _READ
                    and not ({*p.replace("[]", "").split(".")} & _PEOPLE_ONLY))
    assert not unread, f"keys given but never read by the {sc.kind} reader: {unread}"


def test_every_documented_key_appears_in_a_demo_or_fixture():
    # with the test above, every key the schema documents is shown to be read. A key shared by
    # the kinds (the liquid, a segment's pipe) is one Key object: given once, it is covered.
    given = set()
    for path in CASES:
        sc = scn.load(path)
        keys = dict(_walk(ROOTS[sc.kind]))
        given |= {id(keys[p]) for p in _given(sc.doc) if p in keys}
    missing = sorted({f"{kind}: {p}" for kind in ROOTS for p, k in _walk(ROOTS[kind])
                      if id(k) not in given and k.name not in ("checked_by", "checked_date")})
    assert not missing, f"documented keys no demo or fixture gives: {missing}"


# ---------------------------------------------------------------- the generated reference

@pytest.mark.parametrize("kind", sorted(ROOTS))
def test_key_reference_is_generated_from_the_schema(kind):
    from kit.inputs.reference import reference_text

    page = ROOT / "docs" / "keys" / f"{kind}.md"
    assert page.read_text(encoding="utf-8") == reference_text(kind), (
        f"{page} is out of date: run `.venv/bin/python -m kit.inputs.reference`")
    for path, _k in _walk(ROOTS[kind]):
        assert f"`{path.rsplit('.', 1)[-1].replace('[]', '')}`" in page.read_text(encoding="utf-8")
