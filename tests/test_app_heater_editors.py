"""The editors of issue 10's inputs, used as an engineer uses them (pytest-qt, offscreen).

Segment Card: the heater (none, constant output, self-limiting, thermostat), its runs and spiral
ratio, the segment's design margin, the heat sinks table, a blank insulation conductivity (the
material's k(T)) and the jacketing finish that sets the surface emissivity. Project details: the
design cases; Feed: the maintain temperature. Line Strip: a mark per heater kind and the heat
sinks symbol. What is checked is what a user notices: an entry changes the design in one undo step
and Undo/Redo give the designs back; a bad entry is refused with the field's label and the value in
the user's units, and nothing changes; a saved file opens with every setting as it was; the three
heater kinds look different on the strip. The line is invented (Fernbrook Works style).

Unit conversions in expected values come from the definitions of the units: 1 ft = 0.3048 m,
T[K] = T[°C] + 273.15, T[°F] = T[°C]·9/5 + 32.
"""

from __future__ import annotations

import pytest

pytest.importorskip("pytestqt")

from PySide6.QtGui import QColor, QImage  # noqa: E402

from app import commands as C  # noqa: E402
from app import style  # noqa: E402
from app.document import Document  # noqa: E402
from app.panels.feed_panel import FeedPanel  # noqa: E402
from app.panels.line_strip import PIPE_CENTRE_Y, LineStrip  # noqa: E402
from app.panels.pipe_symbols import BORE_HALF, SYMBOLS  # noqa: E402
from app.panels.project_details import ProjectDetailsDialog  # noqa: E402
from app.panels.segment_card import SegmentCard  # noqa: E402
from app.segment_actions import wall_model_words  # noqa: E402
from solver import catalogue  # noqa: E402
from solver.model import (  # noqa: E402
    Alternative,
    ConstantHeater,
    HeatSink,
    Layer,
    Project,
    Segment,
    SelfLimitingHeater,
    StillAir,
    ThermostatHeater,
)
from solver.project_io import dump_project, load_project, save_project  # noqa: E402

FT = 0.3048  # m, by definition


def fernbrook_freeze_line() -> Project:
    """Invented: a small-bore water line outdoors, traced in part, with valves and supports."""
    wool = [Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)]
    segs = [
        Segment(name="Pump outlet", length_m=10.0, insulation=wool),
        Segment(name="Rack", length_m=40.0, insulation=wool,
                heater=SelfLimitingHeater(output_low_W_per_m=30.0, temperature_low_K=283.15,
                                          output_high_W_per_m=12.0, temperature_high_K=338.15, count=2),
                heat_sinks=[HeatSink(kind="valve", count=2), HeatSink(kind="pipe_support", count=8)]),
        Segment(name="Hydrant", length_m=6.0, insulation=wool),
    ]
    return Project(name="Fernbrook fire water", alternatives=[Alternative(name="Base", segments=segs)])


@pytest.fixture
def doc(qtbot):
    d = Document(fernbrook_freeze_line())
    yield d
    d.shutdown()


@pytest.fixture
def card(qtbot, doc):
    c = SegmentCard(doc)
    qtbot.addWidget(c)
    c.resize(440, 1800)
    c.show()
    return c


def commit(edit, text: str) -> bool:
    edit.line_edit.setText(text)
    return edit.commit()


def said(text: str) -> str:
    return text.replace("\u00a0", " ").replace("\u2009", " ")  # no-break and thin spaces as plain ones


def choose(combo, data) -> None:
    """As a user picks an entry: the combo's activated signal."""
    index = combo.findData(data)
    assert index >= 0, data
    combo.setCurrentIndex(index)
    combo.activated.emit(index)


# --------------------------------------------------------------------------- heater kinds


