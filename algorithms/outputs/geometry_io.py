"""Geometries handed to QGIS: shapely arrays in one step (WKB), not vertex
by vertex, and QgsGeometry as they come."""

import numpy as np
from qgis.core import QgsFeature, QgsGeometry

from ..compat.qgis_compat import FAST_INSERT
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


def add_features(sink, geometries, attributes):
    """Features from an array of shapely geometries (encoded in one call) and
    their attribute rows."""
    add_wkb_features(sink, to_wkb(geometries).tolist(), attributes)


def add_wkb_features(sink, wkbs, attributes):
    """Features from WKB geometries and their attribute rows."""
    for wkb, values in zip(wkbs, attributes):
        feature = QgsFeature()
        geometry = QgsGeometry()
        geometry.fromWkb(wkb)
        feature.setGeometry(geometry)
        feature.setAttributes(values)
        sink.addFeature(feature, FAST_INSERT)


def add_qgis_features(sink, geometries, attributes):
    """Features from QgsGeometry objects (None: no geometry) and their
    attribute rows."""
    features = []
    for geometry, values in zip(geometries, attributes):
        feature = QgsFeature()
        if geometry is not None:
            feature.setGeometry(geometry)
        feature.setAttributes(values)
        features.append(feature)
    sink.addFeatures(features, FAST_INSERT)
