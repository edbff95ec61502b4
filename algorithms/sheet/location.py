"""Maps of where the sections are: the small location map of a sheet and
the overview page's map of every line, with north arrow and scale bar."""

from pathlib import Path

from qgis.core import (
    QgsLayoutItemMap,
    QgsLayoutItemPicture,
    QgsLayoutItemScaleBar,
    QgsLayoutMeasurement,
    QgsLayoutPoint,
)

from ..compat.qgis_compat import UNIT_METERS
from ..core.sheet_scale import nice_step
from .labels import label_line_ends
from .text import label, place, text_format

NORTH_ARROW = Path(__file__).with_name("north_arrow.svg")


def add_map(layout, page, box, layers, extent, crs, letter_size=9.0, caption="Location"):
    """A framed map of ``layers`` in ``box`` (x, y, width, height mm) with a
    caption above, a north arrow in its upper right corner and a scale bar
    under it; the first layer, when it holds the lines' end letters, is
    labelled. Returns the map item."""
    x, y, width, height = box
    label(layout, page, caption, (x, y - 6.5, width, 6), 9, bold=True)
    if layers and layers[0] is not None and layers[0].name() == "Section ends":
        label_line_ends(layers[0], letter_size)
    item = QgsLayoutItemMap(layout)
    if crs is not None:
        item.setCrs(crs)
    item.setLayers([layer for layer in layers if layer is not None])
    item.setKeepLayerSet(True)
    item.setFrameEnabled(True)
    item.setFrameStrokeWidth(QgsLayoutMeasurement(0.3))
    layout.addLayoutItem(item)
    place(item, page, x, y, width, height)
    if extent is not None:
        item.zoomToExtent(extent)
    _north_arrow(layout, page, x + width - 9.5, y + 1.5, height)
    scale_bar(layout, page, item, x, y + height + 1.5, 2, nice_step(0.4 * item.extent().width(), 2))
    return item


def _north_arrow(layout, page, x, y, map_height):
    arrow = QgsLayoutItemPicture(layout)
    arrow.setPicturePath(str(NORTH_ARROW))
    arrow.setFrameEnabled(False)
    arrow.setBackgroundEnabled(False)
    layout.addLayoutItem(arrow)
    size = min(20.0, 0.22 * map_height)
    place(arrow, page, x + 8 - 0.4 * size, y, 0.4 * size, size)


def scale_bar(layout, page, linked_map, x, y, segments, metres_per_segment, height=1.5):
    """A scale bar of ``segments`` boxes under ``linked_map``, at (x, y) mm."""
    bar = QgsLayoutItemScaleBar(layout)
    bar.setStyle("Single Box")
    bar.setLinkedMap(linked_map)
    bar.setUnits(UNIT_METERS)
    bar.setUnitLabel("m")
    bar.setNumberOfSegmentsLeft(0)
    bar.setNumberOfSegments(segments)
    bar.setUnitsPerSegment(metres_per_segment)
    bar.setHeight(height)
    bar.setTextFormat(text_format(6.5))
    layout.addLayoutItem(bar)
    bar.attemptMove(QgsLayoutPoint(x, y), page=page)
    bar.refresh()
    return bar
