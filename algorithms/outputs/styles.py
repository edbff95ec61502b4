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


# Outputs on the map and in the section viewer -----------------------------

SKIPPED_COLOUR = "#c0392b"
CONNECTOR = "#6b6b6b"


def _single_line(colour, width, style="solid"):
    return QgsSingleSymbolRenderer(
        QgsLineSymbol.createSimple(
            {"line_color": colour, "line_width": str(width), "line_style": style}
        )
    )


def profile_point_renderer():
    """Profile samples on the map: small dots that do not hide the map."""
    return QgsSingleSymbolRenderer(
        QgsMarkerSymbol.createSimple(
            {"name": "circle", "size": "0.9", "color": "#3d3d3d", "outline_style": "no"}
        )
    )


def profile_line_renderer():
    return _single_line(INK, 0.6)


def connector_renderer():
    """From an attitude's own place to where it landed on the section."""
    return _single_line(CONNECTOR, 0.25, "dash")


def trace_renderer():
    return _single_line(HOLE, 0.5)


def skipped_renderer(geometry_kind):
    """What could not be used: red, dashed or crossed, by geometry kind
    ("point", "line" or "polygon")."""
    if geometry_kind == "point":
        return QgsSingleSymbolRenderer(
            QgsMarkerSymbol.createSimple(
                {
                    "name": "cross2",
                    "size": "2.4",
                    "color": SKIPPED_COLOUR,
                    "outline_color": SKIPPED_COLOUR,
                    "outline_width": "0.4",
                }
            )
        )
    if geometry_kind == "line":
        return _single_line(SKIPPED_COLOUR, 0.5, "dash")
    from qgis.core import QgsFillSymbol

    return QgsSingleSymbolRenderer(
        QgsFillSymbol.createSimple(
            {"style": "no", "outline_color": SKIPPED_COLOUR, "outline_style": "dash"}
        )
    )


def code_interval_renderer(codes, field):
    """Logged intervals beside a hole, coloured like the units they name."""
    categories = [
        QgsRendererCategory(
            code,
            QgsLineSymbol.createSimple(
                {"line_color": unit_colour(index).name(), "line_width": "1.6"}
            ),
            code,
        )
        for index, code in enumerate(sorted(c for c in codes if c))
    ]
    categories.append(
        QgsRendererCategory(
            "", QgsLineSymbol.createSimple({"line_color": "#bdbdbd", "line_width": "1.6"}), "other"
        )
    )
    return QgsCategorizedSymbolRenderer(field, categories)


def _line_marker(size, angle=0.0, offset_mm=0.0, width=0.45):
    """A straight stroke (the simple marker "line"), ``size`` mm long, at
    ``angle`` degrees clockwise from up, its centre moved ``offset_mm`` along
    its own direction."""
    from qgis.core import QgsSimpleMarkerSymbolLayer

    layer = QgsSimpleMarkerSymbolLayer.create(
        {
            "name": "line",
            "size": str(size),
            "angle": str(angle),
            "color": INK,
            "outline_color": INK,
            "outline_width": str(width),
            "offset": f"0,{-offset_mm}",
        }
    )
    return layer


def _attitude_symbol(parts):
    symbol = QgsMarkerSymbol()
    symbol.deleteSymbolLayer(0)
    for part in parts:
        symbol.appendSymbolLayer(part)
    return symbol


