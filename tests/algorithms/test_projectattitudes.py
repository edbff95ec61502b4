"""sectionwright:projectattitudes through processing.run."""

import demo_world as W
import numpy as np
import processing
import pytest
import run_parameters as P
from feedback import LogFeedback
from layers import attributes, is_null, line_layer, plane_raster, point_layer
from pyproj import Proj, Transformer
from qgis.core import QgsProcessingException, QgsVectorLayer

X0, Y0 = 431000.0, 5127000.0
EAST_WEST = f"LINESTRING({X0} {Y0 + 1000}, {X0 + 4000} {Y0 + 1000})"  # azimuth 090
DESIGN_FIELDS = [
    "section",
    "src_fid",
    "chainage",
    "offset",
    "travel",
    "elev",
    "gnd_elev",
    "dip_dir",
    "dip",
    "strike",
    "line_az",
    "line_angle",
    "app_dip",
    "dips_to",
    "plot_dip",
    "app_dip_sd",
    "flags",
]


def run(lines, points, feedback=None, **extra):
    parameters = {
        **P.lines(lines),
        **P.numeric_attitudes(points),
        **P.memory("OUTPUT", "OUTPUT_TICKS", "OUTPUT_CONNECTORS", "SKIPPED"),
    }
    parameters.update(extra)
    return processing.run("sectionwright:projectattitudes", parameters, feedback=feedback)


def demo_run(demo_dir, **extra):
    """The demo notebook carried up to 600 m onto the demo lines."""
    parameters = {**P.demo_projectattitudes(demo_dir), "MAX_DISTANCE": 600, **extra}
    return run(parameters.pop("INPUT"), parameters.pop("ATTITUDES"), **parameters)


def numeric_points(rows, epsg="EPSG:32633"):
    """Points with az/dip fields: rows are (x, y, az, dip), or (x, y, z, az,
    dip) for 3-D points."""
    three_d = len(rows[0]) == 5
    return point_layer(
        [
            (f"POINT{' Z' if three_d else ''}({' '.join(str(c) for c in xyz)})", [az, dip])
            for *xyz, az, dip in rows
        ],
        [("az", "string"), ("dip", "string")],
        epsg=epsg,
        geometry_type="PointZ" if three_d else "Point",
    )


def test_demo_world_apparent_dips_match_the_analytic_structure(provider, demo_dir):
    # Ground truth: the demo world's bedding is the analytic fold surface, so
    # the apparent dip in a section is the slope of that surface along the
    # section's azimuth at the attitude: tan α = |∇F · u| (an independent
    # directional-derivative computation, not the tan δ · sin β formula).
    # Recorded attitudes are rounded to whole degrees: tolerance 1°.
    result = demo_run(demo_dir)
    rows = attributes(result["OUTPUT"])
    assert len(rows) >= 30
    source = {
        f.id(): f.geometry().asPoint()
        for f in QgsVectorLayer(f"{demo_dir}/tarrowgill.gpkg|layername=attitudes").getFeatures()
    }
    h = 0.01
    for row in rows:
        p = source[row["src_fid"]]
        u = np.radians(row["line_az"])
        ahead = W.fold_surface(p.x() + h * np.sin(u), p.y() + h * np.cos(u))
        behind = W.fold_surface(p.x() - h * np.sin(u), p.y() - h * np.cos(u))
        slope = (ahead - behind) / (2 * h)  # rise toward the line's end
        expected = np.degrees(np.arctan(abs(slope)))
        assert row["app_dip"] == pytest.approx(expected, abs=1.0), row["station"]
        if expected > 2:
            assert row["dips_to"] == ("start" if slope > 0 else "end")


def test_every_design_field_is_there_and_the_source_fid_is_not_copied(provider, demo_dir, tmp_path):
    out = tmp_path / "carried.gpkg"
    result = demo_run(demo_dir, OUTPUT=str(out))
    layer = QgsVectorLayer(result["OUTPUT"])
    names = layer.fields().names()
    assert names[0] == "fid"  # the GeoPackage's own key
    assert names[1:6] == ["station", "attitude", "unit", "true_ddir", "true_dip"]
    assert names[6:] == DESIGN_FIELDS
    assert all(len(n) <= 10 for n in names)
    assert layer.featureCount() == result["OUTPUT_TICKS"].featureCount() > 0


