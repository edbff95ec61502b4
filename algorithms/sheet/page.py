"""The pages of a section sheet.

A section page: the section view across the top at its standard scale,
with chainage below and true elevation on both sides, the ends lettered
with their compass directions; under it the scale line; along the foot
the location map, the legend and the title block. An overview page: every
section line on one map, a list of the sections, the title block.
"""

from qgis.core import (
    QgsLayoutItemLegend,
    QgsLayoutItemMap,
    QgsLayoutItemMapGrid,
    QgsLayoutPoint,
    QgsLayoutSize,
    QgsRectangle,
)
from qgis.PyQt.QtCore import Qt
from qgis.PyQt.QtGui import QColor

from ..compat.qgis_compat import (
    LEGEND_GROUP,
    LEGEND_ITEM,
    LEGEND_TITLE,
    set_legend_text,
)
from ..core.sheet_scale import format_scale, nice_step
from ..outputs.styles import GRID
from .location import add_map, scale_bar
from .text import label, text_format
from .title_block import add_title_block

MARGIN = 8.0  # mm round the page
AXIS_ROOM = 14.0  # mm each side of the view for elevation labels
HEAD = 12.0  # mm above the view: the end letters and directions
FOOT = 20.0  # mm under the view: chainage labels, axis title, scale line
TITLE_BLOCK = (0.3, 105.0)  # width: share of the page's width, at least so many mm
GAP = 6.0  # mm between the items of the bottom band


def band_height(page_size):
    """Height (mm) of the bottom band: location map, legend, title block."""
    return max(66.0, 0.27 * page_size[1])


def title_block_width(page_width):
    share, least = TITLE_BLOCK
    return max(share * page_width, least)


def view_box(page_size):
    """(width, height) in mm the section view may take on its page."""
    width, height = page_size
    return (
        width - 2 * MARGIN - 2 * AXIS_ROOM,
        height - 2 * MARGIN - HEAD - FOOT - band_height(page_size) - GAP,
    )


def grid_expression(exaggeration):
    """Grid annotation text: chainage as it is, elevations divided by the
    exaggeration so that the axis reads true elevation."""
    return (
        f"CASE WHEN @grid_axis = 'x' THEN format_number(@grid_number, 0) "
        f"ELSE format_number(@grid_number / {exaggeration!r}, 0) END"
    )


def scale_statement(scale, exaggeration):
    return (
        f"Horizontal {format_scale(scale)} · vertical {format_scale(scale / exaggeration)} · "
        f"vertical exaggeration ×{exaggeration:g}"
    )


def _add_grid(section_map, section):
    grid = QgsLayoutItemMapGrid("axes", section_map)
    extent = section.extent
    grid.setIntervalX(nice_step(extent.width()))
    true_height = extent.height() / section.exaggeration
    grid.setIntervalY(nice_step(true_height, 6) * section.exaggeration)
    grid.setStyle(QgsLayoutItemMapGrid.GridStyle.Solid)
    symbol = grid.lineSymbol()
    symbol.setColor(QColor(GRID))
    symbol.setWidth(0.12)
    grid.setAnnotationEnabled(True)
    grid.setAnnotationFormat(QgsLayoutItemMapGrid.AnnotationFormat.CustomFormat)
    grid.setAnnotationExpression(grid_expression(section.exaggeration))
    grid.setAnnotationTextFormat(text_format(7))
    sides = QgsLayoutItemMapGrid.BorderSide
    for side, shown in (
        (sides.Left, True),
        (sides.Right, True),
        (sides.Bottom, True),
        (sides.Top, False),
    ):
        grid.setAnnotationDisplay(
            QgsLayoutItemMapGrid.DisplayMode.ShowAll
            if shown
            else QgsLayoutItemMapGrid.DisplayMode.HideAll,
            side,
        )
        grid.setAnnotationPosition(QgsLayoutItemMapGrid.AnnotationPosition.OutsideMapFrame, side)
    for side in (sides.Left, sides.Right):
        grid.setAnnotationDirection(QgsLayoutItemMapGrid.AnnotationDirection.Horizontal, side)
    grid.setAnnotationFrameDistance(1.2)
    grid.setFrameStyle(QgsLayoutItemMapGrid.FrameStyle.ExteriorTicks)
    grid.setFrameWidth(1.2)
    section_map.grids().addGrid(grid)


def section_frame_position(page_size, section):
    """(x, y) in mm of the section view's upper left corner: centred across
    the page, and down the space left above the bottom band."""
    box_w, box_h = view_box(page_size)
    width, height = section.frame
    return (
        MARGIN + AXIS_ROOM + (box_w - width) / 2,
        MARGIN + HEAD + (box_h - height) / 2,
    )


def add_section_page(layout, page, page_size, section, block, map_crs):
    """Every item of ``section``'s sheet on page ``page``; returns the
    section view's map item."""
    x, y = section_frame_position(page_size, section)
    width, height = section.frame
    section_map = QgsLayoutItemMap(layout)
    section_map.setCrs(section.section_layers[0].crs())
    section_map.setLayers(section.section_layers)
    section_map.setKeepLayerSet(True)
    section_map.setFrameEnabled(True)
    layout.addLayoutItem(section_map)
    section_map.attemptResize(QgsLayoutSize(width, height))
    section_map.attemptMove(QgsLayoutPoint(x, y), page=page)
    section_map.setExtent(section.extent)
    section_map.setScale(section.scale)
    _add_grid(section_map, section)
    _add_ends(layout, page, section, x, y, width)
    label(
        layout,
        page,
        "Chainage (m)",
        (x, y + height + 5.5, width, 4.5),
        7.5,
        align=Qt.AlignmentFlag.AlignHCenter,
    )
    # A rotated label turns about its upper left corner; both sit out in
    # the margin, clear of the longest elevation numbers.
    for corner, rotation in (
        ((x - AXIS_ROOM - 2.0, y + height / 2 + 15.0), -90.0),
        ((x + width + AXIS_ROOM + 2.0, y + height / 2 - 15.0), 90.0),
    ):
        label(
            layout,
            page,
            "Elevation (m)",
            (*corner, 30, 4),
            7.5,
            align=Qt.AlignmentFlag.AlignHCenter,
            rotation=rotation,
        )
    _section_scale_line(layout, page, section_map, section, x, y + height + 11.0)
    _add_band(layout, page, page_size, section, block, map_crs)
    return section_map


