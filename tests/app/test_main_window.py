"""Main window: Band Plan editing with undo/redo, save/reopen, refusals, close prompt, autosave."""

from __future__ import annotations

import dataclasses

from PySide6.QtGui import QFontDatabase
from PySide6.QtWidgets import QMessageBox

from app import autosave
from core.study import load_study, save_study


def _band_model(window):
    return window.select_page("Band Plan").model


def test_fonts_are_available(qapp):
    # Without fonts every glyph renders as a box and Qt says nothing (qt-headless.md).
    assert QFontDatabase.families()


def test_band_plan_model_passes_the_model_tester(make_window, qtmodeltester):
    w = make_window()
    qtmodeltester.check(_band_model(w))


def test_edit_band_edge_undo_redo_save_reopen(make_window, tmp_path, monkeypatch):
    path = tmp_path / "study.json"
    from core.resources import demo_path

    save_study(load_study(demo_path()), path)
    w = make_window(path)
    model = _band_model(w)
    assert not w.isWindowModified()
    idx = model.index(0, 2)  # n257 f high
    assert model.setData(idx, "30.25")
    assert w.controller.study.bands[0].f_high_ghz == 30.25
    assert w.isWindowModified()
    assert model.data(idx) == "30.250"
    w.controller.undo_stack.undo()
    assert w.controller.study.bands[0].f_high_ghz == 29.5
    assert not w.isWindowModified()
    w.controller.undo_stack.redo()
    assert w.controller.study.bands[0].f_high_ghz == 30.25
    assert w.file_save()
    assert not w.isWindowModified()
    assert load_study(path).bands[0].f_high_ghz == 30.25


def test_invalid_input_is_refused_with_a_notice(make_window):
    w = make_window()
    model = _band_model(w)
    before = w.controller.study
    idx = model.index(1, 2)  # n260 f high below its f low
    assert not model.setData(idx, "12")
    assert w.controller.study == before
    assert "bands[1].f_high_ghz" in model.data(idx, 3)  # tooltip beside the cell
    notices = [str(p) for p in w.notices.problems]
    assert any("bands[1].f_high_ghz" in n and "greater than" in n for n in notices)
    assert not model.setData(model.index(0, 5), "lots")
    assert any("not a number" in str(p) for p in w.notices.problems)
    assert w.controller.study == before
    assert w.controller.undo_stack.count() == 0


def test_add_and_remove_band_are_undoable(make_window):
    w = make_window()
    page = w.select_page("Band Plan")
    page.add_preset("n261")
    assert [b.name for b in w.controller.study.bands] == ["n257", "n260", "n261"]
    assert page.model.rowCount() == 3
    w.controller.undo_stack.undo()
    assert page.model.rowCount() == 2


def test_close_with_unsaved_changes_asks(make_window, monkeypatch):
    w = make_window()
    _band_model(w).setData(_band_model(w).index(0, 5), "21")
    asked = []

    def fake_exec(box):
        asked.append(box.text())
        return QMessageBox.StandardButton.Cancel

    monkeypatch.setattr(QMessageBox, "exec", fake_exec)
    w.close()
    assert asked and "Save the changes" in asked[0]
    assert w.isVisible()  # cancelled: still open, nothing lost
    assert w.controller.study.bands[0].targets.gain_db == 21.0


def test_autosave_written_and_offered_after_a_crash(make_window, tmp_path, monkeypatch):
    path = tmp_path / "s.json"
    from core.resources import demo_path

    save_study(load_study(demo_path()), path)
    w = make_window(path)
    _band_model(w).setData(_band_model(w).index(0, 7), "25")
    w.write_autosave()
    assert autosave.autosave_path(path).exists()
    # "Crash": the window goes away without saving; a new window on the same file offers it.
    w.controller.undo_stack.setClean()
    monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: QMessageBox.StandardButton.Yes)
    w2 = make_window(path)
    w2.offer_recovery()
    assert w2.controller.study.bands[0].targets.pae_pct == 25.0
    assert w2.isWindowModified()
    w2.controller.undo_stack.undo()
    assert w2.controller.study == load_study(path)


def test_revert_restores_the_saved_file(make_window, tmp_path, monkeypatch):
    path = tmp_path / "s.json"
    from core.resources import demo_path

    study = load_study(demo_path())
    save_study(dataclasses.replace(study, name="saved"), path)
    w = make_window(path)
    _band_model(w).setData(_band_model(w).index(0, 0), "renamed")
    monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: QMessageBox.StandardButton.Yes)
    w.file_revert()
    assert w.controller.study.bands[0].name == "n257"
    assert not w.isWindowModified()


def test_rename_study_updates_title_and_undoes(make_window):
    w = make_window()
    page = w.select_page("Band Plan")
    page.name_edit.setText("Quay 7 small cell")
    page.name_edit.editingFinished.emit()
    assert w.controller.study.name == "Quay 7 small cell"
    assert "Quay 7 small cell" in w.windowTitle()
    w.controller.undo_stack.undo()
    assert page.name_edit.text() == w.controller.study.name != "Quay 7 small cell"
    page.name_edit.setText("   ")
    page.name_edit.editingFinished.emit()
    assert w.controller.study.name.strip()
    assert any(p.path == "name" for p in w.notices.problems)


def test_save_as_adds_to_open_recent_and_reopens(make_window, tmp_path, monkeypatch):
    from PySide6.QtWidgets import QFileDialog

    w = make_window()
    target = tmp_path / "quay"
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(target), ""))
    assert w.file_save_as()
    saved = tmp_path / "quay.json"  # the .json suffix is added
    assert saved.exists() and w.controller.path == saved
    assert w.recent_files()[0] == str(saved.resolve())
    assert w.recent_menu.actions()[0].text() == str(saved.resolve())
    w.file_new()
    assert w.controller.path is None
    w.recent_menu.actions()[0].trigger()
    assert w.controller.path == saved.resolve() or w.controller.path == saved
    assert w.controller.study == load_study(saved)