def test_every_convention_gives_the_same_section_record(provider):
    line = line_layer([EAST_WEST], names=["EW"])
    cases = [
        (0, {"AZIMUTH_FIELD": "a", "DIP_FIELD": "d"}, ["120", "40", "", ""]),
        (1, {"AZIMUTH_FIELD": "a", "DIP_FIELD": "d"}, ["30", "40", "", ""]),
        (
            2,
            {"AZIMUTH_FIELD": "a", "DIP_FIELD": "d", "QUADRANT_FIELD": "q"},
            ["210", "40", "SE", ""],
        ),
        (3, {"TEXT_FIELD": "t"}, ["", "", "", "N30E 40SE"]),
        (4, {"TEXT_FIELD": "t"}, ["", "", "", "030/40"]),
    ]
    records = []
    for convention, fields, values in cases:
        points = point_layer(
            [(f"POINT({X0 + 1500} {Y0 + 1100})", values)],
            [("a", "string"), ("d", "string"), ("q", "string"), ("t", "string")],
        )
        result = run(
            line,
            points,
            CONVENTION=convention,
            **{"AZIMUTH_FIELD": None, "DIP_FIELD": None, **fields},
        )
        (row,) = attributes(result["OUTPUT"])
        records.append((row["dip_dir"], row["dip"], row["strike"], round(row["app_dip"], 9)))
    # tan α = tan 40° · sin 60° for an east-west line and a strike of 030.
    expected_alpha = round(
        np.degrees(np.arctan(np.tan(np.radians(40)) * np.sin(np.radians(60)))), 9
    )
    assert set(records) == {(120.0, 40.0, 30.0, expected_alpha)}


def test_north_references(provider):
    # Source: pyproj Proj.get_factors meridian convergence (grid = true − γ)
    # and NOAA's declination convention (true = magnetic + D, east positive).
    x, y = X0 + 1500, Y0 + 1100
    lon, lat = Transformer.from_crs(32633, 4326, always_xy=True).transform(x, y)
    gamma = Proj("EPSG:32633").get_factors(lon, lat).meridian_convergence
    line = line_layer([EAST_WEST], names=["EW"])
    points = point_layer(
        [(f"POINT({x} {y})", ["120", "40", "-3.5"])],
        [("az", "string"), ("dip", "string"), ("decl", "string")],
    )
    grid = attributes(run(line, points, NORTH_REFERENCE=0)["OUTPUT"])[0]["dip_dir"]
    true = attributes(run(line, points, NORTH_REFERENCE=1)["OUTPUT"])[0]["dip_dir"]
    magnetic = attributes(run(line, points, NORTH_REFERENCE=2, DECLINATION=7.0)["OUTPUT"])[0]
    by_field = attributes(
        run(line, points, NORTH_REFERENCE=2, DECLINATION=7.0, DECLINATION_FIELD="decl")["OUTPUT"]
    )[0]
    assert grid == 120.0
    assert true == pytest.approx(120.0 - gamma, abs=1e-9)
    assert magnetic["dip_dir"] == pytest.approx(127.0 - gamma, abs=1e-9)
    assert magnetic["strike"] == pytest.approx(37.0 - gamma, abs=1e-9)
    assert by_field["dip_dir"] == pytest.approx(116.5 - gamma, abs=1e-9)


def test_perpendicular_projection_record(provider, tmp_path):
    dem = plane_raster(
        tmp_path / "flat.tif",
        lambda x, y: 300.0 + 0 * x,
        (X0, 10.0, 0.0, Y0 + 2000, 0.0, -10.0),
        (200, 400),
        32633,
    )
    line = line_layer([EAST_WEST], names=["EW"])
    points = numeric_points([(X0 + 1500, Y0 + 1100, 180, 30), (X0 + 2500, Y0 + 900, 0, 30)])
    result = run(line, points, DEM=dem, VERTICAL_EXAGGERATION=2.0)
    north, south = sorted(attributes(result["OUTPUT"]), key=lambda r: r["chainage"])
    # Strike 090/270 is parallel to the east-west line: apparent dip 0.
    assert (north["chainage"], north["offset"], north["travel"]) == (1500.0, -100.0, 100.0)
    assert (south["chainage"], south["offset"]) == (2500.0, 100.0)  # right of an eastward line
    assert north["line_angle"] == pytest.approx(0.0, abs=1e-9)
    assert north["app_dip"] == pytest.approx(0.0, abs=1e-9) and north["dips_to"] == ""
    assert "oblique" in north["flags"]
    assert north["elev"] == pytest.approx(300.0) and north["gnd_elev"] == pytest.approx(300.0)


