"""The features of one section, copied out of the section-view layers into
small styled layers for its sheet."""

from qgis.core import (
    QgsExpression,
    QgsFeature,
    QgsFeatureRequest,
    QgsGeometry,
    QgsPointXY,
    QgsVectorLayer,
)

from ..compat.null import plain
from ..outputs import fields as F
from ..outputs.section_space import is_section_view, section_crs


def section_filter(label):
    return QgsFeatureRequest().setFilterExpression(section_expression(label))


def _memory_layer(kind, name, fields, crs):
    layer = QgsVectorLayer(f"{kind}?crs=EPSG:4326", name, "memory")
    layer.setCrs(crs)
    layer.dataProvider().addAttributes(fields.toList())
    layer.updateFields()
    return layer


def section_expression(label):
    return f"{QgsExpression.quotedColumnRef(F.SECTION)} = {QgsExpression.quotedValue(label)}"


def copy_section(source, label, name, kind, renderer):
    """A layer showing only section ``label`` of ``source``: a clone filtered
    by a subset string (kept when a project is saved), or a memory copy when
    the source cannot filter; None when it has no ``section`` field."""
    if source is None or source.fields().lookupField(F.SECTION) < 0:
        return None
    layer = source.clone()
    if not layer.setSubsetString(section_expression(label)):
        layer = _memory_layer(kind, name, source.fields(), section_crs())
        layer.dataProvider().addFeatures(list(source.getFeatures(section_filter(label))))
    layer.setName(name)
    layer.setRenderer(renderer)
    return layer


def crossings_in_section(source, label, exaggeration, name, renderer):
    """Crossing points placed in the section view at (chainage, elev × VE);
    those without elevation are left out. A layer already in the section
    view is only filtered."""
    if source is None or source.fields().lookupField(F.SECTION) < 0:
        return None
    if is_section_view(source.crs()):
        return copy_section(source, label, name, "Point", renderer)
    layer = _memory_layer("Point", name, source.fields(), section_crs())
    features = []
    for feature in source.getFeatures(section_filter(label)):
        chainage, elevation = plain(feature[F.CHAINAGE]), plain(feature[F.ELEVATION])
        if chainage is None or elevation is None or elevation != elevation:
            continue
        point = QgsPointXY(float(chainage), float(elevation) * exaggeration)
        copy = QgsFeature(feature)
        copy.setGeometry(QgsGeometry.fromPointXY(point))
        features.append(copy)
    layer.dataProvider().addFeatures(features)
    layer.setRenderer(renderer)
    return layer


def line_on_map(geometry, crs, name, renderer):
    """The section line itself, for the location map."""
    layer = _memory_layer("LineString", name, QgsVectorLayer("None", "", "memory").fields(), crs)
    feature = QgsFeature()
    feature.setGeometry(geometry)
    layer.dataProvider().addFeatures([feature])
    layer.setRenderer(renderer)
    return layer


def collar_points(holes, name, renderer):
    """The top of each borehole line in the section view, to carry its name."""
    if holes is None:
        return None
    layer = _memory_layer("Point", name, holes.fields(), section_crs())
    features = []
    for feature in holes.getFeatures():
        vertices = feature.geometry().vertices()
        if not vertices.hasNext():
            continue
        top = vertices.next()
        copy = QgsFeature(feature)
        copy.setGeometry(QgsGeometry.fromPointXY(QgsPointXY(top.x(), top.y())))
        features.append(copy)
    layer.dataProvider().addFeatures(features)
    layer.setRenderer(renderer)
    return layer
