"""Chainage and sampling along section lines."""

import numpy as np
import shapely
from hypothesis import given, settings
from hypothesis import strategies as st

from sectionwright.algorithms.core.lines import (
    drop_repeated_vertices,
    sample_chainages,
    vertex_chainage,
)
from sectionwright.algorithms.core.profile import profile_samples

KINKED = np.array([[0.0, 0.0], [700.0, 300.0], [900.0, 1200.0], [2000.0, 1150.0]])


def test_chainage_of_kinked_line_matches_shapely_line_locate_point():
    # Source: shapely 2 / GEOS, `shapely.line_locate_point` (distance along a
    # line of the projection of a point onto it): an independent library.
    chainage, xy = profile_samples(KINKED, 37.0)
    reference = shapely.line_locate_point(shapely.linestrings(KINKED), shapely.points(xy))
    np.testing.assert_allclose(chainage, reference, atol=1e-9)


def test_every_vertex_and_the_end_are_sampled():
    chainage, xy = profile_samples(KINKED, 100.0)
    for vertex in KINKED:
        assert np.min(np.hypot(*(xy - vertex).T)) < 1e-9
    assert chainage[0] == 0.0
    assert chainage[-1] == shapely.length(shapely.linestrings(KINKED))


def test_regular_samples_are_step_apart_between_vertices():
    chainage, _ = profile_samples(np.array([[0.0, 0.0], [1000.0, 0.0]]), 30.0)
    np.testing.assert_allclose(np.diff(chainage[:-1]), 30.0)
    assert chainage[-1] == 1000.0 and chainage[-2] == 990.0


def test_zero_step_gives_the_vertices_only():
    chainage, _ = profile_samples(KINKED, 0.0)
    np.testing.assert_allclose(chainage, vertex_chainage(KINKED))


def test_repeated_vertices_do_not_make_duplicate_samples():
    coords = np.array([[0.0, 0.0], [10.0, 0.0], [10.0, 0.0], [10.0, 5.0]])
    assert len(drop_repeated_vertices(coords)) == 3
    chainage, _ = profile_samples(coords, 1.0)
    assert np.all(np.diff(chainage) > 0)


@settings(max_examples=200, deadline=None)
@given(st.lists(st.floats(0.0, 5000.0), min_size=2, max_size=8, unique=True), st.floats(0.5, 400.0))
def test_samples_are_strictly_increasing_and_include_vertices(cuts, step):
    # Property-based (hypothesis): for any vertex chainages and step.
    vertex_ch = np.sort(np.array(cuts)) - min(cuts)
    samples = sample_chainages(vertex_ch, step)
    assert np.all(np.diff(samples) > 0)
    assert np.all(np.isin(vertex_ch, samples))
    # A regular sample within step·1e-6 of a vertex gives way to the vertex.
    assert np.all(np.diff(samples) <= step * (1 + 2e-6))
