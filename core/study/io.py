"""Reading and writing study files (versioned JSON of our own design).

File layout::

    {"format": "bandwright.study", "version": 1, "study": {...fields of Study...}}

Loading is defensive: the size is checked before reading, the nesting depth before parsing,
``json`` is the only parser (no pickle, no eval), and every problem found is reported at once.
"""

from __future__ import annotations

import json
import os
import re
from collections.abc import Callable
from pathlib import Path
from typing import Any

from core.fileio import atomic_write_bytes
from core.schema import Problem, decode, encode
from core.study.model import FORMAT_TAG, FORMAT_VERSION, Study
from core.study.validate import check_study, errors_of

__all__ = [
    "MAX_DEPTH",
    "MAX_FILE_BYTES",
    "StudyError",
    "dumps_study",
    "load_study",
    "loads_study",
    "save_study",
]

#: Files larger than this are refused before they are read (a study is a few kB).
MAX_FILE_BYTES = 20 * 1024 * 1024
#: Deeper JSON nesting than this is refused before parsing (a study nests 4 levels).
MAX_DEPTH = 32


class StudyError(ValueError):
    """A study could not be loaded or is invalid.

    Attributes
    ----------
    problems : list of Problem
        Every problem found (at least one).
    path : str
        Field path of the first problem, e.g. ``bands[1].f_high_ghz`` ('' for the whole file).
    reason : str
        Plain-language reason of the first problem.
    """

    def __init__(self, problems: list[Problem], source: str = "") -> None:
        if not problems:
            raise ValueError("StudyError needs at least one problem")
        self.problems = list(problems)
        self.path = problems[0].path
        self.reason = problems[0].reason
        self.source = source
        more = f" (and {len(problems) - 1} more)" if len(problems) > 1 else ""
        where = f"{source}: " if source else ""
        super().__init__(f"{where}{problems[0]}{more}")


_STRING = re.compile(r'"(?:[^"\\]|\\.)*"', re.DOTALL)
_BRACKET = re.compile(r"[\[\]{}]")


def _max_depth(text: str, limit: int) -> int:
    """Nesting depth of JSON ``text`` (strings skipped), stopping once past ``limit``."""
    depth = best = 0
    for m in _BRACKET.finditer(_STRING.sub("", text)):
        if m.group() in "[{":
            depth += 1
            if depth > best:
                best = depth
                if best > limit:
                    break
        else:
            depth -= 1
    return best


def _migrate(data: dict[str, Any], version: int) -> dict[str, Any]:
    """Bring the ``study`` object of an older file version up to :data:`FORMAT_VERSION`.

    Each step ``_MIGRATIONS[v]`` turns version ``v`` into ``v + 1``. Version 1 is the first
    published format, so there is no step yet; the loop is where the next one goes.
    """
    steps: tuple[Callable[[dict[str, Any]], dict[str, Any]], ...] = ()
    for step in steps[version - 1 :]:
        data = step(data)
    return data


def loads_study(text: str, source: str = "") -> Study:
    """Parse and validate study JSON ``text``.

    Raises
    ------
    StudyError
        With every problem found; warnings alone never raise.

    Examples
    --------
    >>> s = loads_study(dumps_study(Study.new()))
    >>> s.bands[0].name
    'n257'
    """
    if len(text) > MAX_FILE_BYTES:
        raise StudyError([Problem("", "file is larger than 20 MB; not a study file")], source)
    if _max_depth(text, MAX_DEPTH) > MAX_DEPTH:
        raise StudyError([Problem("", f"JSON is nested deeper than {MAX_DEPTH} levels")], source)
    try:
        raw = json.loads(text)
    except json.JSONDecodeError as exc:
        reason = f"not valid JSON ({exc.msg} at line {exc.lineno}, column {exc.colno})"
        raise StudyError([Problem("", reason)], source) from None
    except RecursionError:  # pragma: no cover - guarded by the depth check above
        raise StudyError([Problem("", "JSON is nested too deeply")], source) from None
    if not isinstance(raw, dict):
        raise StudyError([Problem("", "top level must be a JSON object")], source)
    if raw.get("format") != FORMAT_TAG:
        raise StudyError(
            [Problem("format", f"must be {FORMAT_TAG!r}; this is not a Bandwright study")],
            source,
        )
    version = raw.get("version")
    if isinstance(version, bool) or not isinstance(version, int) or version < 1:
        raise StudyError([Problem("version", "must be a whole number of at least 1")], source)
    if version > FORMAT_VERSION:
        raise StudyError(
            [
                Problem(
                    "version",
                    f"file format {version} is newer than this program reads "
                    f"(up to {FORMAT_VERSION}); update Bandwright to open it",
                )
            ],
            source,
        )
    extra = sorted(set(raw) - {"format", "version", "study"})
    problems = [Problem(k, "is not a known field") for k in extra]
    body = raw.get("study")
    if body is None:
        raise StudyError([*problems, Problem("study", "is missing")], source)
    if isinstance(body, dict):
        body = _migrate(body, version)
    study = decode(Study, body, "", problems)
    if study is not None:
        # Fields that failed to decode hold defaults; skip cross-field findings on them.
        seen = {p.path for p in problems}
        problems.extend(p for p in check_study(study) if p.path not in seen)
    errors = errors_of(problems)
    if errors or study is None:
        raise StudyError(errors or problems, source)
    return study


def load_study(path: str | os.PathLike[str]) -> Study:
    """Load and validate the study file at ``path``.

    Raises
    ------
    StudyError
        For a missing, unreadable, oversized or invalid file, with the field paths at fault.
    """
    p = Path(path)
    try:
        size = p.stat().st_size
    except FileNotFoundError:
        raise StudyError([Problem("", "file not found")], str(p)) from None
    except OSError as exc:
        raise StudyError([Problem("", f"cannot read ({exc.strerror})")], str(p)) from None
    if size > MAX_FILE_BYTES:
        raise StudyError([Problem("", "file is larger than 20 MB; not a study file")], str(p))
    try:
        with p.open("rb") as fh:
            data = fh.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise StudyError([Problem("", f"cannot read ({exc.strerror})")], str(p)) from None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        raise StudyError([Problem("", "is not UTF-8 text")], str(p)) from None
    return loads_study(text, str(p))


def dumps_study(study: Study) -> str:
    """Serialise ``study`` to JSON text (UTF-8, indented, stable key order)."""
    doc = {"format": FORMAT_TAG, "version": FORMAT_VERSION, "study": encode(study)}
    return json.dumps(doc, indent=2, ensure_ascii=False, allow_nan=False) + "\n"


def save_study(study: Study, path: str | os.PathLike[str]) -> None:
    """Validate and save ``study`` atomically to ``path``.

    Raises
    ------
    StudyError
        If the study is invalid (nothing is written).
    OSError
        If writing fails; any previous file at ``path`` is left intact.
    """
    errors = errors_of(check_study(study))
    if errors:
        raise StudyError(errors, str(path))
    atomic_write_bytes(path, dumps_study(study).encode("utf-8"))
