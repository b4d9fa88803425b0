"""The main window end to end (offscreen): editing through the Segment Card and Feed, undo and
redo, files (atomic save, corrupt files), autosave and recovery, the unit switch, the screenshot.

Unit conversions are checked against exact definitions: 1 ft = 0.3048 m and 1 in = 0.0254 m
(international yard and pound agreement, 1959; NIST SP 811), standard atmosphere = 101 325 Pa
(ISO 2533), T[K] = T[°C] + 273.15 and T[°F] = T[°C] * 9/5 + 32 (ITS-90 / NIST SP 811).
"""

from __future__ import annotations

import json
import os
from pathlib import Path

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtGui import QImage  # noqa: E402

from app import commands as C  # noqa: E402
from app import settings  # noqa: E402
from app.main_window import MainWindow, run  # noqa: E402
from app.recovery import recovery_dir  # noqa: E402
from solver.results import CAUTIONS, CAUTIONS_BANNER  # noqa: E402
from solver.model import Alternative, Layer, Project, Segment  # noqa: E402
from solver.project_io import dump_project, load_project  # noqa: E402


def small_project() -> Project:
    # invented example: hot water through two insulated, traced runs
    seg = Segment(name="Run 1", length_m=30.0, heat_input_W_per_m=20.0,
                  insulation=[Layer(thickness_m=0.04, conductivity_W_per_mK=0.04)])
    alt = Alternative(name="Base", segments=[seg, seg.model_copy(update={"name": "Run 2", "length_m": 20.0})])
    return Project(name="Window test line", alternatives=[alt])



@pytest.fixture
def win(qtbot):
    w = MainWindow(interactive=False)
    qtbot.addWidget(w)
    with qtbot.waitSignal(w.doc.result_ready, timeout=30000):
        w.doc.set_project(small_project())
    w.show()
    yield w
    w.doc.shutdown()


def commit(edit, text: str) -> None:
    edit.line_edit.setText(text)
    edit.commit()


def test_window_has_real_panels_and_cautions(win):
    from app.panels.checks_panel import ChecksPanel
    from app.panels.key_figures import KeyFiguresPanel
    from app.panels.line_strip import LineStrip
    from app.panels.profiles import ProfilesPanel

    assert isinstance(win.profiles, ProfilesPanel)
    assert isinstance(win.line_strip, LineStrip)
    assert isinstance(win.checks, ChecksPanel)
    assert isinstance(win.key_figures, KeyFiguresPanel)
    text = CAUTIONS_BANNER.lower()
    for phrase in ("hot surfaces burn", "overpressure", "freeze or boil", "temperature-class",
                   "estimates", "local codes", "licensed engineering review"):
        assert phrase in text
    assert win.banner.isVisible()
    titles = [a.text().replace("&", "") for a in win.menuBar().actions()]
    assert titles == ["File", "Edit", "View", "Tools", "Help"]


def test_edit_length_with_unit_updates_model_key_figures_and_plot(win, qtbot):
    card = win.segment_card
    old_outlet = win.key_figures.value_text("outlet_temperature_K")
    old_x_end = win.profiles.curves["bulk"].getData()[0][-1]
    with qtbot.waitSignal(win.doc.result_ready, timeout=30000):
        commit(card.length_edit, "200 ft")
    assert win.doc.current_alternative.segments[0].length_m == pytest.approx(200 * 0.3048)  # 1 ft = 0.3048 m
    assert card.length_edit.text() == "60.96"  # shown back in the display unit (m)
    new_x_end = win.profiles.curves["bulk"].getData()[0][-1]
    assert new_x_end == pytest.approx(60.96 + 20.0)  # the plot spans the new line length
    assert new_x_end != old_x_end
    assert win.key_figures.value_text("outlet_temperature_K") != old_outlet
    assert win.isWindowModified() and "[*]" in win.windowTitle()


