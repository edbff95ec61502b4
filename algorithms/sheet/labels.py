"""Labels of the section view, placed by QGIS's label engine: dips beside
their ticks, hole names at the collars, domain captions in their panels —
none on the geology strip or the holes (they are obstacles) or on each
other (the engine never places two labels over one another)."""

from qgis.core import QgsPalLayerSettings, QgsVectorLayerSimpleLabeling
from qgis.PyQt.QtGui import QColor

from ..compat.qgis_compat import (
    LABEL_AROUND_POINT,
    LABEL_OVER_POINT,
    OBSTACLE_WHOLE_POLYGON,
)
from ..outputs import fields as F
from .text import text_format

MAX_OBSTACLE_FACTOR = 10.0  # the strongest avoidance QGIS's label engine offers


def _settings(expression, size, placement, distance, bold=False):
    settings = QgsPalLayerSettings()
    settings.fieldName = expression
    settings.isExpression = True
    text = text_format(size, bold)
    halo = text.buffer()
    halo.setEnabled(True)
    halo.setSize(0.7)
    halo.setColor(QColor("#ffffff"))
    text.setBuffer(halo)
    settings.setFormat(text)
    settings.placement = placement
    settings.dist = distance
    settings.priority = 5
    return settings


def _apply(layer, settings):
    layer.setLabeling(QgsVectorLayerSimpleLabeling(settings))
    layer.setLabelsEnabled(True)


def label_dips(anchors, only_representatives, clearance_mm):
    """Apparent dip beside each tick's centre, clear of the strip (only the
    representatives when the layer says which they are)."""
    text = f"format_number(\"{F.APPARENT_DIP}\", 0) || '°'"
    if only_representatives:
        text = f'CASE WHEN "{F.REPRESENT}" = 1 THEN {text} END'
    _apply(anchors, _settings(text, 6.5, LABEL_AROUND_POINT, clearance_mm))


def label_collars(collars, clearance_mm):
    """Hole names around their collars, clear of the strip."""
    settings = _settings(f'"{F.HOLE}"', 7, LABEL_AROUND_POINT, clearance_mm, bold=True)
    settings.priority = 8
    _apply(collars, settings)


def label_domains(bar, expression):
    settings = _settings(expression, 6.5, LABEL_OVER_POINT, 0.0)
    settings.priority = 10
    _apply(bar, settings)


def keep_labels_off(layer, whole_polygons=False):
    """The layer's features push every label away and carry none."""
    settings = QgsPalLayerSettings()
    settings.drawLabels = False
    settings.fieldName = "''"
    settings.isExpression = True
    obstacle = settings.obstacleSettings()
    obstacle.setIsObstacle(True)
    obstacle.setFactor(MAX_OBSTACLE_FACTOR)
    if whole_polygons:
        obstacle.setType(OBSTACLE_WHOLE_POLYGON)
    _apply(layer, settings)


def label_line_ends(ends, size):
    """A and A′ beside the ends of the section lines on the map."""
    settings = _settings(f'"{F.END_LETTER}"', size, LABEL_AROUND_POINT, 0.8, bold=True)
    settings.priority = 10
    _apply(ends, settings)
