"""sectionwright:sectionsin3d through processing.run."""

import numpy as np
import processing
import pytest
import run_parameters as P
import shapely
from feedback import LogFeedback
from layers import attributes, line_layer, plane_raster, point_layer
from qgis.core import QgsProcessingException, QgsWkbTypes

X0, Y0 = 431000.0, 5127000.0
# Kinked: east 2 km, then north-east 1.5 km, then north 1 km.
KINKED = (
    f"LINESTRING({X0} {Y0}, {X0 + 2000} {Y0}, "
    f"{X0 + 2000 + 1500 / 2**0.5} {Y0 + 1500 / 2**0.5}, "
    f"{X0 + 2000 + 1500 / 2**0.5} {Y0 + 1500 / 2**0.5 + 1000})"
)


def plane(x, y):
    return 300.0 + 0.03 * (x - X0) - 0.02 * (y - Y0)


def in_3d(lines, view, feedback=None, **extra):
    return processing.run(
        "sectionwright:sectionsin3d",
        dict(
            INPUT=lines,
            LINE_ID_FIELD="name",
            SECTION_LAYER=view,
            OUTPUT="memory:",
            SKIPPED="memory:",
            **extra,
        ),
        feedback=feedback,
    )


def vertices(layer):
    return {
        f["section"]: np.array([[v.x(), v.y(), v.z()] for v in f.geometry().vertices()])
        for f in layer.getFeatures()
    }


@pytest.fixture(scope="module")
def kinked_profile(provider, tmp_path_factory):
    dem = plane_raster(
        tmp_path_factory.mktemp("plane") / "plane.tif",
        plane,
        (X0 - 200, 25.0, 0.0, Y0 + 2500, 0.0, -25.0),
        (120, 200),
        32633,
    )
    lines = line_layer([KINKED], names=["K"])
    result = processing.run(
        "sectionwright:profile",
        {
            "INPUT": lines,
            "LINE_ID_FIELD": "name",
            "DEM": dem,
            "STEP": 70,
            "VERTICAL_EXAGGERATION": 3.0,
            "OUTPUT": "memory:",
            "OUTPUT_SECTION": "memory:",
        },
    )
    return lines, result


def test_the_profile_stands_on_the_map_at_its_true_elevations(kinked_profile):
    # Source of truth: the analytic plane the DEM was made from (bilinear
    # interpolation reproduces a plane exactly), and GEOS (shapely) for the
    # distance to the line and the chainage of each placed vertex.
    lines, profile = kinked_profile
    log = LogFeedback()
    result = in_3d(lines, profile["OUTPUT_SECTION"], feedback=log)
    layer = result["OUTPUT"]
    assert QgsWkbTypes.hasZ(layer.wkbType()) and layer.crs().authid() == "EPSG:32633"
    assert layer.fields().names() == profile["OUTPUT_SECTION"].fields().names()
    xyz = vertices(layer)["K"]
    line = shapely.from_wkt(KINKED)
    assert shapely.distance(line, shapely.points(xyz[:, :2])).max() < 1e-6
    np.testing.assert_allclose(xyz[:, 2], plane(xyz[:, 0], xyz[:, 1]), atol=1e-6)
    view = np.array(
        [
            [v.x(), v.y()]
            for v in next(profile["OUTPUT_SECTION"].getFeatures()).geometry().vertices()
        ]
    )
    chainage = shapely.line_locate_point(line, shapely.points(xyz[:, :2]))
    np.testing.assert_allclose(chainage, view[:, 0], atol=1e-6)
    np.testing.assert_allclose(xyz[:, 2] * 3.0, view[:, 1], atol=1e-6)
    # The map-space sample points of the same run (Z = elevation) are its vertices.
    samples = np.array(
        [
            [p.geometry().constGet().x(), p.geometry().constGet().y(), p["elev"]]
            for p in sorted(profile["OUTPUT"].getFeatures(), key=lambda p: p["chainage"])
        ]
    )
    np.testing.assert_allclose(xyz, samples, atol=1e-6)
    assert log.algorithm_log()[-1] == "Summary: read=1 written=1 skipped=0"


