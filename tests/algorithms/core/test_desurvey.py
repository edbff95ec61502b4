"""Minimum-curvature desurvey and borehole table checks."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sectionwright.algorithms.core.boreholes import (
    assemble_stations,
    check_intervals,
    check_surveys,
)
from sectionwright.algorithms.core.desurvey import (
    inclination_from_vertical,
    positions_at_depths,
    station_offsets,
)


def one_hole(md, inclination, azimuth, balanced=False):
    n = len(md)
    return station_offsets(
        np.asarray(md, float),
        np.asarray(inclination, float),
        np.asarray(azimuth, float),
        np.zeros(n, int),
        balanced,
    )


def textbook_step(md1, i1, a1, md2, i2, a2):
    """One step of the minimum curvature method written out as published,
    with the classic arccos form of the dogleg (S. J. Sawaryn and J. L.
    Thorogood, SPE Drilling & Completion 20(1), 2005, confirmed):
    cos DL = cos(I2 − I1) − sin I1 sin I2 (1 − cos(A2 − A1))."""
    i1, a1, i2, a2 = np.radians([i1, a1, i2, a2])
    cos_dl = np.cos(i2 - i1) - np.sin(i1) * np.sin(i2) * (1 - np.cos(a2 - a1))
    dl = np.arccos(np.clip(cos_dl, -1, 1))
    rf = 1.0 if dl == 0 else 2 / dl * np.tan(dl / 2)
    half = (md2 - md1) / 2
    north = half * (np.sin(i1) * np.cos(a1) + np.sin(i2) * np.cos(a2)) * rf
    east = half * (np.sin(i1) * np.sin(a1) + np.sin(i2) * np.sin(a2)) * rf
    down = half * (np.cos(i1) + np.cos(i2)) * rf
    return np.array([east, north, down])


@pytest.mark.parametrize(
    "step",
    [
        # Worked examples computed from the published formulas above: a build
        # and turn, a drop, and a turn across north.
        (1000.0, 12.0, 40.0, 1090.0, 17.5, 48.0),
        (2500.0, 35.0, 210.0, 2530.0, 31.0, 207.5),
        (800.0, 20.0, 350.0, 900.0, 22.0, 10.0),
    ],
)
def test_matches_the_published_formulas_step_by_step(step):
    md1, i1, a1, md2, i2, a2 = step
    got = one_hole([md1, md2], [i1, i2], [a1, a2])[-1]
    np.testing.assert_allclose(got, textbook_step(*step), atol=1e-9)


def test_quarter_circle_is_exact():
    # Source: Sawaryn & Thorogood 2005 (REFERENCES.md): a quarter circle of
    # radius R from vertical to horizontal gives ΔN = ΔTVD = R; and every
    # depth in between lies on the circle.
    radius = 250.0
    md = np.linspace(0, np.pi * radius / 2, 4)
    inclination = np.degrees(md / radius)
    offsets = one_hole(md, inclination, np.zeros(4))
    np.testing.assert_allclose(offsets[-1], [0.0, radius, radius], atol=1e-9)
    query = np.linspace(0, np.pi * radius / 2, 41)
    got = positions_at_depths(
        md, inclination, np.zeros(4), np.zeros(4, int), offsets, np.zeros(41, int), query
    )
    expected = np.column_stack(
        (np.zeros(41), radius * (1 - np.cos(query / radius)), radius * np.sin(query / radius))
    )
    np.testing.assert_allclose(got, expected, atol=1e-9)


def test_straight_hole_is_exact():
    # Exact geometry: a straight hole 60° below the horizontal toward 135.
    md = np.array([0.0, 100.0, 250.0])
    offsets = one_hole(md, [30.0] * 3, [135.0] * 3)
    along = 250.0 * np.sin(np.radians(30))
    np.testing.assert_allclose(
        offsets[-1],
        [
            along * np.sin(np.radians(135)),
            along * np.cos(np.radians(135)),
            250.0 * np.cos(np.radians(30)),
        ],
        atol=1e-9,
    )


def test_balanced_tangential_converges_to_minimum_curvature():
    # Balanced tangential is minimum curvature with RF = 1 (REFERENCES.md);
    # RF = 1 + DL²/12 + …, so the difference shrinks as the dogleg squared.
    differences = []
    for dogleg in (8.0, 4.0, 2.0, 1.0):
        md = np.array([0.0, 30.0])
        args = ([20.0, 20.0 + dogleg], [60.0, 60.0])
        exact = one_hole(md, *args)[-1]
        balanced = one_hole(md, *args, balanced=True)[-1]
        differences.append(np.linalg.norm(exact - balanced))
    ratios = np.array(differences[:-1]) / np.array(differences[1:])
    np.testing.assert_allclose(ratios, 4.0, rtol=0.01)


def test_turning_across_north_is_not_averaged_through_south():
    # Common practice warning: averaging 350° and 10° gives 180°; the hole
    # must head north.
    offsets = one_hole([0.0, 100.0], [45.0, 45.0], [350.0, 10.0])
    assert offsets[-1][1] > 60.0 and abs(offsets[-1][0]) < 1e-9


@settings(max_examples=100, deadline=None)
@given(st.lists(st.tuples(st.floats(0.0, 120.0), st.floats(0.0, 360.0)), min_size=2, max_size=8))
def test_path_length_equals_measured_depth(directions):
    # Property (hypothesis): on minimum-curvature arcs the path between two
    # stations is exactly the measured depth; sampled finely, the chords add
    # up to it.
    md = np.arange(len(directions)) * 30.0
    inclination = np.array([d[0] for d in directions]) % 180.0
    azimuth = np.array([d[1] for d in directions])
    hole = np.zeros(len(md), int)
    offsets = station_offsets(md, inclination, azimuth, hole)
    query = np.linspace(0, md[-1], 2000)
    path = positions_at_depths(md, inclination, azimuth, hole, offsets, np.zeros(2000, int), query)
    assert np.sum(np.linalg.norm(np.diff(path, axis=0), axis=1)) == pytest.approx(md[-1], rel=1e-4)
    np.testing.assert_allclose(
        positions_at_depths(md, inclination, azimuth, hole, offsets, hole, md), offsets, atol=1e-9
    )


def test_mining_convention():
    # REFERENCES.md: a mining "dip −60°" is an inclination of 30° from
    # vertical, like a logged +60° below the horizontal.
    assert inclination_from_vertical(np.array([-60.0, 60.0, 90.0])).tolist() == [30.0, 30.0, 0.0]


def test_many_holes_at_once_equal_one_at_a_time():
    stations = assemble_stations(
        np.array([90.0, -55.0, 70.0]),
        np.array([0.0, 120.0, 300.0]),
        np.array([1, 1, 2, 2]),
        np.array([50.0, 120.0, 30.0, 90.0]),
        np.array([-52.0, -48.0, 68.0, 60.0]),
        np.array([123.0, 128.0, 305.0, 310.0]),
    )
    offsets = station_offsets(stations.md, stations.inclination, stations.azimuth, stations.hole)
    for h in range(3):
        mine = stations.hole == h
        alone = station_offsets(
            stations.md[mine],
            stations.inclination[mine],
            stations.azimuth[mine],
            np.zeros(mine.sum(), int),
        )
        np.testing.assert_allclose(offsets[mine], alone, atol=1e-9)
    query_hole = np.array([2, 0, 1, 1])
    query_md = np.array([200.0, 10.0, 5.0, 500.0])
    together = positions_at_depths(
        stations.md,
        stations.inclination,
        stations.azimuth,
        stations.hole,
        offsets,
        query_hole,
        query_md,
    )
    assert together[1].tolist() == pytest.approx([0.0, 0.0, 10.0])
    assert together[0][2] > 0 and together[3][2] > together[2][2]


def test_survey_and_interval_checks():
    reasons = check_surveys(
        np.array([0, 0, 0, 1, -1, 1]),
        np.array([0.0, 60, 60, 30, 10, np.nan]),
        np.array([0.0, 1, 2, 3, 4, 5]),
        np.array([90.0, 80, 80, 95, 90, 90]),
        np.array([100.0, 200.0]),
    )
    assert reasons.tolist() == [
        "",
        "",
        "survey out of depth order",
        "inclination out of range",
        "no collar for hole",
        "missing depth",
    ]
    reasons = check_intervals(
        np.array([1, 1, 1, 0, 0]),
        np.array([0.0, 50, 40, 20, 30]),
        np.array([50.0, 90, 60, 20, 250]),
        np.array([200.0, 100.0]),
    )
    assert reasons.tolist() == [
        "",
        "",
        "overlaps the interval above",
        "empty interval",
        "beyond total depth",
    ]