def test_along_strike_goes_both_ways_and_refuses_near_parallel_strikes(provider):
    line = line_layer([EAST_WEST], names=["EW"])
    points = numeric_points(
        [
            (X0 + 1500, Y0 + 1100, 90 + 45, 30),  # strike 045: reaches the line south-west
            (X0 + 2500, Y0 + 900, 90 + 45, 30),  # strike 045: north-east
            (X0 + 3000, Y0 + 1050, 90 + 88, 30),  # strike 088: 50 m off, would travel 1.4 km
        ]
    )
    log = LogFeedback()
    result = run(line, points, feedback=log, PROJECTION=1, MAX_DISTANCE=250)
    rows = sorted(attributes(result["OUTPUT"]), key=lambda r: r["chainage"])
    assert [r["chainage"] for r in rows] == pytest.approx([1400.0, 2600.0])
    assert [r["travel"] for r in rows] == pytest.approx([100 * np.sqrt(2)] * 2)
    assert [r["offset"] for r in rows] == pytest.approx([-100.0, 100.0])
    (skipped,) = attributes(result["SKIPPED"])
    assert skipped["reason"] == "strike nearly parallel to the line"


def test_along_plunge_shifts_elevation(provider):
    # Hand-computed (Groshong 2006, ch. 6): 100 m north of the line at
    # z 500, plunge 30° toward 180: travel 100 m down-plunge, z 442.26.
    line = line_layer([EAST_WEST], names=["EW"])
    points = numeric_points(
        [(X0 + 1500, Y0 + 1100, 500, "120", "40"), (X0 + 1500, Y0 + 900, 500, "120", "40")]
    )
    result = run(line, points, PROJECTION=2, PLUNGE_TREND=180.0, PLUNGE=30.0)
    rows = {round(r["offset"]): r for r in attributes(result["OUTPUT"])}
    assert rows[-100]["elev"] == pytest.approx(500 - 100 * np.tan(np.radians(30)))
    assert rows[100]["elev"] == pytest.approx(500 + 100 * np.tan(np.radians(30)))
    assert rows[-100]["travel"] == pytest.approx(100.0)


def test_kinked_line_uses_the_segment_where_the_point_lands(provider):
    kinked = f"LINESTRING({X0} {Y0}, {X0 + 1000} {Y0}, {X0 + 1000} {Y0 + 1000})"
    points = numeric_points([(X0 + 500, Y0 + 50, 120, 40), (X0 + 1050, Y0 + 500, 120, 40)])
    rows = sorted(
        attributes(run(line_layer([kinked], names=["K"]), points)["OUTPUT"]),
        key=lambda r: r["chainage"],
    )
    assert [r["chainage"] for r in rows] == pytest.approx([500.0, 1500.0])
    assert [r["line_az"] for r in rows] == pytest.approx([90.0, 0.0])
    assert [r["line_angle"] for r in rows] == pytest.approx([60.0, 30.0])


def test_ticks_are_drawn_at_the_plotted_dip_toward_dips_to(provider):
    line = line_layer([EAST_WEST], names=["EW"])
    points = numeric_points(
        [(X0 + 1500, Y0 + 1100, 400, "90", "30"), (X0 + 2500, Y0 + 1100, 400, "270", "30")]
    )
    result = run(line, points, VERTICAL_EXAGGERATION=2.0, TICK_LENGTH=100.0)
    plot = np.degrees(np.arctan(2 * np.tan(np.radians(30))))  # Groshong 2006, eq. 6.1
    for tick in result["OUTPUT_TICKS"].getFeatures():
        a, b = list(tick.geometry().vertices())
        assert tick["plot_dip"] == pytest.approx(plot)
        assert np.hypot(b.x() - a.x(), b.y() - a.y()) == pytest.approx(100.0)
        assert ((a.x() + b.x()) / 2, (a.y() + b.y()) / 2) == pytest.approx(
            (tick["chainage"], 800.0)
        )
        slope = np.degrees(np.arctan2(b.y() - a.y(), b.x() - a.x()))
        assert slope == pytest.approx(-plot if tick["dips_to"] == "end" else plot)
    assert {t["dips_to"] for t in result["OUTPUT_TICKS"].getFeatures()} == {"start", "end"}


def test_connectors_join_source_and_landing(provider):
    line = line_layer([EAST_WEST], names=["EW"])
    result = run(line, numeric_points([(X0 + 1500, Y0 + 1100, 120, 40)]))
    (connector,) = list(result["OUTPUT_CONNECTORS"].getFeatures())
    a, b = list(connector.geometry().vertices())
    assert (a.x(), a.y(), b.x(), b.y()) == pytest.approx(
        (X0 + 1500, Y0 + 1100, X0 + 1500, Y0 + 1000)
    )


