"""sectionwright:sectionsheet: pages, pictures and axes."""

import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import processing
import pytest
from feedback import LogFeedback
from layers import line_layer, plane_raster
from osgeo import gdal
from qgis.core import (
    QgsExpression,
    QgsExpressionContext,
    QgsExpressionContextScope,
    QgsProcessingException,
    QgsVectorLayer,
)

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "scripts"))
import headless  # noqa: E402

X0, Y0 = 431000.0, 5127000.0
DPI = 150


def pdf_pages(path):
    # Source: poppler's pdfinfo, a reader independent of QGIS.
    info = subprocess.run(["pdfinfo", str(path)], capture_output=True, text=True, check=True)
    return int(re.search(r"^Pages:\s+(\d+)", info.stdout, re.M).group(1))


@pytest.fixture(scope="module")
def demo_layers(provider, demo_dir):
    g = f"{demo_dir}/tarrowgill.gpkg|layername="
    common = {"INPUT": g + "sections", "LINE_ID_FIELD": "name"}
    profile = processing.run(
        "sectionwright:profile",
        dict(
            common,
            DEM=f"{demo_dir}/dem.tif",
            STEP=25,
            VERTICAL_EXAGGERATION=2,
            OUTPUT="memory:",
            OUTPUT_SECTION="memory:",
        ),
    )
    attitudes = processing.run(
        "sectionwright:projectattitudes",
        dict(
            common,
            ATTITUDES=g + "attitudes",
            CONVENTION=3,
            TEXT_FIELD="attitude",
            MAX_DISTANCE=500,
            DEM=f"{demo_dir}/dem.tif",
            VERTICAL_EXAGGERATION=2,
            OUTPUT="memory:",
            OUTPUT_TICKS="memory:",
        ),
    )
    geology = processing.run(
        "sectionwright:geologycrossings",
        dict(
            common,
            DEM=f"{demo_dir}/dem.tif",
            UNITS=g + "units",
            UNIT_FIELD="unit",
            CONTACTS=g + "contacts",
            CONTACT_TYPE_FIELD="type",
            VERTICAL_EXAGGERATION=2,
            OUTPUT="memory:",
            OUTPUT_INTERVALS="memory:",
        ),
    )
    return {
        "INPUT": g + "sections",
        "LINE_ID_FIELD": "name",
        "PROFILE": profile["OUTPUT_SECTION"],
        "TICKS": attitudes["OUTPUT_TICKS"],
        "INTERVALS": geology["OUTPUT_INTERVALS"],
        "CROSSINGS": geology["OUTPUT"],
        "MAP_LAYERS": [g + "units"],
        "TITLE": "Tarrowgill test sheet",
    }


def sheet(parameters, output, feedback=None, **extra):
    return processing.run(
        "sectionwright:sectionsheet",
        dict(parameters, OUTPUT=str(output), **extra),
        feedback=feedback,
    )


def test_pdf_has_one_page_per_section(demo_layers, tmp_path):
    out = tmp_path / "sheets.pdf"
    sheet(demo_layers, out)
    assert pdf_pages(out) == 4


def test_png_and_svg_give_one_file_per_section(demo_layers, tmp_path):
    sheet(demo_layers, tmp_path / "sheet.png", PAGE_SIZE=0)
    pictures = sorted(p.name for p in tmp_path.glob("sheet_*.png"))
    assert pictures == ["sheet_A.png", "sheet_B.png", "sheet_C.png", "sheet_D.png"]
    pixels = gdal.Open(str(tmp_path / "sheet_B.png")).ReadAsArray().astype(float)
    grey = pixels[:3].mean(axis=0)
    assert (grey < 200).mean() > 0.01 and grey.std() > 20  # not blank
    sheet(demo_layers, tmp_path / "sheet.svg", PAGE_SIZE=0)
    svg = (tmp_path / "sheet_C.svg").read_text()
    assert "Section C–C′" in svg and "Tarrowgill test sheet" in svg


