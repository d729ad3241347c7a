"""Command-line plumbing shared by ``python -m kit`` / ``headline``: one-line errors, output folders.

Every refusal the command line makes is one line on stderr, ``headline: <what> — <why>``,
and a non-zero exit code (2 for bad usage or input). Nothing here catches errors it does not
expect: a defect of the kit still shows its traceback.

Example
-------
>>> error_line("demo x.toml", "scenario key 'kind': must be one of ...")
"headline: demo x.toml — scenario key 'kind': must be one of ..."
"""

from __future__ import annotations

import argparse
import os
import sys
from pathlib import Path

__all__ = ["USAGE_EXIT", "CliError", "Parser", "error_line", "say_error", "output_folder"]

#: exit code for bad usage or bad input
USAGE_EXIT = 2


class CliError(Exception):
    """A refusal of the command line: ``what`` failed because ``why``; exits with ``code``."""

    def __init__(self, what: str, why: str, code: int = USAGE_EXIT):
        self.what, self.why, self.code = what, why, code
        super().__init__(error_line(what, why))


def error_line(what: str, why: str) -> str:
    """The one line the command line prints for a refusal (newlines folded)."""
    text = f"headline: {what} — {why}"
    return " ".join(text.split())


def say_error(what: str, why: str, stream=None) -> None:
    print(error_line(what, why), file=stream or sys.stderr)


class Parser(argparse.ArgumentParser):
    """An argparse parser whose usage errors are one ``headline:`` line and exit code 2.

    ``--help`` still prints the full help and exits 0.
    """

    def error(self, message):  # noqa: D401 (argparse hook)
        what = self.prog.removeprefix("headline ").removeprefix("python -m kit ")
        raise CliError(what, f"{message} (see {self.prog} --help)")


def output_folder(text: str, option: str = "--out") -> Path:
    """The output folder named by ``text``, created if needed; refuses what cannot work.

    Refused with :class:`CliError`: an empty name, a name that is an existing file (or has a
    file on its path), a folder that cannot be created or written.
    """
    what = f"{option} {text!r}" if text else option
    if not text or not text.strip():
        raise CliError(option, "is empty; give the name of a folder to write into")
    if "\x00" in text:
        raise CliError(what, "contains a NUL character; give a plain folder name")
    p = Path(text).expanduser()
    if p.exists() and not p.is_dir():
        raise CliError(what, "is an existing file, not a folder; give a folder name")
    probe = p
    while not probe.exists():
        if probe.parent == probe:
            break
        probe = probe.parent
    if probe.exists() and not probe.is_dir():
        raise CliError(what, f"cannot be a folder: {str(probe)!r} on its path is a file")
    try:
        p.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise CliError(what, f"cannot be created: {exc.strerror or exc}") from None
    if not os.access(p, os.W_OK | os.X_OK):
        raise CliError(what, "is not writable by you; choose another folder")
    return p