def test_gauge_pressure_typed_with_g(win):
    feed = win.feed_panel
    commit(feed.pressure_edit, "3 bar(g)")
    # gauge + standard atmosphere (101 325 Pa, ISO 2533)
    assert win.doc.current_alternative.feed.inlet_pressure_Pa == pytest.approx(3e5 + 101325.0)
    assert "(g)" in feed.pressure_edit.line_edit.toolTip()
    commit(feed.temp_edit, "150 degF")
    assert win.doc.current_alternative.feed.inlet_temperature_K == pytest.approx((150 - 32) * 5 / 9 + 273.15)


@pytest.mark.parametrize("text", ["abc", "-5", "3 kg", ""])
def test_invalid_input_marked_in_place_model_unchanged(win, text):
    card = win.segment_card
    before = win.doc.project.model_dump()
    commit(card.length_edit, text)
    assert card.length_edit.has_error
    assert card.length_edit.error_label.isVisible()
    assert card.length_edit.error_text.startswith("Length")  # the field's label, not its JSON key
    assert "length_m" not in card.length_edit.error_text
    assert "border" in card.length_edit.line_edit.styleSheet()
    assert win.doc.project.model_dump() == before
    assert win.doc.undo_stack.count() == 0
    # a good entry afterwards clears the mark
    commit(card.length_edit, "12")
    assert not card.length_edit.has_error
    assert win.doc.current_alternative.segments[0].length_m == 12.0


def test_refusal_mark_survives_other_edits_until_selection_changes(win):
    card = win.segment_card
    commit(card.length_edit, "-4")
    assert card.length_edit.has_error
    win.doc.push(C.SetSegmentField(win.doc, 0, 1, "length_m", 25.0))  # an edit elsewhere
    assert card.length_edit.has_error and card.length_edit.text() == "-4"
    win.doc.select_segment(1)
    assert not card.length_edit.has_error and card.length_edit.text() == "25"
    assert [s.length_m for s in win.doc.current_alternative.segments] == [30.0, 25.0]


def test_model_rule_refusal_is_shown_where_typed(win):
    card = win.segment_card
    before = win.doc.project.model_dump()
    commit(card.elevation_edit, "45")  # more than the 30 m segment length: the model refuses
    assert card.elevation_edit.has_error
    # in the user's words and units: the label and the value typed, no JSON key
    text = card.elevation_edit.error_text.replace("\xa0", " ")
    assert text.startswith("Elevation change") and "45 m" in text and "30 m" in text
    assert "elevation_change_m" not in text
    assert win.doc.project.model_dump() == before


def test_undo_redo_updates_card_without_feedback(win, qtbot):
    card = win.segment_card
    commit(card.length_edit, "45")
    card.add_layer()
    assert len(win.doc.current_alternative.segments[0].insulation) == 2
    assert win.doc.undo_stack.count() == 2
    win.undo_action.trigger()
    assert len(win.doc.current_alternative.segments[0].insulation) == 1
    assert card.layer_table.rowCount() == 1
    win.undo_action.trigger()
    assert card.length_edit.text() == "30"
    assert win.doc.undo_stack.count() == 2  # refreshing the card pushed nothing
    assert not win.isWindowModified()
    win.redo_action.trigger()
    assert card.length_edit.text() == "45"


def test_pending_entry_lands_on_the_segment_it_was_typed_for(win):
    card = win.segment_card
    card.length_edit.line_edit.setText("55")  # typed, not yet committed (no Enter, focus elsewhere)
    win.doc.select_segment(1)  # e.g. a click in the Line Strip
    lengths = [s.length_m for s in win.doc.current_alternative.segments]
    assert lengths == [55.0, 20.0]
    assert card.length_edit.text() == "20"  # the card now shows segment 2


def test_segment_actions_add_reorder_delete(win):
    doc = win.doc
    win.insert_segment()
    # a new segment is named after its position in the line
    assert [s.name for s in doc.current_alternative.segments] == ["Run 1", "Segment 2", "Run 2"]
    win.move_segment(1)
    assert [s.name for s in doc.current_alternative.segments] == ["Run 1", "Run 2", "Segment 2"]
    win.delete_segment()
    assert [s.name for s in doc.current_alternative.segments] == ["Run 1", "Run 2"]
    assert doc.undo_stack.count() == 3
    doc.undo_stack.undo()
    assert [s.name for s in doc.current_alternative.segments] == ["Run 1", "Run 2", "Segment 2"]


