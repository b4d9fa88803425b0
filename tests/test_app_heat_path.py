"""The heat path in the app and the report, and "how was this computed" tooltips (issue 8 items 8 and 10).

What a user would notice: the Segment Card's bar shows the selected segment's parts with their shares
and its heat loss per metre, in the chosen units; pointing at a block, a key figure or a finding
shows how it was computed; the report has a table of each segment's heat path. Unit definitions:
1 ft = 0.3048 m exactly (NIST SP 811). The line is an invented example.
"""

from __future__ import annotations

import pytest
from PySide6.QtCore import QEvent, QPoint
from PySide6.QtGui import QHelpEvent
from PySide6.QtWidgets import QApplication, QToolTip

from app.document import Document
from app.panels.checks_panel import ROLE_CHECK, ChecksPanel
from app.panels.key_figures import KeyFiguresPanel
from app.panels.segment_card import SegmentCard
from solver.model import Alternative, Buried, Feed, Layer, Pipe, Project, PureFluid, Segment, StillAir

FT = 0.3048  # m (NIST SP 811)


def project() -> Project:
    wool = [Layer(material="mineral wool", thickness_m=0.05, conductivity_W_per_mK=0.04)]
    return Project(name="Heat path test", alternatives=[Alternative(
        name="Base", fluid=PureFluid(name="Water"),
        feed=Feed(inlet_temperature_K=343.15, inlet_pressure_Pa=5e5, mass_flow_kg_per_s=1.0),
        segments=[
            Segment(name="Rack", length_m=50.0, pipe=Pipe(nps="2", schedule="40"), insulation=wool,
                    heat_input_W_per_m=20.0, surroundings=StillAir(temperature_K=278.15)),
            Segment(name="Crossing", length_m=20.0, pipe=Pipe(nps="2", schedule="40"), insulation=wool,
                    surroundings=Buried(soil_temperature_K=280.15, depth_m=1.0)),
            Segment(name="Hot bare stub", length_m=3.0, pipe=Pipe(nps="2", schedule="40"),
                    surroundings=StillAir(temperature_K=293.15)),
        ])])


@pytest.fixture
def doc(qtbot):
    d = Document(project())
    d.solve_now()
    yield d
    d.shutdown()


def hover(widget, pos: QPoint) -> str:
    """The tooltip text shown when pointing at ``pos`` of ``widget``."""
    QToolTip.hideText()
    event = QHelpEvent(QEvent.ToolTip, pos, widget.mapToGlobal(pos))
    QApplication.sendEvent(widget, event)
    return QToolTip.text()


def test_segment_card_shows_the_selected_segments_heat_path(qtbot, doc):
    card = SegmentCard(doc)
    qtbot.addWidget(card)
    box = card.heat_path
    res = doc.result
    doc.select_segment(0)
    keys = [p.key for p in box.bar.parts]
    assert keys[:3] == ["inside_film", "pipe_wall", "insulation_1"] and keys[-1] == "outer_air_film"
    loss = res.segments[0].heat_loss_W / 50.0
    assert f"Heat loss {loss:.3g} W/m" in box.heat.text()
    legend = box.legend.text().replace("&nbsp;", " ")
    assert "mineral wool" in legend and "%" in legend
    doc.select_segment(1)  # the buried crossing: the soil instead of an air film
    assert [p.key for p in box.bar.parts][-1] == "soil"
    doc.set_unit_system("US")
    loss_ft = res.segments[1].heat_loss_W / 20.0 * FT
    assert f"Heat loss {loss_ft:.3g} W/ft" in box.heat.text()
    assert "h·ft·°F/Btu" in box.note.text()


def test_pointing_at_a_block_gives_its_resistance_and_share(qtbot, doc):
    card = SegmentCard(doc)
    qtbot.addWidget(card)
    card.resize(420, 900)
    card.show()
    doc.select_segment(0)
    bar = card.heat_path.bar
    qtbot.waitExposed(bar)
    rects = bar.block_rects()
    k = [p.key for p in bar.parts].index("insulation_1")
    share = doc.result.resistances[0].part("insulation_1").share_percent
    assert rects[k].width() == pytest.approx((bar.width() - 1) * share / 100.0, rel=1e-6)  # as wide as its share
    text = hover(bar, rects[k].center().toPoint())
    assert text.startswith("Insulation: mineral wool:") and "K·m/W" in text and f"{share:.0f} %" in text


def test_key_figure_tooltip_says_how_and_where(qtbot, doc):
    panel = KeyFiguresPanel(doc)
    qtbot.addWidget(panel)
    panel.resize(600, 900)
    panel.show()
    qtbot.waitExposed(panel)
    row = panel._row_of["max_outer_surface_temperature_K"]
    table = panel.table
    table.scrollToItem(table.item(row, 0))
    text = hover(table.viewport(), table.visualItemRect(table.item(row, 0)).center())
    # the bare stub in 20 °C air is the hottest surface a person can touch (by hand: 70 °C water, no insulation)
    assert "Where: Segment 3 “Hot bare stub”" in text
    assert "Insulation: none" in text
    assert "Churchill, S. W. & Chu, H. H. S. (1975)" in text


def test_finding_tooltip_gives_its_rule_and_threshold(qtbot, doc):
    panel = ChecksPanel(doc)
    qtbot.addWidget(panel)
    panel.resize(700, 400)
    panel.show()
    qtbot.waitExposed(panel)
    tree = panel.tree
    items = [tree.topLevelItem(i) for i in range(tree.topLevelItemCount())]
    hot = [it for it in items if it.data(0, ROLE_CHECK) is not None and it.data(0, ROLE_CHECK).code == "HOT_SURFACE"]
    assert hot, "a bare pipe of 70 °C water in still air burns on contact (above about 60 °C, common practice)"
    tree.scrollToItem(hot[0])
    text = hover(tree.viewport(), tree.visualItemRect(hot[0]).center())
    assert "Rule: Outer surface in air at or above 60.0 °C" in text and "common practice" in text
    assert "Segment 3 “Hot bare stub”" in text


def test_report_has_a_heat_path_table_per_segment(doc):
    from app.reporting.content import Outcome, build_html

    alt = doc.project.alternatives[0]
    body = build_html(doc.project, [Outcome(alt, doc.result, None)], "SI", "2026-12-02")
    html = body.html()
    assert "Heat path per segment" in html
    section = html[html.index("Heat path per segment"):]
    for name in ("Rack", "Crossing", "Hot bare stub"):
        assert name in section
    assert "Insulation: mineral wool" in section and "Soil" in section and "Radiation" in section
    soil = doc.result.resistances[1].part("soil")
    assert f"{soil.share_percent:.1f} %" in section or f"{soil.share_percent:.0f} %" in section
