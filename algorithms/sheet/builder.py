"""From section lines and section-view layers to what each sheet shows:
the per-section layers, styled and labelled, the standard scale and the
view's extent on the page."""

from dataclasses import dataclass, field
from typing import List

from qgis.core import QgsRectangle

from ..compat.null import plain
from ..core.sheet_scale import end_azimuths, end_names, standard_scale
from ..outputs import fields as F
from ..outputs import sheet_styles, styles
from ..outputs.styles import STRIP_WIDTH_MM
from .labels import keep_labels_off, label_collars, label_dips, label_domains
from .layers import (
    collar_points,
    copy_section,
    crossings_in_section,
    domain_bar,
    keep_out_zone,
    line_ends,
    line_on_map,
    section_filter,
    tick_anchors,
)

# Room inside the view frame, in mm on paper: beside the data, above it
# (hole names, dip labels, the domain bar) and below it.
SIDE_ROOM = 2.0
HEADROOM = 9.0
DOMAIN_BAR = (5.0, 1.0)  # mm: panel height, gap under the frame's top
DOMAIN_MIN_WIDTH = 14.0  # mm: room for a domain's caption
FOOTROOM = 4.0
LABEL_CLEARANCE = 0.9  # mm between a label and the strip's edge
# Half width (mm) of the band labels keep off: the strip, its outline, the clearance.
KEEP_OUT_MM = STRIP_WIDTH_MM / 2 + 0.2 + LABEL_CLEARANCE

# Parameter names of the section-view inputs, and their layer names on the sheet.
PROFILE = "PROFILE"
INTERVALS = "INTERVALS"
TICKS = "TICKS"
CROSSINGS = "CROSSINGS"
BOREHOLES = "BOREHOLES"
BOREHOLE_INTERVALS = "BOREHOLE_INTERVALS"
FORM_LINES = "FORM_LINES"
AXES = "AXES"
DOMAINS = "DOMAINS"

# Domain number, mean apparent dip, and an arrow toward the side it dips to
# (+ toward the section's end, drawn on the right).
DOMAIN_CAPTION = (
    f"'D' || \"{F.DOMAIN}\" || '  ' || format_number(abs(\"{F.MEAN_DIP}\"), 0) || '°' || "
    f"CASE WHEN \"{F.MEAN_DIP}\" > 0 THEN ' →' "
    f"WHEN \"{F.MEAN_DIP}\" < 0 THEN ' ←' ELSE '' END"
)
# Form lines through a contact are 'contact', all others 'form line'.
FORM_LINE_KIND = f"CASE WHEN \"{F.KIND}\" = 'contact' THEN 'contact' ELSE 'form line' END"
NO_PROFILE = "no profile for this section in PROFILE"
DOES_NOT_FIT = "does not fit the page at the scale asked for"


@dataclass
class SheetSection:
    """What one page shows."""

    label: str
    exaggeration: float
    scale: float  # N of the horizontal scale 1:N
    extent: QgsRectangle  # section view, exaggerated units
    frame: tuple  # (width, height) of the view on paper, mm
    start_name: str
    end_name: str
    start_azimuth: float
    end_azimuth: float
    length: float
    section_layers: List = field(default_factory=list)  # top to bottom
    legend_layers: List = field(default_factory=list)
    location_layers: List = field(default_factory=list)
    location_extent: QgsRectangle = None


def unit_names(layer, field_name):
    """The distinct non-empty values of a field, sorted (none: no layer or field)."""
    if layer is None or layer.fields().lookupField(field_name) < 0:
        return []
    values = layer.uniqueValues(layer.fields().lookupField(field_name))
    return sorted({str(v) for v in map(plain, values) if v is not None and str(v) != ""})


