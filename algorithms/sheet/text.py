"""Text of the sheet: one typeface, formats and free-standing labels."""

from qgis.core import QgsLayoutItemLabel, QgsLayoutPoint, QgsLayoutSize, QgsTextFormat
from qgis.PyQt.QtCore import Qt
from qgis.PyQt.QtGui import QColor, QFont

from ..compat.qgis_compat import set_label_text
from ..outputs.styles import INK

FONT = "Sans Serif"


def font(size, bold=False, italic=False):
    chosen = QFont(FONT)
    chosen.setPointSizeF(size)
    chosen.setBold(bold)
    chosen.setItalic(italic)
    return chosen


def text_format(size, bold=False, italic=False, colour=INK):
    text = QgsTextFormat()
    text.setFont(font(size, bold, italic))
    text.setSize(size)
    text.setColor(QColor(colour))
    return text


def place(item, page, x, y, width, height):
    item.attemptResize(QgsLayoutSize(width, height))
    item.attemptMove(QgsLayoutPoint(x, y), page=page)


def label(
    layout,
    page,
    text,
    box,
    size=9,
    bold=False,
    italic=False,
    align=Qt.AlignmentFlag.AlignLeft,
    valign=Qt.AlignmentFlag.AlignVCenter,
    rotation=0.0,
):
    """A layout label in ``box`` = (x, y, width, height) mm on ``page``."""
    item = QgsLayoutItemLabel(layout)
    item.setText(text)
    set_label_text(item, text_format(size, bold, italic))
    item.setHAlign(align)
    item.setVAlign(valign)
    layout.addLayoutItem(item)
    place(item, page, *box)
    if rotation:
        item.setItemRotation(rotation, adjustPosition=False)
    return item
