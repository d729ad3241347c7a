"""``python -m kit run``: execute a notebook headless and collect the notebook, HTML and record.

The study notebooks are tested by the lead once they exist; here a tiny notebook written in
the test follows the same contract (HEADLINE_SCENARIO in, record into HEADLINE_RECORD_DIR).
"""

from __future__ import annotations

import json
from pathlib import Path

import nbformat
import pytest
import record_fake_study as fake

from kit.errors import UnknownChoiceError
from kit.record.check import check_main
from kit.runner import NOTEBOOKS, notebook_for, notebooks_dir, run_main

HERE = Path(__file__).resolve().parent

CELLS = [
    "import os\nfrom kit import scenario as scn\n"
    "scenario = scn.load(os.environ.get('HEADLINE_SCENARIO', 'demo.toml'))\nprint(scenario.title)",
    "import record_fake_study\nresults = record_fake_study.compute(scenario)\n"
    "print(len(results.values), 'values')",
    "from kit.record import write_if_requested\n"
    "written = write_if_requested(scenario, results)\nprint(written is not None)",
]


def _notebook(path: Path, cells) -> Path:
    nb = nbformat.v4.new_notebook()
    nb.metadata["kernelspec"] = {"name": "python3", "display_name": "Python 3",
                                 "language": "python"}
    nb.cells = [nbformat.v4.new_markdown_cell("# tiny study")] + [
        nbformat.v4.new_code_cell(c) for c in cells]
    nbformat.write(nb, path)
    return path


@pytest.fixture
def setup(tmp_path, monkeypatch):
    monkeypatch.setenv("PYTHONPATH", str(HERE))  # the kernel imports record_fake_study
    sc = tmp_path / "marlow_creek.toml"
    sc.write_text(fake.SCENARIO_TOML, encoding="utf-8")
    return tmp_path, sc


def test_run_writes_notebook_html_and_record(setup, capsys, monkeypatch):
    tmp, sc = setup
    nb = _notebook(tmp / "tiny.ipynb", CELLS)
    out = tmp / "out"
    code = run_main([str(sc), "--out", str(out), "--notebook", str(nb)])
    _, err = capsys.readouterr()
    assert code == 0, err
    assert "cell  1/3" in err and "cell  3/3" in err and " s  " in err   # progress with time
    for name in ("tiny.ipynb", "tiny.html", "marlow_creek.html", "marlow_creek.json"):
        assert (out / name).is_file(), name
    executed = nbformat.read(out / "tiny.ipynb", as_version=4)
    texts = ["".join(o.get("text", "") for o in c.outputs) for c in executed.cells
             if c.cell_type == "code"]
    assert texts[0].startswith("Cooling water header") and texts[2].strip() == "True"
    assert "<html" in (out / "tiny.html").read_text(encoding="utf-8")[:2000].lower()
    rec = json.loads((out / "marlow_creek.json").read_text(encoding="utf-8"))
    assert rec["header"]["source"] == "marlow_creek.toml"
    # the record written in the kernel checks out in this process
    fake.use_fake_study(monkeypatch)
    assert check_main([str(out / "marlow_creek.json")]) == 0
    assert "VERDICT: MATCH" in capsys.readouterr().out


def test_error_names_the_cell(setup, capsys):
    tmp, sc = setup
    cells = [CELLS[0], "x = 1\nraise ValueError('flow must be positive')", CELLS[2]]
    nb = _notebook(tmp / "broken.ipynb", cells)
    code = run_main([str(sc), "--out", str(tmp / "out"), "--notebook", str(nb), "--quiet"])
    _, err = capsys.readouterr()
    assert code == 1
    assert "code cell 2 of 3" in err and "cell 3 in the notebook" in err
    assert "'x = 1'" in err and "ValueError: flow must be positive" in err
    assert "Traceback" not in err.split("\n")[0]
    assert (tmp / "out" / "broken.ipynb").is_file()   # kept for inspection


def test_notebook_without_record_section_fails(setup, capsys):
    tmp, sc = setup
    nb = _notebook(tmp / "norecord.ipynb", CELLS[:2])
    code = run_main([str(sc), "--out", str(tmp / "out"), "--notebook", str(nb), "--quiet"])
    assert code == 1
    assert "wrote no record marlow_creek.json" in capsys.readouterr().err


