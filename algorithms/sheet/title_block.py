"""The title block: a ruled box in the sheet's lower right corner saying
what the sheet is, at what scale, in which CRS, by whom, when, from what
data — and the caution that goes with an interpretation."""

from dataclasses import dataclass
from typing import List

from qgis.core import QgsLayoutItemShape, QgsLayoutMeasurement
from qgis.PyQt.QtCore import Qt
from qgis.PyQt.QtGui import QColor

from ..outputs.styles import INK
from .text import label, place

CAUTION = (
    "Interpretation: to be checked by a qualified geologist under local codes and "
    "licensed practice before it guides drilling, excavation or slope decisions."
)
HEADER_FILL = "#e7e1d2"
RULE = 0.25  # mm, the block's lines
PAD = 1.6  # mm, text inside a cell


@dataclass
class TitleBlock:
    title: str
    subject: str  # "Section A–A′ · NW 307° → SE 127°" or "Index of sections"
    scale: str  # "Horizontal 1:25 000 · vertical 1:12 500 · VE ×2"
    crs: str
    date: str
    author: str
    sheet: str  # "Sheet 2 of 5"
    sources: List[str]


def _cell(layout, page, x, y, width, height, fill=None):
    shape = QgsLayoutItemShape(layout)
    shape.setShapeType(QgsLayoutItemShape.Shape.Rectangle)
    symbol = shape.symbol().clone()
    symbol.setColor(QColor(fill or "#ffffff"))
    layer = symbol.symbolLayer(0)
    layer.setStrokeColor(QColor(INK))
    layer.setStrokeWidth(RULE)
    shape.setSymbol(symbol)
    shape.setFrameEnabled(False)
    shape.setFrameStrokeWidth(QgsLayoutMeasurement(RULE))
    layout.addLayoutItem(shape)
    place(shape, page, x, y, width, height)


def _row(layout, page, x, y, width, height, caption, text, size=7.5, bold=False):
    _cell(layout, page, x, y, width, height)
    caption_w = 17.0
    label(layout, page, caption, (x + PAD, y, caption_w, height), 6, italic=True)
    label(layout, page, text, (x + caption_w, y, width - caption_w - PAD, height), size, bold)


def add_title_block(layout, page, box, block):
    """The title block in ``box`` = (x, y, width, height) mm."""
    x, y, width, height = box
    unit = height / 15.0
    header, row, data = 2.4 * unit, 1.5 * unit, 3.3 * unit
    _cell(layout, page, x, y, width, header, HEADER_FILL)
    label(layout, page, block.title, (x + PAD, y, width - 2 * PAD, header), 12.0, bold=True)
    top = y + header
    for caption, text, size, bold in (
        ("Subject", block.subject, 8.0, True),
        ("Scale", block.scale, 7.5, False),
        ("CRS", block.crs, 7.0, False),
    ):
        _row(layout, page, x, top, width, row, caption, text, size, bold)
        top += row
    left = x
    for (caption, text), share in zip(
        (("Date", block.date), ("Author", block.author or "—"), ("Sheet", block.sheet)),
        (0.3, 0.45, 0.25),
    ):
        cell = share * width
        _cell(layout, page, left, top, cell, row)
        label(layout, page, caption, (left + PAD, top, 11, row), 6, italic=True)
        label(layout, page, text, (left + 11, top, cell - 11 - PAD, row), 7.5)
        left += cell
    top += row
    sources = ", ".join(block.sources)
    _row(layout, page, x, top, width, data, "Data", sources, 6.3 if len(sources) < 160 else 5.4)
    top += data
    _cell(layout, page, x, top, width, y + height - top, HEADER_FILL)
    label(
        layout,
        page,
        CAUTION,
        (x + PAD, top, width - 2 * PAD, y + height - top),
        6.5,
        italic=True,
        align=Qt.AlignmentFlag.AlignLeft,
    )
