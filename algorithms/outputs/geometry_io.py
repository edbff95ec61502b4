"""Geometries handed to QGIS: shapely arrays in one step (WKB), not vertex
by vertex, and QgsGeometry as they come."""

import shapely
from qgis.core import QgsFeature, QgsGeometry, QgsPoint

from ..compat.qgis_compat import FAST_INSERT


def to_qgis(geometry):
    result = QgsGeometry()
    result.fromWkb(shapely.to_wkb(geometry))
    return result


def points_z(x, y, z):
    """PointZ geometries; a NaN z stays a NaN z (shapely on GEOS 3.11 would
    make such a point 2-D)."""
    return [QgsGeometry(QgsPoint(*xyz)) for xyz in zip(x.tolist(), y.tolist(), z.tolist())]


def add_features(sink, geometries, attributes):
    """Features from an array of shapely geometries (encoded in one call) and
    their attribute rows."""
    for wkb, values in zip(shapely.to_wkb(geometries).tolist(), attributes):
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
