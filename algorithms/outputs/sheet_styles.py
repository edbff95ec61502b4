"""Symbols of the section sheet beyond the ground and the strip: logged
borehole intervals, dip domains, representative ticks, the section's ends
on the map (form lines and axial surfaces draw as everywhere, from
``styles``).

Black and grey carry the geometry; colour is kept for the units (the same
colours on the strip, in the holes and on the map), so the sheet still
reads on a monochrome print.
"""

from qgis.core import (
    QgsCategorizedSymbolRenderer,
    QgsFillSymbol,
    QgsLineSymbol,
    QgsMarkerSymbol,
    QgsNullSymbolRenderer,
    QgsProperty,
    QgsRendererCategory,
    QgsRuleBasedRenderer,
    QgsSingleSymbolRenderer,
)

from ..compat.qgis_compat import FILL_COLOUR_PROPERTY
from . import fields as F
from .styles import HOLE, INK, NO_UNIT_COLOUR, unit_colour

MINOR_TICK = "#a3a3a3"
DOMAIN_FILLS = ("#f1ece1", "#ddd3c0")
HOLE_BAND_MM = 1.7


def palette(units, extra=()):
    """{name: colour}: units in alphabetical order take the unit colours
    (as on the strip and the map), codes that are not units follow them."""
    names = sorted({u for u in units if u})
    names += sorted({c for c in extra if c and c not in names})
    return {name: unit_colour(index) for index, name in enumerate(names)}


def hole_interval_renderer(colours, field):
    """Logged intervals as a band of the code's colour, thinly outlined."""
    categories = [
        QgsRendererCategory(code, _hole_band(colour.name()), code)
        for code, colour in colours.items()
    ]
    categories.append(QgsRendererCategory("", _hole_band(NO_UNIT_COLOUR), "(other code)"))
    return QgsCategorizedSymbolRenderer(field, categories)


def _hole_band(colour):
    symbol = QgsLineSymbol.createSimple(
        {"line_color": HOLE, "line_width": str(HOLE_BAND_MM + 0.3), "capstyle": "flat"}
    )
    inner = QgsLineSymbol.createSimple(
        {"line_color": colour, "line_width": str(HOLE_BAND_MM), "capstyle": "flat"}
    )
    symbol.appendSymbolLayer(inner.symbolLayer(0).clone())
    return symbol


def hole_trace_renderer():
    """The hole's own line: thin, so that its logged intervals show round it."""
    return QgsSingleSymbolRenderer(
        QgsLineSymbol.createSimple({"line_color": HOLE, "line_width": "0.3"})
    )


def representative_tick_renderer(field):
    """Representative attitudes bold, the others thin and grey."""
    root = QgsRuleBasedRenderer.Rule(None)
    for expression, colour, width, label in (
        (f'"{field}" = 1', INK, "0.7", "representative of its dip domain"),
        (f'coalesce("{field}", 0) <> 1', MINOR_TICK, "0.3", "other attitude"),
    ):
        symbol = QgsLineSymbol.createSimple(
            {"line_color": colour, "line_width": width, "capstyle": "round"}
        )
        root.appendChild(QgsRuleBasedRenderer.Rule(symbol, 0, 0, expression, label))
    return QgsRuleBasedRenderer(root)


def domain_bar_renderer():
    """Dip domains as alternating light panels along the top of the view."""
    symbol = QgsFillSymbol.createSimple(
        {"color": DOMAIN_FILLS[0], "outline_color": "#7d7463", "outline_width": "0.2"}
    )
    symbol.symbolLayer(0).setDataDefinedProperty(
        FILL_COLOUR_PROPERTY,
        QgsProperty.fromExpression(
            f"CASE WHEN \"{F.DOMAIN}\" % 2 = 0 THEN '{DOMAIN_FILLS[1]}' "
            f"ELSE '{DOMAIN_FILLS[0]}' END"
        ),
    )
    return QgsSingleSymbolRenderer(symbol)


def hidden_renderer():
    """Drawn as nothing: for layers that only keep labels away."""
    return QgsNullSymbolRenderer()


def end_point_renderer():
    return QgsSingleSymbolRenderer(
        QgsMarkerSymbol.createSimple(
            {"name": "circle", "size": "1.6", "color": INK, "outline_color": "#ffffff"}
        )
    )
