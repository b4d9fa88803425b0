"""The editors of the new model fields, used as an engineer uses them (pytest-qt, offscreen).

Feed: whether the flow develops from the inlet or arrives fully developed. Segment Card: inside
fouling (with published typical values to pick from), the steam tube tracer, and the steam-side
fouling of a wall heated by condensing steam. What is checked is what a user notices: an entry
changes the design in one undo step and Undo gives the old design back; a bad entry is refused
with the field's label and the value in the user's units, and nothing changes; the tracer cannot
be switched on where a jacket or fixed wall already sets the outside, and the card says why; a
saved file opens with every new setting as it was; the Line Strip shows the tracer. The line is
invented (Fernbrook Works style), not a real plant.
"""

from __future__ import annotations

import re

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtCore import QRectF  # noqa: E402
from PySide6.QtGui import QColor, QImage, QPainter  # noqa: E402

from app import messages, texts, units  # noqa: E402
from app.document import Document  # noqa: E402
from app.main_window import MainWindow  # noqa: E402
from app.panels.feed_panel import FeedPanel  # noqa: E402
from app.panels.pipe_symbols import BORE_HALF, paint_pipe, wall_summary  # noqa: E402
from app.panels.segment_card import SegmentCard  # noqa: E402
from app.segment_actions import wall_model_words  # noqa: E402
from solver.model import Alternative, FixedWall, Jacket, Layer, Project, Segment, SteamTracer  # noqa: E402

# 1 h·ft²·°F/Btu = 0.176 110 m²·K/W (the R-value conversion factor of the ASHRAE Handbook's SI
# conversion table); TEMA's typical 0.001 h·ft²·°F/Btu is quoted there as 0.000 176 m²·K/W.
M2K_PER_W_PER_US = 0.176110


def fernbrook_line() -> Project:
    """Invented: a condensate-return header run (insulated, in still air), a jacketed section, and a
    section whose wall is heated by condensing steam."""
    wool = [Layer(thickness_m=0.04, conductivity_W_per_mK=0.045)]
    segs = [
        Segment(name="Header run", length_m=30.0, insulation=wool),
        Segment(name="Jacketed", length_m=8.0, surroundings=Jacket(medium_temperature_K=393.15)),
        Segment(name="Steam heated", length_m=6.0,
                surroundings=FixedWall(wall_temperature_K=None, steam_pressure_Pa=4.0e5)),
    ]
    return Project(name="Fernbrook condensate return", alternatives=[Alternative(name="Base", segments=segs)])


@pytest.fixture
def doc(qtbot):
    d = Document(fernbrook_line())
    yield d
    d.shutdown()


@pytest.fixture
def card(qtbot, doc):
    c = SegmentCard(doc)
    qtbot.addWidget(c)
    c.resize(420, 1400)
    c.show()
    return c


def commit(edit, text: str) -> bool:
    edit.line_edit.setText(text)
    return edit.commit()


def said(edit) -> str:
    return edit.error_text.replace("\u00a0", " ")  # number and unit are joined by a no-break space


def seg(doc, i: int) -> Segment:
    return doc.current_alternative.segments[i]


# --------------------------------------------------------------------------- Feed: flow at the inlet


def test_feed_inlet_flow_is_one_undo_step_and_undo_restores_it(qtbot, doc):
    feed = FeedPanel(doc)
    qtbot.addWidget(feed)
    assert doc.current_alternative.feed.inlet_flow == "developing"  # the model's default, shown as such
    assert feed.inlet_flow_combo.currentText() == "Develops from the inlet"
    i = feed.inlet_flow_combo.findData("developed")
    feed.inlet_flow_combo.setCurrentIndex(i)
    feed.inlet_flow_combo.activated.emit(i)
    assert doc.current_alternative.feed.inlet_flow == "developed"
    assert doc.undo_stack.count() == 1 and "fully developed" in doc.undo_stack.undoText()
    doc.undo_stack.undo()
    assert doc.current_alternative.feed.inlet_flow == "developing"
    assert feed.inlet_flow_combo.currentData() == "developing"  # the panel follows the undo
    # the hint says why the choice matters, in words a plant engineer uses
    assert "vessel or header" in feed.inlet_flow_hint.text() and "inside film coefficient" in feed.inlet_flow_hint.text()


# --------------------------------------------------------------------------- inside fouling


def test_inside_fouling_typed_in_us_units_is_stored_si_and_undone(qtbot, doc, card):
    doc.select_segment(0)
    doc.set_unit_system("US")
    assert card.fouling.edit.unit_label.text() == "h·ft²·°F/Btu"
    assert commit(card.fouling.edit, "0.002")  # TEMA's river-water figure, as published in US units
    assert seg(doc, 0).inside_fouling_m2K_per_W == pytest.approx(0.002 * M2K_PER_W_PER_US, rel=1e-4)
    assert doc.undo_stack.count() == 1
    doc.undo_stack.undo()
    assert seg(doc, 0).inside_fouling_m2K_per_W == 0.0
    assert card.fouling.edit.text() == "0"


