"""Command line: ``headline {lab,app,demo,run,check,refresh}`` (or ``python -m kit ...``).

- ``lab``     open JupyterLab on the notebooks folder.
- ``app``     serve the notebooks as app pages (inputs, charts, findings; no code) with Voilà.
- ``demo``    compute a scenario headless and print its results, verdict and findings.
- ``run``     execute the scenario's notebook headless and write the notebook, its HTML and
  the record (HTML + JSON) into a folder.
- ``check``   re-run a record's scenario with the installed kit and compare every result.
- ``refresh`` re-execute the committed notebooks and strip their widget state.

Bad input never shows a traceback: one line ``headline: <what> — <why>`` on stderr and exit
code 2 (``check`` has its own codes, see ``headline check --help``).
"""

from __future__ import annotations

import sys
from pathlib import Path

from kit.cli import USAGE_EXIT, CliError, Parser, say_error

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "scenarios" / "kestrel_ridge_booster.toml"

COMMANDS = ("lab", "app", "demo", "run", "check", "refresh")


def _demo(argv) -> int:
    from kit.textout import summary

    ap = Parser(prog="headline demo", description="Compute a scenario and print its results.")
    ap.add_argument("scenario", nargs="?", default=str(DEMO), help="scenario TOML file")
    ap.add_argument("--units", choices=("SI", "US"), default=None,
                    help="display system (default: the scenario's)")
    a = ap.parse_args(argv)
    sc = load_scenario(a.scenario, "demo")
    res = _run_study(sc, f"demo {a.scenario!r}")
    print(summary(sc, res, system=a.units or sc.display_system, full=True))
    return 0


def load_scenario(path: str, cmd: str):
    """Load a scenario file or raise a one-line :class:`CliError`."""
    from kit import scenario as scn
    from kit.errors import HeadlineError

    what = f"{cmd} {path!r}" if path else cmd
    if not path:
        raise CliError(cmd, "the scenario file name is empty")
    p = Path(path)
    if not p.exists():
        raise CliError(what, "no such scenario file")
    if p.is_dir():
        raise CliError(what, "is a folder; give a scenario TOML file")
    try:
        return scn.load(p)
    except HeadlineError as exc:
        raise CliError(what, str(exc)) from None
    except (UnicodeDecodeError, RecursionError, MemoryError) as exc:  # a file no scenario can be
        raise CliError(what, f"is not a readable scenario file ({type(exc).__name__})") from None


def _run_study(sc, what: str):
    from kit.errors import HeadlineError
    from kit.results import compute

    try:
        return compute(sc)
    except HeadlineError as exc:
        raise CliError(what, str(exc)) from None


def _lab(argv) -> int:
    ap = Parser(prog="headline lab", description="Open JupyterLab on the notebooks folder.")
    ap.add_argument("--port", type=int, default=8888)
    a, rest = ap.parse_known_args(argv)
    from jupyterlab.labapp import main as lab_main

    sys.argv = ["jupyter-lab", f"--ServerApp.root_dir={ROOT / 'notebooks'}",
                f"--ServerApp.port={a.port}", *rest]
    lab_main()
    return 0


def main(argv=None) -> int:
    """Run one command; returns the exit code. Bad input is one ``headline:`` line, exit 2."""
    argv = list(sys.argv[1:] if argv is None else argv)
    if not argv or argv[0] in ("-h", "--help"):
        print(__doc__.strip(), file=sys.stderr if not argv else sys.stdout)
        return USAGE_EXIT if not argv else 0
    cmd, rest = argv[0], argv[1:]
    if cmd not in COMMANDS:
        say_error(repr(cmd), f"is not a command; choose one of {', '.join(COMMANDS)}")
        return USAGE_EXIT
    try:
        if cmd == "run":
            from kit.runner import run_main

            return run_main(rest)
        if cmd == "check":
            from kit.record.check import check_main

            return check_main(rest)
        if cmd == "refresh":
            from kit.refresh import refresh_main

            return refresh_main(rest)
        if cmd == "app":
            from kit.app import app_main

            return app_main(rest)
        return {"demo": _demo, "lab": _lab}[cmd](rest)
    except CliError as exc:
        say_error(exc.what, exc.why)
        return exc.code
    except KeyboardInterrupt:
        say_error(cmd, "interrupted")
        return 130


if __name__ == "__main__":
    sys.exit(main())
