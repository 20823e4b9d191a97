"""File → Export actions and the clipboard copy, with patched file dialogs."""

from __future__ import annotations

import openpyxl
import pandas as pd
from PySide6.QtWidgets import QApplication, QFileDialog, QMessageBox

from app.cli import main
from core.export import SHEETS
from core.resources import demo_path


def _dialog_returns(monkeypatch, path):
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(path), ""))


def test_export_workbook_writes_the_chosen_file_and_reports(make_window, tmp_path, monkeypatch):
    w = make_window()
    target = tmp_path / "review"  # no suffix typed: .xlsx is added
    _dialog_returns(monkeypatch, target)
    assert w.export_workbook()
    out = tmp_path / "review.xlsx"
    wb = openpyxl.load_workbook(out)
    assert set(SHEETS) <= set(wb.sheetnames)
    assert "Exported comparison workbook" in w.statusBar().currentMessage()
    # The Summary lists every enabled candidate by name.
    names = {c.name for c in w.controller.study.candidates}
    cells = {str(c.value) for row in wb["Summary"].iter_rows() for c in row}
    assert names <= cells


def test_failed_export_keeps_the_old_file_and_says_why(make_window, tmp_path, monkeypatch):
    w = make_window()
    out = tmp_path / "review.xlsx"
    out.write_bytes(b"previous contents")
    _dialog_returns(monkeypatch, out)
    import core.fileio as fileio

    def boom(*_a, **_k):
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(fileio.os, "replace", boom)
    shown = []
    monkeypatch.setattr(QMessageBox, "critical", lambda *a, **k: shown.append(a[2]))
    assert not w.export_workbook()
    assert out.read_bytes() == b"previous contents"
    assert shown and "Permission denied" in shown[0]
    assert "Export failed" in w.statusBar().currentMessage()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["review.xlsx"]


def test_csv_exports_round_trip_and_clipboard(make_window, tmp_path, monkeypatch):
    w = make_window()
    _dialog_returns(monkeypatch, tmp_path / "score.csv")
    assert w.export_scorecard_csv()
    df = pd.read_csv(tmp_path / "score.csv")
    assert len(df) == len(w.controller.evaluation.scorecard)
    _dialog_returns(monkeypatch, tmp_path / "curves.csv")
    assert w.export_curves_csv()
    assert len(pd.read_csv(tmp_path / "curves.csv")) == len(w.controller.evaluation.curves)
    w.copy_scorecard()
    text = QApplication.clipboard().text()
    assert "\t" in text and w.controller.study.candidates[0].name in text


def test_cli_writes_the_same_workbook_and_csv(tmp_path, capsys):
    xlsx, csv = tmp_path / "cli.xlsx", tmp_path / "cli.csv"
    assert main(["evaluate", str(demo_path()), "--xlsx", str(xlsx), "--csv", str(csv)]) == 0
    assert set(SHEETS) <= set(openpyxl.load_workbook(xlsx).sheetnames)
    assert (tmp_path / "cli-curves.csv").exists()
    assert len(pd.read_csv(csv)) > 0
    assert "Scorecard" in capsys.readouterr().out