def test_flags_unit_changed_and_no_elevation(provider):
    line = line_layer([EAST_WEST], names=["EW"])
    units = point_layer(
        [
            (
                f"POLYGON(({X0} {Y0}, {X0 + 4000} {Y0}, {X0 + 4000} {Y0 + 1050}, "
                f"{X0} {Y0 + 1050}, {X0} {Y0}))",
                ["LOW"],
            ),
            (
                f"POLYGON(({X0} {Y0 + 1050}, {X0 + 4000} {Y0 + 1050}, "
                f"{X0 + 4000} {Y0 + 2000}, {X0} {Y0 + 2000}, {X0} {Y0 + 1050}))",
                ["HIGH"],
            ),
        ],
        [("unit", "string")],
        geometry_type="Polygon",
    )
    points = numeric_points([(X0 + 1500, Y0 + 1100, 90, 90), (X0 + 2500, Y0 + 1020, 0, 0)])
    rows = sorted(
        attributes(run(line, points, UNITS=units, UNIT_FIELD="unit")["OUTPUT"]),
        key=lambda r: r["chainage"],
    )
    assert rows[0]["flags"].split(",") == ["unit_changed", "no_elevation", "vertical"]
    assert rows[1]["flags"].split(",") == ["oblique", "no_elevation", "horizontal"]
    assert is_null(rows[0]["elev"])


def test_bad_input_is_skipped_with_reasons_and_counts_reconcile(provider):
    line = line_layer([EAST_WEST], names=["EW"])
    p = f"POINT({X0 + 1500} {Y0 + 1100})"
    rows = [
        (p, ["120", None]),
        (p, ["abc", "40"]),
        (p, ["120", "95"]),
        (p, ["-10", "40"]),
        (p, ["400", "40"]),
        (None, ["120", "40"]),
        (p, ["120", "40"]),
        (f"POINT({X0 + 1500} {Y0 + 5000})", ["120", "40"]),
        (f"POINT({X0 - 100} {Y0 + 1000})", ["120", "40"]),
    ]
    points = point_layer(rows, [("az", "string"), ("dip", "string")])
    log = LogFeedback()
    result = run(line, points, feedback=log)
    reasons = [
        r["reason"] for r in sorted(attributes(result["SKIPPED"]), key=lambda r: r["src_fid"])
    ]
    assert reasons == [
        "missing dip",
        "non-numeric azimuth: 'abc'",
        "dip out of range",
        "azimuth out of range",
        "azimuth out of range",
        "null geometry",
        "beyond max distance",
        "beyond the end of the line",
    ]
    assert result["OUTPUT"].featureCount() == 1
    algorithm_log = log.algorithm_log()
    assert algorithm_log[-3] == "Section EW: 1 attitude(s), 1 flagged."  # no_elevation
    assert algorithm_log[-2] == "Summary: read=9 written=1 skipped=8"
    assert algorithm_log[-1] == (
        "Skipped: azimuth out of range=2, beyond max distance=1, "
        "beyond the end of the line=1, dip out of range=1, "
        "missing dip=1, non-numeric azimuth=1, null geometry=1"
    )


def test_text_problems_are_quoted(provider):
    line = line_layer([EAST_WEST], names=["EW"])
    p = f"POINT({X0 + 1500} {Y0 + 1100})"
    points = point_layer(
        [(p, ["N45E 30NE"]), (p, ["see sketch"]), (p, ["120/40"])], [("t", "string")]
    )
    result = run(line, points, CONVENTION=3, TEXT_FIELD="t", AZIMUTH_FIELD=None, DIP_FIELD=None)
    reasons = sorted(r["reason"] for r in attributes(result["SKIPPED"]))
    assert reasons == ["quadrant contradicts strike", "unparsed text: 'see sketch'"]


def test_points_in_other_crs_including_geographic(provider):
    line = line_layer([EAST_WEST], names=["EW"])
    here = (X0 + 1500, Y0 + 1100)
    reference = attributes(run(line, numeric_points([(*here, 120, 40)]))["OUTPUT"])[0]
    for epsg in (3035, 4326):
        x, y = Transformer.from_crs(32633, epsg, always_xy=True).transform(*here)
        moved = attributes(run(line, numeric_points([(x, y, 120, 40)], f"EPSG:{epsg}"))["OUTPUT"])
        assert moved[0]["chainage"] == pytest.approx(reference["chainage"], abs=1e-4)
        assert moved[0]["app_dip"] == pytest.approx(reference["app_dip"])


def test_a_missing_field_for_the_convention_is_a_clear_error(provider):
    line = line_layer([EAST_WEST], names=["EW"])
    with pytest.raises(QgsProcessingException, match="Attitude text field"):
        run(line, numeric_points([(X0, Y0, 1, 1)]), CONVENTION=3)