def test_surroundings_switch_carries_temperature_and_is_one_step(win):
    card = win.segment_card
    card.surr_combo.setCurrentIndex(card.surr_combo.findData("fixed_wall"))
    card._on_surroundings_kind(card.surr_combo.currentIndex())
    seg = win.doc.current_alternative.segments[0]
    assert seg.surroundings.kind == "fixed_wall" and seg.heat_input_W_per_m == 0.0
    assert card.surr_stack.currentWidget() is card.surr_pages["fixed_wall"]
    assert not card.heater.kind_combo.isEnabled()  # a held wall takes no tracing
    win.doc.undo_stack.undo()
    seg = win.doc.current_alternative.segments[0]
    assert seg.surroundings.kind == "still_air" and seg.heat_input_W_per_m == 20.0


def test_save_and_reload_round_trip(win, tmp_path):
    commit(win.segment_card.length_edit, "33")
    target = tmp_path / "line.json"
    assert win.save_to(target)
    assert not win.doc.modified and not win.isWindowModified()
    again = load_project(target)
    assert again.model_dump() == win.doc.project.model_dump()
    assert settings.recent_files()[0] == str(target.resolve())
    w2 = MainWindow(interactive=False)
    try:
        assert w2.open_file(target)
        assert w2.doc.project.model_dump() == win.doc.project.model_dump()
        assert w2.doc.path == target
    finally:
        w2.doc.shutdown()
        w2.close()


def test_failed_save_leaves_old_file_and_says_why(win, tmp_path, monkeypatch):
    target = tmp_path / "line.json"
    assert win.save_to(target)
    old_bytes = target.read_bytes()
    commit(win.segment_card.length_edit, "77")
    # 1) the final replace step fails (e.g. the disk refuses): the old file must be intact
    def refuse(*_a, **_k):
        raise PermissionError(13, "Permission denied")

    monkeypatch.setattr(os, "replace", refuse)
    assert not win.save_to(target)
    monkeypatch.undo()
    assert target.read_bytes() == old_bytes
    assert sorted(p.name for p in tmp_path.iterdir() if p.is_file()) == ["line.json"]  # no temp file left
    assert win.messages[-1][0] == "Project not saved"
    assert "Permission denied" in win.messages[-1][1]
    assert win.doc.modified  # the edit is still unsaved
    # 2) a folder that does not exist, and 3) a path that is a folder
    assert not win.save_to(tmp_path / "no such folder" / "line.json")
    assert "does not exist" in win.messages[-1][1]
    assert not win.save_to(tmp_path)
    assert win.doc.modified and win.doc.path == target


def test_corrupt_and_invalid_files_listed_app_keeps_running(win, tmp_path):
    before = win.doc.project.model_dump()
    broken = tmp_path / "broken.json"
    broken.write_text("{ this is not json", encoding="utf-8")
    assert not win.open_file(broken)
    title, body = win.messages[-1]
    assert title == "Cannot open project" and "line 1" in body
    raw = json.loads(dump_project(small_project()))
    raw["alternatives"][0]["segments"][0]["length_m"] = -3
    raw["alternatives"][0]["segments"][1]["pipe"]["material"] = 5
    invalid = tmp_path / "invalid.json"
    invalid.write_text(json.dumps(raw), encoding="utf-8")
    assert not win.open_file(invalid)
    body = win.messages[-1][1]
    assert "alternatives[0].segments[0].length_m" in body
    assert "alternatives[0].segments[1].pipe.material" in body
    assert win.doc.project.model_dump() == before  # the open project stays
    assert win.isVisible()
    commit(win.segment_card.length_edit, "31")  # and still edits
    assert win.doc.current_alternative.segments[0].length_m == 31.0


