"""Section-view geometry placed back on the map along kinked lines."""

import numpy as np
import shapely
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from sectionwright.algorithms.core.section_to_map import map_positions, place_on_map

KINKED = np.array([[1000.0, 2000.0], [1800.0, 2600.0], [1850.0, 3400.0], [900.0, 3900.0]])


def kinked_lines():
    """Random polylines of 2-6 vertices, segments 20-2000 m long."""
    step = st.tuples(
        st.floats(20.0, 2000.0), st.floats(0.0, 360.0, exclude_max=True)
    )  # (length, azimuth)
    return st.lists(step, min_size=1, max_size=5).map(
        lambda steps: np.vstack(
            (
                [[500.0, 800.0]],
                [500.0, 800.0]
                + np.cumsum(
                    [[d * np.sin(np.radians(a)), d * np.cos(np.radians(a))] for d, a in steps],
                    axis=0,
                ),
            )
        )
    )


@settings(max_examples=60, deadline=None)
@given(kinked_lines(), st.floats(0.0, 1.0), st.floats(-500.0, 3000.0), st.floats(0.2, 10.0))
def test_round_trip_is_exact_on_kinked_lines(line, fraction, elevation, exaggeration):
    # Independent inverse: shapely's line_locate_point (GEOS) gives the
    # chainage of the placed point back; z × VE gives the view's y.
    # A self-crossing line has two chainages at its crossing: no inverse.
    assume(shapely.is_simple(shapely.linestrings(line)))
    length = shapely.length(shapely.linestrings(line))
    chainage = fraction * length
    (placed,) = place_on_map(
        line, [shapely.points(chainage, elevation * exaggeration)], exaggeration
    )
    x, y, z = shapely.get_coordinates(placed, include_z=True)[0]
    back = shapely.line_locate_point(shapely.linestrings(line), shapely.points(x, y))
    assert abs(back - chainage) < 1e-6
    assert abs(z * exaggeration - elevation * exaggeration) < 1e-6
    assert shapely.distance(shapely.linestrings(line), shapely.points(x, y)) < 1e-6


def test_every_vertex_of_a_placed_line_lies_on_the_section_line():
    # A form line from chainage 100 to 2500 crosses the two kinks (at 1000
    # and 1801.6 m): the placed line must bend there, not cut the corner.
    view = shapely.linestrings([[100.0, 900.0], [2500.0, 100.0]])
    (placed,) = place_on_map(KINKED, [view], 2.0)
    xyz = shapely.get_coordinates(placed, include_z=True)
    line = shapely.linestrings(KINKED)
    assert len(xyz) == 4
    assert shapely.distance(line, shapely.points(xyz[:, :2])).max() < 1e-9
    np.testing.assert_allclose(xyz[1, :2], KINKED[1], atol=1e-9)
    np.testing.assert_allclose(xyz[2, :2], KINKED[2], atol=1e-9)
    # z is linear in chainage along the view's straight segment
    chainage = shapely.line_locate_point(line, shapely.points(xyz[:, :2]))
    np.testing.assert_allclose(xyz[:, 2] * 2.0, np.interp(chainage, [100, 2500], [900, 100]))


def test_beyond_the_ends_the_line_continues_along_its_end_segments():
    first = (KINKED[1] - KINKED[0]) / np.linalg.norm(KINKED[1] - KINKED[0])
    last = (KINKED[3] - KINKED[2]) / np.linalg.norm(KINKED[3] - KINKED[2])
    length = shapely.length(shapely.linestrings(KINKED))
    xy = map_positions(KINKED, np.array([-150.0, length + 240.0]))
    np.testing.assert_allclose(xy[0], KINKED[0] - 150.0 * first, atol=1e-9)
    np.testing.assert_allclose(xy[1], KINKED[3] + 240.0 * last, atol=1e-9)


def test_types_are_kept_and_gain_z():
    view = shapely.from_wkt(
        [
            "POINT (10 20)",
            "MULTIPOINT (10 20, 30 40)",
            "MULTILINESTRING ((0 0, 1200 10), (1500 0, 1600 0))",
            "POLYGON ((900 0, 1100 0, 1100 50, 900 50, 900 0))",
            "MULTIPOLYGON (((0 0, 10 0, 10 10, 0 0)), ((20 0, 30 0, 30 10, 20 0)))",
            "LINESTRING EMPTY",
            None,
        ]
    )
    placed = place_on_map(KINKED, view, 1.0)
    assert [None if g is None else shapely.get_type_id(g) for g in placed] == [
        0,
        4,
        5,
        3,
        6,
        None,
        None,
    ]
    assert all(shapely.has_z(g) for g in placed[:5])
    # The polygon spans the kink at 1000 m: both its horizontal edges bend there.
    ring = shapely.get_coordinates(shapely.get_exterior_ring(placed[3]), include_z=True)
    assert sum(np.allclose(p[:2], KINKED[1]) for p in ring) == 2
    assert shapely.get_num_geometries(placed[2]) == 2
