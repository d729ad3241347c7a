"""The nbval sanitize file: each pattern replaces what varies between runs and nothing else.

Applied the way nbval 0.11 applies it (``re.sub(regex, replace, text)`` in file order, no
flags). Common practice, no source.
"""

import re
from pathlib import Path

import pytest

pytest.importorskip("nbval")
from nbval.plugin import get_sanitize_patterns  # noqa: E402

FILE = Path(__file__).resolve().parents[2] / "notebooks" / "nbval.sanitize"


def sanitize(text: str) -> str:
    for regex, replace in get_sanitize_patterns(FILE.read_text(encoding="utf-8")):
        text = re.sub(regex, replace, text)
    return text


@pytest.mark.parametrize(("text", "expected"), [
    ("<Pipe object at 0x7f3a2b1c9d80>", "<Pipe object at 0x<ADDR>>"),
    ("id 2f1e5c3a-1b2c-4d5e-8f90-123456789abc", "id <UUID>"),
    ("sha256 " + "ab" * 32, "sha256 <HEX>"),
    ("stamped 2024-05-01T12:30:45Z", "stamped <DATE>"),
    ("on 2024-05-01 at 12:30:45", "on <DATE> at <TIME>"),
    ("x\nCPU times: user 3 ms, sys: 0 ns, total: 3 ms\nWall time: 2.5 ms\ny",
     "x\nCPU times: <TIMING>\nWall time: <TIMING>\ny"),
    ("12.3 µs ± 1.1 µs per loop (mean ± std. dev. of 7 runs, 100000 loops each)", "<TIMEIT>"),
    ("took 1.25 s", "took <DURATION>"),
    ("written /tmp/pytest-of-root/x/record.html", "written <PATH>"),
    (r"saved C:\Users\a\b.json", "saved <PATH>"),
    ("FigureWidget({'data': [{'uid': 'x'}]})", "FigureWidget(...)"),
], ids=lambda v: v[:30] if isinstance(v, str) else v)
def test_variable_text_is_replaced(text, expected):
    assert sanitize(text) == expected


@pytest.mark.parametrize("text", [
    "flow 150 gpm = 34.07 m³/h; head 25.0 m",
    "pressure 2.5 bar(g) = 351.3 kPa(a); drop 1.2 kPa/100 m",
    "drain time 10 s to low level; NPS 4 Sch 40 (DN 100)",
    "overall: FAIL — 1 pass, 1 check, 1 fail",
])
def test_engineering_text_is_untouched(text):
    assert sanitize(text) == text