def test_recovery_offered_after_simulated_crash(qtbot, tmp_path):
    crashed = MainWindow(interactive=False)
    crashed.doc.set_project(small_project())
    crashed.doc.push(C.SetSegmentField(crashed.doc, 0, 0, "length_m", 42.0))
    crashed_file = crashed.recovery_file
    assert crashed.write_recovery() == crashed_file and crashed_file.exists()
    # as if the process died: no closeEvent, no more autosaves, the file stays and its lock is gone
    crashed._autosave_timer.stop()
    crashed._edit_autosave.stop()
    crashed.doc.shutdown()
    crashed.recovery_slot.release(remove_files=False)
    crashed.deleteLater()

    offers = []
    w = MainWindow(interactive=False)
    qtbot.addWidget(w)
    w.ask_recover = lambda info: offers.append(info) or True
    assert w.check_recovery()
    assert len(offers) == 1 and "Window test line" in offers[0]
    assert w.doc.current_alternative.segments[0].length_m == 42.0
    assert w.doc.modified  # recovered work is unsaved until saved
    w.doc.shutdown()
    assert not crashed_file.exists()  # taken over into w's own file
    w.close()  # a clean exit removes the recovery file
    assert not list(recovery_dir().iterdir())


def test_edits_autosave_and_a_second_window_leaves_the_live_file_alone(win, qtbot):
    win.doc.push(C.SetSegmentField(win.doc, 0, 0, "length_m", 44.0))
    qtbot.waitUntil(lambda: win.recovery_file.exists(), timeout=10000)  # autosave after an edit
    saved = json.loads(win.recovery_file.read_text(encoding="utf-8"))
    assert saved["project"]["alternatives"][0]["segments"][0]["length_m"] == 44.0
    other = MainWindow(interactive=False)
    qtbot.addWidget(other)
    offers = []
    other.ask_recover = lambda info: offers.append(info) or False
    assert not other.check_recovery()
    assert offers == []  # the first window is running: its work is not "recovered" from under it
    other.doc.shutdown()
    other.close()
    assert json.loads(win.recovery_file.read_text(encoding="utf-8")) == saved


def test_unit_switch_changes_display_not_file(win, tmp_path):
    si_file = tmp_path / "si.json"
    us_file = tmp_path / "us.json"
    assert win.save_to(si_file)
    card = win.segment_card
    assert card.length_edit.text() == "30" and card.length_edit.unit_label.text() == "m"
    win.us_action.trigger()
    assert win.doc.unit_system == "US"
    assert card.length_edit.unit_label.text() == "ft"
    assert float(card.length_edit.text()) == pytest.approx(30 / 0.3048, rel=1e-5)  # 98.4252 ft
    assert win.feed_panel.temp_edit.unit_label.text() == "°F"
    assert settings.unit_system() == "US"  # remembered for the next run
    assert win.save_to(us_file)
    assert us_file.read_bytes() == si_file.read_bytes()  # the file stays SI
    # a bare number typed in US is read in feet
    commit(card.length_edit, "100")
    assert win.doc.current_alternative.segments[0].length_m == pytest.approx(30.48)
    w2 = MainWindow(interactive=False)
    try:
        assert w2.doc.unit_system == "US"
    finally:
        w2.doc.shutdown()
        w2.close()


