"""Points carried onto the nearest of many section lines."""

import numpy as np
import pytest
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from sectionwright.algorithms.core.projection import (
    SectionNetwork,
    along_directions,
    line_azimuths,
    nearest_points,
    plunge_elevation,
    signed_offsets,
)

REACH = 300.0


def random_lines(rng, count=12):
    lines = []
    for _ in range(count):
        n = rng.integers(2, 6)
        lines.append(np.cumsum(rng.normal(0, 700, (n, 2)), axis=0) + rng.uniform(0, 3000, 2))
    return lines


@pytest.fixture
def world():
    rng = np.random.default_rng(11)
    lines = random_lines(rng)
    return lines, SectionNetwork(lines, 2 * REACH), rng.uniform(-500, 3500, (3000, 2))


def reachable_distance(line, points, xy):
    """Distance from each point to a line, by shapely segment by segment,
    leaving out the first segment for points behind the first vertex and the
    last for points past the last vertex (their perpendicular misses)."""
    best = np.full(len(xy), np.inf)
    count = len(line) - 1
    for k in range(count):
        a, b = line[k], line[k + 1]
        distance = shapely.distance(shapely.LineString([a, b]), points)
        along = np.einsum("ij,j->i", xy - a, b - a) / np.dot(b - a, b - a)
        if k == 0:
            distance = np.where((along < 0) & (distance > 0), np.inf, distance)
        if k == count - 1:
            distance = np.where((along > 1) & (distance > 0), np.inf, distance)
        best = np.minimum(best, distance)
    return best


def test_nearest_line_and_chainage_match_shapely(world):
    # Source: shapely 2 / GEOS distance and line_locate_point, brute force
    # over every segment of every line: an independent implementation. A
    # point behind a line's first vertex or past its last does not reach the
    # end segment (its perpendicular misses the line).
    lines, network, xy = world
    landing = nearest_points(network, xy, REACH)
    points = shapely.points(xy)
    distances = np.array([reachable_distance(c, points, xy) for c in lines])
    nearest = distances.argmin(axis=0)
    within = distances.min(axis=0) <= REACH
    assert np.array_equal(landing.line >= 0, within)
    hit = np.flatnonzero(within)
    assert np.array_equal(landing.line[hit], nearest[hit])
    np.testing.assert_allclose(landing.travel[hit], distances.min(axis=0)[hit], atol=1e-8)
    geometries = [shapely.LineString(c) for c in lines]
    foot = shapely.points(landing.xy[hit])
    expected_chainage = [
        shapely.line_locate_point(geometries[nearest[i]], f) for i, f in zip(hit, foot)
    ]
    np.testing.assert_allclose(landing.chainage[hit], expected_chainage, atol=1e-7)


def test_along_directions_match_shapely_intersections(world):
    lines, network, xy = world
    azimuth = np.random.default_rng(3).uniform(0, 360, len(xy))
    landing = along_directions(network, xy, azimuth, REACH)
    geometries = [shapely.LineString(c) for c in lines]
    d = np.column_stack((np.sin(np.radians(azimuth)), np.cos(np.radians(azimuth))))
    for i in range(0, len(xy), 7):
        path = shapely.LineString([xy[i] - REACH * d[i], xy[i] + REACH * d[i]])
        best = (np.inf, -1)
        for index, line in enumerate(geometries):
            for x, y in shapely.get_coordinates(path.intersection(line)):
                travel = (x - xy[i, 0]) * d[i, 0] + (y - xy[i, 1]) * d[i, 1]
                if abs(travel) < abs(best[0]) - 1e-9:
                    best = (travel, index)
        assert landing.line[i] == best[1]
        if best[1] >= 0:
            assert landing.travel[i] == pytest.approx(best[0], abs=1e-6)


def test_kinked_line_chainage_and_segment_azimuth():
    line = np.array([[0.0, 0.0], [100.0, 0.0], [100.0, 200.0], [300.0, 200.0]])
    network = SectionNetwork([line], 60.0)
    xy = np.array([[50.0, -5.0], [104.0, 150.0], [250.0, 210.0]])
    landing = nearest_points(network, xy, 20.0)
    np.testing.assert_allclose(landing.chainage, [50.0, 250.0, 450.0])
    np.testing.assert_allclose(line_azimuths(network, landing), [90.0, 0.0, 90.0])


def test_offsets_are_positive_right_of_the_line_whatever_the_method():
    network = SectionNetwork([np.array([[0.0, 0.0], [0.0, 1000.0]])], 200.0)  # northward
    xy = np.array([[30.0, 500.0], [-40.0, 600.0]])
    perpendicular = nearest_points(network, xy, 100.0)
    np.testing.assert_allclose(signed_offsets(network, perpendicular, xy), [30.0, -40.0])
    oblique = along_directions(network, xy, np.array([60.0, 60.0]), 100.0)
    np.testing.assert_allclose(np.abs(oblique.travel), [30.0, 40.0] / np.sin(np.radians(60.0)))
    np.testing.assert_allclose(signed_offsets(network, oblique, xy), [30.0, -40.0])


@pytest.mark.parametrize(
    "trend, travel, z",
    [
        # Hand-computed (REFERENCES.md; Groshong 2006, ch. 6): a point 100 m
        # north of an east-west section at 500 m, plunge 30°.
        (180.0, 100.0, 500.0 - 100.0 * np.tan(np.radians(30.0))),  # down-plunge: 442.26
        (0.0, -100.0, 500.0 + 100.0 * np.tan(np.radians(30.0))),  # up-plunge: 557.74
        (
            135.0,
            100.0 / np.cos(np.radians(45.0)),
            500.0 - 100.0 / np.cos(np.radians(45.0)) * np.tan(np.radians(30.0)),
        ),  # 418.35
    ],
)
def test_plunge_projection_shifts_elevation_by_travel_times_tan_plunge(trend, travel, z):
    network = SectionNetwork([np.array([[-1000.0, 0.0], [1000.0, 0.0]])], 400.0)
    landing = along_directions(network, np.array([[0.0, 100.0]]), np.array([trend]), 250.0)
    assert landing.travel[0] == pytest.approx(travel)
    assert plunge_elevation(500.0, landing.travel, 30.0)[0] == pytest.approx(z)


def test_direction_parallel_to_the_line_reaches_nothing():
    network = SectionNetwork([np.array([[0.0, 0.0], [1000.0, 0.0]])], 200.0)
    landing = along_directions(network, np.array([[500.0, 10.0]]), np.array([90.0]), 100.0)
    assert landing.line[0] == -1


@settings(max_examples=60, deadline=None)
@given(st.integers(0, 10_000))
def test_chunking_does_not_change_results(seed):
    import sectionwright.algorithms.core.projection as projection

    rng = np.random.default_rng(seed)
    lines = random_lines(rng, 5)
    network = SectionNetwork(lines, 2 * REACH)
    xy = rng.uniform(-500, 3500, (257, 2))
    whole = nearest_points(network, xy, REACH)
    saved = projection.CHUNK
    projection.CHUNK = 10
    try:
        pieces = nearest_points(network, xy, REACH)
    finally:
        projection.CHUNK = saved
    assert np.array_equal(whole.line, pieces.line)
    np.testing.assert_array_equal(whole.chainage, pieces.chainage)
