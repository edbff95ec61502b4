"""Unit intervals, crossings and contact planes from traces."""

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from sectionwright.algorithms.core.geology import (
    boundary_crossings,
    contact_crossings,
    unit_intervals,
)
from sectionwright.algorithms.core.trace_fit import plane_fits, trace_windows

LINE = np.array([[0.0, 0.0], [600.0, 300.0], [900.0, 900.0]])


def blobs(seed, count=25):
    rng = np.random.default_rng(seed)
    centres = rng.uniform(-100, 1000, (count, 2))
    polygons = shapely.buffer(shapely.points(centres), rng.uniform(20, 180, count), quad_segs=4)
    return polygons, rng.integers(0, 4, count)


@settings(max_examples=40, deadline=None)
@given(st.integers(0, 1000))
def test_intervals_tile_the_line_exactly(seed):
    polygons, units = blobs(seed)
    parts = unit_intervals(LINE, polygons, units)
    length = shapely.LineString(LINE).length
    assert parts.start[0] == 0.0 and parts.end[-1] == pytest.approx(length)
    np.testing.assert_array_equal(parts.start[1:], parts.end[:-1])
    assert np.sum(parts.end - parts.start) == pytest.approx(length)
    assert np.all(parts.unit[1:] != parts.unit[:-1]) or np.any(parts.overlap)


def test_crossing_chainages_match_shapely_intersections():
    # Source: shapely 2 / GEOS: the line cut by the union of each unit's
    # polygons, pieces located with line_locate_point — an independent path.
    polygons, units = blobs(3)
    line = shapely.LineString(LINE)
    parts = unit_intervals(LINE, polygons, units)
    chainage, before, after = boundary_crossings(parts)
    expected = []
    for unit in np.unique(units):
        area = shapely.union_all(polygons[units == unit])
        inside = shapely.intersection(line, area)
        for piece in shapely.get_parts(shapely.line_merge(inside)):
            ends = shapely.get_coordinates(piece)[[0, -1]]
            expected.extend(shapely.line_locate_point(line, shapely.points(ends)))
    expected = np.unique(np.round([e for e in expected if 1e-6 < e < line.length - 1e-6], 6))
    overlapping = np.any(parts.overlap)
    if not overlapping:
        np.testing.assert_allclose(np.unique(np.round(chainage, 6)), expected, atol=1e-6)
    assert np.all(before != after)


def test_overlaps_go_to_the_first_polygon_and_are_flagged():
    polygons = [shapely.box(0, -1, 6, 1), shapely.box(4, -1, 10, 1)]
    parts = unit_intervals(np.array([[0.0, 0], [12, 0]]), polygons, np.array([1, 0]))
    assert parts.start.tolist() == [0.0, 4.0, 6.0, 10.0]
    assert parts.unit.tolist() == [1, 1, 0, -1]
    assert parts.overlap.tolist() == [False, True, False, False]


def test_a_corner_touching_the_line_cuts_nothing():
    polygons = [shapely.box(0, -5, 20, 5), shapely.Polygon([(8, 5), (10, 7), (12, 5), (10, 3)])]
    parts = unit_intervals(np.array([[1.0, 5.0], [19, 5]]), polygons[1:], np.array([2]))
    assert parts.unit.tolist() == [-1, 2, -1] or parts.unit.tolist() == [-1]


def test_contacts_crossing_twice_and_touching_at_a_vertex():
    contacts = [
        shapely.LineString([(100, 100), (400, -50), (700, 500)]),
        shapely.LineString([(600, 300), (650, 100)]),
    ]
    chainage, which, along = contact_crossings(LINE, contacts)
    line = shapely.LineString(LINE)
    expected = shapely.line_locate_point(
        line, shapely.get_parts(shapely.intersection(line, contacts[0]))
    )
    assert sorted(chainage[which == 0]) == pytest.approx(sorted(expected))
    assert len(chainage[which == 0]) == len(expected) >= 2
    assert chainage[which == 1].tolist() == pytest.approx([line.project(shapely.Point(600, 300))])
    assert not along.any()