def test_fluid_picker_and_flow_switch(win):
    from solver.catalogue import SOLUTIONS

    feed = win.feed_panel
    i = feed.fluid_combo.findData("solution:MPG")
    assert i >= 0 and "Propylene glycol" in feed.fluid_combo.itemText(i)
    feed.fluid_combo.setCurrentIndex(i)
    feed._on_fluid(i)
    fluid = win.doc.current_alternative.fluid
    assert (fluid.kind, fluid.solute) == ("solution", "MPG")
    _label, basis, lo, hi = SOLUTIONS["MPG"]
    assert lo <= fluid.concentration <= hi
    assert feed.conc_spin.isVisible() and f"by {basis}" in feed.conc_label.text()
    feed.conc_spin.setValue(40.0)
    assert win.doc.current_alternative.fluid.concentration == pytest.approx(0.40)
    # mass -> volume flow keeps the flow: V = m / rho with the inlet density of the latest result
    rho_in = float(win.doc.result.profile.density_kg_per_m3[0])
    m = win.doc.current_alternative.feed.mass_flow_kg_per_s
    feed.volume_radio.click()
    fed = win.doc.current_alternative.feed
    assert fed.mass_flow_kg_per_s is None
    assert fed.volume_flow_m3_per_s == pytest.approx(m / rho_in)
    assert feed.volume_edit.isVisibleTo(feed) and not feed.mass_edit.isVisibleTo(feed)
    win.doc.undo_stack.undo()
    assert win.doc.current_alternative.feed.mass_flow_kg_per_s == m


def test_user_fluid_table_pasted(win):
    feed = win.feed_panel
    dlg = feed.open_table_editor()
    text = ("T [°C]\trho [kg/m3]\tcp [kJ/(kg K)]\tmu [mPa s]\tk [W/(m K)]\n"
            "20\t1050\t2.1\t80\t0.15\n"
            "100\t990\t2.4\t6\t0.14\n")
    assert dlg.paste_from_clipboard(text)
    assert dlg.table.rowCount() == 2
    dlg.name_edit.setText("Test oil")
    dlg.try_accept()
    fluid = win.doc.current_alternative.fluid
    assert fluid.kind == "table" and fluid.name == "Test oil"
    assert fluid.rows[0].temperature_K == pytest.approx(293.15)
    assert fluid.rows[1].viscosity_Pa_s == pytest.approx(0.006)  # 6 mPa·s
    assert fluid.rows[0].specific_heat_J_per_kgK == pytest.approx(2100.0)
    assert win.doc.undo_stack.count() == 1


def test_user_fluid_table_rejects_decreasing_temperatures(win):
    dlg = win.feed_panel.open_table_editor()
    assert dlg.paste_from_clipboard("100,990,2.4,6,0.14\n20,1050,2.1,80,0.15\n")
    dlg.try_accept()
    assert "increase" in dlg.error_label.text()
    assert win.doc.current_alternative.fluid.kind == "pure"
    dlg.reject()


def test_screenshot_run(tmp_path, qtbot):
    out = tmp_path / "shot.png"
    assert run(None, screenshot=str(out)) == 0
    image = QImage(str(out))
    assert (image.width(), image.height()) == (1600, 1000)


def test_screenshot_leaves_settings_recent_files_and_recovery_alone(tmp_path, qtbot, monkeypatch):
    import app.main_window as mw
    from app import cli

    windows = []

    class Recorded(MainWindow):
        def __init__(self, *a, **k):
            super().__init__(*a, **k)
            windows.append(self)

    monkeypatch.setattr(mw, "MainWindow", Recorded)
    project = tmp_path / "line.json"
    project.write_text(dump_project(small_project()), encoding="utf-8")
    # a user's remembered state, and a recovery file left by a session that crashed
    settings.set_unit_system("US")
    settings.add_recent_file(tmp_path / "earlier.json")
    ini = Path(os.environ["CALORUN_SETTINGS_DIR"]) / "calorun.ini"
    remembered = ini.read_bytes()
    crashed_file = recovery_dir() / "recovery-1-1.json"  # no lock held: its session is gone
    crashed_file.parent.mkdir(parents=True, exist_ok=True)
    crashed_file.write_text('{"kept": "for the user"}', encoding="utf-8")

    assert cli.main(["--screenshot", str(tmp_path / "si.png"), str(project)]) == 0
    assert windows[-1].doc.unit_system == "SI"  # the option's default, not the remembered US
    assert windows[-1].doc.path == project  # the file was shown...
    assert cli.main(["--screenshot", str(tmp_path / "us.png"), "--units", "US", str(project)]) == 0
    assert windows[-1].doc.unit_system == "US"
    assert ini.read_bytes() == remembered  # ...but nothing was written: no units, no Recent files entry
    assert settings.recent_files() == [str((tmp_path / "earlier.json").resolve())]
    assert crashed_file.read_text(encoding="utf-8") == '{"kept": "for the user"}'
    assert sorted(p.name for p in recovery_dir().iterdir()) == ["recovery-1-1.json"]  # and no file of its own
    assert QImage(str(tmp_path / "us.png")).width() == 1600