def test_holes_in_the_section_plane_coincide_with_their_desurveyed_traces(kinked_profile):
    # Hole P lies in the plane of the second (north-east) segment, dipping
    # 40° toward its end; hole Q starts 60 m from the line's start and
    # drills back toward it at 20°, so its trace runs past chainage 0 and
    # must continue along the first segment. projectboreholes' own
    # OUTPUT_TRACES (minimum curvature, straight holes) is the reference.
    lines, _ = kinked_profile
    c = 1500 / 2**0.5
    collars = point_layer(
        [
            (f"POINT Z({X0 + 2000 + c / 3} {Y0 + c / 3} 420)", ["P", "45", "40", "600"]),
            (f"POINT Z({X0 + 60} {Y0} 300)", ["Q", "270", "20", "400"]),
        ],
        [("hole", "string"), ("az", "double"), ("incl", "double"), ("depth", "double")],
        geometry_type="PointZ",
    )
    holes = processing.run(
        "sectionwright:projectboreholes",
        {
            **P.lines(lines),
            **P.boreholes(collars),
            "VERTICAL_EXAGGERATION": 2.0,
            **P.memory("OUTPUT", "OUTPUT_TRACES"),
        },
    )
    placed = {
        f["hole"]: np.array([[v.x(), v.y(), v.z()] for v in f.geometry().vertices()])
        for f in in_3d(lines, holes["OUTPUT"])["OUTPUT"].getFeatures()
    }
    traces = {
        f["hole"]: np.array([[v.x(), v.y(), v.z()] for v in f.geometry().vertices()])
        for f in holes["OUTPUT_TRACES"].getFeatures()
    }
    assert sorted(placed) == ["P", "Q"]
    for hole in ("P", "Q"):
        trace = shapely.linestrings(traces[hole])
        # every placed vertex is on the trace (3-D: xy on it, z at its depth)
        along = shapely.line_locate_point(trace, shapely.points(placed[hole][:, :2]))
        on_trace = shapely.get_coordinates(shapely.line_interpolate_point(trace, along))
        np.testing.assert_allclose(placed[hole][:, :2], on_trace, atol=1e-6)
        z = np.interp(
            along,
            np.r_[0, np.cumsum(np.hypot(*np.diff(traces[hole][:, :2], axis=0).T))],
            traces[hole][:, 2],
        )
        np.testing.assert_allclose(placed[hole][:, 2], z, atol=1e-6)
    assert placed["Q"][:, 0].min() < X0 - 300  # beyond the start, on the first segment's line
    np.testing.assert_allclose(placed["Q"][:, 1], Y0, atol=1e-6)


def test_unknown_sections_are_skipped_and_geographic_lines_get_their_crs_back(provider):
    from qgis.core import QgsCoordinateReferenceSystem, QgsCoordinateTransform, QgsProject

    from sectionwright.algorithms.outputs.section_space import SECTION_CRS_WKT

    to_wgs84 = QgsCoordinateTransform(
        QgsCoordinateReferenceSystem("EPSG:32633"),
        QgsCoordinateReferenceSystem("EPSG:4326"),
        QgsProject.instance(),
    )
    start = to_wgs84.transform(X0, Y0)
    end = to_wgs84.transform(X0 + 3000, Y0)
    lines = line_layer(
        [f"LINESTRING({start.x()} {start.y()}, {end.x()} {end.y()})"], "EPSG:4326", names=["G"]
    )
    view = point_layer(
        [
            ("POINT(1000 900)", ["G", 3.0]),
            ("POINT(10 10)", ["ELSEWHERE", 3.0]),
            (None, ["G", 3.0]),
            ("POINT(20 20)", ["G", None]),
        ],
        [("section", "string"), ("ve", "double")],
        epsg=SECTION_CRS_WKT,
    )
    view.setCrs(QgsCoordinateReferenceSystem.fromWkt(SECTION_CRS_WKT))
    log = LogFeedback()
    result = in_3d(lines, view, feedback=log)
    (point,) = list(result["OUTPUT"].getFeatures())
    assert result["OUTPUT"].crs().authid() == "EPSG:4326"
    assert point.geometry().constGet().z() == pytest.approx(300.0)
    lon_lat = point.geometry().asPoint()
    to_utm = QgsCoordinateTransform(
        QgsCoordinateReferenceSystem("EPSG:4326"),
        QgsCoordinateReferenceSystem("EPSG:32633"),
        QgsProject.instance(),
    )
    back = to_utm.transform(lon_lat)
    # The working CRS is the automatic UTM zone (33N here); the line is
    # straight there to well under a millimetre over 3 km.
    assert (back.x(), back.y()) == pytest.approx((X0 + 1000, Y0), abs=0.01)
    reasons = sorted(r["reason"] for r in attributes(result["SKIPPED"]))
    assert reasons == ["missing ve", "null geometry", "section not among the lines"]
    assert log.algorithm_log()[-2:] == [
        "Summary: read=4 written=1 skipped=3",
        "Skipped: missing ve=1, null geometry=1, section not among the lines=1",
    ]


def test_a_map_layer_is_refused_with_its_name(kinked_profile):
    lines, profile = kinked_profile
    with pytest.raises(QgsProcessingException, match="Section-view layer: .* is a map layer"):
        in_3d(lines, profile["OUTPUT"])