def test_each_heater_kind_through_the_editor_and_undo_redo(doc, card):
    doc.select_segment(0)
    box = card.heater
    steps = doc.undo_stack.count()

    choose(box.kind_combo, "constant")
    assert isinstance(doc.selected.heater, ConstantHeater)
    commit(box.edits["constant.output_W_per_m"], "25")
    commit(box.ratio_edit, "1.5")
    box.runs_spin.setValue(2)
    heater = doc.selected.heater
    assert (heater.output_W_per_m, heater.heater_per_pipe_length, heater.count) == (25.0, 1.5, 2)
    # the card says what the pipe gets: 25 W/m × 2 runs × 1.5 m of heater per m of pipe = 75 W/m
    assert "Rated 75" in box.rated.text()

    # to self-limiting: runs, spiral ratio and the rated output are kept (the first rating point)
    choose(box.kind_combo, "self_limiting")
    heater = doc.selected.heater
    assert isinstance(heater, SelfLimitingHeater)
    assert (heater.output_low_W_per_m, heater.count, heater.heater_per_pipe_length) == (25.0, 2, 1.5)
    commit(box.edits["self_limiting.temperature_high_K"], "50 °C")
    assert doc.selected.heater.temperature_high_K == pytest.approx(323.15)  # 50 °C

    # to thermostat: the rated output again, and a set point typed in °F in the US system
    choose(box.kind_combo, "thermostat")
    heater = doc.selected.heater
    assert isinstance(heater, ThermostatHeater) and heater.output_W_per_m == 25.0 and heater.count == 2
    doc.set_unit_system("US")
    commit(box.edits["thermostat.set_point_K"], "45")  # 45 °F = 7.222 °C
    assert doc.selected.heater.set_point_K == pytest.approx(273.15 + (45 - 32) * 5 / 9)
    commit(box.edits["thermostat.output_W_per_m"], "10")  # 10 W/ft = 32.808 W/m
    assert doc.selected.heater.output_W_per_m == pytest.approx(10 / FT)

    # back to self-limiting: what it had under that kind comes back (runs and ratio follow the heater)
    choose(box.kind_combo, "self_limiting")
    assert doc.selected.heater.temperature_high_K == pytest.approx(323.15)
    choose(box.kind_combo, None)
    assert doc.selected.heater is None

    # one undo step per entry, and undo/redo walk the designs back and forth
    assert doc.undo_stack.count() - steps == 11
    for _ in range(5):
        doc.undo_stack.undo()
    heater = doc.selected.heater
    assert isinstance(heater, SelfLimitingHeater) and heater.temperature_high_K == pytest.approx(323.15)
    assert box.kind_combo.currentData() == "self_limiting"
    assert said(box.edits["self_limiting.temperature_high_K"].text()) == "122"  # 50 °C in °F
    for _ in range(6):
        doc.undo_stack.undo()
    assert doc.selected.heater is None and box.kind_combo.currentData() is None
    for _ in range(11):
        doc.undo_stack.redo()
    assert doc.selected.heater is None
    doc.undo_stack.undo()
    assert isinstance(doc.selected.heater, SelfLimitingHeater)


def test_a_bad_heater_entry_is_refused_in_the_users_units(doc, card):
    doc.select_segment(1)
    box = card.heater
    before, steps = doc.selected, doc.undo_stack.count()
    doc.set_unit_system("US")
    # the upper rating point must give less than the lower (a self-limiting heater): 30 W/m = 9.144 W/ft
    edit = box.edits["self_limiting.output_high_W_per_m"]
    assert not commit(edit, "40")
    assert said(edit.error_text) == (
        "Output at the upper rating temperature must be below the output at the lower one (a self-limiting "
        "heater gives less when hotter); you entered 40 W/ft and 9.144 W/ft")
    edit = box.edits["self_limiting.output_low_W_per_m"]
    assert not commit(edit, "-3")
    assert said(edit.error_text) == "Output at the lower rating temperature must be at least 0 W/ft; you entered −3 W/ft"
    # the whole heater per foot of pipe is held to 10 kW/m (solver.model): 3 048 W/ft
    assert not commit(edit, "2000")  # × 2 runs = 4 000 W/ft of pipe
    assert "must be at most 3 048 W/ft" in said(edit.error_text)
    assert doc.selected == before and doc.undo_stack.count() == steps


def test_a_fixed_wall_takes_the_heater_off_and_gives_it_back(doc, card):
    doc.select_segment(1)
    heater = doc.selected.heater
    choose(card.surroundings.combo, "fixed_wall")
    assert doc.selected.heater is None and not card.heater.kind_combo.isEnabled()
    assert "Not with a fixed wall" in card.heater.note.text()
    choose(card.surroundings.combo, "still_air")
    assert doc.selected.heater == heater  # the same self-limiting heater, every number
    doc.undo_stack.undo()
    assert doc.selected.heater is None  # surroundings and heater changed in one step
    doc.undo_stack.undo()
    assert doc.selected.heater == heater and doc.selected.surroundings.kind == "still_air"