def test_screenshot_writes_nothing_to_the_default_settings_location(tmp_path, qtbot, monkeypatch):
    from PySide6.QtCore import QSettings

    # without CALORUN_SETTINGS_DIR the settings live in the user's QSettings location: redirect it here
    monkeypatch.delenv("CALORUN_SETTINGS_DIR")
    probe = Path(QSettings(QSettings.IniFormat, QSettings.UserScope, "probe", "probe").fileName())
    user_scope = tmp_path / "user-scope"
    QSettings.setPath(QSettings.IniFormat, QSettings.UserScope, str(user_scope))
    try:
        assert settings.settings().fileName().startswith(str(user_scope))  # the redirection took
        project = tmp_path / "line.json"
        project.write_text(dump_project(small_project()), encoding="utf-8")
        assert run(str(project), screenshot=str(tmp_path / "shot.png")) == 0  # opening a file would list it
        assert not user_scope.exists() or not any(p.is_file() for p in user_scope.rglob("*"))
    finally:
        QSettings.setPath(QSettings.IniFormat, QSettings.UserScope, str(probe.parent.parent))


def test_screenshot_of_unreadable_file_fails_cleanly(tmp_path, qtbot):
    bad = tmp_path / "bad.json"
    bad.write_text("[]", encoding="utf-8")
    assert run(str(bad), screenshot=str(tmp_path / "x.png")) == 2
    assert not (tmp_path / "x.png").exists()


def test_exports_write_files(win, tmp_path):
    from app.export import read_profiles_csv

    csv_path = tmp_path / "profiles.csv"
    assert win.export_csv(csv_path)
    columns, system = read_profiles_csv(csv_path)
    assert system == "SI"
    assert len(columns["x_m"]) == len(win.doc.result.profile.x_m)
    pdf_path = tmp_path / "report.pdf"
    assert win.export_pdf(pdf_path)
    assert pdf_path.read_bytes()[:5] == b"%PDF-"
    assert not win.export_csv(tmp_path / "missing" / "x.csv")  # says why, app keeps running
    assert win.messages[-1][0] == "CSV not written"


def _two_alternatives(win):
    base = win.doc.project.alternatives[0]
    thicker = base.model_copy(update={"name": "Thicker", "segments": [
        s.model_copy(update={"insulation": [Layer(thickness_m=0.08, conductivity_W_per_mK=0.04)]})
        for s in base.segments]})
    win.doc.push(C.InsertAlternative(win.doc, 1, thicker))


class _CountingSolve:
    """Wraps solver.solve: records (alternative name, on the GUI thread?); can hold one name until released."""

    def __init__(self, hold=None):
        import threading

        import solver

        self.real = solver.solve
        self.calls = []
        self.hold = hold
        self.release = threading.Event()

    def __call__(self, alternative, **options):
        import threading

        self.calls.append((alternative.name, threading.current_thread() is threading.main_thread()))
        if alternative.name == self.hold:
            assert self.release.wait(30)
        return self.real(alternative, **options)


def test_export_pdf_uses_the_results_already_held(win, tmp_path, monkeypatch):
    import solver

    _two_alternatives(win)
    win.doc.results_now()  # held, e.g. after the Side-by-Side showed them
    counter = _CountingSolve()
    monkeypatch.setattr(solver, "solve", counter)
    pdf_path = tmp_path / "report.pdf"
    assert win.export_pdf(pdf_path)
    assert counter.calls == []  # not one solve more
    assert pdf_path.read_bytes()[:5] == b"%PDF-"