def test_a_typical_fouling_value_is_picked_from_the_menu_in_one_step(qtbot, doc, card):
    doc.select_segment(0)
    card.fouling.menu.aboutToShow.emit()  # the menu is filled as it opens, in the reader's units
    labels = [a.text() for a in card.fouling.menu.actions()]
    cooling = next(a for a in card.fouling.menu.actions() if a.text().startswith("Cooling-tower water, treated"))
    assert "m²·K/W" in cooling.text() and "TEMA" in cooling.toolTip()
    cooling.trigger()
    # TEMA's typical value for treated cooling-tower water: 0.001 h·ft²·°F/Btu (from memory)
    assert seg(doc, 0).inside_fouling_m2K_per_W == pytest.approx(0.001 * M2K_PER_W_PER_US, rel=1e-3)
    assert doc.undo_stack.count() == 1
    assert labels[0].startswith("Clean")
    doc.undo_stack.undo()
    assert seg(doc, 0).inside_fouling_m2K_per_W == 0.0


@pytest.mark.parametrize("system, text, words", [
    ("SI", "-0.0002", ["Inside fouling", "at least 0 m²·K/W", "−0.0002 m²·K/W"]),
    ("US", "-0.001", ["Inside fouling", "at least 0 h·ft²·°F/Btu", "−0.001 h·ft²·°F/Btu"]),
    ("SI", "0.2 W/m2", ["Inside fouling"]),
])
def test_a_negative_or_wrong_fouling_is_refused_in_the_users_units(qtbot, doc, card, system, text, words):
    doc.select_segment(0)
    doc.set_unit_system(system)
    before = doc.project.model_dump()
    assert not commit(card.fouling.edit, text)
    message = said(card.fouling.edit)
    for w in words:
        assert w in message, message
    assert "inside_fouling" not in message and "m2K_per_W" not in message, message
    assert doc.project.model_dump() == before and doc.undo_stack.count() == 0


# --------------------------------------------------------------------------- steam tracer


def test_steam_tracer_on_every_field_and_off_each_one_undo_step(qtbot, doc, card):
    doc.select_segment(0)
    box = card.tracer
    assert not box.pressure_edit.isVisibleTo(card)  # nothing to fill in until the tracer is on
    box.on_check.click()
    assert seg(doc, 0).steam_tracer == SteamTracer()  # the model's defaults
    assert box.pressure_edit.isVisibleTo(card) and box.on_check.isChecked()

    # 60 psig, typed as a gauge pressure: 60 + 14.696 psi absolute = 5.151 bar(a) (standard atmosphere)
    assert commit(box.pressure_edit, "60 psig")
    assert seg(doc, 0).steam_tracer.steam_pressure_Pa == pytest.approx((60 + 14.696) * 6894.757, rel=1e-4)
    box.count_spin.setValue(3)
    assert seg(doc, 0).steam_tracer.count == 3
    assert commit(box.diameter_edit, "0.625 in")
    assert seg(doc, 0).steam_tracer.tube_outer_diameter_m == pytest.approx(0.015875)  # 5/8 in, exact
    i = box.contact_combo.findData("cement")
    box.contact_combo.setCurrentIndex(i)
    box.contact_combo.activated.emit(i)
    assert seg(doc, 0).steam_tracer.contact == "cement"
    steps = doc.undo_stack.count()
    assert steps == 5  # on, pressure, count, diameter, contact

    box.on_check.click()  # off
    assert seg(doc, 0).steam_tracer is None and doc.undo_stack.count() == 6
    box.on_check.click()  # on again: the settings it had come back
    assert seg(doc, 0).steam_tracer.count == 3 and seg(doc, 0).steam_tracer.contact == "cement"

    # undo walks back one entry at a time, and the card shows each state
    doc.undo_stack.undo()
    doc.undo_stack.undo()
    assert seg(doc, 0).steam_tracer.contact == "cement"
    doc.undo_stack.undo()
    assert seg(doc, 0).steam_tracer.contact == "bare"
    assert box.contact_combo.currentData() == "bare"
    doc.undo_stack.undo()
    doc.undo_stack.undo()
    assert seg(doc, 0).steam_tracer.count == 1 and box.count_spin.value() == 1
    doc.undo_stack.undo()
    doc.undo_stack.undo()
    assert seg(doc, 0).steam_tracer is None and not box.on_check.isChecked()


