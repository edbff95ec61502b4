"""sectionwright:geologycrossings through processing.run."""

import demo_world as W
import numpy as np
import processing
import pytest
import run_parameters as P
import shapely
from feedback import LogFeedback
from layers import attributes, line_layer, plane_raster, point_layer
from pyproj import Transformer
from qgis.core import QgsProcessingContext, QgsVectorLayer


def run(demo_dir, feedback=None, **extra):
    parameters = {
        **P.demo_geologycrossings(demo_dir),
        **P.memory("OUTPUT", "OUTPUT_INTERVALS", "SKIPPED"),
    }
    parameters.update(extra)
    return processing.run("sectionwright:geologycrossings", parameters, feedback=feedback)


@pytest.fixture(scope="module")
def demo_result(provider, demo_dir):
    return run(demo_dir, VERTICAL_EXAGGERATION=2.0)


def section_lines(demo_dir):
    layer = QgsVectorLayer(f"{demo_dir}/tarrowgill.gpkg|layername=sections")
    return {f["name"]: shapely.from_wkt(f.geometry().asWkt()) for f in layer.getFeatures()}


def test_intervals_tile_every_demo_section(demo_result, demo_dir):
    lines = section_lines(demo_dir)
    rows = attributes(demo_result["OUTPUT_INTERVALS"])
    for name, line in lines.items():
        mine = sorted({(r["ch_from"], r["ch_to"]) for r in rows if r["section"] == name})
        assert mine[0][0] == 0.0 and mine[-1][1] == pytest.approx(line.length)
        assert all(a[1] == b[0] for a, b in zip(mine, mine[1:]))
        assert sum(b - a for a, b in mine) == pytest.approx(line.length)


def test_geology_strip_is_the_exaggerated_ground(demo_result):
    for feature in demo_result["OUTPUT_INTERVALS"].getFeatures():
        vertices = list(feature.geometry().vertices())
        assert vertices[0].x() == pytest.approx(feature["ch_from"])
        assert vertices[-1].x() == pytest.approx(feature["ch_to"])
        assert feature["ve"] == 2.0
        assert all(700 < v.y() < 1800 for v in vertices)  # 2 × 390…875 m


def test_units_either_side_of_boundaries_are_the_demo_worlds(demo_result, demo_dir):
    # Ground truth: the analytic world's unit at the ground 15 m before and
    # after each unit-boundary crossing (the polygons are traced on a 10 m
    # grid, so the boundary itself is only good to about a cell). Where a
    # section runs along a boundary its staircase gives crossings metres
    # apart; only crossings 40 m from any other are compared.
    lines = section_lines(demo_dir)
    every = [r for r in attributes(demo_result["OUTPUT"]) if r["kind"] == "unit boundary"]
    crossings = [
        r
        for r in every
        if all(
            o is r or o["section"] != r["section"] or abs(o["chainage"] - r["chainage"]) > 40
            for o in every
        )
    ]
    assert len(crossings) > 20
    agree = 0
    for row in crossings:
        line = lines[row["section"]]
        before = line.interpolate(max(row["chainage"] - 15, 0))
        after = line.interpolate(min(row["chainage"] + 15, line.length))
        truth = [W.UNITS[int(W.unit_index(p.x, p.y, W.ground(p.x, p.y)))] for p in (before, after)]
        agree += truth == [row["unit_prev"] or None, row["unit_next"] or None]
    assert agree >= 0.9 * len(crossings)


def test_contact_crossings_sit_on_the_known_contacts(demo_result, demo_dir):
    # Ground truth: at a crossing of the contact at the base of unit k, the
    # ground is at that contact's elevation (traces from a 10 m grid:
    # tolerance a few metres of elevation on slopes of up to ~30°).
    lines = section_lines(demo_dir)
    rows = [r for r in attributes(demo_result["OUTPUT"]) if r["kind"] == "contact"]
    assert len(rows) > 20
    for row in rows:
        p = lines[row["section"]].interpolate(row["chainage"])
        misfit = min(
            abs(W.ground(p.x, p.y) - W.contact_elevation(k, p.x, p.y))
            for k in range(len(W.CONTACT_LEVELS))
        )
        assert misfit < 6.0
        assert row["elev"] == pytest.approx(float(W.ground(p.x, p.y)), abs=2.0)
    fault = next(
        f
        for f in QgsVectorLayer(f"{demo_dir}/tarrowgill.gpkg|layername=contacts").getFeatures()
        if f["type"] == "fault"
    )
    fault_line = shapely.from_wkt(fault.geometry().asWkt())
    crossed = {name for name, line in lines.items() if line.intersects(fault_line)}
    faults = [r for r in attributes(demo_result["OUTPUT"]) if r["kind"] == "fault"]
    assert crossed and {r["section"] for r in faults} == crossed