def test_export_pdf_solves_only_what_is_missing_off_the_gui_thread(win, tmp_path, monkeypatch):
    import solver

    _two_alternatives(win)  # "Base" is held (on screen), "Thicker" is not
    counter = _CountingSolve()
    monkeypatch.setattr(solver, "solve", counter)
    assert win.export_pdf(tmp_path / "report.pdf")
    assert counter.calls == [("Thicker", False)]  # once, on the worker thread
    assert (tmp_path / "report.pdf").read_bytes()[:5] == b"%PDF-"


def test_export_pdf_can_be_cancelled_while_solving(win, tmp_path, monkeypatch):
    import solver
    from PySide6.QtCore import QTimer

    _two_alternatives(win)
    counter = _CountingSolve(hold="Thicker")
    monkeypatch.setattr(solver, "solve", counter)
    shown = []

    def press_cancel():
        shown.append(win.report_progress.isVisible())
        win.report_progress.canceled.emit()  # what the Cancel button sends

    QTimer.singleShot(200, press_cancel)
    try:
        assert not win.export_pdf(tmp_path / "report.pdf")
    finally:
        counter.release.set()
    assert shown == [True]  # the progress dialog was up while the solve ran
    assert not (tmp_path / "report.pdf").exists()
    assert win.report_progress is None


def test_new_asks_about_unsaved_changes(win, tmp_path):
    commit(win.segment_card.length_edit, "36")
    asked = []
    win.ask_save_changes = lambda: asked.append(1) or "cancel"
    win.new_project()
    assert asked and win.doc.current_alternative.segments[0].length_m == 36.0  # cancelled: kept
    win.ask_save_changes = lambda: "discard"
    win.new_project()
    assert win.doc.project.name == "Untitled line" and not win.doc.modified
    assert win.doc.undo_stack.count() == 0  # a new project starts a fresh history


def test_recent_files_menu(win, tmp_path):
    for name in ("a.json", "b.json"):
        assert win.save_to(tmp_path / name)
    win._fill_recent_menu()
    texts = [a.text() for a in win.recent_menu.actions() if a.text()]
    assert texts[:2] == [str((tmp_path / "b.json").resolve()), str((tmp_path / "a.json").resolve())]
    commit(win.segment_card.length_edit, "39")
    win.ask_save_changes = lambda: "discard"
    win.recent_menu.actions()[1].trigger()  # open a.json again
    assert win.doc.path == Path(texts[1])
    assert win.doc.current_alternative.segments[0].length_m == 30.0


def test_cautions_dialog_is_not_modal(win):
    dlg = win.show_cautions()
    assert dlg.isVisible() and not dlg.isModal()
    from PySide6.QtWidgets import QTextBrowser

    shown = dlg.findChild(QTextBrowser).toPlainText()
    for caution in CAUTIONS:
        assert caution.split(":")[0] in shown
    dlg.close()


def test_bore_by_nps_then_by_diameter(win):
    card = win.segment_card
    i = card.nps_combo.findText("3")
    card.nps_combo.setCurrentIndex(i)
    card._on_nps(i)
    pipe = win.doc.current_alternative.segments[0].pipe
    assert (pipe.nps, pipe.schedule) == ("3", "40")
    assert card.schedule_combo.findText("80") >= 0  # schedules offered for NPS 3
    card.nps_combo.setCurrentIndex(card.nps_combo.findText("2"))
    card._on_nps(card.nps_combo.currentIndex())
    card.bore_combo.setCurrentIndex(card.bore_combo.findData("diameter"))  # emits: the card switches
    pipe = win.doc.current_alternative.segments[0].pipe
    assert pipe.bore == "diameter"
    # NPS 2 schedule 40 per ASME B36.10M: OD 60.3 mm, wall 3.91 mm, bore 52.48 mm
    assert pipe.inner_diameter_m == pytest.approx(0.05248, abs=1e-6)
    assert pipe.wall_thickness_m == pytest.approx(0.00391, abs=1e-6)
    assert card.id_edit.isVisibleTo(card) and not card.nps_row.isVisibleTo(card)
    commit(card.id_edit, "2 in")
    assert win.doc.current_alternative.segments[0].pipe.inner_diameter_m == pytest.approx(0.0508)  # 1 in = 25.4 mm
    win.doc.undo_stack.undo()
    win.doc.undo_stack.undo()
    assert win.doc.current_alternative.segments[0].pipe.bore == "nps"
    assert card.nps_row.isVisibleTo(card)


