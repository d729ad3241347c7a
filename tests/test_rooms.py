"""The rooms keep to themselves: no module reaches into another room's private names.

A room is a sub-package of ``kit`` (core, inputs, studies, panels, record) or a top-level
module. Importing ``_name`` from another room, or reading ``module._name`` of a module imported
from another room, couples the rooms through something that was not offered: refused here.
"""

from __future__ import annotations

import ast
from pathlib import Path

KIT = Path(__file__).resolve().parents[1] / "kit"


def _room(module: str) -> str:
    parts = module.split(".")
    return ".".join(parts[:2]) if len(parts) > 2 or (KIT / parts[-1]).is_dir() else module


def _module_of(path: Path) -> str:
    rel = path.relative_to(KIT.parent).with_suffix("")
    parts = list(rel.parts)
    if parts[-1] == "__init__":
        parts = parts[:-1]
    return ".".join(parts)


def _violations():
    out = []
    for path in sorted(KIT.rglob("*.py")):
        me = _module_of(path)
        tree = ast.parse(path.read_text(encoding="utf-8"))
        aliases = {}
        for node in ast.walk(tree):
            if isinstance(node, ast.ImportFrom) and node.module and node.module.startswith("kit"):
                for a in node.names:
                    target = f"{node.module}.{a.name}"
                    if a.name.startswith("_") and _room(node.module) != _room(me):
                        out.append(f"{me}: imports {a.name} from {node.module}")
                    aliases[a.asname or a.name] = target
            elif isinstance(node, ast.Import):
                for a in node.names:
                    if a.name.startswith("kit"):
                        aliases[a.asname or a.name.split(".")[0]] = a.name
        for node in ast.walk(tree):
            if (isinstance(node, ast.Attribute) and node.attr.startswith("_")
                    and not node.attr.startswith("__") and isinstance(node.value, ast.Name)
                    and node.value.id in aliases):
                target = aliases[node.value.id]
                if _room(target) != _room(me):
                    out.append(f"{me}: reads {node.value.id}.{node.attr} ({target})")
    return out


def test_no_room_reaches_into_another_rooms_private_names():
    assert _violations() == []


def test_the_check_finds_a_planted_violation(tmp_path, monkeypatch):
    # the test above can fail: a module that reads a study's private helper is caught
    bad = KIT / "panels" / "_planted_for_test.py"
    bad.write_text("from kit.studies import tank_drainage as td\nx = td._history\n",
                   encoding="utf-8")
    try:
        assert any("_planted_for_test" in v for v in _violations())
    finally:
        bad.unlink()
