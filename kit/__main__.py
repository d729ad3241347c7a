"""Command line: ``python -m kit {lab,demo,run,check}``.

- ``lab``   open JupyterLab on the notebooks folder.
- ``demo``  compute a scenario headless and print its results and findings.
- ``run``   execute the scenario's notebook headless and write the notebook, its HTML and
  the record (HTML + JSON) into a folder.
- ``check`` re-run a record's scenario with the installed kit and compare every result.
- ``refresh`` re-execute the committed notebooks and strip their widget state.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DEMO = ROOT / "scenarios" / "kestrel_ridge_booster.toml"


def _demo(argv) -> int:
    from kit import scenario as scn
    from kit.errors import HeadlineError
    from kit.results import compute
    from kit.textout import summary

    ap = argparse.ArgumentParser(prog="python -m kit demo",
                                 description="Compute a scenario and print its results.")
    ap.add_argument("scenario", nargs="?", default=str(DEMO), help="scenario TOML file")
    ap.add_argument("--units", choices=("SI", "US"), default=None,
                    help="display system (default: the scenario's)")
    a = ap.parse_args(argv)
    try:
        sc = scn.load(a.scenario)
        res = compute(sc)
    except HeadlineError as exc:
        print(f"error: {exc}", file=sys.stderr)
        return 2
    print(summary(sc, res, system=a.units or sc.display_system, full=True))
    return 0


def _lab(argv) -> int:
    ap = argparse.ArgumentParser(prog="python -m kit lab",
                                 description="Open JupyterLab on the notebooks folder.")
    ap.add_argument("--port", type=int, default=8888)
    a, rest = ap.parse_known_args(argv)
    from jupyterlab.labapp import main as lab_main

    sys.argv = ["jupyter-lab", f"--ServerApp.root_dir={ROOT / 'notebooks'}",
                f"--ServerApp.port={a.port}", *rest]
    lab_main()
    return 0


def main(argv=None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    commands = {"demo": _demo, "lab": _lab, "run": None, "check": None, "refresh": None}
    if not argv or argv[0] not in commands:
        print(__doc__.strip(), file=sys.stderr)
        return 2
    cmd, rest = argv[0], argv[1:]
    if cmd == "run":
        from kit.runner import run_main

        return run_main(rest)
    if cmd == "check":
        from kit.record.check import check_main

        return check_main(rest)
    if cmd == "refresh":
        from kit.refresh import refresh_main

        return refresh_main(rest)
    return commands[cmd](rest)


if __name__ == "__main__":
    sys.exit(main())
