"""The command line: bad input and bad output paths are one line and a non-zero exit, never a
traceback; ``check`` reads only the record; verdicts print as words.

Most tests call :func:`kit.__main__.main` in-process and read stderr; one runs the installed
interpreter in a subprocess.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
from pathlib import Path

import pytest
import record_fake_study as fake

from kit.__main__ import main
from kit.cli import CliError, error_line, output_folder
from kit.errors import OutOfRangeError, RecordError
from kit.record.check import check_tolerance, outside_files, read_record

ROOT = Path(__file__).resolve().parents[1]


def _cli(capsys, *argv):
    code = main(list(argv))
    out, err = capsys.readouterr()
    assert "Traceback" not in out + err
    return code, out, err


def _one_line(err: str, start: str) -> str:
    lines = [x for x in err.splitlines() if x.strip()]
    assert len(lines) == 1, err
    assert lines[0].startswith(start), lines[0]
    return lines[0]


@pytest.fixture
def scenario_file(tmp_path):
    p = tmp_path / "marlow_creek.toml"
    p.write_text(fake.SCENARIO_TOML, encoding="utf-8")
    return p


@pytest.fixture
def record(tmp_path, monkeypatch):
    fake.use_fake_study(monkeypatch)
    return fake.write_fake_record(tmp_path / "rec")[1]


def _rewrite(path: Path, change) -> Path:
    d = json.loads(path.read_text(encoding="utf-8"))
    change(d)
    fake.reforge(d)
    path.write_text(json.dumps(d), encoding="utf-8")
    return path


# ------------------------------------------------------------------ usage and scenarios


def test_no_command_prints_usage_and_exit_2(capsys):
    code, _, err = _cli(capsys)
    assert code == 2 and "headline {lab,app,demo,run,check,refresh}" in err


def test_unknown_command(capsys):
    code, _, err = _cli(capsys, "sise")
    assert code == 2
    _one_line(err, "headline: 'sise' — is not a command; choose one of lab, app, demo")


@pytest.mark.parametrize("argv, match", [
    pytest.param(["demo", "no_such.toml"], "no such scenario file", id="missing-file"),
    pytest.param(["demo", ""], "the scenario file name is empty", id="empty-name"),
    pytest.param(["demo", "--units", "imperial"], "argument --units: invalid choice",
                 id="bad-units-choice"),
    pytest.param(["demo", "a.toml", "b.toml"], "unrecognized arguments: b.toml", id="extra-arg"),
])
def test_demo_usage_errors(capsys, argv, match):
    code, _, err = _cli(capsys, *argv)
    assert code == 2
    assert match in _one_line(err, "headline: ")


def test_demo_refuses_a_folder(capsys, tmp_path):
    code, _, err = _cli(capsys, "demo", str(tmp_path))
    assert code == 2 and "is a folder; give a scenario TOML file" in _one_line(err, "headline: demo")


@pytest.mark.parametrize("text, match", [
    pytest.param("schema = \n", "is not valid TOML", id="bad-toml"),
    pytest.param('schema = "headline-scenario/1"\nkind = "boiler"\n', "scenario key 'kind'",
                 id="unknown-kind"),
    pytest.param(fake.SCENARIO_TOML.replace("[route]", "[rout]"), "rout", id="misspelt-table"),
    pytest.param(fake.SCENARIO_TOML.replace('length = "120 m"', 'length = "120 kg"'),
                 "route.length", id="bad-unit"),
])
def test_demo_bad_scenario_is_one_line(capsys, tmp_path, text, match):
    p = tmp_path / "bad.toml"
    p.write_text(text, encoding="utf-8")
    code, _, err = _cli(capsys, "demo", str(p))
    assert code == 2
    line = _one_line(err, f"headline: demo {str(p)!r} — ")
    assert match in line


def test_demo_binary_file_is_one_line(capsys, tmp_path):
    p = tmp_path / "binary.toml"
    p.write_bytes(b"\xff\xfe\x00\x01garbage\x00")
    code, _, err = _cli(capsys, "demo", str(p))
    assert code == 2 and _one_line(err, "headline: demo")


def test_demo_prints_verdict_words(capsys, scenario_file, monkeypatch):
    fake.use_fake_study(monkeypatch)
    code, out, _ = _cli(capsys, "demo", str(scenario_file))
    assert code == 0
    assert "VERDICT: CHECK — all findings (1 pass, 1 check, 0 fail)" in out
    assert "Findings" in out and "Methods" in out and "Cautions" in out


# ------------------------------------------------------------------ run --out


@pytest.mark.parametrize("make, match", [
    pytest.param(lambda t: "", "--out — is empty", id="empty"),
    pytest.param(lambda t: "   ", "--out — is empty", id="blank"),
    pytest.param(lambda t: (t / "f.txt").write_text("x") and str(t / "f.txt"),
                 "is an existing file, not a folder", id="existing-file"),
    pytest.param(lambda t: (t / "g.txt").write_text("x") and str(t / "g.txt" / "sub"),
                 "on its path is a file", id="file-on-path"),
])
def test_run_bad_out(capsys, tmp_path, scenario_file, make, match):
    out = make(tmp_path)
    code, _, err = _cli(capsys, "run", str(scenario_file), "--out", out)
    assert code == 2
    assert match in _one_line(err, "headline: ")


def test_run_out_not_writable(capsys, tmp_path, scenario_file, monkeypatch):
    target = tmp_path / "locked"
    target.mkdir()
    real = os.access
    monkeypatch.setattr(os, "access", lambda p, m, **k: False if Path(p) == target
                        else real(p, m, **k))
    code, _, err = _cli(capsys, "run", str(scenario_file), "--out", str(target))
    assert code == 2 and "is not writable by you" in _one_line(err, "headline: --out")


def test_run_out_cannot_be_created(capsys, scenario_file):
    target = "/sys/headline-cli-test/out"  # sysfs refuses new folders, even to root
    if os.path.exists(target):
        pytest.skip("sysfs accepted a folder")
    code, _, err = _cli(capsys, "run", str(scenario_file), "--out", target)
    assert code == 2 and "cannot be created" in _one_line(err, "headline: --out")


def test_run_missing_scenario_and_bad_timeout(capsys, tmp_path, scenario_file):
    code, _, err = _cli(capsys, "run", str(tmp_path / "nope.toml"), "--out", str(tmp_path / "o"))
    assert code == 2 and "no such scenario file" in _one_line(err, "headline: run")
    code, _, err = _cli(capsys, "run", str(scenario_file), "--out", str(tmp_path / "o"),
                        "--timeout", "-5")
    assert code == 2 and "finite number of seconds above 0" in _one_line(err, "headline: run")
    code, _, err = _cli(capsys, "run", str(scenario_file))
    assert code == 2 and "the following arguments are required: --out" in err


def test_output_folder_creates_nested(tmp_path):
    p = output_folder(str(tmp_path / "a" / "b"))
    assert p.is_dir()
    with pytest.raises(CliError, match="contains a NUL character"):
        output_folder("bad\x00name")


# ------------------------------------------------------------------ check


def test_check_good_record_notes_the_entry_point(capsys, record):
    code, out, _ = _cli(capsys, "check", str(record))
    assert code == 0 and "VERDICT: MATCH" in out
    assert "headline check RECORD.json" in out and "python -m kit" in out


def _big(t):
    p = t / "big.json"
    with open(p, "wb") as fh:
        fh.seek(70_000_000)
        fh.write(b"\n")
    return p


@pytest.mark.parametrize("make, match", [
    pytest.param(lambda t: t / "nope.json", "does not exist", id="missing"),
    pytest.param(lambda t: t, "is a folder", id="folder"),
    pytest.param(lambda t: (t / "x.json").write_text("{not json") and t / "x.json",
                 "is not valid JSON", id="not-json"),
    pytest.param(lambda t: (t / "u.json").write_bytes("{}".encode("utf-16")) and t / "u.json",
                 "is not UTF-8 text", id="utf16"),
    pytest.param(lambda t: (t / "a.json").write_text("[1, 2]") and t / "a.json",
                 "must hold a JSON object, not a list", id="array"),
    pytest.param(lambda t: (t / "d.json").write_text("[" * 100_000 + "]" * 100_000)
                 and t / "d.json", "nested too deeply", id="deep-nesting"),
    pytest.param(lambda t: (t / "n.json").write_text('{"x": NaN}') and t / "n.json",
                 "bare NaN is not allowed", id="bare-nan"),
    pytest.param(lambda t: (t / "f.json").write_text('{"format": "other/1"}') and t / "f.json",
                 "expected 'headline-record/1'", id="wrong-format"),
    pytest.param(_big, "a record is at most 64 MB", id="too-large"),
])
def test_check_bad_record_files(capsys, tmp_path, make, match):
    p = make(tmp_path)
    code, _, err = _cli(capsys, "check", str(p))
    assert code == 2
    assert match in _one_line(err, "headline: check")


@pytest.mark.parametrize("rtol, match", [
    pytest.param("nan", "'relative tolerance' must be a finite number", id="nan"),
    pytest.param("inf", "'relative tolerance' must be a finite number", id="inf"),
    pytest.param("-1e-6", "must be between 0 and 0.1", id="negative"),
    pytest.param("0.5", "must be between 0 and 0.1", id="too-loose"),
    pytest.param("abc", "argument --rtol", id="not-a-number"),
])
def test_check_refuses_bad_tolerance(capsys, record, rtol, match):
    code, out, err = _cli(capsys, "check", str(record), f"--rtol={rtol}")
    assert code == 2 and out == ""
    assert match in _one_line(err, "headline: check — argument --rtol")


@pytest.mark.parametrize("bad, match", [
    pytest.param(float("nan"), "must be a finite number", id="nan"),
    pytest.param(-0.1, "must be between 0 and 0.1", id="negative"),
    pytest.param("x", "must be a finite number", id="text"),
])
def test_check_tolerance_function(bad, match):
    with pytest.raises(OutOfRangeError, match=match):
        check_tolerance(bad)


def test_check_refuses_a_record_that_references_an_outside_file(capsys, record, tmp_path):
    (record.parent / "list.csv").write_text("tag,flow\nL1,1 m3/h\n", encoding="utf-8")
    _rewrite(record, lambda d: d["scenario"].setdefault("batch", {}).update(file="list.csv"))
    code, _, err = _cli(capsys, "check", str(record))
    assert code == 2
    line = _one_line(err, "headline: check")
    assert "refers to the outside file 'list.csv' at 'batch.file'" in line
    assert "carrying it inline" in line


def test_outside_files_lists_file_keys_without_text():
    doc = {"batch": {"file": "a.csv"}, "x": [{"file": "b.csv"}], "y": {"file": "c", "text": "t"}}
    assert outside_files(doc) == [("batch.file", "a.csv"), ("x[0].file", "b.csv")]


@pytest.mark.parametrize("change, match", [
    pytest.param(lambda d: d.update(selection={"verdict": "maybe"}), "field 'selection' must be",
                 id="bad-selection"),
    pytest.param(lambda d: d.update(edits=["x"]), "field 'edits' must be", id="bad-edits"),
])
def test_check_refuses_malformed_parts(capsys, record, change, match):
    _rewrite(record, change)
    code, _, err = _cli(capsys, "check", str(record))
    assert code == 2 and match in _one_line(err, "headline: check")


def test_read_record_empty_name():
    with pytest.raises(RecordError, match="the file name is empty"):
        read_record("")


def test_error_line_folds_newlines():
    assert error_line("run", "cell 2\nraised ValueError") == "headline: run — cell 2 raised ValueError"


def test_unexpected_errors_still_surface(monkeypatch, scenario_file):
    import kit.results

    def broken(sc):
        raise ZeroDivisionError("a defect")

    monkeypatch.setattr(kit.results, "compute", broken)
    with pytest.raises(ZeroDivisionError, match="a defect"):
        main(["demo", str(scenario_file)])


def test_subprocess_bad_record_is_one_line(tmp_path):
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join(p for p in (str(ROOT), env.get("PYTHONPATH")) if p)
    r = subprocess.run([sys.executable, "-m", "kit", "check", str(tmp_path / "missing.json")],
                       capture_output=True, text=True, cwd=tmp_path, env=env, timeout=120)
    assert r.returncode == 2
    assert r.stdout == ""
    assert r.stderr.strip().splitlines() == [
        f"headline: check {str(tmp_path / 'missing.json')!r} — record "
        f"{tmp_path / 'missing.json'}: does not exist"]


# ------------------------------------------------------------------ app mode


def test_app_pages_and_command(tmp_path):
    from kit.app import HOST, notebook_pages, page_urls, voila_command

    for name in ("b.ipynb", "a.ipynb", ".hidden.ipynb", "notes.txt"):
        (tmp_path / name).write_text("{}")
    assert notebook_pages(tmp_path) == ["a.ipynb", "b.ipynb"]
    assert page_urls(["a.ipynb"], 9000) == ["http://127.0.0.1:9000/voila/render/a.ipynb"]
    cmd = voila_command(tmp_path, 9000)
    assert cmd[1:4] == ["-m", "voila", str(tmp_path)]
    assert f"--Voila.ip={HOST}" in cmd and HOST == "127.0.0.1"
    assert "--VoilaConfiguration.strip_sources=True" in cmd and "--no-browser" in cmd
    assert "--VoilaConfiguration.file_allowlist=records/.*\\.(html|json)" in cmd


@pytest.mark.parametrize("argv, match", [
    pytest.param(["app", "--port", "80"], "must be between 1024 and 65535, not 80", id="low-port"),
    pytest.param(["app", "--port", "99999"], "must be between 1024 and 65535", id="high-port"),
    pytest.param(["app", "--port", "eighty"], "argument --port: invalid int value",
                 id="port-text"),
])
def test_app_refuses_bad_ports(capsys, argv, match):
    code, _, err = _cli(capsys, *argv)
    assert code == 2 and match in _one_line(err, "headline: app")


def test_app_refuses_without_notebooks_or_voila(capsys, tmp_path, monkeypatch):
    import importlib.util

    monkeypatch.setenv("HEADLINE_NOTEBOOKS", str(tmp_path))
    code, _, err = _cli(capsys, "app", "--port", "18999")
    assert code == 2 and f"no notebooks in {tmp_path}" in _one_line(err, "headline: app")
    real = importlib.util.find_spec
    monkeypatch.setattr(importlib.util, "find_spec",
                        lambda name, *a: None if name == "voila" else real(name, *a))
    code, _, err = _cli(capsys, "app")
    assert code == 2 and 'pip install "voila>=0.5.13"' in _one_line(err, "headline: app")


def test_app_refuses_a_port_in_use(capsys, tmp_path, monkeypatch):
    import socket

    (tmp_path / "a.ipynb").write_text("{}")
    monkeypatch.setenv("HEADLINE_NOTEBOOKS", str(tmp_path))
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        s.listen()
        port = s.getsockname()[1]
        if port < 1024:
            pytest.skip("the system gave a low port")
        code, _, err = _cli(capsys, "app", "--port", str(port))
    assert code == 2 and "is in use on 127.0.0.1" in _one_line(err, f"headline: app --port {port}")


def test_check_warns_when_python_files_lie_in_the_working_folder(capsys, record, tmp_path,
                                                                 monkeypatch):
    (tmp_path / "numpy.py").write_text("raise SystemExit('shadowed')\n")
    monkeypatch.chdir(tmp_path)
    monkeypatch.setattr(sys, "path", ["", *sys.path[1:]])
    code, out, _ = _cli(capsys, "check", str(record))
    assert code == 0
    assert "warning: this run imports from the current folder, which holds numpy.py" in out
