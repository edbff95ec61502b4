"""The section view's coordinate operation for QGIS's distance calculator:
every render context of a section-view map finds a transform, and lengths
measured through it are the section's own metres."""

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