def test_design_margin_override_and_its_blank(doc, card):
    doc.select_segment(1)
    edit = card.heater.margin_edit
    assert said(edit.line_edit.placeholderText()) == "project's, 20.0 %"  # DesignCases default 0.2
    commit(edit, "15")
    assert doc.selected.design_margin == pytest.approx(0.15)
    assert not commit(edit, "150")
    assert said(edit.error_text) == "Design margin must be at most 100 %; you entered 150 %"
    commit(edit, "")
    assert doc.selected.design_margin is None


# --------------------------------------------------------------------------- heat sinks


def test_heat_sink_rows_add_remove_and_undo(doc, card):
    doc.select_segment(0)
    sinks = card.heat_sinks
    steps = doc.undo_stack.count()
    sinks.add_sink()
    assert [s.kind for s in doc.selected.heat_sinks] == ["pipe_support"]
    choose(sinks.table.cellWidget(0, 0), "other")  # 'other' has no catalogue size: a metre to start from
    assert doc.selected.heat_sinks[0].equivalent_length_m == 1.0
    choose(sinks.table.cellWidget(0, 3), "conductance")
    commit(sinks.table.cellWidget(0, 4), "0.8 W/K")
    sinks.table.cellWidget(0, 1).setValue(3)
    label = sinks.table.cellWidget(0, 2)
    label.setText("sample point")
    label.editingFinished.emit()
    sink = doc.selected.heat_sinks[0]
    assert (sink.kind, sink.count, sink.label, sink.loss_W_per_K, sink.equivalent_length_m) == (
        "other", 3, "sample point", 0.8, None)
    # 'other' sized by the catalogue is refused under the table, in words, and nothing changes
    choose(sinks.table.cellWidget(0, 3), "catalogue")
    assert sinks.error.isVisibleTo(card) and "An 'other' heat sink needs its size" in sinks.error.text()
    assert doc.selected.heat_sinks[0] == sink
    sinks.add_sink("valve")
    sinks.table.setCurrentCell(0, 0)
    sinks.remove_sink()
    assert [s.kind for s in doc.selected.heat_sinks] == ["valve"]
    assert doc.undo_stack.count() - steps == 8
    doc.undo_stack.undo()
    assert doc.selected.heat_sinks[0] == sink and sinks.table.rowCount() == 2
    assert sinks.table.cellWidget(0, 3).currentData() == "conductance"
    assert said(sinks.table.cellWidget(0, 4).text()) == "0.8"
    for _ in range(7):
        doc.undo_stack.undo()
    assert doc.selected.heat_sinks == [] and sinks.table.rowCount() == 0


def test_heat_sink_count_refused_in_words(doc, card):
    doc.select_segment(1)
    # a count the model refuses (a file could hold it; the spin box cannot): said with the row
    with pytest.raises(Exception) as info:
        C.SetSegmentField(doc, 0, 1, "heat_sinks.0.count", 0)
    from app.panels.editing import refusal_text

    assert said(refusal_text(info.value, "SI", prefix="segments[1]")) == (
        "Heat sink count (heat sink 1) must be at least 1; you entered 0")


# --------------------------------------------------------------------------- insulation and jacketing


def test_a_blank_conductivity_is_the_materials_k_of_t(doc, card):
    doc.select_segment(0)
    kbox = card.layer_table.cellWidget(0, 2)
    commit(kbox, "")
    assert doc.selected.insulation[0].conductivity_W_per_mK is None
    assert kbox.text() == "" and kbox.line_edit.placeholderText() == "k(T)"
    assert "k(T)" in card.layer_table.horizontalHeaderItem(2).toolTip()
    card.add_layer()
    assert doc.selected.insulation[1].conductivity_W_per_mK is None  # a new layer: the material's k(T)
    doc.undo_stack.undo()
    doc.undo_stack.undo()
    assert doc.selected.insulation[0].conductivity_W_per_mK == 0.04