@pytest.mark.parametrize("field, text, words", [
    ("pressure_edit", "0", ["Tracer steam pressure", "more than 0 bar(a)", "0 bar(a)"]),
    ("diameter_edit", "-12", ["Tracer tube outside diameter", "more than 0 mm", "−12 mm"]),
])
def test_a_bad_tracer_entry_is_refused_with_its_label_and_value(qtbot, doc, card, field, text, words):
    doc.select_segment(0)
    card.tracer.on_check.click()
    before = doc.project.model_dump()
    edit = getattr(card.tracer, field)
    assert not commit(edit, text)
    message = said(edit)
    for w in words:
        assert w in message, message
    assert not re.search(r"steam_pressure_Pa|tube_outer_diameter_m|Input should", message), message
    assert doc.project.model_dump() == before


def test_tracer_section_is_off_with_a_jacket_or_fixed_wall_and_says_why(qtbot, doc, card):
    for index, why in ((1, "jacket"), (2, "fixed wall")):
        doc.select_segment(index)
        box = card.tracer
        assert not box.on_check.isEnabled()
        assert not box.pressure_edit.isVisibleTo(card)
        assert box.note.isVisibleTo(card) and why in box.note.text().lower(), box.note.text()
    doc.select_segment(0)
    assert card.tracer.on_check.isEnabled()


def test_a_tracer_with_a_jacket_is_refused_in_plain_words(qtbot, doc, card):
    doc.select_segment(1)
    refused = []
    card.edit_refused.connect(refused.append)
    before = doc.project.model_dump()
    card.set_fields({"steam_tracer": SteamTracer(count=2).model_dump()}, error_label=card.tracer.error)
    assert doc.project.model_dump() == before and doc.undo_stack.count() == 0
    message = refused[-1].replace("\u00a0", " ")
    assert message.startswith("Steam tracer cannot be combined with a jacket"), message
    assert "2 tubes" in message and "4.5 bar(a)" in message and "steam_tracer" not in message, message


def test_switching_to_a_jacket_removes_the_tracer_in_the_same_step_and_back_restores_it(qtbot, doc, card):
    doc.select_segment(0)
    card.tracer.on_check.click()
    card.tracer.count_spin.setValue(2)
    combo = card.surroundings.combo
    jacket = combo.findData("jacket")
    combo.setCurrentIndex(jacket)
    combo.activated.emit(jacket)
    assert seg(doc, 0).surroundings.kind == "jacket" and seg(doc, 0).steam_tracer is None
    assert "steam tracer removed" in doc.undo_stack.undoText()
    assert not card.tracer.on_check.isEnabled()
    doc.undo_stack.undo()  # one step gives both back
    assert seg(doc, 0).surroundings.kind == "still_air" and seg(doc, 0).steam_tracer.count == 2
    doc.undo_stack.redo()
    still = combo.findData("still_air")
    combo.setCurrentIndex(still)
    combo.activated.emit(still)
    assert seg(doc, 0).surroundings.kind == "still_air" and seg(doc, 0).steam_tracer.count == 2
    # a tracer turned off by hand stays off when the outside changes between kinds that take one
    card.tracer.on_check.click()
    wind = combo.findData("wind")
    combo.setCurrentIndex(wind)
    combo.activated.emit(wind)
    assert seg(doc, 0).surroundings.kind == "wind" and seg(doc, 0).steam_tracer is None


def test_tracer_count_out_of_range_in_a_file_is_said_in_words():
    from pydantic import ValidationError

    data = Segment(name="Tracer run", steam_tracer=SteamTracer()).model_dump()
    for count, bound in ((14, "at most 12"), (0, "at least 1")):
        data["steam_tracer"]["count"] = count
        with pytest.raises(ValidationError) as err:
            Segment.model_validate(data)
        text = messages.validation_message(err.value, "SI", prefix="segments[0]")
        assert text == f"Number of tracer tubes must be {bound}; you entered {count}", text


# --------------------------------------------------------------------------- steam-heated wall


def test_steam_side_fouling_is_offered_with_steam_only_and_the_hint_says_what_the_steam_does(qtbot, doc, card):
    doc.select_segment(2)
    box = card.surroundings
    assert box.steam_fouling.isVisibleTo(card)
    assert "condensate film" in box.fixed_hint.text()
    assert "held" not in box.fixed_hint.text()  # the steam no longer holds the wall at saturation
    # TEMA's oil-free steam: 0.0005 h·ft²·°F/Btu (from memory) = 0.000 088 m²·K/W
    assert commit(box.steam_fouling.edit, "0.0005 h·ft²·°F/Btu")
    assert seg(doc, 2).surroundings.steam_side_fouling_m2K_per_W == pytest.approx(0.0005 * M2K_PER_W_PER_US, rel=1e-4)
    assert doc.undo_stack.count() == 1
    assert not commit(box.steam_fouling.edit, "-0.0001")
    assert "Steam-side fouling" in said(box.steam_fouling.edit) and "−0.0001 m²·K/W" in said(box.steam_fouling.edit)
    doc.undo_stack.undo()
    assert seg(doc, 2).surroundings.steam_side_fouling_m2K_per_W == 0.0

    box.fixed_by_temp.click()  # the fixed temperature: kept, and called the idealisation it is
    assert seg(doc, 2).surroundings.wall_temperature_K is not None
    assert not box.steam_fouling.isVisibleTo(card)
    assert "idealisation" in box.fixed_hint.text()