def test_project_details_and_targets_edit_in_one_undo_step(win):
    dialog = win.edit_project_details()
    dialog.prepared_edit.setText("Process engineering")
    dialog.revision_edit.setText("C")
    dialog.target_edits["outlet_temperature_min_K"].setText("60")  # °C in SI display
    dialog.target_edits["max_pressure_drop_Pa"].setText("2 bar")  # typed unit, a difference
    assert dialog.apply() is None
    p = win.doc.project
    assert p.prepared_by == "Process engineering" and p.revision == "C"
    assert p.targets.outlet_temperature_min_K == pytest.approx(333.15)  # 60 °C = 333.15 K (definition)
    assert p.targets.max_pressure_drop_Pa == pytest.approx(2e5)  # 1 bar = 1e5 Pa (definition)
    win.doc.undo_stack.undo()  # one step undoes all of it
    assert win.doc.project.revision != "C" and win.doc.project.targets.outlet_temperature_min_K != pytest.approx(333.15)


def test_project_details_refuses_a_bad_target_without_changing_the_model(win):
    before = win.doc.project.model_dump()
    dialog = win.edit_project_details()
    dialog.target_edits["max_heat_input_W"].setText("-5 kW")  # a maximum heat input must be > 0
    error = dialog.apply()
    # in the user's words and display units: the target's label and the value typed, no JSON key
    text = error.replace("\xa0", " ")
    assert text.startswith("Heat input target") and "5 kW" in text and "max_heat_input_W" not in text
    assert win.doc.project.model_dump() == before


def test_text_typed_before_a_unit_switch_is_kept_in_the_units_it_was_typed_in(win):
    win.feed_panel.temp_edit.setText("80")  # typed in °C, not yet committed
    win.set_unit_system("US")
    # 80 °C = 353.15 K (definition of the Celsius scale)
    assert win.doc.current_alternative.feed.inlet_temperature_K == pytest.approx(353.15)
    assert win.feed_panel.temp_edit.text().startswith("176")  # 80 °C = 176 °F
    win.set_unit_system("SI")


def test_switching_surroundings_kind_and_back_restores_its_settings(win):
    card = win.segment_card
    doc = win.doc

    def choose(kind):  # as a user picks it: the combo's activated signal
        index = card.surr_combo.findData(kind)
        card.surr_combo.setCurrentIndex(index)
        card.surr_combo.activated.emit(index)

    choose("still_air")
    before = doc.selected.surroundings.model_dump()
    heat = doc.selected.heat_input_W_per_m
    choose("fixed_wall")
    assert doc.selected.heat_input_W_per_m == 0.0  # a held wall takes no tracing
    choose("adiabatic")
    choose("still_air")
    assert doc.selected.surroundings.model_dump() == before
    assert doc.selected.heat_input_W_per_m == heat


def test_choosing_the_user_table_again_after_another_fluid_restores_it(win):
    from solver.model import PureFluid, TableFluid, TableRow
    from app.commands import SetAlternativeField

    row = dict(density_kg_per_m3=900.0, specific_heat_J_per_kgK=2000.0, viscosity_Pa_s=0.01,
               conductivity_W_per_mK=0.13)
    table = TableFluid(name="Demo oil", rows=[TableRow(temperature_K=280.0, **row), TableRow(temperature_K=420.0, **row)])
    doc = win.doc
    doc.push(SetAlternativeField(doc, doc.current_index, "fluid", table))
    doc.push(SetAlternativeField(doc, doc.current_index, "fluid", PureFluid(name="Water")))
    dlg = win.feed_panel.open_table_editor()
    assert dlg.table.rowCount() == 2  # the table used before, not an empty editor
    dlg.reject()
