"""NULL as Qt6 builds of QGIS deliver it: ``None`` instead of a null QVariant.

QGIS 3.22 (Qt5) hands NULL attributes over as null QVariants. Each case
below runs once as they come, and once with QGIS's attribute reading
patched to hand over ``None`` instead, as QGIS 4 does; outputs, SKIPPED
reasons and the log must be the same, and the NULLs must have mattered
(the SKIPPED reasons they cause are asserted)."""

import processing
import pytest
import run_parameters as P
from feedback import LogFeedback
from layers import attributes, is_null, line_layer, plane_raster, point_layer
from qgis.core import QgsFeature, QgsVectorLayer

X0, Y0 = 431000.0, 5127000.0
EAST_WEST = f"LINESTRING({X0} {Y0 + 1000}, {X0 + 4000} {Y0 + 1000})"
NEAR = f"POINT({X0 + 1500} {Y0 + 1100})"


def _none_for_null(value):
    return None if is_null(value) else value


@pytest.fixture
def nulls_as_none(monkeypatch):
    """Features and layers hand NULL over as None, as under PyQt6."""
    by_key, one, every = QgsFeature.__getitem__, QgsFeature.attribute, QgsFeature.attributes
    unique = QgsVectorLayer.uniqueValues
    monkeypatch.setattr(QgsFeature, "__getitem__", lambda f, k: _none_for_null(by_key(f, k)))
    monkeypatch.setattr(QgsFeature, "attribute", lambda f, k: _none_for_null(one(f, k)))
    monkeypatch.setattr(QgsFeature, "attributes", lambda f: [_none_for_null(v) for v in every(f)])
    monkeypatch.setattr(
        QgsVectorLayer,
        "uniqueValues",
        lambda layer, *a: {_none_for_null(v) for v in unique(layer, *a)},
    )


def test_the_patch_hands_over_none(nulls_as_none):
    layer = point_layer([(NEAR, [None, "x"])], [("dip", "double"), ("t", "string")])
    feature = next(layer.getFeatures())
    assert feature["dip"] is None and feature.attribute("dip") is None
    assert feature.attributes() == [None, "x"]
    assert layer.uniqueValues(0) == {None}


def snapshot(result, log):
    """Every output layer's geometries and attributes (NULL as None), and the log."""
    layers = {}
    for key, value in sorted(result.items()):
        if isinstance(value, QgsVectorLayer):
            layers[key] = sorted(
                (f.geometry().asWkt(6), repr([_none_for_null(v) for v in f.attributes()]))
                for f in value.getFeatures()
            )
    return layers, log.algorithm_log()


def skipped_reasons(result):
    return sorted(str(r["reason"]) for r in attributes(result["SKIPPED"]))


def attitudes_case(tmp_path):
    lines = line_layer([EAST_WEST, EAST_WEST.replace(f"{Y0 + 1000}", f"{Y0 + 3000}")], names=None)
    lines.dataProvider().changeAttributeValues({2: {0: None}})  # second line: no label
    points = point_layer(
        [
            (NEAR, [120.0, 40.0, 2.0]),
            (NEAR, [120.0, None, 2.0]),
            (NEAR, [None, 40.0, 2.0]),
            (NEAR, [120.0, 40.0, None]),  # falls back to DECLINATION
            (f"POINT({X0 + 1500} {Y0 + 2900})", [200.0, 30.0, None]),
        ],
        [("az", "double"), ("dip", "double"), ("decl", "double")],
    )
    units = point_layer(
        [
            (
                f"POLYGON(({X0} {Y0}, {X0 + 2000} {Y0}, {X0 + 2000} {Y0 + 4000}, {X0} {Y0 + 4000}, "
                f"{X0} {Y0}))",
                [None],
            ),
        ],
        [("unit", "string")],
        geometry_type="Polygon",
    )
    log = LogFeedback()
    result = processing.run(
        "sectionwright:projectattitudes",
        {
            **P.lines(lines),
            **P.numeric_attitudes(points),
            "NORTH_REFERENCE": 2,
            "DECLINATION": 5.0,
            "DECLINATION_FIELD": "decl",
            "UNITS": units,
            "UNIT_FIELD": "unit",
            **P.memory("OUTPUT", "OUTPUT_TICKS", "OUTPUT_CONNECTORS", "SKIPPED"),
        },
        feedback=log,
    )
    assert skipped_reasons(result) == ["missing azimuth", "missing dip"]
    assert {r["section"] for r in attributes(result["OUTPUT"])} == {"L0", "2"}  # 2 = feature id
    return result, log


def notation_case(tmp_path):
    table = point_layer(
        [(None, ["30", "40", "SE"]), (None, ["30", None, "SE"]), (None, ["30", "40", None])],
        [("strike", "string"), ("dip", "string"), ("quad", "string")],
        geometry_type="None",
    )
    log = LogFeedback()
    result = processing.run(
        "sectionwright:normalizeattitudes",
        {
            "INPUT": table,
            "CONVENTION": 2,
            "AZIMUTH_FIELD": "strike",
            "DIP_FIELD": "dip",
            "QUADRANT_FIELD": "quad",
            "OUTPUT": "memory:",
            "SKIPPED": "memory:",
        },
        feedback=log,
    )
    assert skipped_reasons(result) == ["missing dip", "missing quadrant"]
    return result, log


