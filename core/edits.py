"""Small pure edits of a study, each with apply and revert, testable without Qt.

The GUI wraps every edit in one generic undo command; the edit itself never touches a widget.
A field is addressed by a path such as ``("bands", 1, "f_high_ghz")`` (written
``bands[1].f_high_ghz`` in messages).
"""

from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass
from typing import Any, Protocol

from core.schema import Problem
from core.study.model import Study
from core.study.validate import check_study, errors_of

__all__ = [
    "Compound",
    "Edit",
    "EditRefused",
    "InsertItem",
    "Path",
    "RemoveItem",
    "ReplaceStudy",
    "SetField",
    "format_path",
    "get_in",
    "parse_path",
    "set_in",
    "try_apply",
    "unique_name",
]

Path = tuple[str | int, ...]


class Edit(Protocol):
    """What every edit offers."""

    label: str

    def apply(self, study: Study) -> Study: ...

    def revert(self, study: Study) -> Study: ...


class EditRefused(ValueError):
    """An edit would make the study invalid; ``problems`` says why (field paths included)."""

    def __init__(self, problems: list[Problem]) -> None:
        self.problems = problems
        super().__init__(str(problems[0]) if problems else "edit refused")


def unique_name(name: str, taken: set[str] | frozenset[str]) -> str:
    """``name``, or ``name (2)``, ``name (3)``… — the first not in ``taken``.

    >>> unique_name("n257", {"n257", "n257 (2)"})
    'n257 (3)'
    """
    if name not in taken:
        return name
    k = 2
    while f"{name} ({k})" in taken:
        k += 1
    return f"{name} ({k})"


def format_path(path: Path) -> str:
    """``("bands", 1, "f_high_ghz")`` → ``"bands[1].f_high_ghz"``."""
    out = ""
    for part in path:
        if isinstance(part, int):
            out += f"[{part}]"
        else:
            out += f".{part}" if out else part
    return out


_TOKEN = re.compile(r"([A-Za-z_][A-Za-z0-9_]*)|\[(\d+)\]")


def parse_path(text: str) -> Path:
    """``"bands[1].f_high_ghz"`` → ``("bands", 1, "f_high_ghz")``."""
    parts: list[str | int] = []
    for m in _TOKEN.finditer(text):
        parts.append(m.group(1) if m.group(1) is not None else int(m.group(2)))
    return tuple(parts)


def get_in(obj: Any, path: Path) -> Any:
    """The value at ``path`` inside nested dataclasses and tuples."""
    for part in path:
        obj = obj[part] if isinstance(part, int) else getattr(obj, part)
    return obj


def set_in(obj: Any, path: Path, value: Any) -> Any:
    """A copy of ``obj`` with the value at ``path`` replaced (structure shared elsewhere)."""
    if not path:
        return value
    head, rest = path[0], path[1:]
    if isinstance(head, int):
        seq = list(obj)
        seq[head] = set_in(seq[head], rest, value)
        return tuple(seq)
    return dataclasses.replace(obj, **{head: set_in(getattr(obj, head), rest, value)})


@dataclass(frozen=True, slots=True)
class SetField:
    """Set one field; consecutive edits of the same field merge (see :meth:`merged`)."""

    path: Path
    old: Any
    new: Any
    label: str = ""

    def apply(self, study: Study) -> Study:
        return set_in(study, self.path, self.new)

    def revert(self, study: Study) -> Study:
        return set_in(study, self.path, self.old)

    def merged(self, later: SetField) -> SetField | None:
        """One edit equivalent to ``self`` then ``later``, or None if they touch other fields."""
        if later.path != self.path:
            return None
        return SetField(self.path, self.old, later.new, self.label)


@dataclass(frozen=True, slots=True)
class InsertItem:
    """Insert ``item`` at ``index`` of the tuple field ``collection`` (e.g. ``"bands"``)."""

    collection: str
    index: int
    item: Any
    label: str = ""

    def apply(self, study: Study) -> Study:
        seq = list(getattr(study, self.collection))
        seq.insert(self.index, self.item)
        return dataclasses.replace(study, **{self.collection: tuple(seq)})

    def revert(self, study: Study) -> Study:
        seq = list(getattr(study, self.collection))
        del seq[self.index]
        return dataclasses.replace(study, **{self.collection: tuple(seq)})


@dataclass(frozen=True, slots=True)
class RemoveItem:
    """Remove the item at ``index`` of ``collection`` (the item is kept for revert)."""

    collection: str
    index: int
    item: Any
    label: str = ""

    def apply(self, study: Study) -> Study:
        return InsertItem(self.collection, self.index, self.item).revert(study)

    def revert(self, study: Study) -> Study:
        return InsertItem(self.collection, self.index, self.item).apply(study)


@dataclass(frozen=True, slots=True)
class Compound:
    """Several edits applied in order and reverted in reverse order, as one undo step."""

    edits: tuple[Any, ...]
    label: str = ""

    def apply(self, study: Study) -> Study:
        for e in self.edits:
            study = e.apply(study)
        return study

    def revert(self, study: Study) -> Study:
        for e in reversed(self.edits):
            study = e.revert(study)
        return study


def try_apply(study: Study, edit: Edit) -> Study:
    """Apply ``edit`` and validate; the original study is untouched either way.

    Raises
    ------
    EditRefused
        If the result would have errors; only problems the edit introduced are listed when
        the study had errors before (it never should).
    """
    new = edit.apply(study)
    errors = errors_of(check_study(new))
    if errors:
        before = {str(p) for p in errors_of(check_study(study))}
        fresh = [p for p in errors if str(p) not in before]
        if fresh:
            raise EditRefused(fresh)
    return new


@dataclass(frozen=True, slots=True)
class ReplaceStudy:
    """Replace the whole study (recovering an autosave copy), undoable as one step."""

    old: Study
    new: Study
    label: str = "Replace study"

    def apply(self, study: Study) -> Study:
        return self.new

    def revert(self, study: Study) -> Study:
        return self.old