def test_missing_notebook_and_bad_scenario(setup, capsys, tmp_path, monkeypatch):
    tmp, sc = setup
    assert run_main([str(sc), "--out", str(tmp / "o"), "--notebook", str(tmp / "none.ipynb")]) == 2
    assert "not found" in capsys.readouterr().err
    monkeypatch.setenv("HEADLINE_NOTEBOOKS", str(tmp / "empty"))
    assert run_main([str(sc), "--out", str(tmp / "o")]) == 2
    assert "line_sizing.ipynb not found" in capsys.readouterr().err
    bad = tmp / "bad.toml"
    bad.write_text('schema = "headline-scenario/1"\nkind = "boiler"\n', encoding="utf-8")
    assert run_main([str(bad), "--out", str(tmp / "o")]) == 2
    assert "scenario key 'kind'" in capsys.readouterr().err


def test_notebook_location(monkeypatch, tmp_path):
    monkeypatch.delenv("HEADLINE_NOTEBOOKS", raising=False)
    assert notebooks_dir() == HERE.parents[1] / "notebooks"
    monkeypatch.setenv("HEADLINE_NOTEBOOKS", str(tmp_path))
    assert notebook_for("tank_drainage") == tmp_path / "tank_drainage.ipynb"
    assert {"line_sizing", "pump_selection", "tank_drainage"} <= set(NOTEBOOKS)
    with pytest.raises(UnknownChoiceError, match="'scenario kind' must be one of 'line_sizing'"):
        notebook_for("boiler")


WIDGET_CELLS = [
    "import ipywidgets as w\nfrom kit.panels.plot_view import PlotView\n"
    "view = PlotView({'data': [{'type': 'scatter', 'x': [0, 1], 'y': [3, 4], 'name': 'zq-trace'}],"
    " 'layout': {'title': {'text': 'zq chart'}}})\n"
    "box = w.VBox([w.HTML('<b>zq-html</b>'), w.Text(description='zq field', value='350 gpm'),"
    " w.Dropdown(options=['NPS 2', 'NPS 3'], value='NPS 3', description='zq size'),"
    " w.Label('zq-hidden', layout=w.Layout(display='none')), view])\nbox",
    "view2 = PlotView({'data': [{'type': 'bar', 'x': [1], 'y': [2]}], 'layout': {}})\nview2",
] + CELLS[:1] + CELLS[1:]


class _Refs(__import__("html.parser").parser.HTMLParser):
    """Every script src, link href and other URL attribute of a page."""

    def __init__(self):
        super().__init__()
        self.urls = []

    def handle_starttag(self, tag, attrs):
        for k, v in attrs:
            if k in ("src", "href", "data") and v:
                self.urls.append((tag, k, v))


def test_notebook_html_works_offline(setup, capsys):
    """The notebook's HTML export loads nothing from a network: no widget renderer, require.js
    or MathJax from a CDN; widgets are drawn from their stored state (values, HTML, charts
    by plotly.js carried once), hidden widgets are left out."""
    tmp, sc = setup
    nb = _notebook(tmp / "wid.ipynb", WIDGET_CELLS)
    out = tmp / "out"
    code = run_main([str(sc), "--out", str(out), "--notebook", str(nb)])
    assert code == 0, capsys.readouterr().err
    page = (out / "wid.html").read_text(encoding="utf-8")
    parser = _Refs()
    parser.feed(page)
    remote = [u for u in parser.urls if u[2].lower().lstrip().startswith(("http:", "https:", "//"))]
    assert remote == [], remote
    assert "embed-amd" not in page and "require.min.js" not in page and "unpkg" not in page
    assert "application/vnd.jupyter.widget-state+json" not in page
    for text in ("<b>zq-html</b>", "zq field", "350 gpm", "zq size", "NPS 3", "zq-trace",
                 "zq chart"):
        assert text in page, text
    assert page.count("zq-hidden") == 1          # in the cell's source only, not drawn
    assert page.count("Plotly.newPlot.apply") == 2
    from plotly.offline import get_plotlyjs_version

    assert page.count(f"plotly.js v{get_plotlyjs_version()}") == 1