# --------------------------------------------------------------------------- summaries and the drawing


def test_summaries_mention_the_tracer_and_the_fouling():
    s = Segment(name="Traced", steam_tracer=SteamTracer(count=2, contact="cement", steam_pressure_Pa=4.5e5),
                inside_fouling_m2K_per_W=0.000176)
    assert wall_summary(s, "SI").startswith("2 steam tracers 4.50 bar(a)")
    assert "steam tracer 2 × 12.7 mm at 4.50 bar(a)" in wall_model_words(s, "SI")
    words = texts.steam_tracer_text(s.steam_tracer, "US").replace("\u00a0", " ")
    assert words.startswith("2 steam tracer tubes of 0.5 in OD") and "heat-transfer cement" in words, words
    assert texts.fouling_text(s, "SI") == "inside 0.000176\u00a0m²·K/W"
    assert texts.steam_tracer_text(None, "SI") == "none"


def _pixel_below_pipe(steam_tracer: bool) -> QColor:
    img = QImage(200, 80, QImage.Format_ARGB32)
    img.fill(QColor("#FFFFFF"))
    p = QPainter(img)
    paint_pipe(p, QRectF(0, 0, 200, 0), 40, model="bare", insulation_px=0.0, heat_input=False,
               steam_tracer=steam_tracer)
    p.end()
    return img.pixelColor(100, int(40 + BORE_HALF + 2 + 3))  # just below the pipe wall, mid-run


def test_the_line_strip_draws_a_tracer_tube_below_the_pipe(qtbot):
    plain, traced = _pixel_below_pipe(False), _pixel_below_pipe(True)
    assert plain.name() == "#ffffff"  # nothing drawn below a bare pipe
    assert traced.name() != "#ffffff"  # the tube is there


# --------------------------------------------------------------------------- the file


def test_a_project_with_the_new_settings_saves_and_opens_as_it_was(qtbot, tmp_path):
    project = fernbrook_line()
    alt = project.alternatives[0]
    segs = list(alt.segments)
    segs[0] = segs[0].model_copy(update={
        "steam_tracer": SteamTracer(steam_pressure_Pa=5.5e5, count=2, tube_outer_diameter_m=0.009525, contact="cement"),
        "inside_fouling_m2K_per_W": 0.000352})
    segs[2] = segs[2].model_copy(update={"surroundings": FixedWall(wall_temperature_K=None, steam_pressure_Pa=4e5,
                                                                   steam_side_fouling_m2K_per_W=0.000088)})
    alt = alt.model_copy(update={"segments": segs, "feed": alt.feed.model_copy(update={"inlet_flow": "developed"})})
    project = Project.model_validate(project.model_copy(update={"alternatives": [alt]}).model_dump())

    win = MainWindow(interactive=False, remember=False)
    qtbot.addWidget(win)
    try:
        win.doc.set_project(project)
        path = tmp_path / "fernbrook.json"
        assert win.save_to(path)
        text = path.read_text(encoding="utf-8")
        assert '"inlet_flow": "developed"' in text and '"contact": "cement"' in text
        win.doc.set_project(fernbrook_line())
        assert win.open_file(path, ask=False)
        assert win.doc.project == project
        opened = win.doc.current_alternative
        assert opened.feed.inlet_flow == "developed"
        assert opened.segments[0].steam_tracer.tube_outer_diameter_m == 0.009525
        assert opened.segments[2].surroundings.steam_side_fouling_m2K_per_W == 0.000088
        # and the editors show what was opened
        win.doc.select_segment(0)
        assert win.segment_card.tracer.on_check.isChecked() and win.segment_card.tracer.count_spin.value() == 2
        assert win.feed_panel.inlet_flow_combo.currentData() == "developed"
    finally:
        win.doc.shutdown()


def test_the_unit_conversion_of_fouling_matches_the_published_factor():
    # 1 h·ft²·°F/Btu = 0.176110 m²·K/W (ASHRAE Handbook — Fundamentals, SI conversion table)
    assert units.parse("1 h·ft²·°F/Btu", "fouling_resistance", "SI") == pytest.approx(M2K_PER_W_PER_US, rel=1e-5)
    assert units.to_display(M2K_PER_W_PER_US, "fouling_resistance", "US") == pytest.approx(1.0, rel=1e-5)
    assert units.format_value(0.000176, "fouling_resistance", "SI") == "0.0001760 m²·K/W"  # no "< 0.001"