def test_jacketing_sets_the_surface_emissivity(doc, card):
    doc.select_segment(0)
    combo = card.surroundings.jacketing["still_air"]
    choose(combo, "aluminium_new")
    # the catalogue's value for new bright aluminium (solver.catalogue.JACKETING, its source named there)
    assert doc.selected.surroundings.emissivity == catalogue.JACKETING["aluminium_new"].emissivity
    assert card.surroundings.edits["still_air.emissivity"].text() == "0.05"
    doc.undo_stack.undo()
    assert doc.selected.surroundings.emissivity == StillAir().emissivity
    assert combo.currentData() is not None  # 0.9: a painted or non-metallic finish
    commit(card.surroundings.edits["still_air.emissivity"], "0.42")
    assert combo.currentData() is None  # no finish has it: as entered


# --------------------------------------------------------------------------- project-wide


def test_design_cases_edited_and_saved_round_trip(qtbot, doc, tmp_path):
    dialog = ProjectDetailsDialog(doc)
    qtbot.addWidget(dialog)
    edits = dialog.cases_box.edits
    edits["worst_air_temperature_K"].setText("-25 °C")
    edits["worst_wind_speed_m_per_s"].setText("10 m/s")
    edits["hot_air_temperature_K"].setText("104 °F")  # 40 °C
    edits["design_margin"].setText("15")
    dialog.cases_box.no_flow_check.setChecked(False)
    steps = doc.undo_stack.count()
    assert dialog.apply() is None
    cases = doc.project.design_cases
    assert cases.worst_air_temperature_K == pytest.approx(248.15)
    assert cases.worst_wind_speed_m_per_s == 10.0
    assert cases.hot_air_temperature_K == pytest.approx(313.15)
    assert cases.design_margin == pytest.approx(0.15) and cases.worst_no_flow is False
    assert doc.undo_stack.count() - steps == 1

    feed = FeedPanel(doc)
    qtbot.addWidget(feed)
    commit(feed.maintain_edit, "5 °C")
    assert doc.current_alternative.limits.maintain_temperature_K == pytest.approx(278.15)

    path = tmp_path / "freeze.json"
    save_project(doc.project, path)
    again = load_project(path)
    assert again.design_cases == doc.project.design_cases
    assert again.alternatives[0].limits.maintain_temperature_K == pytest.approx(278.15)
    assert again.alternatives[0].segments[1].heater == doc.project.alternatives[0].segments[1].heater
    assert dump_project(again) == dump_project(doc.project)
    doc.undo_stack.undo()
    doc.undo_stack.undo()
    assert doc.project.design_cases == fernbrook_freeze_line().design_cases


def test_a_bad_design_case_is_refused_in_the_users_units(qtbot, doc):
    doc.set_unit_system("US")
    dialog = ProjectDetailsDialog(doc)
    qtbot.addWidget(dialog)
    dialog.cases_box.edits["design_margin"].setText("140")
    text = dialog.apply()
    assert said(text) == "Project design margin must be at most 100 %; you entered 140 %"
    assert doc.project.design_cases == fernbrook_freeze_line().design_cases


# --------------------------------------------------------------------------- new segments


def test_an_inserted_segment_takes_the_neighbours_heater(qtbot, doc):
    strip = LineStrip(doc)
    qtbot.addWidget(strip)
    doc.select_segment(1)
    strip.segment_actions.insert_after.trigger()
    new, neighbour = doc.current_alternative.segments[2], doc.current_alternative.segments[1]
    assert new.heater == neighbour.heater and new.heat_sinks == []  # sinks belong to the place
    assert "(self-limiting)" in wall_model_words(neighbour, "SI")


# --------------------------------------------------------------------------- line strip


def _strip_with_each_kind(qtbot) -> tuple[LineStrip, Document]:
    wool = [Layer(thickness_m=0.05, conductivity_W_per_mK=0.04)]
    heaters = [None, ConstantHeater(output_W_per_m=20.0),
               SelfLimitingHeater(output_low_W_per_m=30.0, temperature_low_K=283.15, output_high_W_per_m=12.0,
                                  temperature_high_K=338.15),
               ThermostatHeater(output_W_per_m=20.0, set_point_K=278.15)]
    segs = [Segment(name=f"S{i}", length_m=20.0, insulation=wool, heater=h,
                    heat_sinks=[HeatSink(kind="valve", count=3)] if i == 1 else []) for i, h in enumerate(heaters)]
    d = Document(Project(alternatives=[Alternative(name="A", segments=segs)]))
    strip = LineStrip(d)
    qtbot.addWidget(strip)
    strip.resize(1200, 240)
    strip.show()
    return strip, d


