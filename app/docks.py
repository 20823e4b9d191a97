"""The Derivation and Notices docks."""

from __future__ import annotations

import html
from typing import Any

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QDockWidget,
    QHeaderView,
    QTableWidget,
    QTableWidgetItem,
    QTextBrowser,
    QWidget,
)

from core.schema import Problem

__all__ = ["DerivationDock", "NoticesDock", "derivation_html"]

_EMPTY_DERIVATION = (
    "<p style='color:#555'><b>Nothing selected.</b></p>"
    "<p style='color:#555'>Select a number — a Scorecard cell, a Link Ledger line, a "
    "die-area or cost figure — and this panel shows how it was computed: the formula, every "
    "input with its unit, and the intermediate values, so that it can be checked by hand.</p>"
)


def _fmt(value: Any) -> str:
    """Six significant figures; no "-0"; thousands separated rather than exponent for money."""
    if isinstance(value, float):
        if value != value:
            return "—"
        if value in (float("inf"), float("-inf")):
            return "∞" if value > 0 else "−∞"
        if abs(value) < 5e-13:
            return "0"
        if 1e5 <= abs(value) < 1e12:
            return f"{value:,.0f}"
        return f"{value:.6g}"
    return html.escape(str(value))


def derivation_html(d: Any) -> str:
    """HTML for a derivation record (title, formula, inputs, steps, result, source)."""
    if d is None:
        return _EMPTY_DERIVATION
    parts = [f"<h3 style='margin-bottom:4px'>{html.escape(d.title)}</h3>"]
    parts.append(
        f"<p style='font-size:15px;margin:2px 0 8px 0'><b>{_fmt(d.result)}</b> "
        f"{html.escape(d.unit)}</p>"
    )
    parts.append(
        "<p style='font-family:DejaVu Sans Mono,monospace;background:#f3f3f3;padding:4px'>"
        + html.escape(d.formula).replace("\n", "<br>")
        + "</p>"
    )
    for heading, rows in (("Inputs", d.inputs), ("Intermediate values", d.steps)):
        if not rows:
            continue
        parts.append(f"<p style='margin:8px 0 2px 0'><b>{heading}</b></p><table cellspacing=0>")
        for name, value, unit in rows:
            parts.append(
                f"<tr><td style='padding-right:10px'>{html.escape(str(name))}</td>"
                f"<td align=right style='padding-right:4px'>{_fmt(value)}</td>"
                f"<td>{html.escape(str(unit))}</td></tr>"
            )
        parts.append("</table>")
    if d.source:
        parts.append(
            f"<p style='color:#555;margin-top:8px'><i>Source:</i> {html.escape(d.source)}</p>"
        )
    return "".join(parts)


class DerivationDock(QDockWidget):
    """Right dock: how the selected number was computed."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__("Derivation", parent)
        self.setObjectName("DerivationDock")
        self.browser = QTextBrowser(self)
        self.browser.setOpenLinks(False)
        self.setWidget(self.browser)
        self.current: Any = None
        self.show_derivation(None)

    def show_derivation(self, derivation: Any) -> None:
        self.current = derivation
        self.browser.setHtml(derivation_html(derivation))


class NoticesDock(QDockWidget):
    """Bottom dock: validation problems, warnings, evaluation findings and cautions."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__("Notices", parent)
        self.setObjectName("NoticesDock")
        self.table = QTableWidget(0, 3, self)
        self.table.setHorizontalHeaderLabels(["", "Where", "What"])
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QTableWidget.EditTrigger.NoEditTriggers)
        self.table.setSelectionBehavior(QTableWidget.SelectionBehavior.SelectRows)
        hh = self.table.horizontalHeader()
        hh.setSectionResizeMode(0, QHeaderView.ResizeMode.ResizeToContents)
        hh.setSectionResizeMode(1, QHeaderView.ResizeMode.ResizeToContents)
        hh.setSectionResizeMode(2, QHeaderView.ResizeMode.Stretch)
        self.setWidget(self.table)
        self.problems: list[Problem] = []

    def set_problems(self, problems: list[Problem]) -> None:
        self.problems = list(problems)
        self.table.setRowCount(len(problems))
        for row, p in enumerate(problems):
            mark = {"error": "✗ error", "warning": "⚠ warning"}.get(p.severity, "ℹ caution")
            for col, txt in enumerate((mark, p.path or "study", p.reason)):
                item = QTableWidgetItem(txt)
                item.setFlags(Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable)
                self.table.setItem(row, col, item)
        errors, warnings = self.counts()
        self.setWindowTitle(f"Notices ({errors + warnings})" if errors + warnings else "Notices")

    def counts(self) -> tuple[int, int]:
        """(errors, warnings); notes and cautions are not counted."""
        errors = sum(p.severity == "error" for p in self.problems)
        return errors, sum(p.severity == "warning" for p in self.problems)
