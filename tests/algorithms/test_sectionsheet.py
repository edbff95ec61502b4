"""sectionwright:sectionsheet: pages, pictures and axes."""

import re
import subprocess
import sys
from pathlib import Path

import numpy as np
import processing
import pytest
import run_parameters as P
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
    ve = {"VERTICAL_EXAGGERATION": 2}
    profile = processing.run(
        "sectionwright:profile",
        {**P.demo_profile(demo_dir), "STEP": 25, **ve, **P.memory("OUTPUT", "OUTPUT_SECTION")},
    )
    attitudes = processing.run(
        "sectionwright:projectattitudes",
        {**P.demo_projectattitudes(demo_dir), **ve, **P.memory("OUTPUT", "OUTPUT_TICKS")},
    )
    geology = processing.run(
        "sectionwright:geologycrossings",
        {**P.demo_geologycrossings(demo_dir), **ve, **P.memory("OUTPUT", "OUTPUT_INTERVALS")},
    )
    return {
        **P.demo_lines(demo_dir),
        "PROFILE": profile["OUTPUT_SECTION"],
        "TICKS": attitudes["OUTPUT_TICKS"],
        "INTERVALS": geology["OUTPUT_INTERVALS"],
        "CROSSINGS": geology["OUTPUT"],
        "MAP_LAYERS": [P.demo_layer(demo_dir, "units")],
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


def plane_sheet(tmp_path, exaggeration=2.5, **extra):
    """A known plane: ground rising from 400 m to 600 m along a 10 km line,
    drawn at ``exaggeration`` on an A4 sheet. Returns (PNG pixels as grey,
    frame box in pixels, view extent, stated scale N)."""
    from qgis.core import QgsRectangle

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
    parameters = {"INPUT": line, "LINE_ID_FIELD": "name", "PROFILE": profile}
    log = LogFeedback()
    sheet(parameters, tmp_path / "p.png", feedback=log, PAGE_SIZE=0, **extra)
    view = next(line for line in log.lines if line.startswith("Section P: page 1"))
    scale = float(re.search(r"\(1:(\d+)\)", view).group(1))
    ranges = re.findall(r"(-?\d+(?:\.\d+)?)…(-?\d+(?:\.\d+)?)", view)
    numbers = [float(v) for v in ranges[0] + ranges[1]]
    extent = QgsRectangle(numbers[0], numbers[2], numbers[1], numbers[3])
    image = gdal.Open(str(tmp_path / "p_P.png")).ReadAsArray().astype(float)[:3].mean(axis=0)
    pdf = tmp_path / "p.pdf"
    sheet(parameters, pdf, PAGE_SIZE=0, **extra)
    return image, frame_pixels(extent, scale), extent, scale, pdf


def frame_pixels(extent, scale):
    from types import SimpleNamespace

    from sectionwright.algorithms.sheet.page import section_frame_position

    frame = (extent.width() / scale * 1000.0, extent.height() / scale * 1000.0)
    x, y = section_frame_position((297.0, 210.0), SimpleNamespace(frame=frame))
    return tuple(v * DPI / 25.4 for v in (x, y, *frame))


def test_axis_labels_are_where_the_true_elevations_are(provider, tmp_path):
    # The pixel row of the ground in the picture must be the row of its true
    # elevation on the axis, and the axis labels must read true elevation
    # (grid value / VE).
    from sectionwright.algorithms.sheet.page import grid_expression

    exaggeration = 2.5
    image, (x, y, w, h), extent, _, _ = plane_sheet(tmp_path, exaggeration)
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


def grid_columns(image, row, x0, x1):
    """Centres (pixels) of the vertical grid lines crossing ``row``."""
    grey = image[row, int(x0) + 4 : int(x1) - 4]
    dark = np.flatnonzero((grey < 235) & (grey > 120)) + int(x0) + 4
    runs = np.split(dark, np.flatnonzero(np.diff(dark) > 2) + 1)
    return np.array([run.mean() for run in runs if len(run)])


def test_the_stated_scale_is_the_scale_on_paper(provider, tmp_path):
    # The scale printed on the sheet (read from the PDF by poppler's
    # pdftotext, independent of QGIS) must match the distance between two
    # chainage grid lines measured on the picture, within 1 %.
    from sectionwright.algorithms.core.sheet_scale import nice_step

    image, (x, y, w, h), extent, scale, pdf = plane_sheet(tmp_path)
    text = subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True, text=True).stdout
    stated = re.search(r"Horizontal 1:([\d\u202f ]+)", text).group(1)
    stated = float(stated.replace("\u202f", "").replace(" ", ""))
    assert stated == scale and stated in (10000, 20000, 25000, 50000, 100000)
    columns = grid_columns(image, int(y + 0.4 * 9.0 * DPI / 25.4), x, x + w)
    assert len(columns) >= 3
    measured_mm = np.diff(columns).mean() * 25.4 / DPI
    ground_metres = nice_step(extent.width())
    expected_mm = ground_metres / stated * 1000.0
    assert abs(measured_mm - expected_mm) / expected_mm < 0.01, (measured_mm, expected_mm)


