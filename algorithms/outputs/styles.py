"""Sectionwright's own unit colour scheme, applied to geology outputs.

Twelve colours chosen for this project: muted, told apart by lightness as
well as hue so that a strip printed in black and white still shows its
boundaries. Units take them in the alphabetical order of their labels.
"""

from qgis.core import (
    QgsCategorizedSymbolRenderer,
    QgsExpression,
    QgsLineSymbol,
    QgsMarkerSymbol,
    QgsProcessingLayerPostProcessorInterface,
    QgsRendererCategory,
    QgsSingleSymbolRenderer,
)
from qgis.PyQt.QtGui import QColor

from . import fields as F

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


# Section sheet: black-and-white first, colour where it adds.
INK = "#1d1d1d"
GRID = "#b8b8b8"
FAULT = "#8e2b1f"
HOLE = "#3b3b3b"


def profile_renderer():
    return QgsSingleSymbolRenderer(
        QgsLineSymbol.createSimple({"line_color": INK, "line_width": "0.5"})
    )


def tick_renderer():
    return QgsSingleSymbolRenderer(
        QgsLineSymbol.createSimple({"line_color": INK, "line_width": "0.45", "capstyle": "round"})
    )


def hole_renderer():
    return QgsSingleSymbolRenderer(
        QgsLineSymbol.createSimple({"line_color": HOLE, "line_width": "0.7", "line_style": "solid"})
    )


def crossing_renderer():
    """Unit boundaries as small open rings, contacts as short upright bars,
    faults as bold crosses — told apart by shape, not colour."""

    def marker(props):
        return QgsMarkerSymbol.createSimple(props)

    categories = [
        QgsRendererCategory(
            "unit boundary",
            marker(
                {
                    "name": "circle",
                    "size": "1.6",
                    "color": "#ffffff",
                    "outline_color": INK,
                    "outline_width": "0.3",
                }
            ),
            "unit boundary",
        ),
        QgsRendererCategory(
            "fault",
            marker(
                {
                    "name": "cross2",
                    "size": "3.2",
                    "color": FAULT,
                    "outline_color": FAULT,
                    "outline_width": "0.6",
                }
            ),
            "fault",
        ),
        QgsRendererCategory(
            "",
            marker(
                {
                    "name": "line",
                    "size": "3.0",
                    "color": INK,
                    "outline_color": INK,
                    "outline_width": "0.45",
                    "angle": "0",
                }
            ),
            "contact",
        ),
    ]
    kind = QgsExpression.quotedColumnRef(F.KIND)
    return QgsCategorizedSymbolRenderer(
        f"CASE WHEN {kind} IN ('unit boundary', 'fault') THEN {kind} ELSE '' END", categories
    )


def section_line_renderer():
    """The section line on the location map: dark on a white halo, visible on
    any map style."""
    symbol = QgsLineSymbol.createSimple({"line_color": "#ffffff", "line_width": "1.8"})
    core = QgsLineSymbol.createSimple({"line_color": INK, "line_width": "0.7"})
    symbol.appendSymbolLayer(core.symbolLayer(0).clone())
    return QgsSingleSymbolRenderer(symbol)


def collar_renderer():
    """Collars only carry the hole's name: a small filled square."""
    return QgsSingleSymbolRenderer(
        QgsMarkerSymbol.createSimple(
            {"name": "square", "size": "1.4", "color": HOLE, "outline_color": HOLE}
        )
    )


def unit_fill_renderer(units, field):
    """Unit polygons on the map in the same colours as the geology strip."""
    from qgis.core import QgsFillSymbol

    categories = [
        QgsRendererCategory(
            unit,
            QgsFillSymbol.createSimple(
                {
                    "color": unit_colour(index).name(),
                    "outline_color": "#5a5a5a",
                    "outline_width": "0.15",
                }
            ),
            unit,
        )
        for index, unit in enumerate(sorted(u for u in units if u))
    ]
    return QgsCategorizedSymbolRenderer(field, categories)


def contact_renderer(field):
    """Contacts thin and dark, faults thick in the fault colour."""
    categories = [
        QgsRendererCategory(
            "fault", QgsLineSymbol.createSimple({"line_color": FAULT, "line_width": "0.9"}), "fault"
        ),
        QgsRendererCategory(
            "", QgsLineSymbol.createSimple({"line_color": INK, "line_width": "0.3"}), "contact"
        ),
    ]
    return QgsCategorizedSymbolRenderer(
        f"CASE WHEN \"{field}\" = 'fault' THEN 'fault' ELSE '' END", categories
    )


def form_line_renderer(field):
    """Form lines through contacts drawn firm, the extra ones between them
    fine and dashed: the eye reads the constructed contacts first."""
    contact = QgsLineSymbol.createSimple({"line_color": INK, "line_width": "0.4"})
    extra = QgsLineSymbol.createSimple(
        {"line_color": "#6b6b6b", "line_width": "0.2", "line_style": "dash"}
    )
    categories = [
        QgsRendererCategory("contact", contact, "contact"),
        QgsRendererCategory("form line", extra, "form line"),
    ]
    return QgsCategorizedSymbolRenderer(field, categories)


def axis_renderer():
    """Axial surfaces (and arc radii) as thin dash-dot lines."""
    return QgsSingleSymbolRenderer(
        QgsLineSymbol.createSimple(
            {"line_color": FAULT, "line_width": "0.25", "line_style": "dash dot"}
        )
    )


class RendererStyler(QgsProcessingLayerPostProcessorInterface):
    """Gives a layer Processing loads into the project the renderer made by
    ``make_renderer``."""

    def __init__(self, make_renderer):
        super().__init__()
        self.make_renderer = make_renderer

    def postProcessLayer(self, layer, context, feedback):  # noqa: N802 (QGIS API)
        layer.setRenderer(self.make_renderer())
        layer.triggerRepaint()
