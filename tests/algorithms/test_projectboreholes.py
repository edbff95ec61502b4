"""sectionwright:projectboreholes through processing.run."""

import demo_world as W
import make_demo
import numpy as np
import processing
import pytest
import run_parameters as P
from feedback import LogFeedback
from layers import attributes, line_layer, point_layer
from pyproj import Proj, Transformer
from qgis.core import QgsVectorLayer

X0, Y0 = 431000.0, 5127000.0
EAST_WEST = f"LINESTRING({X0} {Y0 + 1000}, {X0 + 4000} {Y0 + 1000})"
COLLAR_FIELDS = [("hole", "string"), ("az", "string"), ("incl", "string"), ("depth", "string")]


def run(lines, collars, feedback=None, **extra):
    parameters = {
        **P.lines(lines),
        **P.boreholes(collars),
        **P.memory("OUTPUT", "OUTPUT_INTERVALS", "OUTPUT_TRACES", "SKIPPED"),
    }
    parameters.update(extra)
    return processing.run("sectionwright:projectboreholes", parameters, feedback=feedback)


def demo_run(demo_dir, **extra):
    parameters = {**P.demo_projectboreholes(demo_dir), **extra}
    return run(parameters.pop("INPUT"), parameters.pop("COLLARS"), **parameters)


@pytest.fixture(scope="module")
def demo(provider, demo_dir):
    return demo_run(demo_dir)


def trace_points(layer):
    """{hole: (n, 3) vertices} of the 3-D traces, with measured depth by
    summing chords (exact for straight holes; 5 m chords of the curved hole
    differ from its arc by under a micrometre)."""
    traces = {}
    for feature in layer.getFeatures():
        xyz = np.array([[v.x(), v.y(), v.z()] for v in feature.geometry().vertices()])
        md = np.r_[0.0, np.cumsum(np.linalg.norm(np.diff(xyz, axis=0), axis=1))]
        traces[feature["hole"]] = (xyz, md)
    return traces


def test_demo_holes_hit_the_known_contacts_at_the_logged_depths(demo, demo_dir):
    # Ground truth: the demo's intervals were logged from the analytic world
    # along each hole's exact path; at every boundary between two intervals
    # the desurveyed trace must be at that contact (units differ just above
    # and below it).
    traces = trace_points(demo["OUTPUT_TRACES"])
    intervals = sorted(attributes(demo["OUTPUT_INTERVALS"]), key=lambda r: (r["hole"], r["from_m"]))
    checked = 0
    for above, below in zip(intervals, intervals[1:]):
        if above["hole"] != below["hole"]:
            continue
        xyz, md = traces[above["hole"]]
        at = [
            np.array([np.interp(above["to_m"] + d, md, xyz[:, k]) for k in range(3)])
            for d in (-0.5, 0.5)
        ]
        units = [W.UNITS[int(W.unit_index(*p))] for p in at]
        assert units == [above["code"], below["code"]], above["hole"]
        checked += 1
    assert checked >= 6


def test_the_curved_hole_follows_its_arc(demo):
    # Exact geometry: TG-07 is a circular arc (make_demo.arc_path); minimum
    # curvature reproduces arcs exactly (Sawaryn & Thorogood 2005).
    hole_id, u, v, azimuth, _, depth = make_demo.CURVED
    xyz, md = trace_points(demo["OUTPUT_TRACES"])["TG-07"]
    collar = np.array(
        [W.ORIGIN[0] + u, W.ORIGIN[1] + v, float(W.ground(W.ORIGIN[0] + u, W.ORIGIN[1] + v))]
    )
    path = make_demo.arc_path(azimuth, depth)
    depths = np.arange(0.0, depth + 1e-9, 5.0)
    np.testing.assert_allclose(xyz, collar + path(depths), atol=1e-6)


def test_a_vertical_hole_sits_at_its_collars_chainage(provider):
    collars = point_layer(
        [(f"POINT Z({X0 + 1234} {Y0 + 1100} 500)", ["V", "", "90", "200"])],
        COLLAR_FIELDS,
        geometry_type="PointZ",
    )
    result = run(line_layer([EAST_WEST], names=["EW"]), collars, VERTICAL_EXAGGERATION=3.0)
    (hole,) = list(result["OUTPUT"].getFeatures())
    vertices = list(hole.geometry().vertices())
    assert all(v.x() == pytest.approx(1234.0) for v in vertices)
    assert (vertices[0].y(), vertices[-1].y()) == pytest.approx((1500.0, 900.0))
    assert (hole["off_min"], hole["off_max"], hole["depth"]) == pytest.approx((-100, -100, 200))