def _add_ends(layout, page, section, x, y, width):
    """The end letters with the compass point and azimuth each end faces."""
    for text, direction, anchor, align in (
        (section.label, f"{section.start_name} {section.start_azimuth:03.0f}°", x, "left"),
        (
            f"{section.label}′",
            f"{section.end_name} {section.end_azimuth:03.0f}°",
            x + width,
            "right",
        ),
    ):
        if align == "left":
            label(layout, page, text, (anchor, y - HEAD + 1, 14, 8), 14, bold=True)
            label(layout, page, direction, (anchor + 12, y - HEAD + 2.5, 40, 6), 8.5)
        else:
            label(
                layout,
                page,
                text,
                (anchor - 14, y - HEAD + 1, 14, 8),
                14,
                bold=True,
                align=Qt.AlignmentFlag.AlignRight,
            )
            label(
                layout,
                page,
                direction,
                (anchor - 52, y - HEAD + 2.5, 40, 6),
                8.5,
                align=Qt.AlignmentFlag.AlignRight,
            )


def _section_scale_line(layout, page, section_map, section, x, y):
    bar = scale_bar(
        layout, page, section_map, x, y, 4, nice_step(section.extent.width() / 4.0, 4), 1.6
    )
    label(
        layout,
        page,
        scale_statement(section.scale, section.exaggeration),
        (x + bar.rect().width() + 6, y, 150, 7),
        8,
        bold=True,
    )


def _band_boxes(page_size):
    """(location map, legend, title block) boxes of the bottom band."""
    width, height = page_size
    band = band_height(page_size)
    top = height - MARGIN - band
    block_w = title_block_width(width)
    map_w = 1.15 * (band - 12)
    location = (MARGIN, top + 7, map_w, band - 16)
    block = (width - MARGIN - block_w, top, block_w, band)
    legend_x = MARGIN + map_w + GAP
    legend = (legend_x, top, width - MARGIN - block_w - GAP - legend_x, band)
    return location, legend, block


def _add_band(layout, page, page_size, section, block, map_crs):
    location, legend, title = _band_boxes(page_size)
    add_map(layout, page, location, section.location_layers, section.location_extent, map_crs)
    _add_legend(layout, page, section.legend_layers, legend)
    add_title_block(layout, page, title, block)


def _add_legend(layout, page, layers, box):
    """Legend with each layer's entries kept together in one column."""
    x, y, width, height = box
    legend = QgsLayoutItemLegend(layout)
    legend.setTitle("Legend")
    legend.setAutoUpdateModel(False)
    root = legend.model().rootGroup()
    root.removeAllChildren()
    for layer in layers:
        # The name as drawn now, whatever the layer is renamed to later.
        root.addLayer(layer).setCustomProperty("legend/title-label", layer.name())
    set_legend_text(legend, LEGEND_TITLE, text_format(9, True))
    set_legend_text(legend, LEGEND_GROUP, text_format(7.5, True))
    set_legend_text(legend, LEGEND_ITEM, text_format(7))
    legend.setSymbolWidth(8)
    legend.setSymbolHeight(3.2)
    legend.setSplitLayer(False)
    legend.setEqualColumnWidth(False)
    legend.setColumnCount(max(2, int(width // 30)))
    legend.setColumnSpace(4)
    legend.setFrameEnabled(False)
    legend.setResizeToContents(True)
    layout.addLayoutItem(legend)
    legend.attemptMove(QgsLayoutPoint(x, y), page=page)
    legend.adjustBoxSize()
    return legend


def add_overview_page(layout, page, page_size, layers, extent, crs, block, listing):
    """Every section line on one map, the list of sections, the title block."""
    width, height = page_size
    block_w = title_block_width(width)
    band = band_height(page_size)
    map_box = (MARGIN, MARGIN + 8, width - 2 * MARGIN - block_w - GAP, height - 2 * MARGIN - 16)
    add_map(layout, page, map_box, layers, _padded(extent), crs, 11.0, "Section lines")
    list_top = MARGIN + 8
    label(
        layout,
        page,
        "Sections",
        (width - MARGIN - block_w, list_top - 6.5, block_w, 6),
        9,
        bold=True,
    )
    label(
        layout,
        page,
        "\n".join(listing),
        (width - MARGIN - block_w, list_top, block_w, height - 2 * MARGIN - band - 16),
        8,
        valign=Qt.AlignmentFlag.AlignTop,
    )
    add_title_block(
        layout, page, (width - MARGIN - block_w, height - MARGIN - band, block_w, band), block
    )


def _padded(box):
    grow = 0.08 * max(box.width(), box.height())
    return QgsRectangle(
        box.xMinimum() - grow, box.yMinimum() - grow, box.xMaximum() + grow, box.yMaximum() + grow
    )
