"""One section's page of a print layout: section view with true-elevation
axes, end directions, legend, location map, scale bar and caution."""

from dataclasses import dataclass, field
from typing import List

from qgis.core import (
    QgsExpression,
    QgsLayoutItemLabel,
    QgsLayoutItemLegend,
    QgsLayoutItemMap,
    QgsLayoutItemMapGrid,
    QgsLayoutItemScaleBar,
    QgsLayoutMeasurement,
    QgsLayoutPoint,
    QgsLayoutSize,
    QgsPalLayerSettings,
    QgsRectangle,
    QgsTextFormat,
    QgsVectorLayerSimpleLabeling,
)
from qgis.PyQt.QtCore import Qt
from qgis.PyQt.QtGui import QColor, QFont

from ..compat.qgis_compat import (
    LABEL_HORIZONTAL,
    LABEL_OVER_POINT,
    LEGEND_GROUP,
    LEGEND_ITEM,
    LEGEND_TITLE,
    UNIT_METERS,
    set_label_text,
    set_legend_text,
)
from ..core.sheet_scale import nice_step
from ..outputs import fields as F
from ..outputs.styles import GRID, INK

CAUTION = (
    "Interpretation: to be checked by a qualified geologist under local codes and "
    "licensed practice before it guides drilling, excavation or slope decisions."
)
MARGIN = 12.0  # mm
BOTTOM_BAND = 84.0  # mm under the section view: axis title, scale bar, location, legend
LOCATION = (78.0, 56.0)  # mm, the location map
FONT = "Sans Serif"


@dataclass
class SheetSection:
    """What one page shows."""

    label: str
    title: str
    exaggeration: float
    extent: QgsRectangle  # section view, exaggerated units
    start_name: str
    end_name: str
    section_layers: List = field(default_factory=list)  # top to bottom
    legend_layers: List = field(default_factory=list)
    location_layers: List = field(default_factory=list)
    location_extent: QgsRectangle = None
    location_crs: object = None
    label_dips: bool = False


def _font(size, bold=False, italic=False):
    font = QFont(FONT)
    font.setPointSizeF(size)
    font.setBold(bold)
    font.setItalic(italic)
    return font


def _text_format(size, bold=False, italic=False, colour=INK):
    text = QgsTextFormat()
    text.setFont(_font(size, bold, italic))
    text.setSize(size)
    text.setColor(QColor(colour))
    return text


def _place(item, page, x, y, width, height):
    item.attemptResize(QgsLayoutSize(width, height))
    item.attemptMove(QgsLayoutPoint(x, y), page=page)


def _label(
    layout,
    page,
    text,
    x,
    y,
    width,
    height,
    size=9,
    bold=False,
    italic=False,
    align=Qt.AlignmentFlag.AlignLeft,
    rotation=0.0,
):
    item = QgsLayoutItemLabel(layout)
    item.setText(text)
    set_label_text(item, _text_format(size, bold, italic))
    item.setHAlign(align)
    item.setVAlign(Qt.AlignmentFlag.AlignVCenter)
    layout.addLayoutItem(item)
    _place(item, page, x, y, width, height)
    if rotation:
        item.setItemRotation(rotation, adjustPosition=False)
    return item


def fitted_size(extent, width, height):
    """Largest (width, height) in mm with the extent's aspect inside a box,
    so that one metre is as long across as up (the exaggeration is in the
    data, not in the drawing)."""
    aspect = extent.width() / max(extent.height(), 1e-9)
    if width / height > aspect:
        return height * aspect, height
    return width, width / aspect


def section_view_box(page_size, extent):
    """(x, y, width, height) in mm of the section view on its page."""
    width, height = page_size
    box_w = width - 2 * MARGIN - 18
    box_h = height - (MARGIN + 22) - MARGIN - BOTTOM_BAND
    map_w, map_h = fitted_size(extent, box_w, box_h)
    return MARGIN + 14, MARGIN + 22, map_w, map_h


def grid_expression(exaggeration):
    """Grid annotation text: chainage as it is, elevations divided by the
    exaggeration so that the axis reads true elevation."""
    return (
        f"CASE WHEN @grid_axis = 'x' THEN format_number(@grid_number, 0) "
        f"ELSE format_number(@grid_number / {exaggeration!r}, 0) END"
    )


