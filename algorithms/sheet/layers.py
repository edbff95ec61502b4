"""The features of one section, copied out of the section-view layers into
small styled layers for its sheet."""

import numpy as np
from qgis.core import (
    QgsFeature,
    QgsFeatureRequest,
    QgsFields,
    QgsGeometry,
    QgsPointXY,
    QgsRectangle,
    QgsVectorLayer,
)

from ..compat.null import plain
from ..core.sheet_scale import domain_panels
from ..inputs.section_views import section_expression
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


def keep_out_zone(source, half_width, name):
    """Polygons a ``half_width`` (map units) either side of every feature of
    ``source``: the ground strip as it is drawn, for labels to stay off."""
    if source is None:
        return None
    layer = _memory_layer("Polygon", name, QgsFields(), section_crs())
    zones = []
    for feature in source.getFeatures():
        if not feature.hasGeometry():
            continue
        zone = QgsFeature()
        zone.setGeometry(feature.geometry().buffer(half_width, 4))
        zones.append(zone)
    layer.dataProvider().addFeatures(zones)
    return layer


def domain_bar(domains, label, top, height, min_width, name, renderer):
    """The dip domains of section ``label`` (rows of the domains table) as
    panels along the top of the view, hanging ``height`` below ``top``
    (section-view units), meeting half-way between neighbours
    (``core.sheet_scale.domain_panels``); None without a usable table."""
    needed = (F.SECTION, F.DOMAIN, F.FROM_CHAINAGE, F.TO_CHAINAGE)
    if domains is None or any(domains.fields().lookupField(n) < 0 for n in needed):
        return None
    layer = _memory_layer("Polygon", name, domains.fields(), section_crs())
    rows = []
    for row in domains.getFeatures(section_filter(label)):
        start, end = plain(row[F.FROM_CHAINAGE]), plain(row[F.TO_CHAINAGE])
        if start is not None and end is not None:
            rows.append((min(float(start), float(end)), float(end), row))
    rows.sort(key=lambda r: r[0])
    panels = []
    if rows:
        lefts, rights = domain_panels(
            np.array([r[0] for r in rows]), np.array([r[1] for r in rows]), min_width
        )
        for (_, _, row), left, right in zip(rows, lefts, rights):
            panel = QgsFeature(row)
            panel.setGeometry(QgsGeometry.fromRect(QgsRectangle(left, top - height, right, top)))
            panels.append(panel)
    layer.dataProvider().addFeatures(panels)
    layer.setRenderer(renderer)
    return layer


def line_ends(parts, crs, name, renderer):
    """The two ends of each section line on the map, lettered A and A′ (the
    section's own label and its primed form)."""
    fields = F.SHEET_ENDS.qgs_fields()
    layer = _memory_layer("Point", name, fields, crs)
    points = []
    for part in parts:
        vertices = [v for v in part.geometry.constGet().vertices()] if part.geometry else []
        if len(vertices) < 2:
            continue
        for vertex, letter in ((vertices[0], part.label), (vertices[-1], f"{part.label}′")):
            point = QgsFeature(fields)
            point.setGeometry(QgsGeometry.fromPointXY(QgsPointXY(vertex.x(), vertex.y())))
            point.setAttributes([letter])
            points.append(point)
    layer.dataProvider().addFeatures(points)
    layer.setRenderer(renderer)
    return layer


def tick_anchors(ticks, name):
    """The centre of each dip tick (where the attitude sits on the section),
    to hang its dip label on."""
    if ticks is None:
        return None
    layer = _memory_layer("Point", name, ticks.fields(), section_crs())
    anchors = []
    for feature in ticks.getFeatures():
        geometry = feature.geometry()
        if geometry is None or geometry.isEmpty():
            continue
        anchor = QgsFeature(feature)
        anchor.setGeometry(geometry.interpolate(geometry.length() / 2.0))
        anchors.append(anchor)
    layer.dataProvider().addFeatures(anchors)
    return layer
