"""`python -m kit run` on every demo scenario writes its files, and `kit check` agrees.

End to end through the command line, as a checker would use it: a fresh process per
command, the real notebooks, the real studies.
"""

import json
import re
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
DEMOS = sorted((ROOT / "scenarios").glob("*.toml"))
NOTEBOOK_OF = {"line_sizing": "line_sizing", "pump_selection": "pump_selection",
               "tank_drainage": "tank_drainage", "network": "network_systems"}


class _Urls(HTMLParser):
    def __init__(self):
        super().__init__()
        self.urls = []

    def handle_starttag(self, tag, attrs):
        self.urls += [v or "" for k, v in attrs if k in ("src", "href", "action", "data")]


def element_urls(html: str) -> list[str]:
    p = _Urls()
    p.feed(html)
    return p.urls


def kit(*args, cwd=ROOT, timeout=600):
    return subprocess.run([sys.executable, "-m", "kit", *map(str, args)], cwd=cwd,
                          capture_output=True, text=True, timeout=timeout)


@pytest.mark.parametrize("scenario", DEMOS, ids=lambda p: p.stem)
def test_run_writes_notebook_html_and_record_then_check_matches(scenario, tmp_path):
    out = tmp_path / "out"
    run = kit("run", scenario, "--out", out)
    assert run.returncode == 0, run.stderr[-3000:]
    assert "cell" in run.stderr  # progress shown on the terminal
    kind = json.loads((out / f"{scenario.stem}.json").read_text())["kind"]
    nb = NOTEBOOK_OF[kind]
    for name in (f"{nb}.ipynb", f"{nb}.html", f"{scenario.stem}.html", f"{scenario.stem}.json"):
        assert (out / name).stat().st_size > 1000, name
    html = (out / f"{scenario.stem}.html").read_text()
    assert "inputs-table" in html
    # offline: no element loads anything from a network address (the inlined plotly.js
    # mentions URLs inside its own code; those are script text, not elements)
    assert [u for u in element_urls(html) if re.match(r"\s*(https?:)?//", u)] == []
    check = kit("check", out / f"{scenario.stem}.json")
    assert check.returncode == 0, check.stdout[-3000:] + check.stderr[-2000:]
    assert "VERDICT: MATCH" in check.stdout


def test_check_of_an_edited_record_fails(tmp_path):
    scenario = ROOT / "scenarios" / "marlow_vale_cip_dump.toml"
    out = tmp_path / "out"
    assert kit("run", scenario, "--out", out).returncode == 0
    path = out / f"{scenario.stem}.json"
    data = json.loads(path.read_text())
    data["results"][0]["value"] = data["results"][0]["value"] * 1.01
    path.write_text(json.dumps(data))
    check = kit("check", path)
    assert check.returncode == 2 and "hash" in (check.stdout + check.stderr)