def _add_grid(section_map, section):
    grid = QgsLayoutItemMapGrid("axes", section_map)
    extent = section.extent
    grid.setIntervalX(nice_step(extent.width()))
    grid.setIntervalY(nice_step(extent.height() / section.exaggeration, 6) * section.exaggeration)
    grid.setStyle(QgsLayoutItemMapGrid.GridStyle.Solid)
    symbol = grid.lineSymbol()
    symbol.setColor(QColor(GRID))
    symbol.setWidth(0.12)
    grid.setAnnotationEnabled(True)
    grid.setAnnotationFormat(QgsLayoutItemMapGrid.AnnotationFormat.CustomFormat)
    grid.setAnnotationExpression(grid_expression(section.exaggeration))
    grid.setAnnotationTextFormat(_text_format(7))
    for side, shown in (
        (QgsLayoutItemMapGrid.BorderSide.Left, True),
        (QgsLayoutItemMapGrid.BorderSide.Bottom, True),
        (QgsLayoutItemMapGrid.BorderSide.Right, False),
        (QgsLayoutItemMapGrid.BorderSide.Top, False),
    ):
        grid.setAnnotationDisplay(
            QgsLayoutItemMapGrid.DisplayMode.ShowAll
            if shown
            else QgsLayoutItemMapGrid.DisplayMode.HideAll,
            side,
        )
        grid.setAnnotationPosition(QgsLayoutItemMapGrid.AnnotationPosition.OutsideMapFrame, side)
    grid.setAnnotationDirection(
        QgsLayoutItemMapGrid.AnnotationDirection.Horizontal, QgsLayoutItemMapGrid.BorderSide.Left
    )
    grid.setAnnotationFrameDistance(1.2)
    grid.setFrameStyle(QgsLayoutItemMapGrid.FrameStyle.ExteriorTicks)
    grid.setFrameWidth(1.2)
    section_map.grids().addGrid(grid)
    return grid


def _label_layer(layer, expression, size, placement):
    settings = QgsPalLayerSettings()
    settings.fieldName = expression
    settings.isExpression = True
    text = _text_format(size)
    halo = text.buffer()
    halo.setEnabled(True)
    halo.setSize(0.6)
    halo.setColor(QColor("#ffffff"))
    text.setBuffer(halo)
    settings.setFormat(text)
    settings.placement = placement
    settings.dist = 0.8
    layer.setLabeling(QgsVectorLayerSimpleLabeling(settings))
    layer.setLabelsEnabled(True)


def _layer(section, name):
    return next((layer for layer in section.section_layers if layer.name() == name), None)


def add_page(layout, page, page_size, section):
    """Every item of ``section``'s sheet on page ``page`` of ``layout``;
    returns the scale of the section view."""
    width, height = page_size
    _add_titles(layout, page, width, section)
    map_x, map_y, map_w, map_h = section_view_box(page_size, section.extent)
    section_map = _add_section_view(layout, page, section, (map_x, map_y, map_w, map_h))
    _add_axis_titles(layout, page, section, (map_x, map_y, map_w, map_h))
    _add_scale_bar(layout, page, section, section_map, map_x, map_y + map_h + 14)
    band_y = map_y + map_h + 30
    _add_location(layout, page, section, MARGIN, band_y)
    _add_legend(layout, page, section, MARGIN + LOCATION[0] + 12, band_y - 7)
    _label(
        layout, page, CAUTION, MARGIN, height - MARGIN - 6, width - 2 * MARGIN, 6, 7.5, italic=True
    )
    return section_map.scale()


def _add_titles(layout, page, width, section):
    _label(layout, page, section.title, MARGIN, MARGIN - 4, width - 2 * MARGIN, 9, 15, True)
    _label(
        layout,
        page,
        f"Section {section.label}–{section.label}′ · vertical exaggeration "
        f"×{section.exaggeration:g} · chainage and true elevation in metres",
        MARGIN,
        MARGIN + 5,
        width - 2 * MARGIN,
        6,
        9,
    )