def _heater_line(image: QImage, rect, y: int) -> list[tuple[int, int]]:
    """Where the heater colour is in a band of rows around ``y`` inside ``rect`` (x relative to the block)."""
    target = QColor(style.HEAT_INPUT)
    out = []
    for x in range(rect.left() + 8, rect.right() - 8):
        for dy in range(-4, 5):
            c = image.pixelColor(x, y + dy)
            if abs(c.red() - target.red()) + abs(c.green() - target.green()) + abs(c.blue() - target.blue()) < 90:
                out.append((x - rect.left(), dy))
    return out


def test_line_strip_draws_each_heater_kind_its_own_way(qtbot, tmp_path):
    strip, d = _strip_with_each_kind(qtbot)
    try:
        image = strip.canvas.grab().toImage()
        image.save(str(tmp_path / "heater_kinds.png"))
        y = PIPE_CENTRE_Y - (BORE_HALF + 2) - 3  # the heater's line just above the pipe wall (pipe_symbols)
        marks = [_heater_line(image, strip.canvas.block_rects()[i].toRect(), y) for i in range(4)]
        assert marks[0] == []  # no heater, no mark
        for m in marks[1:]:
            assert len(m) > 50
        # what a user sees: three different lines (sets of lit pixels over the same span differ)
        span = min(max(x for x, _ in m) for m in marks[1:])
        shapes = [frozenset((x, dy) for x, dy in m if x < span - 10) for m in marks[1:]]
        for a in range(3):
            for b in range(a + 1, 3):
                overlap = len(shapes[a] & shapes[b]) / min(len(shapes[a]), len(shapes[b]))
                assert overlap < 0.8, (a, b, overlap)
        # the heat sinks: their own caption with the count, and the tooltip says what they are
        kinds = {c.kind: c.text for c in strip.captions(1)}
        assert kinds.get("heat_sinks") == "×3" and "heat_sinks" not in {c.kind for c in strip.captions(0)}
        assert "Heat sink: 3 × valve" in strip.segment_tooltip(1)
        assert "Electric tracing: self-limiting" in strip.segment_tooltip(2)
        legend = strip.legend.toolTip()
        for key in ("heat_input", "heater_self_limiting", "heater_thermostat", "heat_sinks"):
            assert SYMBOLS[key][0] in legend
    finally:
        d.shutdown()


def test_wall_summary_names_the_heater_kind(qtbot):
    strip, d = _strip_with_each_kind(qtbot)
    try:
        walls = [next(c.full for c in strip.captions(i) if c.kind == "wall") for i in range(4)]
        assert said(walls[1]).startswith("traced 20.0 W/m")
        assert said(walls[2]).startswith("self-limiting 30.0 W/m")
        assert said(walls[3]).startswith("thermostat 20.0 W/m")
    finally:
        d.shutdown()


def test_an_adiabatic_outside_takes_the_heat_sinks_off_and_gives_them_back(doc, card):
    # heat sinks lose heat to the surroundings: with none (adiabatic) or a held wall the model refuses them, so
    # the switch takes them off in the same undo step and the way back restores them
    doc.select_segment(1)
    sinks = list(doc.selected.heat_sinks)
    assert sinks
    choose(card.surroundings.combo, "adiabatic")
    assert doc.selected.surroundings.kind == "adiabatic" and doc.selected.heat_sinks == []
    choose(card.surroundings.combo, "still_air")
    assert doc.selected.heat_sinks == sinks
    doc.undo_stack.undo()
    doc.undo_stack.undo()  # one step each way: surroundings and sinks together
    assert doc.selected.surroundings.kind == "still_air" and doc.selected.heat_sinks == sinks


def test_indoors_is_one_undoable_tick_on_still_air(doc, card):
    # the design cases leave indoor air as entered; the tick is an edit like any other
    doc.select_segment(0)
    assert doc.selected.surroundings.kind == "still_air" and not doc.selected.surroundings.indoors
    card.surroundings.indoors.click()
    assert doc.selected.surroundings.indoors is True and card.surroundings.indoors.isChecked()
    doc.undo_stack.undo()
    assert doc.selected.surroundings.indoors is False and not card.surroundings.indoors.isChecked()
