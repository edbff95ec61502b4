"""sectionwright:normalizeattitudes through processing.run."""

import processing
import pytest
from layers import attributes, point_layer
from pyproj import Proj, Transformer


def run(layer, **extra):
    parameters = {
        "INPUT": layer,
        "CONVENTION": 3,
        "TEXT_FIELD": "attitude",
        "OUTPUT": "memory:",
        "SKIPPED": "memory:",
    }
    parameters.update(extra)
    return processing.run("sectionwright:normalizeattitudes", parameters)


def test_the_demo_notebook_is_read_back_to_its_true_planes(provider, demo_dir):
    # Ground truth: the demo world's exact bedding (true_ddir, true_dip),
    # written in five notations rounded to whole degrees.
    result = run(f"{demo_dir}/tarrowgill.gpkg|layername=attitudes")
    rows = attributes(result["OUTPUT"])
    assert len(rows) == 78
    for row in rows:
        assert (row["dip_dir"] - row["true_ddir"] + 180) % 360 - 180 == pytest.approx(0, abs=0.51)
        assert row["dip"] == pytest.approx(row["true_dip"], abs=0.51)
        assert row["strike"] == pytest.approx((row["dip_dir"] - 90) % 360)
    skipped = sorted(r["reason"] for r in attributes(result["SKIPPED"]))
    assert skipped == ["missing text", "unparsed text: 'see sketch p. 41'"]


def test_a_plain_table_and_fields_of_the_same_names(provider):
    table = point_layer(
        [(None, ["N30E 40SE", 999.0]), (None, ["s60w 40n", 999.0]), (None, ["30/40", 999.0])],
        [("attitude", "string"), ("dip_dir", "double")],
        geometry_type="None",
    )
    result = run(table)
    rows = attributes(result["OUTPUT"])
    assert [(r["dip_dir"], r["dip"], r["strike"]) for r in rows] == [
        (120.0, 40.0, 30.0),
        (330.0, 40.0, 240.0),
        (30.0, 40.0, 300.0),
    ]
    assert [f.name() for f in result["OUTPUT"].fields()] == ["attitude", "dip_dir", "dip", "strike"]


def test_magnetic_azimuths_become_grid_azimuths_of_the_layer(provider):
    # Source: NOAA declination convention and pyproj meridian convergence.
    x, y = 431500.0, 5128000.0
    lon, lat = Transformer.from_crs(32633, 4326, always_xy=True).transform(x, y)
    gamma = Proj("EPSG:32633").get_factors(lon, lat).meridian_convergence
    layer = point_layer(
        [(f"POINT({x} {y})", ["120/40"]), (None, ["120/40"])], [("attitude", "string")]
    )
    result = run(layer, NORTH_REFERENCE=2, DECLINATION=3.0)
    (row,) = attributes(result["OUTPUT"])
    assert row["dip_dir"] == pytest.approx(123.0 - gamma)
    assert [r["reason"] for r in attributes(result["SKIPPED"])] == [
        "no position for the north correction"
    ]


def test_numeric_conventions_and_bad_values(provider):
    layer = point_layer(
        [
            (None, ["30", "40", "SE"]),
            (None, ["45", "30", "NE"]),
            (None, ["30", "140", "SE"]),
            (None, [None, "40", "SE"]),
        ],
        [("strike", "string"), ("dip", "string"), ("quad", "string")],
        geometry_type="None",
    )
    result = run(
        layer,
        CONVENTION=2,
        AZIMUTH_FIELD="strike",
        DIP_FIELD="dip",
        QUADRANT_FIELD="quad",
        TEXT_FIELD=None,
    )
    assert [(r["dip_dir"], r["strike"]) for r in attributes(result["OUTPUT"])] == [(120.0, 30.0)]
    assert [r["reason"] for r in attributes(result["SKIPPED"])] == [
        "quadrant contradicts strike",
        "dip out of range",
        "missing azimuth",
    ]


def test_a_line_layer_is_refused_by_its_label(provider):
    from layers import line_layer
    from qgis.core import QgsProcessingException

    lines = line_layer(["LINESTRING (0 0, 1 1)"])
    with pytest.raises(
        QgsProcessingException,
        match="Attitudes \\(points or a table\\): this layer holds lines; "
        "choose a layer of points or a table",
    ):
        processing.run(
            "sectionwright:normalizeattitudes",
            {"INPUT": lines, "CONVENTION": 3, "TEXT_FIELD": "name", "OUTPUT": "memory:"},
        )