def strike_dip_renderer(strike_field, dip_field):
    """The strike-and-dip symbol as drawn here: a strike stroke 4.2 mm long
    along the strike, a dip stroke 1.5 mm long from its middle toward the dip
    direction (right-hand rule: strike + 90°); horizontal beds a ring with a
    cross, vertical beds the strike stroke with a stroke to either side.
    Rotated with the ``strike`` field."""
    from qgis.core import QgsProperty, QgsRuleBasedRenderer, QgsSimpleMarkerSymbolLayer

    def rotated(symbol):
        symbol.setDataDefinedAngle(QgsProperty.fromField(strike_field))
        return symbol

    inclined = rotated(
        _attitude_symbol([_line_marker(4.2), _line_marker(1.5, angle=90.0, offset_mm=0.75)])
    )
    vertical = rotated(
        _attitude_symbol(
            [
                _line_marker(4.2),
                _line_marker(1.2, angle=90.0, offset_mm=0.6),
                _line_marker(1.2, angle=270.0, offset_mm=0.6),
            ]
        )
    )
    ring = QgsSimpleMarkerSymbolLayer.create(
        {
            "name": "circle",
            "size": "2.6",
            "color": "0,0,0,0",
            "outline_color": INK,
            "outline_width": "0.35",
        }
    )
    horizontal = _attitude_symbol([ring, _line_marker(3.6), _line_marker(3.6, angle=90.0)])
    root = QgsRuleBasedRenderer.Rule(None)
    for symbol, expression, label in (
        (horizontal, f'"{dip_field}" = 0', "horizontal"),
        (vertical, f'"{dip_field}" = 90', "vertical"),
        (inclined, f'"{dip_field}" > 0 AND "{dip_field}" < 90', "inclined (dip beside)"),
    ):
        root.appendChild(QgsRuleBasedRenderer.Rule(symbol, 0, 0, expression, label))
    return QgsRuleBasedRenderer(root)


def dip_labels(dip_field):
    """The dip written beside the symbol, small, on a white halo."""
    from qgis.core import (
        QgsPalLayerSettings,
        QgsTextBufferSettings,
        QgsTextFormat,
        QgsVectorLayerSimpleLabeling,
    )
    from qgis.PyQt.QtGui import QFont

    from ..compat.qgis_compat import LABEL_AROUND_POINT

    text = QgsTextFormat()
    text.setFont(QFont("Sans Serif"))
    text.setSize(7.0)
    text.setColor(QColor(INK))
    halo = QgsTextBufferSettings()
    halo.setEnabled(True)
    halo.setSize(0.6)
    halo.setColor(QColor("#ffffff"))
    text.setBuffer(halo)
    settings = QgsPalLayerSettings()
    settings.fieldName = f'CASE WHEN "{dip_field}" > 0 THEN format_number("{dip_field}", 0) END'
    settings.isExpression = True
    settings.setFormat(text)
    settings.placement = LABEL_AROUND_POINT
    settings.dist = 1.2
    return QgsVectorLayerSimpleLabeling(settings)


SUGGESTED = "#1f5f8b"


def suggested_line_renderer():
    """A section line the structure suggests: bold, dashed, in blue."""
    return _single_line(SUGGESTED, 0.8, "dash")


def misfit_renderer(misfit_field):
    """Existing section lines by their misfit to the structure: within 20°
    dark green, to 45° amber, beyond red (common practice: a section within
    about 20° of the dip direction shows apparent dips close to true)."""
    from qgis.core import QgsRuleBasedRenderer

    root = QgsRuleBasedRenderer.Rule(None)
    for colour, expression, label in (
        ("#2e7d32", f'"{misfit_field}" <= 20', "within 20° of the best azimuth"),
        ("#d9a441", f'"{misfit_field}" > 20 AND "{misfit_field}" <= 45', "20–45° off"),
        (SKIPPED_COLOUR, f'"{misfit_field}" > 45', "more than 45° off"),
    ):
        symbol = QgsLineSymbol.createSimple({"line_color": colour, "line_width": "0.9"})
        root.appendChild(QgsRuleBasedRenderer.Rule(symbol, 0, 0, expression, label))
    return QgsRuleBasedRenderer(root)


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


def fence_face_symbol():
    """Faces of a section stood up in 3-D: light grey, outlined in ink."""
    from qgis.core import QgsFillSymbol

    return QgsFillSymbol.createSimple(
        {"color": "#d9d9d9", "outline_color": INK, "outline_width": "0.2"}
    )
