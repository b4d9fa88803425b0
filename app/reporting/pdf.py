"""Paging and rendering of the report: the body as pageable parts, laid out and written as a PDF.

The body is a ``QTextDocument`` built from HTML (tables keep whole rows on a page and repeat their
header rows); charts are painted as vector graphics with ``QPainter`` over fixed-height
placeholder blocks, so they stay crisp at any zoom. Works headless: when no Qt application exists
one is created on the offscreen platform.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Optional, Sequence

from PySide6.QtCore import QMarginsF, QPointF, QRectF, QSizeF, Qt
from PySide6.QtGui import (
    QColor,
    QFont,
    QFontMetricsF,
    QPageLayout,
    QPageSize,
    QPainter,
    QPdfWriter,
    QPen,
    QTextBlockFormat,
    QTextCursor,
    QTextDocument,
    QTextOption,
)

from app.reporting.chart import Chart, draw_chart
from app.style import INK_MUTED, RULE

#: A callable(doc, page_height) run on the final layout; tests inspect it.
LAYOUT_HOOK = None


def ensure_gui_application():
    """The running Qt application, or a new offscreen one when there is none (headless).

    A QApplication (not only a QGuiApplication), so widgets can still be made
    later in the same process (e.g. the app or a widget test after a report).
    """
    from PySide6.QtCore import QCoreApplication

    app = QCoreApplication.instance()
    if app is None:
        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
        from PySide6.QtWidgets import QApplication

        app = QApplication(["calorun-report"])
    return app


# --------------------------------------------------------------------------- the body as parts


@dataclass
class Table:
    headers: Sequence[str]
    rows: Sequence[Sequence[str]]
    num_cols: Sequence[int] = ()
    widths: Optional[Sequence[int]] = None
    font_pt: float = 8.0
    raw: Optional[str] = None  # a one-row box drawn as given (never split)
    splits: set = field(default_factory=set)  # body-row indices that start a new page


@dataclass
class Heading:
    level: int
    html: str
    style: str = ""
    break_before: bool = False


class Body:
    """The report body as parts (HTML strings, tables, headings, figures).

    Tables and headings stay objects so the renderer can start a new page in
    front of a row or heading that Qt would otherwise split or strand.
    """

    def __init__(self, css: str = ""):
        self.css = css
        self.parts: list = []
        self.figures: list[Chart] = []
        self.table_map: list[tuple[Table, int]] = []  # per rendered <table>: (table, first body row)
        self.heading_map: list[Heading] = []

    def add(self, s: str) -> None:
        self.parts.append(s)

    def heading(self, level: int, html_text: str, style: str = "") -> None:
        self.parts.append(Heading(level, html_text, style))

    def figure(self, chart: Chart) -> None:
        self.add(f'<p align="center">[[CALORUN-FIGURE-{len(self.figures)}]]</p>')
        self.figures.append(chart)

    def page_break(self) -> None:
        self.add('<p style="page-break-before: always; margin: 0px;"></p>')

    def box(self, inner_html: str, border: str, background: str) -> None:
        raw = (
            f'<table width="100%" cellspacing="0" cellpadding="5" style="margin-top: 6px; margin-bottom: 4px;">'
            f'<tr><td style="border-left: 3px solid {border}; background-color: {background};">{inner_html}</td></tr></table>'
        )
        self.parts.append(Table((), (), raw=raw))

    def table(self, headers: Sequence[str], rows: Sequence[Sequence[str]], num_cols: Sequence[int] = (),
              widths: Sequence[int] | None = None, font_pt: float = 8.0) -> None:
        """A table; headers and cells are HTML already (escape user text first)."""
        self.parts.append(Table(headers, rows, tuple(num_cols), widths, font_pt))

    def _table_html(self, t: Table, first: int, last: int, page_break: bool) -> str:
        brk = " page-break-before: always;" if page_break else ""
        out = [f'<table class="grid" width="100%" cellspacing="0" style="font-size: {t.font_pt}pt;{brk}"><thead><tr>']
        for i, h in enumerate(t.headers):
            cls = ' class="num"' if i in t.num_cols else ""
            w = f' width="{t.widths[i]}%"' if t.widths else ""
            out.append(f"<th{cls}{w}>{h}</th>")
        out.append("</tr></thead><tbody>")
        for row in t.rows[first:last]:
            out.append("<tr>")
            for i, c in enumerate(row):
                cls = ' class="num"' if i in t.num_cols else ""
                out.append(f"<td{cls}>{c}</td>")
            out.append("</tr>")
        out.append("</tbody></table>")
        return "".join(out)

    def html(self) -> str:
        self.table_map = []
        self.heading_map = []
        body = []
        for part in self.parts:
            if isinstance(part, str):
                body.append(part)
            elif isinstance(part, Heading):
                self.heading_map.append(part)
                style = part.style + (" page-break-before: always;" if part.break_before else "")
                attr = f' style="{style.strip()}"' if style.strip() else ""
                body.append(f"<h{part.level}{attr}>{part.html}</h{part.level}>")
            elif part.raw is not None:
                self.table_map.append((part, 0))
                if 0 in part.splits:  # find_break moved the box to the next page
                    body.append('<p style="page-break-before: always; margin: 0px;"></p>')
                body.append(part.raw)
            else:
                cuts = [0] + sorted(s for s in part.splits if 0 < s < len(part.rows)) + [len(part.rows)]
                for a, b in zip(cuts[:-1], cuts[1:]):
                    self.table_map.append((part, a))
                    body.append(self._table_html(part, a, b, page_break=a > 0 or 0 in part.splits))
        return f"<html><head><style>{self.css}</style></head><body>{''.join(body)}</body></html>"


# --------------------------------------------------------------------------- paging


def find_break(doc, page_h: float, body: Body) -> bool:
    """Find the first table row that straddles a page boundary, or heading left
    alone at a page foot, in the laid-out ``doc``; mark it in ``body`` to start a
    new page. Returns whether anything was marked (then lay out again).

    Qt may split a multi-line row across pages; a reviewer should never have to
    join half-rows, so such a row starts the next page (header row repeated).
    """
    layout = doc.documentLayout()
    layout.documentSize()  # forces the layout

    def page_of(y: float) -> int:
        return int(y // page_h)

    def block_span(block) -> tuple[float, float]:
        r = layout.blockBoundingRect(block)
        bl = block.layout()
        if bl is None or bl.lineCount() == 0:
            return r.top(), r.bottom()
        first, last = bl.lineAt(0), bl.lineAt(bl.lineCount() - 1)
        return r.top() + first.y(), r.top() + last.y() + last.height()

    def row_span(table, row: int) -> tuple[float, float]:
        top, bottom = math.inf, -math.inf
        for col in range(table.columns()):
            cell = table.cellAt(row, col)
            if not cell.isValid():
                continue
            t, _ = block_span(cell.firstCursorPosition().block())
            _, b = block_span(cell.lastCursorPosition().block())
            top, bottom = min(top, t), max(bottom, b)
        return top, bottom

    def straddles(top: float, bottom: float) -> bool:
        return (
            math.isfinite(top) and math.isfinite(bottom) and bottom - top < page_h * 0.9
            and page_of(top + 1e-6) != page_of(bottom - 1e-6)
        )

    table_index = -1
    heading_index = -1
    block = doc.begin()
    last_table = None
    while block.isValid():
        table = QTextCursor(block).currentTable()
        if table is not None:
            if last_table is None or table.firstPosition() != last_table:
                last_table = table.firstPosition()
                table_index += 1
                part, first_row = body.table_map[table_index]
                if part.raw is not None and 0 not in part.splits:
                    # a box (a caution, a note) is read whole: one that straddles a page boundary starts the next
                    if any(straddles(*row_span(table, row)) for row in range(table.rows())):
                        part.splits.add(0)
                        return True
                if part.raw is None:
                    header_rows = table.format().headerRowCount()
                    for row in range(header_rows, table.rows()):
                        if straddles(*row_span(table, row)):
                            split = first_row + row - header_rows
                            if split in part.splits:
                                continue  # it starts a page already and still straddles: nothing more to do
                            part.splits.add(split)  # 0: the whole table starts the next page
                            return True
            block = block.next()
            continue
        last_table = None
        if block.blockFormat().headingLevel() > 0:
            heading_index += 1
            heading = body.heading_map[heading_index]
            top, _ = block_span(block)
            follow_bottom = None
            nxt = block.next()
            for _ in range(2):  # the next block, or the first row of a table right after a note
                if not nxt.isValid():
                    break
                ntable = QTextCursor(nxt).currentTable()
                if ntable is not None:
                    first_body = min(ntable.format().headerRowCount(), ntable.rows() - 1)
                    follow_bottom = row_span(ntable, first_body)[1]
                    break
                follow_bottom = block_span(nxt)[1]
                if nxt.text().strip():
                    nn = nxt.next()
                    if nn.isValid() and QTextCursor(nn).currentTable() is not None:
                        nxt = nn
                        continue
                    break
                nxt = nxt.next()
            if follow_bottom is not None and not heading.break_before and straddles(top, follow_bottom):
                heading.break_before = True
                return True
        block = block.next()
    return False


# --------------------------------------------------------------------------- rendering


def render_pdf(body: Body, path: Path, title: str, header_text: str, system: str) -> int:
    """Lay ``body`` out on pages (A4 for SI, Letter for US) and write the PDF; returns the page count."""
    writer = QPdfWriter(str(path))
    writer.setResolution(600)
    writer.setTitle(title)
    writer.setCreator("Calorun")
    page = QPageSize(QPageSize.Letter if system == "US" else QPageSize.A4)
    writer.setPageLayout(QPageLayout(page, QPageLayout.Portrait, QMarginsF(16, 14, 16, 14), QPageLayout.Millimeter))
    dpi = writer.resolution()
    pt = dpi / 72.0
    paint = writer.pageLayout().paintRectPixels(dpi)
    width, height = float(paint.width()), float(paint.height())
    header_h = 16 * pt
    footer_h = 16 * pt
    body_h = height - header_h - footer_h

    font = QFont()
    font.setFamilies(["DejaVu Sans", "Liberation Sans", "Arial", "Helvetica"])
    font.setPointSizeF(9.0)

    # Qt scales block line heights and margins from its logical pixels to the
    # device; measure the factor once rather than assume a platform dpi.
    probe = QTextDocument()
    probe.documentLayout().setPaintDevice(writer)
    probe.setDocumentMargin(0)
    probe.setPlainText("a\nb")
    first = probe.begin()
    pcur = QTextCursor(first)
    pbf = pcur.blockFormat()
    pbf.setLineHeight(1000.0, QTextBlockFormat.LineHeightTypes.FixedHeight.value)
    pcur.setBlockFormat(pbf)
    probe.setPageSize(QSizeF(width, 1e9))
    probe.documentLayout().documentSize()
    scale = (probe.documentLayout().blockBoundingRect(first.next()).top() - probe.documentLayout().blockBoundingRect(first).top()) / 1000.0
    if not (scale > 0 and math.isfinite(scale)):
        scale = dpi / 96.0

    def build():
        doc = QTextDocument()
        doc.documentLayout().setPaintDevice(writer)  # before the page size, or text comes out tiny
        doc.setDefaultFont(font)
        doc.setDocumentMargin(0)
        # a long word (a name without spaces, a path) breaks where it must rather than run off the page
        option = QTextOption(doc.defaultTextOption())
        option.setWrapMode(QTextOption.WrapMode.WrapAtWordBoundaryOrAnywhere)
        doc.setDefaultTextOption(option)
        doc.setHtml(body.html())
        # Figures: an empty block of fixed line height holds the place; the chart
        # is painted as vector graphics over it once the pages are laid out.
        # The placeholders are top-level paragraphs: one walk over the top level finds them all
        # (QTextDocument.find per figure reads the whole document each time, tables included).
        placeholders = {}
        it = doc.rootFrame().begin()
        while not it.atEnd():
            block = it.currentBlock()
            if block.isValid() and block.text().startswith("[[CALORUN-FIGURE-"):
                placeholders[block.text()] = block
            it += 1
        blocks = []
        for i, chart in enumerate(body.figures):
            block = placeholders.get(f"[[CALORUN-FIGURE-{i}]]")
            if block is None:
                raise RuntimeError(f"report figure {i} placeholder not found")
            cursor = QTextCursor(block)
            cursor.movePosition(QTextCursor.MoveOperation.EndOfBlock, QTextCursor.MoveMode.KeepAnchor)
            cursor.removeSelectedText()
            bf = cursor.blockFormat()
            fig_h = min(width * chart.aspect, body_h * 0.95)
            bf.setLineHeight(fig_h / scale, QTextBlockFormat.LineHeightTypes.FixedHeight.value)
            bf.setTopMargin(0)
            bf.setBottomMargin(6 * pt / scale)
            cursor.setBlockFormat(bf)
            blocks.append((cursor.block(), chart, fig_h))
        doc.setPageSize(QSizeF(width, body_h))
        return doc, blocks

    for _ in range(200):
        doc, figure_blocks = build()
        if not find_break(doc, body_h, body):
            break
    if LAYOUT_HOOK is not None:
        LAYOUT_HOOK(doc, body_h)
    pages = doc.pageCount()
    layout = doc.documentLayout()
    figures_by_page: dict[int, list] = {}
    for block, chart, fig_h in figure_blocks:
        r = layout.blockBoundingRect(block)
        # Qt keeps the fixed-height line whole: on this page if it fits, else on the next.
        top = r.top()
        page_index = int(top // body_h)
        if page_index != int((top + fig_h - 1e-6) // body_h):
            page_index += 1
            top = page_index * body_h
        figures_by_page.setdefault(page_index, []).append((QRectF(0, top, width, fig_h), chart))

    small = QFont(font)
    small.setPointSizeF(7.5)
    painter = QPainter()
    if not painter.begin(writer):
        raise OSError(f"cannot write the report to {path}")
    try:
        fm = QFontMetricsF(small, writer)
        head = fm.elidedText(header_text, Qt.ElideRight, width * 0.7)
        for i in range(pages):
            if i:
                writer.newPage()
            painter.save()
            painter.translate(0, header_h - i * body_h)
            # 1 device unit (1/600 in) short of the page foot: a line Qt moved to the next page
            # may start a hair above the break by round-off; it must not print twice.
            doc.drawContents(painter, QRectF(0, i * body_h, width, body_h - 1))
            for rect, chart in figures_by_page.get(i, []):
                draw_chart(painter, rect, chart, pt)
            painter.restore()
            _page_frame(painter, i, pages, width, height, header_h, footer_h, head, small, pt)
    finally:
        painter.end()
    return pages


def _page_frame(painter, i, pages, width, height, header_h, footer_h, head, font, pt) -> None:
    """Running header, footer and page number."""
    painter.setFont(font)
    painter.setPen(QColor(INK_MUTED))
    painter.drawText(QRectF(0, 0, width, header_h - 5 * pt), int(Qt.AlignLeft | Qt.AlignBottom), head)
    painter.drawText(QRectF(0, 0, width, header_h - 5 * pt), int(Qt.AlignRight | Qt.AlignBottom), "Line design summary")
    painter.setPen(QPen(QColor(RULE), 0.6 * pt))
    painter.drawLine(QPointF(0, header_h - 3.5 * pt), QPointF(width, header_h - 3.5 * pt))
    fy = height - footer_h
    painter.drawLine(QPointF(0, fy + 3.5 * pt), QPointF(width, fy + 3.5 * pt))
    painter.setPen(QColor(INK_MUTED))
    foot = QRectF(0, fy + 5 * pt, width, footer_h - 5 * pt)
    painter.drawText(foot, int(Qt.AlignLeft | Qt.AlignTop), "Calorun")
    painter.drawText(foot, int(Qt.AlignHCenter | Qt.AlignTop), "Engineering estimate — defer to codes, standards and licensed review")
    painter.drawText(foot, int(Qt.AlignRight | Qt.AlignTop), f"Page {i + 1} of {pages}")
