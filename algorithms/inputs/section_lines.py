"""Reading the section lines: working CRS, labels, parts, bad geometry."""

import math
from dataclasses import dataclass
from typing import Optional

import numpy as np
import shapely
from qgis.core import (
    QgsCoordinateReferenceSystem,
    QgsCoordinateTransform,
    QgsCsException,
    QgsFeatureRequest,
    QgsGeometry,
    QgsPointXY,
)

from ..compat.null import plain
from ..compat.qgis_compat import (
    SKIP_GEOMETRY_CHECKS,
    UNIT_METERS,
    WKT2_2019,
    is_curved,
    unit_name,
)
from ..core.crs import utm_epsg
from ..core.lines import drop_repeated_vertices
from ..core.wkb import from_wkb
from ..framework.parameter_names import LINE_ID_FIELD
from ..framework.run_guard import ParameterProblem, stop_if_cancelled
from .map_crs import require_lonlat, require_map_crs

WGS84 = QgsCoordinateReferenceSystem("EPSG:4326")


@dataclass
class SectionPart:
    """One single-part section line in the working CRS, or why it is unusable."""

    label: str
    fid: int
    geometry: QgsGeometry  # the input feature's geometry, as read
    coords: Optional[np.ndarray]  # (n, 2) working-CRS vertices; None when skipped
    reason: str = ""


def crs_wkt(crs):
    return crs.toWkt(WKT2_2019)


def working_crs(source, context, feedback, layer=("Section lines", "the section lines")):
    """The section lines' CRS when projected, else the UTM zone of the centre
    of their extent (one CRS per run); the log says which and in what unit.
    ``layer``: the parameter's label and the layer's name in messages, when
    the layer that sets the CRS is another one."""
    label, name = layer
    crs = require_map_crs(source.sourceCrs(), label, name, f"{name} drawn on the map")
    if not crs.isGeographic():
        if crs.mapUnits() != UNIT_METERS:
            feedback.pushInfo(
                f"Chainages and distances are in "
                f"{unit_name(crs.mapUnits())}, the unit of {crs.authid()}."
            )
        return crs
    extent = source.sourceExtent()
    require_lonlat(extent, label, name)
    centre = QgsCoordinateTransform(crs, WGS84, context.transformContext()).transform(
        extent.center()
    )
    if not (math.isfinite(centre.x()) and math.isfinite(centre.y())):
        # No geometry at all (QGIS 3.44's empty extent is NaN, 3.22's is 0, 0):
        # nothing will be placed, any zone serves; the one at 0°, 0° as on 3.22.
        centre = QgsPointXY(0.0, 0.0)
    work = QgsCoordinateReferenceSystem(f"EPSG:{utm_epsg(centre.x(), centre.y())}")
    feedback.pushInfo(
        f"{name[0].upper() + name[1:]} are in a geographic CRS ({crs.authid()}); "
        f"working CRS: {work.authid()} {work.description()}, in metres."
    )
    return work


def section_label(feature, id_field):
    """The section's label: the LINE_ID_FIELD value, else the feature id."""
    if id_field:
        value = plain(feature[id_field])
        if value is not None and str(value).strip():
            return str(value).strip()
    return str(feature.id())


def _single_parts(geometry, to_working):
    """Working-CRS vertex arrays of each part, or a reason for the feature."""
    if geometry is None or geometry.isNull():
        return None, "null geometry"
    if geometry.isEmpty():
        return None, "empty geometry"
    working = QgsGeometry(geometry)
    if is_curved(working.wkbType()):
        working.convertToStraightSegment()
    try:
        working.transform(to_working)
    except QgsCsException:
        return None, "cannot be transformed to the working CRS"
    parts = shapely.get_parts(shapely.force_2d(from_wkb(bytes(working.asWkb()))))
    return [drop_repeated_vertices(shapely.get_coordinates(p)) for p in parts], ""


def read_section_parts(source, id_field, work_crs, context, feedback):
    """Every section line part, labelled, in the working CRS.

    Unusable parts come back with ``coords`` None and a reason, so that the
    caller accounts for them in SKIPPED.
    """
    if id_field and source.fields().lookupField(id_field) < 0:
        raise ParameterProblem(LINE_ID_FIELD, f"the section lines have no field {id_field!r}.")
    to_working = QgsCoordinateTransform(source.sourceCrs(), work_crs, context.transformContext())
    sections = []
    # Degenerate lines are ours to report in SKIPPED, not Processing's to refuse.
    features = source.getFeatures(QgsFeatureRequest(), SKIP_GEOMETRY_CHECKS)
    for feature in features:
        stop_if_cancelled(feedback)
        label = section_label(feature, id_field)
        geometry = feature.geometry()
        parts, reason = _single_parts(geometry, to_working)
        if parts is None:
            sections.append(SectionPart(label, feature.id(), geometry, None, reason))
            continue
        if len(parts) > 1:
            feedback.pushInfo(
                f"Section {label} has {len(parts)} parts: "
                f"processed as {label}#1 … {label}#{len(parts)}."
            )
        for number, coords in enumerate(parts, start=1):
            part_label = f"{label}#{number}" if len(parts) > 1 else label
            if len(coords) < 2:
                sections.append(
                    SectionPart(part_label, feature.id(), geometry, None, "zero-length line")
                )
            else:
                sections.append(SectionPart(part_label, feature.id(), geometry, coords))
    return sections


OBVIOUS_LABEL_FIELDS = ("name", "label", "section", "id")


def obvious_label_field(field_names):
    """The field that plainly labels section lines (``name``, ``label``,
    ``section``, ``id`` … in that order, any case), or None."""
    by_lower = {name.lower(): name for name in field_names}
    return next((by_lower[n] for n in OBVIOUS_LABEL_FIELDS if n in by_lower), None)
