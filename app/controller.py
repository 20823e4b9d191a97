"""The document controller: one per open study, the single source of truth for the views.

It owns the :class:`~core.study.Study`, its file path and its :class:`QUndoStack`, turns user
edits (pure :mod:`core.edits` objects) into undo commands, and re-emits changes as Qt signals
named in the past tense. Views connect in ``__init__`` and never replace the study themselves.
"""

from __future__ import annotations

import time
from pathlib import Path
from typing import Any

from PySide6.QtCore import QObject, QTimer, Signal
from PySide6.QtGui import QUndoCommand, QUndoStack

from core.edits import Compound, EditRefused, InsertItem, RemoveItem, SetField, try_apply
from core.schema import Problem
from core.study import Study, check_study

__all__ = ["EditCommand", "StudyController"]

#: Standing caution listed in Notices (the Link Ledger repeats it beside every EIRP figure).
CAUTION_TEXT = (
    "Estimates for comparing architectures, not a design sign-off. RF exposure, transmit power "
    "and emission limits are set by local regulation: defer to it and to licensed practice."
)

#: Undo-command id shared by all field edits, so Qt offers them to mergeWith().
_SET_FIELD_ID = 1001


class EditCommand(QUndoCommand):
    """Generic undo command: holds the controller and one pure edit, never a widget."""

    def __init__(self, controller: StudyController, edit: Any, *, mergeable: bool = False):
        super().__init__(edit.label or "Edit")
        self._controller = controller
        self.edit = edit
        self._mergeable = mergeable

    def redo(self) -> None:
        self._controller._replace(self.edit.apply(self._controller.study), self.edit, False)

    def undo(self) -> None:
        self._controller._replace(self.edit.revert(self._controller.study), self.edit, True)

    def id(self) -> int:
        return _SET_FIELD_ID if self._mergeable and isinstance(self.edit, SetField) else -1

    def mergeWith(self, other: QUndoCommand) -> bool:
        if not isinstance(other, EditCommand) or not other._mergeable:
            return False
        merged = self.edit.merged(other.edit)
        if merged is None:
            return False
        self.edit = merged
        return True


