"""Reading map layers (unit polygons, contact lines) into the working CRS."""

import numpy as np
import shapely
from qgis.core import (
    QgsCoordinateTransform,
    QgsCsException,
    QgsFeatureRequest,
)

from ..compat.null import plain
from ..compat.qgis_compat import SKIP_GEOMETRY_CHECKS
from ..core.units import polygon_index_at
from ..core.wkb import from_wkb
from ..framework.parameter_names import UNIT_FIELD, UNITS
from ..framework.run_guard import ParameterProblem
from .map_crs import require_map_crs


def read_features(source, value_field, work_crs, context):
    """(shapely geometries in the working CRS, the value of ``value_field``
    of each — None when NULL or no field —, count of features left out for
    having no usable geometry)."""
    to_working = QgsCoordinateTransform(source.sourceCrs(), work_crs, context.transformContext())
    request = QgsFeatureRequest()
    if value_field:
        request.setSubsetOfAttributes([value_field], source.fields())
    wkbs, values, unusable = [], [], 0
    for feature in source.getFeatures(request, SKIP_GEOMETRY_CHECKS):
        geometry = feature.geometry()
        if geometry is None or geometry.isNull() or geometry.isEmpty():
            unusable += 1
            continue
        try:
            geometry.transform(to_working)
        except QgsCsException:
            unusable += 1
            continue
        value = plain(feature[value_field]) if value_field else None
        wkbs.append(bytes(geometry.asWkb()))
        values.append(None if value is None or not str(value).strip() else str(value))
    geometries = shapely.force_2d(from_wkb(np.array(wkbs, dtype=object)))
    return geometries, values, unusable


class UnitMap:
    """Unit polygons (working CRS) and their labels, for point look-ups."""

    def __init__(self, polygons, labels):
        self.polygons = polygons
        self.labels = np.asarray(labels, dtype=object)

    def unit_at(self, xy):
        """Unit label at each position; None outside every unit."""
        index = polygon_index_at(self.polygons, xy)
        labels = np.full(len(index), None, dtype=object)
        labels[index >= 0] = self.labels[index[index >= 0]]
        return labels


def read_unit_map(source, unit_field, work_crs, context, feedback):
    """Unit polygons of ``source`` in the working CRS. Invalid polygons are
    repaired (shapely's make_valid) and counted in the log; polygons with no
    geometry are left out and counted."""
    require_map_crs(source.sourceCrs(), UNITS, "the unit polygons", "the map's unit polygons")
    if not unit_field:
        raise ParameterProblem(UNIT_FIELD, "choose the field that names the unit.")
    if source.fields().lookupField(unit_field) < 0:
        raise ParameterProblem(UNIT_FIELD, f"the units layer has no field {unit_field!r}.")
    polygons, labels, unusable = read_features(source, unit_field, work_crs, context)
    invalid = ~shapely.is_valid(polygons)
    if invalid.any():
        polygons[invalid] = shapely.make_valid(polygons[invalid])
        feedback.pushInfo(f"{int(invalid.sum())} invalid unit polygon(s) repaired before use.")
    if unusable:
        feedback.pushInfo(f"{unusable} unit feature(s) without usable geometry left out.")
    return UnitMap(polygons, labels)