def test_crossing_chainages_match_shapely(demo_result, demo_dir):
    # Source: shapely 2 / GEOS intersection of each section with each
    # contact line, located with line_locate_point.
    lines = section_lines(demo_dir)
    contacts = [
        shapely.from_wkt(f.geometry().asWkt())
        for f in QgsVectorLayer(f"{demo_dir}/tarrowgill.gpkg|layername=contacts").getFeatures()
    ]
    rows = attributes(demo_result["OUTPUT"])
    for name, line in lines.items():
        expected = sorted(
            line.project(p)
            for c in contacts
            for p in shapely.get_parts(line.intersection(c))
            if not p.is_empty
        )
        mine = sorted(
            r["chainage"] for r in rows if r["section"] == name and r["kind"] != "unit boundary"
        )
        np.testing.assert_allclose(mine, expected, atol=1e-6)


def test_log_accounts_for_every_section(provider, demo_dir):
    log = LogFeedback()
    run(demo_dir, feedback=log)
    assert log.algorithm_log()[-1] == "Summary: read=4 written=4 skipped=0"


def rugged(x, y):
    return 400 + 80 * np.sin((x - 431000) / 230.0) + 60 * np.cos((y - 5127000) / 170.0)


def test_trace_window_recovers_a_known_plane(provider, tmp_path):
    # A plane dipping 35° toward 140 cuts rugged synthetic ground; its trace
    # is found with GDAL's contouring (a general-purpose library) and given
    # as the contact; the algorithm drapes it on the 2 m DEM and fits.
    from osgeo import gdal, ogr

    x0, y0, size, cell = 431000.0, 5127000.0, 600, 2.0
    d = np.radians(140.0)

    def plane(x, y):
        return 420 - np.tan(np.radians(35.0)) * ((x - x0) * np.sin(d) + (y - y0) * np.cos(d))

    gt = (x0, cell, 0.0, y0 + size * cell, 0.0, -cell)
    dem = plane_raster(tmp_path / "rugged.tif", rugged, gt, (size, size), 32633)
    misfit = gdal.GetDriverByName("MEM").Create("", size, size, 1, gdal.GDT_Float64)
    misfit.SetGeoTransform(gt)
    centres = (np.arange(size) + 0.5) * cell
    x, y = np.meshgrid(x0 + centres, y0 + size * cell - centres)
    misfit.GetRasterBand(1).WriteArray(rugged(x, y) - plane(x, y))
    store = ogr.GetDriverByName("Memory").CreateDataSource("")
    layer = store.CreateLayer("c")
    layer.CreateField(ogr.FieldDefn("id", ogr.OFTInteger))
    layer.CreateField(ogr.FieldDefn("z", ogr.OFTReal))
    gdal.ContourGenerate(misfit.GetRasterBand(1), 0, 0, [0.0], 0, 0, layer, 0, 1)
    trace = max(
        (shapely.from_wkt(f.GetGeometryRef().ExportToWkt()) for f in layer), key=lambda g: g.length
    )
    contacts = point_layer(
        [(shapely.to_wkt(trace, rounding_precision=-1, trim=True, output_dimension=2), ["fault"])],
        [("type", "string")],
        geometry_type="LineString",
    )
    middle = trace.interpolate(0.5, normalized=True)
    section = line_layer(
        [f"LINESTRING({middle.x - 300} {middle.y - 100}, {middle.x + 300} {middle.y + 100})"],
        names=["T"],
    )
    result = processing.run(
        "sectionwright:geologycrossings",
        {
            "INPUT": section,
            "LINE_ID_FIELD": "name",
            "DEM": dem,
            "CONTACTS": contacts,
            "CONTACT_TYPE_FIELD": "type",
            "TRACE_WINDOW": 250.0,
            "OUTPUT": "memory:",
            "OUTPUT_INTERVALS": "memory:",
        },
    )
    rows = attributes(result["OUTPUT"])
    assert rows and all(r["kind"] == "fault" for r in rows)
    best = min(rows, key=lambda r: abs(r["chainage"] - 316.2))
    assert best["est_dip"] == pytest.approx(35.0, abs=1.0)
    assert best["est_dipdir"] == pytest.approx(140.0, abs=2.0)
    assert "ill_conditioned" not in best["flags"]
    azimuth = np.degrees(np.arctan2(600, 200))
    expected = np.degrees(
        np.arctan(np.tan(np.radians(35)) * abs(np.cos(np.radians(azimuth - 140))))
    )
    assert best["est_appdip"] == pytest.approx(expected, abs=1.0)