class StudyController(QObject):
    """Holds the open study and tells the views when it, or its evaluation, changed."""

    #: The study was replaced (any edit, undo, redo, open, revert). Argument: the new Study.
    study_changed = Signal(object)
    #: Rows are about to be inserted/removed: (collection, index, "insert"|"remove").
    items_about_to_change = Signal(str, int, str)
    #: Rows were inserted/removed: (collection, index, "insert"|"remove").
    items_changed = Signal(str, int, str)
    #: A new evaluation is ready: (evaluation, elapsed seconds).
    evaluation_changed = Signal(object, float)
    #: The file path changed (open, save as). Argument: Path or None.
    path_changed = Signal(object)
    #: An edit was refused: (field path, reason).
    edit_refused = Signal(str, str)
    #: Notices (validation warnings, evaluation findings) were recomputed. Argument: list.
    notices_changed = Signal(list)
    #: A view asks the Derivation dock to show something. Argument: a derivation object or None.
    derivation_requested = Signal(object)

    def __init__(self, study: Study, path: Path | None = None, parent: QObject | None = None):
        super().__init__(parent)
        self._study = study
        self._path = path
        self.undo_stack = QUndoStack(self)
        self.evaluation: Any = None
        #: Cost model result and weighted scores of the current evaluation (core.costing).
        self.cost: Any = None
        self.scores: Any = None
        self.eval_seconds = 0.0
        self._refusals: list[Problem] = []
        self.last_refusal = ""
        self._eval_timer = QTimer(self)
        self._eval_timer.setSingleShot(True)
        self._eval_timer.setInterval(30)  # coalesce bursts of edits (spin-box drags)
        self._eval_timer.timeout.connect(self.recompute)

    # -- state ---------------------------------------------------------------------------
    @property
    def study(self) -> Study:
        return self._study

    @property
    def path(self) -> Path | None:
        return self._path

    def set_path(self, path: Path | None) -> None:
        self._path = path
        self.path_changed.emit(path)

    def reset(self, study: Study, path: Path | None) -> None:
        """Replace the whole document (open, new, revert): clears undo history, marks clean."""
        self.undo_stack.clear()
        self._refusals = []
        self._study = study
        self.set_path(path)
        self.study_changed.emit(study)
        self.recompute()
        self.undo_stack.setClean()

    # -- edits ---------------------------------------------------------------------------
    def submit(self, edit: Any, *, mergeable: bool = False) -> bool:
        """Validate and push ``edit``; on refusal emit :attr:`edit_refused` and return False."""
        try:
            try_apply(self._study, edit)
        except EditRefused as exc:
            first = exc.problems[0]
            self.report_refusal(first.path, first.reason)
            return False
        self._refusals = []
        self.undo_stack.push(EditCommand(self, edit, mergeable=mergeable))
        return True

    def report_refusal(self, path: str, reason: str) -> None:
        """Record a refused input (also one a view refused before it reached an edit)."""
        self.last_refusal = reason
        self._refusals = [Problem(path, f"input refused: {reason}", "error")]
        self.edit_refused.emit(path, reason)
        self._emit_notices()

    def set_field(
        self, path: tuple, value: Any, label: str = "", *, mergeable: bool = False
    ) -> bool:
        """Convenience: submit a :class:`SetField` from the current value to ``value``."""
        from core.edits import get_in

        old = get_in(self._study, path)
        if old == value and type(old) is type(value):
            return True
        return self.submit(SetField(path, old, value, label or "Edit value"), mergeable=mergeable)

    def _replace(self, study: Study, edit: Any, reverse: bool) -> None:
        hint = self._row_hint(edit, reverse)
        if hint:
            self.items_about_to_change.emit(*hint)
        self._study = study
        if hint:
            self.items_changed.emit(*hint)
        self.study_changed.emit(study)
        self._eval_timer.start()

    @staticmethod
    def _row_hint(edit: Any, reverse: bool) -> tuple[str, int, str] | None:
        if isinstance(edit, Compound) and len(edit.edits) >= 1:
            edit = edit.edits[0]
        if isinstance(edit, InsertItem):
            return (edit.collection, edit.index, "remove" if reverse else "insert")
        if isinstance(edit, RemoveItem):
            return (edit.collection, edit.index, "insert" if reverse else "remove")
        return None

    # -- evaluation ----------------------------------------------------------------------
    def recompute(self) -> None:
        """Evaluate the study now (normally triggered by the debounce timer)."""
        from core.costing import cost_study, weighted_scores
        from core.estimate import evaluate

        self._eval_timer.stop()
        t0 = time.perf_counter()
        self.evaluation = evaluate(self._study)
        self.cost = cost_study(self._study, self.evaluation)
        self.scores = weighted_scores(self._study, self.evaluation, self.cost)
        self.eval_seconds = time.perf_counter() - t0
        self.evaluation_changed.emit(self.evaluation, self.eval_seconds)
        self._emit_notices()

    def flush(self) -> None:
        """Run a pending recompute at once (tests, snapshots, before export)."""
        if self._eval_timer.isActive():
            self.recompute()

    def notices(self) -> list[Problem]:
        """Refusals, validation warnings and evaluation findings, as Problems."""
        out = list(self._refusals)
        out += [p for p in check_study(self._study) if p.severity == "warning"]
        from core.link_plan import target_findings

        out += target_findings(self._study)
        ev = self.evaluation
        if ev is not None:
            findings = list(ev.findings) + list(getattr(self.cost, "findings", ()))
            for f in findings:
                where = f.candidate + (f" · {f.band}" if getattr(f, "band", None) else "")
                sev = {"error": "error", "warning": "warning"}.get(f.severity, "note")
                out.append(Problem(where, f.message, sev))
        out.append(Problem("cautions", CAUTION_TEXT, "note"))
        return out

    def _emit_notices(self) -> None:
        self.notices_changed.emit(self.notices())