class SheetBuilder:
    """Turns section line parts and the section-view layers into
    SheetSections; used by the algorithm and by scripts that build a
    project. ``inputs`` maps parameter names (PROFILE, TICKS …) to layers."""

    def __init__(self, inputs, map_layers, lines_crs, view_box, scale=0.0, label_dips=True):
        self.inputs = inputs
        self.map_layers = list(map_layers)
        self.lines_crs = lines_crs
        self.view_box = view_box  # (width, height) mm the view may take
        self.asked_scale = scale
        self.label_dips = label_dips
        strip_units = unit_names(inputs.get(INTERVALS), F.UNIT)
        self.strip_units = strip_units
        self.colours = sheet_styles.palette(
            strip_units, unit_names(inputs.get(BOREHOLE_INTERVALS), F.CODE)
        )
        ticks = inputs.get(TICKS)
        self.has_representatives = (
            ticks is not None and ticks.fields().lookupField(F.REPRESENT) >= 0
        )
        self.reason = ""

    def section(self, part, exaggeration):
        """The SheetSection of a section line part, or None (``reason`` says why)."""
        profile = self.inputs[PROFILE]
        ground = (
            next(profile.getFeatures(section_filter(part.label)), None)
            if part.coords is not None
            else None
        )
        if ground is None:
            self.reason = part.reason or NO_PROFILE
            return None
        layers = self._section_layers(part.label, exaggeration)
        data = _data_box([layer for layer in layers.values() if layer is not None], ground)
        placement = self._placement(data, part, exaggeration)
        if placement is None:
            self.reason = DOES_NOT_FIT
            return None
        scale, extent, frame = placement
        self._add_view_aids(layers, part.label, scale, extent)
        start, end = end_names(part.coords)
        start_az, end_az = end_azimuths(part.coords)
        order = (
            "dip_labels",
            "domains",
            "ticks",
            "crossings",
            "collars",
            "holes",
            "hole_intervals",
            "strip",
            "ground",
            "axes",
            "form_lines",
            "keep_out",
        )
        present = [layers[name] for name in order if layers.get(name) is not None]
        legend = [
            layers[name]
            for name in order
            if layers.get(name) is not None
            and name not in ("dip_labels", "collars", "keep_out")
            and layers[name].featureCount()
        ]
        line = line_on_map(
            part.geometry,
            self.lines_crs,
            f"Section line {part.label}",
            styles.section_line_renderer(),
        )
        return SheetSection(
            label=part.label,
            exaggeration=exaggeration,
            scale=scale,
            extent=extent,
            frame=frame,
            start_name=start,
            end_name=end,
            start_azimuth=start_az,
            end_azimuth=end_az,
            length=float(ground[F.LENGTH])
            if ground.fields().lookupField(F.LENGTH) >= 0
            else data.width(),
            section_layers=present,
            legend_layers=legend,
            location_layers=[self.ends([part]), line] + self.map_layers,
            location_extent=around(part.geometry.boundingBox()),
        )

    def ends(self, parts):
        return line_ends(parts, self.lines_crs, "Section ends", sheet_styles.end_point_renderer())

    def _section_layers(self, label, exaggeration):
        inputs = self.inputs
        holes = copy_section(
            inputs.get(BOREHOLES),
            label,
            "Boreholes",
            "LineString",
            sheet_styles.hole_trace_renderer(),
        )
        ticks_renderer = (
            sheet_styles.representative_tick_renderer(F.REPRESENT)
            if self.has_representatives
            else styles.tick_renderer()
        )
        return {
            "ticks": copy_section(
                inputs.get(TICKS), label, "Dip ticks", "LineString", ticks_renderer
            ),
            "crossings": crossings_in_section(
                inputs.get(CROSSINGS),
                label,
                exaggeration,
                "Contacts and boundaries",
                styles.crossing_renderer(),
            ),
            "collars": collar_points(holes, "Collars", styles.collar_renderer()),
            "holes": holes,
            "hole_intervals": copy_section(
                inputs.get(BOREHOLE_INTERVALS),
                label,
                "Logged intervals",
                "LineString",
                sheet_styles.hole_interval_renderer(self.colours, F.CODE),
            ),
            "strip": copy_section(
                inputs.get(INTERVALS),
                label,
                "Geology strip",
                "LineString",
                styles.unit_strip_renderer(self.strip_units, F.UNIT),
            ),
            "ground": copy_section(
                inputs[PROFILE],
                label,
                "Ground surface",
                "MultiLineString",
                styles.profile_renderer(),
            ),
            "axes": copy_section(
                inputs.get(AXES),
                label,
                "Axial surfaces",
                "LineString",
                styles.axis_renderer(),
            ),
            "form_lines": copy_section(
                inputs.get(FORM_LINES),
                label,
                "Form lines",
                "LineString",
                styles.form_line_renderer(FORM_LINE_KIND),
            ),
        }

    def _placement(self, data, part, exaggeration):
        """(scale, extent, frame size) of the section view, or None when the
        scale asked for does not fit the page. Scale: the largest standard
        one at which the data and its margins fit; the view is then let
        down below the data to fill the page's height, but not deeper than
        a quarter of the section's length below its lowest ground: room to
        draw by hand (form lines, when given, are data and count in full)."""
        box_w, box_h = self.view_box
        room_w, room_h = (
            2 * SIDE_ROOM,
            HEADROOM
            + FOOTROOM
            + (DOMAIN_BAR[0] + DOMAIN_BAR[1]) * (self.inputs.get(DOMAINS) is not None),
        )
        scale = self.asked_scale or standard_scale(
            data.width(), data.height(), box_w - room_w, box_h - room_h
        )
        if not scale == scale:  # NaN: even the smallest scale is too large
            return None
        metres = scale / 1000.0  # view units per mm of paper
        width = data.width() / metres + room_w
        needed = data.height() / metres + room_h
        if width > box_w + 1e-6 or needed > box_h + 1e-6:
            return None
        lowest_ground = self.inputs[PROFILE].extent().yMinimum()
        deepest = lowest_ground - 0.25 * data.width() * exaggeration
        extra = max(0.0, (data.yMinimum() - deepest) / metres)
        height = min(box_h, needed + extra)
        top = data.yMaximum() + (room_h - FOOTROOM) * metres
        left = data.xMinimum() - SIDE_ROOM * metres
        extent = QgsRectangle(left, top - height * metres, left + width * metres, top)
        return scale, extent, (width, height)

    def _add_view_aids(self, layers, label, scale, extent):
        """Domain bar, label obstacles and labels, once the scale is known."""
        metres = scale / 1000.0
        bar_height, gap = DOMAIN_BAR
        layers["domains"] = domain_bar(
            self.inputs.get(DOMAINS),
            label,
            extent.yMaximum() - gap * metres,
            bar_height * metres,
            DOMAIN_MIN_WIDTH * metres,
            "Dip domains",
            sheet_styles.domain_bar_renderer(),
        )
        if layers["domains"] is not None:
            label_domains(layers["domains"], DOMAIN_CAPTION)
        drawn_ground = layers["strip"] or layers["ground"]
        half_band = KEEP_OUT_MM * metres
        layers["keep_out"] = keep_out_zone(drawn_ground, half_band, "Strip keep-out")
        if layers["keep_out"] is not None:
            layers["keep_out"].setRenderer(sheet_styles.hidden_renderer())
            keep_labels_off(layers["keep_out"], whole_polygons=True)
        for name in ("ticks", "holes", "hole_intervals", "form_lines", "axes", "crossings"):
            if layers.get(name) is not None:
                keep_labels_off(layers[name])
        if self.label_dips and layers["ticks"] is not None:
            layers["dip_labels"] = tick_anchors(layers["ticks"], "Dip labels")
            layers["dip_labels"].setRenderer(sheet_styles.hidden_renderer())
            label_dips(
                layers["dip_labels"],
                self.has_representatives,
                KEEP_OUT_MM + 0.3,
            )
        if layers["collars"] is not None:
            label_collars(layers["collars"], KEEP_OUT_MM + 0.3)


def _data_box(layers, ground):
    box = QgsRectangle(ground.geometry().boundingBox())
    for layer in layers:
        if layer.featureCount():
            box.combineExtentWith(layer.extent())
    return box


def around(box):
    """A map extent round a line's bounding box, with room for its end letters."""
    grow = 0.35 * max(box.width(), box.height())
    return QgsRectangle(
        box.xMinimum() - grow, box.yMinimum() - grow, box.xMaximum() + grow, box.yMaximum() + grow
    )