def test_a_scale_asked_for_is_used_and_one_too_large_skips_the_page(provider, tmp_path):
    _, _, _, scale, _ = plane_sheet(tmp_path, SCALE=100000)
    assert scale == 100000
    with pytest.raises(QgsProcessingException, match="No section could be drawn"):
        plane_sheet(tmp_path, SCALE=10000)


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
            **P.demo_profile(demo_dir),
            "STEP": 50,
            "OUTPUT": "memory:",
            "OUTPUT_SECTION": str(profile),
        },
    )
    out = tmp_path / "headless.pdf"
    headless.run(
        "sectionwright:sectionsheet",
        {**P.demo_lines(demo_dir), "PROFILE": str(profile), "OUTPUT": str(out)},
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


def section_view_layer(kind, fields, rows, name):
    """A memory section-view layer: rows are (wkt, [values])."""
    from qgis.core import QgsCoordinateReferenceSystem, QgsFeature, QgsGeometry

    from sectionwright.algorithms.outputs.section_space import SECTION_CRS_WKT

    spec = "&".join(f"field={n}:{t}" for n, t in fields)
    layer = QgsVectorLayer(f"{kind}?{spec}", name, "memory")
    layer.setCrs(QgsCoordinateReferenceSystem.fromWkt(SECTION_CRS_WKT))
    features = []
    for wkt, values in rows:
        feature = QgsFeature(layer.fields())
        if wkt:
            feature.setGeometry(QgsGeometry.fromWkt(wkt))
        feature.setAttributes(values)
        features.append(feature)
    layer.dataProvider().addFeatures(features)
    return layer


def interpretation_layers(ve=2.0):
    """Form lines, axial surfaces and dip domains of section A with the
    fields of DESIGN.md's formlines and dipdomains outputs, made up here
    (the algorithms that make them are built elsewhere)."""
    form_lines = section_view_layer(
        "LineString",
        [
            ("section", "string"),
            ("kind", "string"),
            ("unit_above", "string"),
            ("unit_below", "string"),
            ("ve", "double"),
        ],
        [
            ("LINESTRING(900 1180, 2500 400, 4200 -300)", ["A", "contact", "BRS", "COL", ve]),
            ("LINESTRING(1500 1250, 2600 700, 4300 0)", ["A", "form line", None, None, ve]),
            ("LINESTRING(5500 1400, 6500 600, 8000 -200)", ["A", "contact", "HWM", "DNG", ve]),
        ],
        "formlines_out",
    )
    axes = section_view_layer(
        "LineString",
        [
            ("section", "string"),
            ("dip_left", "double"),
            ("dip_right", "double"),
            ("axis_dip", "double"),
            ("ve", "double"),
        ],
        [("LINESTRING(2500 1150, 2900 -600)", ["A", 30.0, -12.0, 78.0, ve])],
        "axes_out",
    )
    domains = QgsVectorLayer(
        "None?field=section:string&field=domain:integer&field=from_ch:double&"
        "field=to_ch:double&field=count:integer&field=mean_dip:double&field=dip_sd:double&"
        "field=dips_to:string&field=rep_fid:integer",
        "domains_out",
        "memory",
    )
    from qgis.core import QgsFeature

    rows = []
    for number, (start, end, dip) in enumerate(
        ((0, 2600, 31.0), (2600, 5600, -14.0), (5600, 9265, 22.0)), start=1
    ):
        row = QgsFeature(domains.fields())
        row.setAttributes(["A", number, start, end, 3, dip, 2.0, "end" if dip > 0 else "start", 1])
        rows.append(row)
    domains.dataProvider().addFeatures(rows)
    return {"FORM_LINES": form_lines, "AXES": axes, "DOMAINS": domains}


def ticks_with_representatives(ticks):
    """The demo's ticks with a 'represent' field: every other one chosen."""
    from qgis.core import QgsFeatureRequest, QgsField

    from sectionwright.algorithms.compat.qgis_compat import LONG

    marked = ticks.materialize(QgsFeatureRequest())
    marked.dataProvider().addAttributes([QgsField("represent", LONG)])
    marked.updateFields()
    index = marked.fields().lookupField("represent")
    marked.dataProvider().changeAttributeValues(
        {f.id(): {index: int(n % 2 == 0)} for n, f in enumerate(marked.getFeatures())}
    )
    return marked


@pytest.fixture(scope="module")
def full_sheet(demo_layers, tmp_path_factory):
    """Every input given, the layout kept in the project for inspection."""
    from qgis.core import QgsProject

    folder = tmp_path_factory.mktemp("full")
    g = demo_layers["INPUT"].replace("layername=sections", "layername=")
    holes = processing.run(
        "sectionwright:projectboreholes",
        {
            **P.lines(demo_layers["INPUT"]),
            **P.boreholes(g + "collars", intervals=g + "intervals", fields=P.DEMO_HOLES),
            "MAX_DISTANCE": 600.0,
            "VERTICAL_EXAGGERATION": 2.0,
            **P.memory("OUTPUT", "OUTPUT_INTERVALS"),
        },
    )
    parameters = dict(
        demo_layers,
        BOREHOLES=holes["OUTPUT"],
        BOREHOLE_INTERVALS=holes["OUTPUT_INTERVALS"],
        TICKS=ticks_with_representatives(demo_layers["TICKS"]),
        AUTHOR="R. Example",
        OVERVIEW=True,
        TITLE="Tarrowgill full sheet",
        **interpretation_layers(),
    )
    log = LogFeedback()
    sheet(parameters, folder / "full.pdf", feedback=log, ADD_LAYOUT=True)
    layout = QgsProject.instance().layoutManager().layoutByName("Tarrowgill full sheet")
    return parameters, layout, folder / "full.pdf", log


def section_page_items(layout, page, kind):
    return [item for item in layout.items() if isinstance(item, kind) and item.page() == page]


def test_every_input_layer_appears_in_the_legend(full_sheet):
    from qgis.core import QgsLayoutItemLegend

    _, layout, _, _ = full_sheet
    (legend,) = section_page_items(layout, 1, QgsLayoutItemLegend)  # page 1: section A
    names = {node.layer().name() for node in legend.model().rootGroup().findLayers()}
    assert names == {
        "Ground surface",
        "Geology strip",
        "Dip ticks",
        "Contacts and boundaries",
        "Form lines",
        "Axial surfaces",
        "Dip domains",
        "Boreholes",
        "Logged intervals",
    }


def test_the_title_block_says_what_the_sheet_is(full_sheet):
    # Read back from the PDF by poppler's pdftotext, independent of QGIS.
    _, _, pdf, _ = full_sheet
    text = subprocess.run(["pdftotext", str(pdf), "-"], capture_output=True, text=True).stdout
    text = " ".join(text.split())
    assert pdf_pages(pdf) == 5
    for expected in (
        "Tarrowgill full sheet",
        "R. Example",
        "EPSG:32633",
        "vertical exaggeration ×2",
        "Index of sections",
        "formlines_out",
        "domains_out",
        "local codes and licensed practice",
        "Section A–A′",
    ):
        assert expected in text, expected


@pytest.fixture(scope="module")
def placed_labels(full_sheet):
    """The labels QGIS's label engine placed in section A's view
    (QgsLayoutExporter.labelingResults), and that view's map item."""
    from qgis.core import QgsLayoutExporter, QgsLayoutItemMap

    from sectionwright.algorithms.compat.qgis_compat import EXPORT_SUCCESS

    _, layout, pdf, _ = full_sheet
    exporter = QgsLayoutExporter(layout)
    settings = QgsLayoutExporter.ImageExportSettings()
    settings.dpi = 72
    settings.pages = [1]
    assert exporter.exportToImage(str(pdf.with_suffix(".png")), settings) == EXPORT_SUCCESS
    (section_map,) = [
        item for item in section_page_items(layout, 1, QgsLayoutItemMap) if item.grids().size()
    ]
    labels = exporter.labelingResults()[section_map.uuid()].allLabels()
    return [label for label in labels if not label.isUnplaced], section_map


def sheet_layer(name, section="A"):
    """A per-section layer the full sheet drew (kept in the project, in a
    group of its own)."""
    from qgis.core import QgsProject

    group = QgsProject.instance().layerTreeRoot().findGroup("Sheet layers: Tarrowgill full sheet")
    return next(
        node.layer()
        for node in group.findGroup(f"Section {section}").findLayers()
        if node.layer().name() == name
    )


def test_no_label_covers_another_or_the_strip(placed_labels):
    # Every placed label's box, in section-view units, must stay off every
    # other label and off the geology strip as drawn (its band width).
    from qgis.core import QgsGeometry

    from sectionwright.algorithms.outputs.styles import STRIP_WIDTH_MM

    placed, section_map = placed_labels
    assert len(placed) >= 8  # dips of the representatives, hole names, domain captions
    boxes = [QgsGeometry.fromRect(label.labelRect) for label in placed]
    for i, box in enumerate(boxes):
        for other in boxes[i + 1 :]:
            assert box.intersection(other).area() < 1e-6 * box.area(), placed[i].labelText
    half_band = (STRIP_WIDTH_MM / 2 + 0.2) * section_map.scale() / 1000.0
    strip = sheet_layer("Geology strip")
    band = QgsGeometry.unaryUnion([f.geometry().buffer(half_band, 4) for f in strip.getFeatures()])
    for label, box in zip(placed, boxes):
        assert not box.intersects(band), label.labelText
    texts = {label.labelText for label in placed}
    assert {"D1  31° →", "D2  14° ←", "D3  22° →", "TG-01"} <= texts


def test_only_representatives_get_dip_labels(placed_labels):
    placed, _ = placed_labels
    anchors = sheet_layer("Dip labels")
    dips = [label for label in placed if label.layerID == anchors.id()]
    assert dips
    for label in dips:
        assert anchors.getFeature(label.featureId)["represent"] == 1


def test_different_exaggerations_are_an_error_naming_the_layers(demo_layers, tmp_path):
    with pytest.raises(QgsProcessingException) as error:
        sheet(dict(demo_layers, **interpretation_layers(ve=3.0)), tmp_path / "mixed.pdf")
    message = str(error.value)
    assert "different vertical exaggerations" in message
    assert "Form lines" in message and "formlines_out" in message and "×3" in message
    assert "Profile" in message and "×2" in message


def test_ticks_at_another_exaggeration_are_refused_naming_the_layers(
    demo_layers, demo_dir, tmp_path
):
    ticks_at_1 = processing.run(
        "sectionwright:projectattitudes",
        {
            **P.demo_projectattitudes(demo_dir),
            "VERTICAL_EXAGGERATION": 1,
            **P.memory("OUTPUT", "OUTPUT_TICKS"),
        },
    )["OUTPUT_TICKS"]
    with pytest.raises(QgsProcessingException) as refused:
        sheet(dict(demo_layers, TICKS=ticks_at_1), tmp_path / "mixed.pdf")
    message = str(refused.value)
    assert "different vertical exaggerations" in message
    assert "Dip ticks (section view)" in message and "×1" in message
    assert "Profile (section view, from Topographic profile)" in message and "×2" in message
    assert not (tmp_path / "mixed.pdf").exists()


def test_the_map_lines_are_refused_as_the_profile(demo_layers, tmp_path):
    with pytest.raises(QgsProcessingException, match="Profile .*not the map's section lines"):
        sheet(dict(demo_layers, PROFILE=demo_layers["INPUT"]), tmp_path / "lines.pdf")