def test_inclined_holes_and_true_north(provider):
    # A hole 45° below the horizontal toward 180 crosses an east-west section
    # 100 m south of its collar at 100 m below it. With true north the
    # azimuth turns by −γ (pyproj Proj.get_factors meridian convergence).
    x, y = X0 + 1500, Y0 + 1100
    collars = point_layer(
        [(f"POINT Z({x} {y} 500)", ["S", "180", "-45", "300"])],
        COLLAR_FIELDS,
        geometry_type="PointZ",
    )
    grid = run(line_layer([EAST_WEST], names=["EW"]), collars)
    (hole,) = list(grid["OUTPUT"].getFeatures())
    assert hole["off_min"] == pytest.approx(-100.0) and hole["off_max"] > 100.0
    xyz, _ = trace_points(grid["OUTPUT_TRACES"])["S"]
    assert np.interp(Y0 + 1000, xyz[::-1, 1], xyz[::-1, 2]) == pytest.approx(400.0, abs=1e-6)
    lon, lat = Transformer.from_crs(32633, 4326, always_xy=True).transform(x, y)
    gamma = Proj("EPSG:32633").get_factors(lon, lat).meridian_convergence
    true = run(line_layer([EAST_WEST], names=["EW"]), collars, NORTH_REFERENCE=1)
    xyz_true, _ = trace_points(true["OUTPUT_TRACES"])["S"]
    heading = np.degrees(np.arctan2(*(xyz_true[-1, :2] - xyz_true[0, :2]))) % 360
    assert heading == pytest.approx(180.0 - gamma, abs=1e-6)


def test_bad_rows_are_skipped_and_the_rest_still_drawn(provider, tmp_path):
    collars = point_layer(
        [
            (f"POINT Z({X0 + 1000} {Y0 + 1050} 500)", ["A", "0", "90", "300"]),
            (f"POINT Z({X0 + 2000} {Y0 + 1050} 500)", ["A", "0", "90", "300"]),  # duplicate id
            (f"POINT Z({X0 + 2500} {Y0 + 5000} 500)", ["FAR", "0", "90", "300"]),
            (None, ["NOGEO", "0", "90", "100"]),
            (f"POINT Z({X0 + 3000} {Y0 + 1050} 500)", ["B", "", "60", "200"]),  # no azimuth
        ],
        COLLAR_FIELDS,
        geometry_type="PointZ",
    )
    surveys_csv = tmp_path / "surveys.csv"
    surveys_csv.write_text(
        "hole,depth,az,incl\nA,0,0,90\nA,100,10,85\nA,80,10,85\nGHOST,10,0,90\nA,200,20,80\n"
    )
    intervals_csv = tmp_path / "intervals.csv"
    intervals_csv.write_text(
        "hole,from,to,code\nA,0,120,SAND\nA,100,150,CLAY\nA,120,310,ROCK\n"
        "A,150,290,ROCK\nGHOST,0,5,X\n"
    )
    surveys = QgsVectorLayer(f"file://{surveys_csv}?type=csv&geomType=none", "s", "delimitedtext")
    intervals = QgsVectorLayer(
        f"file://{intervals_csv}?type=csv&geomType=none", "i", "delimitedtext"
    )
    assert surveys.isValid() and intervals.isValid()
    log = LogFeedback()
    result = run(
        line_layer([EAST_WEST], names=["EW"]),
        collars,
        feedback=log,
        SURVEYS=surveys,
        SURVEY_HOLE_FIELD="hole",
        SURVEY_DEPTH_FIELD="depth",
        SURVEY_AZIMUTH_FIELD="az",
        SURVEY_INCLINATION_FIELD="incl",
        INTERVALS=intervals,
        INTERVAL_HOLE_FIELD="hole",
        INTERVAL_FROM_FIELD="from",
        INTERVAL_TO_FIELD="to",
        INTERVAL_CODE_FIELD="code",
    )
    skipped = sorted((r["table"], r["hole"], r["reason"]) for r in attributes(result["SKIPPED"]))
    assert skipped == [
        ("collars", "A", "duplicate hole id"),
        ("collars", "B", "missing azimuth"),
        ("collars", "FAR", "beyond max distance"),
        ("collars", "NOGEO", "null geometry"),
        ("intervals", "A", "beyond total depth"),
        ("intervals", "A", "overlaps the interval above"),
        ("intervals", "GHOST", "no collar for hole"),
        ("surveys", "A", "survey out of depth order"),
        ("surveys", "GHOST", "no collar for hole"),
    ]
    assert [r["hole"] for r in attributes(result["OUTPUT"])] == ["A"]
    assert sorted(r["code"] for r in attributes(result["OUTPUT_INTERVALS"])) == ["ROCK", "SAND"]
    assert log.algorithm_log()[-2] == "Summary: read=15 written=6 skipped=9"


def test_a_wandering_hole_is_reported(provider):
    collars = point_layer(
        [(f"POINT Z({X0 + 1500} {Y0 + 1200} 500)", ["W", "0", "5", "1000"])],
        COLLAR_FIELDS,
        geometry_type="PointZ",
    )
    log = LogFeedback()
    run(line_layer([EAST_WEST], names=["EW"]), collars, feedback=log)
    assert any("wanders up to" in line and "W" in line for line in log.lines)
