"""Geometries handed to QGIS as WKB, not vertex by vertex (features are
written by ``feature_writer.write_rows``)."""

import numpy as np
from qgis.core import QgsGeometry

from ..core.wkb import to_wkb

WKB_POINT_Z = 1001  # ISO
POINT_Z_RECORD = np.dtype([("order", "u1"), ("type", "<u4"), ("xyz", "<f8", 3)])


def to_qgis(geometry):
    result = QgsGeometry()
    result.fromWkb(to_wkb(geometry))
    return result


def points_z(x, y, z):
    """WKB of PointZ geometries, built by numpy; a NaN z stays a NaN z
    (shapely on GEOS 3.11 would make such a point 2-D)."""
    records = np.empty(len(x), POINT_Z_RECORD)
    records["order"] = 1  # little endian
    records["type"] = WKB_POINT_Z
    records["xyz"] = np.column_stack((x, y, z))
    return [record.tobytes() for record in records]