def geology_case(tmp_path):
    x, y = X0, Y0
    dem = plane_raster(
        tmp_path / "dem.tif",
        lambda e, n: 300.0 + 0 * e,
        (x - 500, 10.0, 0.0, y + 1500, 0.0, -10.0),
        (200, 600),
        32633,
    )
    units = point_layer(
        [
            (
                f"POLYGON(({x} {y}, {x + 1000} {y}, {x + 1000} {y + 2000}, {x} {y + 2000}, "
                f"{x} {y}))",
                ["SST"],
            ),
            (
                f"POLYGON(({x + 1000} {y}, {x + 2000} {y}, {x + 2000} {y + 2000}, {x + 1000} "
                f"{y + 2000}, {x + 1000} {y}))",
                [None],
            ),
        ],
        [("unit", "string")],
        geometry_type="Polygon",
    )
    contacts = point_layer(
        [
            (f"LINESTRING({x + 500} {y}, {x + 500} {y + 2000})", [None]),
            (f"LINESTRING({x + 1500} {y}, {x + 1500} {y + 2000})", ["fault"]),
        ],
        [("type", "string")],
        geometry_type="LineString",
    )
    log = LogFeedback()
    result = processing.run(
        "sectionwright:geologycrossings",
        {
            **P.lines(line_layer([EAST_WEST, None], names=["EW", "EMPTY"])),
            "DEM": dem,
            **P.geology(units, contacts),
            **P.memory("OUTPUT", "OUTPUT_INTERVALS", "SKIPPED"),
        },
        feedback=log,
    )
    assert [r["unit"] for r in attributes(result["OUTPUT_INTERVALS"])].count("") >= 1
    assert skipped_reasons(result) == ["null geometry"]
    return result, log


def boreholes_case(tmp_path):
    collars = point_layer(
        [
            (f"POINT Z({X0 + 1000} {Y0 + 1050} 500)", ["A", 0.0, 90.0, 300.0]),
            (f"POINT Z({X0 + 2000} {Y0 + 1050} 500)", ["B", None, 60.0, 200.0]),
            (f"POINT Z({X0 + 3000} {Y0 + 1050} 500)", ["C", 0.0, 90.0, None]),
            (f"POINT Z({X0 + 3500} {Y0 + 1050} 500)", [None, 0.0, 90.0, 100.0]),
        ],
        [("hole", "string"), ("az", "double"), ("incl", "double"), ("depth", "double")],
        geometry_type="PointZ",
    )
    surveys = point_layer(
        [(None, ["A", 100.0, 10.0, 85.0]), (None, ["A", None, 10.0, 85.0])],
        [("hole", "string"), ("depth", "double"), ("az", "double"), ("incl", "double")],
        geometry_type="None",
    )
    intervals = point_layer(
        [
            (None, ["A", 0.0, 120.0, "SAND"]),
            (None, ["A", 120.0, None, "ROCK"]),
            (None, ["A", 150.0, 200.0, None]),
        ],
        [("hole", "string"), ("from", "double"), ("to", "double"), ("code", "string")],
        geometry_type="None",
    )
    log = LogFeedback()
    result = processing.run(
        "sectionwright:projectboreholes",
        {
            **P.lines(line_layer([EAST_WEST], names=["EW"])),
            **P.boreholes(collars, surveys, intervals),
            **P.memory("OUTPUT", "OUTPUT_INTERVALS", "OUTPUT_TRACES", "SKIPPED"),
        },
        feedback=log,
    )
    reasons = skipped_reasons(result)
    assert "missing azimuth" in reasons and len(reasons) >= 4
    return result, log


def profile_case(tmp_path):
    dem = plane_raster(
        tmp_path / "dem.tif",
        lambda e, n: 300.0 + 0.01 * (e - X0),
        (X0 - 500, 10.0, 0.0, Y0 + 1500, 0.0, -10.0),
        (100, 600),
        32633,
    )
    lines = line_layer([EAST_WEST, EAST_WEST], names=["EW", "EW"])
    lines.dataProvider().changeAttributeValues({2: {0: None}})
    log = LogFeedback()
    result = processing.run(
        "sectionwright:profile",
        {
            "INPUT": lines,
            "LINE_ID_FIELD": "name",
            "DEM": dem,
            "STEP": 100.0,
            "OUTPUT": "memory:",
            "OUTPUT_SECTION": "memory:",
            "SKIPPED": "memory:",
        },
        feedback=log,
    )
    assert sorted(r["section"] for r in attributes(result["OUTPUT_SECTION"])) == ["2", "EW"]
    return result, log


CASES = [attitudes_case, notation_case, geology_case, boreholes_case, profile_case]


@pytest.mark.parametrize("case", CASES, ids=lambda c: c.__name__)
def test_same_results_with_null_as_none(provider, tmp_path, request, case):
    (tmp_path / "qvariant").mkdir()
    (tmp_path / "none").mkdir()
    as_qvariant = snapshot(*case(tmp_path / "qvariant"))
    request.getfixturevalue("nulls_as_none")
    as_none = snapshot(*case(tmp_path / "none"))
    assert as_none == as_qvariant


def test_sheet_layers_leave_null_elevations_and_units_out(provider, request):
    from sectionwright.algorithms.outputs.styles import crossing_renderer
    from sectionwright.algorithms.sheet.builder import unit_names
    from sectionwright.algorithms.sheet.layers import crossings_in_section

    def drawn():
        crossings = point_layer(
            [(NEAR, ["EW", 100.0, 400.0]), (NEAR, ["EW", 200.0, None]), (NEAR, ["EW", None, 1.0])],
            [("section", "string"), ("chainage", "double"), ("elev", "double")],
        )
        units = point_layer(
            [(None, ["SST"]), (None, [None]), (None, [""])],
            [("unit", "string")],
            geometry_type="None",
        )
        layer = crossings_in_section(crossings, "EW", 2.0, "Crossings", crossing_renderer())
        return [f.geometry().asWkt(3) for f in layer.getFeatures()], unit_names(units, "unit")

    as_qvariant = drawn()
    assert as_qvariant == (["Point (100 800)"], ["SST"])
    request.getfixturevalue("nulls_as_none")
    assert drawn() == as_qvariant