def test_the_classic_three_point_problem():
    # The three-point problem by its published construction (e.g. D. M.
    # Ragan, Structural Geology, 2009, ch. 1 — from memory): on the line
    # from the highest to the lowest point find the point at the middle
    # elevation; the line from it to the middle point is the strike; the dip
    # is the height difference over the horizontal distance across strike.
    a, b, c = (
        np.array([0.0, 0.0, 320.0]),
        np.array([800.0, 200.0, 180.0]),
        np.array([300.0, 700.0, 250.0]),
    )
    high, low, middle = a, b, c
    t = (high[2] - middle[2]) / (high[2] - low[2])
    on_line = high + t * (low - high)
    strike = (middle - on_line)[:2] / np.linalg.norm((middle - on_line)[:2])
    across = np.array([strike[1], -strike[0]])
    run = abs(np.dot((high - on_line)[:2], across))
    expected_dip = np.degrees(np.arctan((high[2] - middle[2]) / run))
    down = across if np.dot((low - on_line)[:2], across) > 0 else -across
    expected_direction = np.degrees(np.arctan2(down[0], down[1])) % 360
    dip_direction, dip, rms, ill = plane_fits(np.array([a, b, c]), np.zeros(3, int))
    assert dip[0] == pytest.approx(expected_dip, abs=1e-9)
    assert dip_direction[0] == pytest.approx(expected_direction, abs=1e-9)
    assert rms[0] == pytest.approx(0.0, abs=1e-4) and not ill[0]  # √ of a ~0 eigenvalue


def rugged(x, y):
    return 400 + 80 * np.sin(x / 230.0) + 60 * np.cos(y / 170.0) + 0.05 * x


def test_a_known_plane_is_recovered_from_its_trace_on_rugged_ground():
    # The trace is found independently with GDAL's contouring (Source: GDAL
    # ContourGenerate, a general-purpose library) at level 0 of
    # ground − plane on a 2 m grid; its points are draped on the exact ground.
    from osgeo import gdal, ogr

    dip, direction = 35.0, 140.0
    d = np.radians(direction)

    def plane(x, y):
        return 420 - np.tan(np.radians(dip)) * (x * np.sin(d) + y * np.cos(d))

    size, cell = 600, 2.0
    centres = (np.arange(size) + 0.5) * cell
    x, y = np.meshgrid(centres, centres[::-1])
    raster = gdal.GetDriverByName("MEM").Create("", size, size, 1, gdal.GDT_Float64)
    raster.SetGeoTransform((0, cell, 0, size * cell, 0, -cell))
    raster.GetRasterBand(1).WriteArray(rugged(x, y) - plane(x, y))
    store = ogr.GetDriverByName("Memory").CreateDataSource("")  # keep: layers die with it
    layer = store.CreateLayer("c")
    layer.CreateField(ogr.FieldDefn("id", ogr.OFTInteger))
    layer.CreateField(ogr.FieldDefn("z", ogr.OFTReal))
    gdal.ContourGenerate(raster.GetRasterBand(1), 0, 0, [0.0], 0, 0, layer, 0, 1)
    traces = [shapely.from_wkt(f.GetGeometryRef().ExportToWkt()) for f in layer]
    longest = max(traces, key=lambda g: g.length)
    centre = longest.interpolate(0.5, normalized=True)
    xy, which = trace_windows(
        [longest], np.array([0]), np.array([[centre.x, centre.y]]), 250.0, 5.0
    )
    xyz = np.column_stack((xy, rugged(xy[:, 0], xy[:, 1])))
    got_direction, got_dip, rms, ill = plane_fits(xyz, which)
    assert got_dip[0] == pytest.approx(dip, abs=0.5)
    assert got_direction[0] == pytest.approx(direction, abs=1.0)
    assert not ill[0]


def test_straight_and_flat_traces_are_ill_conditioned():
    t = np.linspace(0, 500, 60)
    straight = np.column_stack((t, 0.5 * t, 300 - 0.2 * t))
    flat = np.column_stack((t, 80 * np.sin(t / 60), np.full_like(t, 250.0)))
    curved = np.column_stack((t, 80 * np.sin(t / 60), 250 + 0.3 * 80 * np.sin(t / 60)))
    xyz = np.vstack((straight, flat, curved))
    group = np.repeat([0, 1, 2], len(t))
    _, dip, _, ill = plane_fits(xyz, group)
    assert ill.tolist() == [True, True, False]
    assert dip[2] == pytest.approx(np.degrees(np.arctan(0.3)), abs=1e-6)


def test_too_few_points_give_no_plane():
    dip_direction, dip, rms, ill = plane_fits(np.array([[0.0, 0, 0], [1, 1, 1]]), np.zeros(2, int))
    assert np.isnan(dip[0]) and ill[0]