def test_axis_labels_are_where_the_true_elevations_are(provider, tmp_path):
    # A known plane: ground rising from 400 m to 600 m along a 10 km line,
    # drawn at VE 2.5. The pixel row of the ground in the picture must be
    # the row of its true elevation on the axis, and the axis labels must
    # read true elevation (grid value / VE).
    from qgis.core import QgsRectangle

    from sectionwright.algorithms.sheet.page import grid_expression, section_view_box

    exaggeration = 2.5
    dem = plane_raster(
        tmp_path / "plane.tif",
        lambda x, y: 400.0 + 0.02 * (x - X0),
        (X0 - 100, 25.0, 0.0, Y0 + 500, 0.0, -25.0),
        (40, 420),
        32633,
    )
    line = line_layer([f"LINESTRING({X0} {Y0}, {X0 + 10000} {Y0})"], names=["P"])
    profile = processing.run(
        "sectionwright:profile",
        {
            "INPUT": line,
            "LINE_ID_FIELD": "name",
            "DEM": dem,
            "STEP": 50,
            "VERTICAL_EXAGGERATION": exaggeration,
            "OUTPUT": "memory:",
            "OUTPUT_SECTION": "memory:",
        },
    )["OUTPUT_SECTION"]
    log = LogFeedback()
    sheet(
        {"INPUT": line, "LINE_ID_FIELD": "name", "PROFILE": profile},
        tmp_path / "p.png",
        feedback=log,
        PAGE_SIZE=0,
    )
    view = next(line for line in log.lines if line.startswith("Section P: page 1"))
    ranges = re.findall(r"(-?\d+(?:\.\d+)?)…(-?\d+(?:\.\d+)?)", view)
    numbers = [float(v) for v in ranges[0] + ranges[1]]
    extent = QgsRectangle(numbers[0], numbers[2], numbers[1], numbers[3])
    x, y, w, h = (v * DPI / 25.4 for v in section_view_box((297.0, 210.0), extent))
    image = gdal.Open(str(tmp_path / "p_P.png")).ReadAsArray().astype(float)[:3].mean(axis=0)
    for chainage in (1000.0, 5000.0, 9000.0):
        true_elevation = 400.0 + 0.02 * chainage
        column = int(round(x + (chainage - extent.xMinimum()) / extent.width() * w))
        expected_row = y + (extent.yMaximum() - true_elevation * exaggeration) / extent.height() * h
        rows = np.flatnonzero(image[int(y) + 3 : int(y + h) - 3, column] < 80) + int(y) + 3
        assert len(rows) and abs(rows.mean() - expected_row) < 3.0, chainage
    context = QgsExpressionContext()
    scope = QgsExpressionContextScope()
    scope.setVariable("grid_axis", "y")
    scope.setVariable("grid_number", 500.0 * exaggeration)
    context.appendScope(scope)
    assert QgsExpression(grid_expression(exaggeration)).evaluate(context) == "500"


def test_a_missing_section_and_an_empty_layer_leave_the_other_pages(demo_layers, tmp_path):
    profile = demo_layers["PROFILE"]
    without_d = QgsVectorLayer(f"MultiLineString?crs={profile.crs().toWkt()}", "p", "memory")
    without_d.setCrs(profile.crs())
    without_d.dataProvider().addAttributes(profile.fields().toList())
    without_d.updateFields()
    without_d.dataProvider().addFeatures([f for f in profile.getFeatures() if f["section"] != "D"])
    empty_ticks = QgsVectorLayer("LineString?field=section:string", "t", "memory")
    log = LogFeedback()
    out = tmp_path / "partial.pdf"
    result = sheet(
        dict(demo_layers, PROFILE=without_d, TICKS=empty_ticks),
        out,
        feedback=log,
        SKIPPED="memory:",
    )
    assert pdf_pages(out) == 3
    assert [f["section"] for f in result["SKIPPED"].getFeatures()] == ["D"]
    assert any("Section D: no page" in line for line in log.lines)
    assert any("nothing in TICKS" in line for line in log.lines)


def test_an_unwritable_output_is_a_clear_error(demo_layers):
    with pytest.raises(QgsProcessingException, match="Section sheets: cannot write"):
        sheet(demo_layers, "/nonexistent-folder/sheets.pdf")


@pytest.mark.headless
def test_sheets_are_made_headless(provider, demo_dir, tmp_path):
    profile = tmp_path / "profile.gpkg"
    processing.run(
        "sectionwright:profile",
        {
            "INPUT": f"{demo_dir}/tarrowgill.gpkg|layername=sections",
            "LINE_ID_FIELD": "name",
            "DEM": f"{demo_dir}/dem.tif",
            "STEP": 50,
            "OUTPUT": "memory:",
            "OUTPUT_SECTION": str(profile),
        },
    )
    out = tmp_path / "headless.pdf"
    headless.run(
        "sectionwright:sectionsheet",
        {
            "INPUT": f"{demo_dir}/tarrowgill.gpkg|layername=sections",
            "LINE_ID_FIELD": "name",
            "PROFILE": str(profile),
            "OUTPUT": str(out),
        },
    )
    assert pdf_pages(out) == 4


def test_the_layout_can_be_added_to_the_project(demo_layers, tmp_path):
    from qgis.core import QgsProject

    project = QgsProject.instance()
    before = len(project.layoutManager().layouts())
    sheet(demo_layers, tmp_path / "kept.pdf", ADD_LAYOUT=True)
    layouts = project.layoutManager().layouts()
    assert len(layouts) == before + 1
    assert layouts[-1].pageCollection().pageCount() == 4
    assert any(g.name().startswith("Sheet layers") for g in project.layerTreeRoot().children())
