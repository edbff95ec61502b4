"""Shapely geometries handed to QGIS in one step (WKB), not vertex by vertex."""

import shapely
from qgis.core import QgsGeometry


def to_qgis(geometry):
    result = QgsGeometry()
    result.fromWkb(shapely.to_wkb(geometry))
    return result
