"""Sectionwright's own unit colour scheme, applied to geology outputs.

Twelve colours chosen for this project: muted, told apart by lightness as
well as hue so that a strip printed in black and white still shows its
boundaries. Units take them in the alphabetical order of their labels.
"""

from qgis.core import (
    QgsCategorizedSymbolRenderer,
    QgsLineSymbol,
    QgsProcessingLayerPostProcessorInterface,
    QgsRendererCategory,
)
from qgis.PyQt.QtGui import QColor

UNIT_COLOURS = (
    "#e6d5a3",
    "#8c5a3c",
    "#9dbf8a",
    "#5b6f8f",
    "#d9a441",
    "#c7a3c2",
    "#4d6b4a",
    "#e3b8a0",
    "#7a7a7a",
    "#a8cfd0",
    "#9c4f4f",
    "#cfc9e8",
)
NO_UNIT_COLOUR = "#ffffff"
STRIP_WIDTH_MM = 2.6


def unit_colour(index):
    return QColor(UNIT_COLOURS[index % len(UNIT_COLOURS)])


def unit_strip_renderer(units, field):
    """A categorised renderer drawing each unit's stretch of the ground line
    as a thick band of its colour, outlined thinly in dark grey."""
    categories = []
    for index, unit in enumerate(sorted(u for u in units if u)):
        categories.append(QgsRendererCategory(unit, _band(unit_colour(index)), unit))
    categories.append(QgsRendererCategory("", _band(QColor(NO_UNIT_COLOUR)), "(no mapped unit)"))
    return QgsCategorizedSymbolRenderer(field, categories)


def _band(colour):
    symbol = QgsLineSymbol.createSimple(
        {"line_color": "#3a3a3a", "line_width": str(STRIP_WIDTH_MM + 0.4)}
    )
    inner = QgsLineSymbol.createSimple(
        {"line_color": colour.name(), "line_width": str(STRIP_WIDTH_MM)}
    )
    symbol.appendSymbolLayer(inner.symbolLayer(0).clone())
    return symbol


class UnitStripStyler(QgsProcessingLayerPostProcessorInterface):
    """Styles the intervals layer when Processing loads it into the project."""

    def __init__(self, units, field):
        super().__init__()
        self.units = units
        self.field = field

    def postProcessLayer(self, layer, context, feedback):  # noqa: N802 (QGIS API)
        layer.setRenderer(unit_strip_renderer(self.units, self.field))
        layer.triggerRepaint()
