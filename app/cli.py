"""Command line: ``bandwright [FILE]``, ``evaluate``, ``snapshot`` and ``--version``.

User errors (missing or invalid file, bad option) print one line to stderr and exit 2.
Qt is imported only by the commands that need it, so ``evaluate`` starts fast.
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Sequence
from pathlib import Path

from core import __version__
from core.resources import demo_path
from core.study import StudyError, load_study

__all__ = ["main"]

EXIT_USER_ERROR = 2


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # one clear line, exit 2 (argparse's own code too)
        self.exit(EXIT_USER_ERROR, f"bandwright: {message}\n")


def _gui_parser() -> argparse.ArgumentParser:
    p = _Parser(
        prog="bandwright",
        description="Link-budget and PA specification trade-off explorer. "
        "Commands: evaluate FILE, snapshot [FILE] --out DIR; with no command, opens the GUI.",
        epilog="bandwright evaluate FILE [--csv OUT] [--xlsx OUT] [--format text|json]  prints the "
        "scorecard; bandwright snapshot [FILE] --out DIR [--size WxH]  renders every page to PNG. "
        "Add --help after a command for its options.",
    )
    p.add_argument(
        "file", nargs="?", help="study file to open (default: an unsaved copy of the built-in demo)"
    )
    p.add_argument("--version", action="version", version=f"bandwright {__version__}")
    return p


def _evaluate_parser() -> argparse.ArgumentParser:
    p = _Parser(prog="bandwright evaluate", description="Evaluate a study and print the scorecard.")
    p.add_argument("file", help="study file (.json)")
    p.add_argument("--csv", metavar="OUT", help="also write the scorecard as CSV")
    p.add_argument("--xlsx", metavar="OUT", help="also write the comparison workbook")
    p.add_argument("--format", choices=("text", "json"), default="text", help="output format")
    return p


def _snapshot_parser() -> argparse.ArgumentParser:
    p = _Parser(prog="bandwright snapshot", description="Render every page to PNG, offscreen.")
    p.add_argument("file", nargs="?", help="study file (default: the built-in demo)")
    p.add_argument("--out", required=True, metavar="DIR", help="folder for the PNG files")
    p.add_argument("--size", default="1480x920", help="window size WxH in pixels")
    return p


def _fail(message: str) -> int:
    print(f"bandwright: {message}", file=sys.stderr)
    return EXIT_USER_ERROR


def main(argv: Sequence[str] | None = None) -> int:
    """Entry point of the ``bandwright`` console script; returns the exit status."""
    args = list(sys.argv[1:] if argv is None else argv)
    try:
        if args and args[0] == "evaluate":
            return _run_evaluate(_evaluate_parser().parse_args(args[1:]))
        if args and args[0] == "snapshot":
            return _run_snapshot(_snapshot_parser().parse_args(args[1:]))
        ns = _gui_parser().parse_args(args)
    except SystemExit as exc:
        return int(exc.code or 0)
    path = Path(ns.file) if ns.file else None
    if path is not None:
        try:
            load_study(path)  # fail fast on the command line, before a window appears
        except StudyError as exc:
            return _fail(str(exc))
    from app.main import run_gui

    return run_gui(path)


def _run_evaluate(ns: argparse.Namespace) -> int:
    from core.report import evaluate_command

    try:
        study = load_study(ns.file)
    except StudyError as exc:
        return _fail(str(exc))
    try:
        text = evaluate_command(study, Path(ns.file), fmt=ns.format, csv=ns.csv, xlsx=ns.xlsx)
    except OSError as exc:
        return _fail(f"cannot write output: {exc.strerror or exc}")
    sys.stdout.write(text)
    return 0


def _run_snapshot(ns: argparse.Namespace) -> int:
    try:
        width, height = (int(v) for v in ns.size.lower().split("x"))
    except ValueError:
        return _fail(f"--size: expected WxH such as 1480x920 (got {ns.size!r})")
    path = Path(ns.file) if ns.file else demo_path()
    try:
        study = load_study(path)
    except StudyError as exc:
        return _fail(str(exc))
    out = Path(ns.out)
    try:
        out.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        return _fail(f"--out: cannot create {out} ({exc.strerror})")
    from app.snapshot import snapshot_pages

    for written in snapshot_pages(study, path, out, (width, height)):
        print(written)
    return 0


if __name__ == "__main__":  # pragma: no cover
    raise SystemExit(main())
