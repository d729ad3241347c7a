"""The key reference of each scenario kind, generated from its schema (it cannot drift).

Run ``python -m kit.inputs.reference`` to write ``docs/keys/<kind>.md``; a test checks that
the committed pages equal what the schema generates.

>>> "flow_design" in reference_text("line_sizing")
True
"""

from __future__ import annotations

from pathlib import Path

from kit.inputs.kinds import ROOTS
from kit.inputs.schema import reference

__all__ = ["reference_text", "write_all"]

_TITLES = {"line_sizing": "Scenario keys: line_sizing",
           "pump_selection": "Scenario keys: pump_selection",
           "tank_drainage": "Scenario keys: tank_drainage",
           "network": "Scenario keys: network"}

_PREAMBLE = (
    "Generated from `kit/inputs/*_schema.py` by `python -m kit.inputs.reference`; do not edit.\n"
    "Every quantity is a text with its unit (`\"150 gpm\"`, `\"4 in\"`); pressures where gauge "
    "or absolute matters say which (`kPa(g)`, `psia`). An unknown or misplaced key, a value of "
    "the wrong type, or a value out of range is refused with the key's path.\n")


def reference_text(kind: str) -> str:
    """The Markdown key reference of ``kind``."""
    text = reference(ROOTS[kind], _TITLES[kind])
    head, _, rest = text.partition("\n\n")
    return f"{head}\n\n{_PREAMBLE}\n{rest}"


def write_all(folder: Path | None = None) -> list[Path]:
    """Write every kind's page into ``folder`` (default ``docs/keys`` of the repository)."""
    folder = folder or Path(__file__).resolve().parents[2] / "docs" / "keys"
    folder.mkdir(parents=True, exist_ok=True)
    out = []
    for kind in ROOTS:
        p = folder / f"{kind}.md"
        p.write_text(reference_text(kind), encoding="utf-8")
        out.append(p)
    return out


if __name__ == "__main__":
    for p in write_all():
        print(p)