def test_bad_geology_input(provider, demo_dir, tmp_path):
    # A self-intersecting (bow-tie) polygon is repaired, a polygon with NULL
    # unit is unmapped ground, contacts in another CRS still cross where
    # they should, a trace window larger than the line is fine, a null
    # section line is SKIPPED.
    x, y = 433000.0, 5130000.0
    units = point_layer(
        [
            (
                f"POLYGON(({x} {y}, {x + 400} {y + 400}, {x + 400} {y}, {x} {y + 400}, {x} {y}))",
                ["BOW"],
            ),
            (
                f"POLYGON(({x + 500} {y}, {x + 700} {y}, {x + 700} {y + 400}, {x + 500} {y + 400}, "
                f"{x + 500} {y}))",
                [None],
            ),
        ],
        [("unit", "string")],
        geometry_type="Polygon",
    )
    to_geo = Transformer.from_crs(32633, 4326, always_xy=True)
    (ax, bx), (ay, by) = to_geo.transform([x + 600, x + 600], [y - 50, y + 450])
    contacts = point_layer(
        [(f"LINESTRING({ax} {ay}, {bx} {by})", ["fault"])],
        [("type", "string")],
        epsg="EPSG:4326",
        geometry_type="LineString",
    )
    lines = line_layer(
        [f"LINESTRING({x - 100} {y + 200}, {x + 900} {y + 200})", None], names=["S", "EMPTY"]
    )
    log = LogFeedback()
    result = processing.run(
        "sectionwright:geologycrossings",
        {
            **P.lines(lines),
            "DEM": P.demo_dem(demo_dir),
            **P.geology(units, contacts),
            "TRACE_WINDOW": 50000.0,
            **P.memory("OUTPUT", "OUTPUT_INTERVALS", "SKIPPED"),
        },
        feedback=log,
    )
    assert any("repaired" in line for line in log.lines)
    assert any("no unit value" in line for line in log.lines)
    intervals = sorted(attributes(result["OUTPUT_INTERVALS"]), key=lambda r: r["ch_from"])
    assert [r["unit"] for r in intervals] == ["", "BOW", ""]
    assert intervals[1]["ch_from"] == pytest.approx(100.0) and intervals[1][
        "ch_to"
    ] == pytest.approx(500.0)
    (fault,) = [r for r in attributes(result["OUTPUT"]) if r["kind"] == "fault"]
    assert fault["chainage"] == pytest.approx(700.0, abs=1e-3)
    assert "ill_conditioned" in fault["flags"]  # a straight trace fixes no plane
    assert [r["reason"] for r in attributes(result["SKIPPED"])] == ["null geometry"]
    assert log.algorithm_log()[-2:] == [
        "Summary: read=2 written=1 skipped=1",
        "Skipped: null geometry=1",
    ]


def test_unit_colours_are_applied_when_loaded(provider, demo_result):
    from sectionwright.algorithms.outputs.output_styles import StyleOnLoad
    from sectionwright.algorithms.outputs.styles import UNIT_COLOURS

    layer = demo_result["OUTPUT_INTERVALS"]
    StyleOnLoad("geologycrossings", "OUTPUT_INTERVALS").postProcessLayer(
        layer, QgsProcessingContext(), None
    )
    renderer = layer.renderer()
    assert renderer.classAttribute() == "unit"
    values = [c.value() for c in renderer.categories()]
    assert values == ["ASH", "BRS", "COL", "DNG", "HWM", ""]
    colours = [c.symbol().symbolLayer(1).color().name() for c in renderer.categories()[:2]]
    assert colours == list(UNIT_COLOURS[:2])
