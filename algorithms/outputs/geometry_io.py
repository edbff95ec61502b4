"""Shapely geometries handed to QGIS in one step (WKB), not vertex by vertex."""

from qgis.core import QgsFeature, QgsGeometry

from ..compat.qgis_compat import FAST_INSERT
from ..core.wkb import to_wkb


def to_qgis(geometry):
    result = QgsGeometry()
    result.fromWkb(to_wkb(geometry))
    return result


def add_features(sink, geometries, attributes):
    """Features from an array of shapely geometries (encoded in one call) and
    their attribute rows."""
    for wkb, values in zip(to_wkb(geometries).tolist(), attributes):
        feature = QgsFeature()
        geometry = QgsGeometry()
        geometry.fromWkb(wkb)
        feature.setGeometry(geometry)
        feature.setAttributes(values)
        sink.addFeature(feature, FAST_INSERT)