def _add_section_view(layout, page, section, box):
    """The section view map with its labelled layers and true-elevation grid."""
    ticks = _layer(section, "Dip ticks")
    if section.label_dips and ticks is not None:
        dip = QgsExpression.quotedColumnRef(F.APPARENT_DIP)
        _label_layer(ticks, f"format_number({dip}, 0) || '°'", 6.5, LABEL_HORIZONTAL)
    collars = _layer(section, "Collars")
    if collars is not None:
        _label_layer(collars, QgsExpression.quotedColumnRef(F.HOLE), 7, LABEL_OVER_POINT)
    section_map = QgsLayoutItemMap(layout)
    section_map.setCrs(section.section_layers[0].crs() if section.section_layers else None)
    section_map.setLayers(section.section_layers)
    section_map.setKeepLayerSet(True)
    section_map.setFrameEnabled(True)
    layout.addLayoutItem(section_map)
    _place(section_map, page, *box)
    section_map.setExtent(section.extent)
    _add_grid(section_map, section)
    return section_map


def _add_axis_titles(layout, page, section, box):
    """End names above the view, axis titles beside it."""
    map_x, map_y, map_w, map_h = box
    _label(
        layout, page, f"{section.label}   {section.start_name}", map_x, map_y - 8, 40, 6, 11, True
    )
    _label(
        layout,
        page,
        f"{section.end_name}   {section.label}′",
        map_x + map_w - 40,
        map_y - 8,
        40,
        6,
        11,
        True,
        align=Qt.AlignmentFlag.AlignRight,
    )
    _label(
        layout,
        page,
        "Chainage (m)",
        map_x,
        map_y + map_h + 7,
        map_w,
        5,
        8,
        align=Qt.AlignmentFlag.AlignHCenter,
    )
    _label(
        layout,
        page,
        "Elevation (m)",
        map_x - 14,
        map_y + map_h / 2 + 20,
        40,
        5,
        8,
        align=Qt.AlignmentFlag.AlignHCenter,
        rotation=-90.0,
    )


def _add_scale_bar(layout, page, section, section_map, x, y):
    scale_bar = QgsLayoutItemScaleBar(layout)
    scale_bar.setStyle("Single Box")
    scale_bar.setLinkedMap(section_map)
    scale_bar.setUnits(UNIT_METERS)
    scale_bar.setUnitLabel("m")
    scale_bar.setNumberOfSegments(2)
    scale_bar.setNumberOfSegmentsLeft(0)
    scale_bar.setUnitsPerSegment(nice_step(section.extent.width(), 10))
    scale_bar.setHeight(2.0)
    scale_bar.setTextFormat(_text_format(7))
    layout.addLayoutItem(scale_bar)
    scale_bar.attemptMove(QgsLayoutPoint(x, y), page=page)
    scale_bar.refresh()


def _add_location(layout, page, section, x, y):
    _label(layout, page, "Location", x, y - 7, LOCATION[0], 6, 9, True)
    location = QgsLayoutItemMap(layout)
    if section.location_crs is not None:
        location.setCrs(section.location_crs)
    location.setLayers(section.location_layers)
    location.setKeepLayerSet(True)
    location.setFrameEnabled(True)
    location.setFrameStrokeWidth(QgsLayoutMeasurement(0.3))
    layout.addLayoutItem(location)
    _place(location, page, x, y, *LOCATION)
    if section.location_extent is not None:
        location.zoomToExtent(section.location_extent)


def _add_legend(layout, page, section, x, y):
    legend = QgsLayoutItemLegend(layout)
    legend.setTitle("Legend")
    legend.setAutoUpdateModel(False)
    root = legend.model().rootGroup()
    root.removeAllChildren()
    for layer in section.legend_layers:
        root.addLayer(layer)
    set_legend_text(legend, LEGEND_TITLE, _text_format(9, True))
    set_legend_text(legend, LEGEND_GROUP, _text_format(8, True))
    set_legend_text(legend, LEGEND_ITEM, _text_format(7.5))
    legend.setSymbolWidth(9)
    legend.setColumnCount(3)
    legend.setSplitLayer(True)
    layout.addLayoutItem(legend)
    legend.attemptMove(QgsLayoutPoint(x, y), page=page)
    legend.adjustBoxSize()
