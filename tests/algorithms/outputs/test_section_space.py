"""The section view's coordinate operation for QGIS's distance calculator:
every render context of a section-view map finds a transform, and lengths
measured through it are the section's own metres."""

import math

import pytest
from qgis.core import (
    QgsCoordinateReferenceSystem,
    QgsCoordinateTransform,
    QgsMapSettings,
    QgsPointXY,
    QgsProject,
    QgsRectangle,
    QgsRenderContext,
)
from qgis.PyQt.QtCore import QSize

from sectionwright.algorithms.outputs.section_space import add_measuring_operations, section_crs


def _render_context(project):
    settings = QgsMapSettings()
    settings.setDestinationCrs(section_crs())
    settings.setExtent(QgsRectangle(0, -2_000, 20_000, 8_000))
    settings.setOutputSize(QSize(800, 400))
    settings.setTransformContext(project.transformContext())
    settings.setEllipsoid(project.ellipsoid())
    return QgsRenderContext.fromMapSettings(settings)


def _project(ellipsoid):
    project = QgsProject()
    project.setCrs(QgsCoordinateReferenceSystem("EPSG:32633"))
    project.setEllipsoid(ellipsoid)
    return project


def _calculator_finds_a_transform(project):
    calculator = _render_context(project).distanceArea()
    return QgsCoordinateTransform(
        section_crs(), calculator.ellipsoidCrs(), project.transformContext()
    ).isValid()


@pytest.mark.parametrize("ellipsoid", ["NONE", "EPSG:7030", "EPSG:7004"])
def test_a_render_context_in_the_section_view_finds_a_transform(qgis_app, ellipsoid):
    project = _project(ellipsoid)
    # What QGIS reports as "No transform available between Section view and …".
    assert not _calculator_finds_a_transform(project)
    assert add_measuring_operations(project)
    assert _calculator_finds_a_transform(project)
    assert not add_measuring_operations(project)


@pytest.mark.parametrize("ellipsoid", ["NONE", "EPSG:7030", "EPSG:7004"])
def test_lengths_measured_in_the_section_view_are_section_metres(qgis_app, ellipsoid):
    project = _project(ellipsoid)
    add_measuring_operations(project)
    calculator = _render_context(project).distanceArea()
    # The Mercator projection is true to scale along the equator, and its
    # scale factor grows only as sec φ away from it (Snyder, J. P., "Map
    # Projections: A Working Manual", USGS Professional Paper 1395, 1987,
    # ch. 7): about 3 × 10⁻⁷ at 5 km. Hence 2 ppm for a view 10 km high.
    for start, end, length in (
        ((0, 0), (20_000, 0), 20_000),
        ((0, 5_000), (20_000, 5_000), 20_000),
        ((3_000, -2_000), (3_000, 8_000), 10_000),
        ((0, 0), (3_000, 4_000), 5_000),
    ):
        measured = calculator.measureLine(QgsPointXY(*start), QgsPointXY(*end))
        assert measured == pytest.approx(length, rel=2e-6), (start, end)


def test_a_section_view_layer_has_an_extent_in_wgs84_near_the_origin(qgis_app):
    """QGIS works out every layer's extent in WGS 84 as it changes: in the
    section view that extent lies at 0° N 0° E, its size in degrees the
    section's metres over the equator's metres per degree."""
    project = _project("NONE")
    to_wgs84 = QgsCoordinateTransform(
        section_crs(), QgsCoordinateReferenceSystem("EPSG:4326"), project.transformContext()
    )
    assert not to_wgs84.isValid()
    add_measuring_operations(project)
    to_wgs84 = QgsCoordinateTransform(
        section_crs(), QgsCoordinateReferenceSystem("EPSG:4326"), project.transformContext()
    )
    corner = to_wgs84.transform(QgsPointXY(10_000, 1_000))
    # WGS 84 (NIMA TR8350.2, 2000): a = 6,378,137 m, e² = 0.00669437999014.
    # Along the equator a degree of longitude is 2πa/360 metres; along the
    # meridian there a degree of latitude is 2πM/360, M = a(1 − e²) the
    # meridian's radius of curvature at the equator.
    a, e2 = 6_378_137.0, 0.00669437999014
    assert corner.x() == pytest.approx(10_000 / (2 * math.pi * a / 360), rel=1e-9)
    assert corner.y() == pytest.approx(1_000 / (2 * math.pi * a * (1 - e2) / 360), rel=1e-6)
