"""Topographic profile along one section line: samples and drawable runs."""

import numpy as np

from .lines import drop_repeated_vertices, positions_at, sample_chainages, vertex_chainage


def profile_samples(coords, step):
    """Chainages and map positions of the samples of one line part.

    Samples are every ``step`` from the start plus every vertex and the end;
    ``step`` 0 gives the vertices only.

    >>> ch, xy = profile_samples(np.array([[0.0, 0], [3, 4], [3, 6]]), 2.0)
    >>> ch.tolist()
    [0.0, 2.0, 4.0, 5.0, 6.0, 7.0]
    >>> xy[-1].tolist()
    [3.0, 6.0]
    """
    coords = drop_repeated_vertices(coords)
    vertex_ch = vertex_chainage(coords)
    chainages = sample_chainages(vertex_ch, step)
    return chainages, positions_at(coords, vertex_ch, chainages)


def covered_runs(elevation):
    """(start, stop) index pairs of the runs of consecutive samples that
    have an elevation, at least two samples long (a lone sample between
    two gaps cannot make a line).

    >>> covered_runs(np.array([1, 2, np.nan, 4, np.nan, 5, 6, 7.0]))
    [(0, 2), (5, 8)]
    """
    valid = ~np.isnan(np.asarray(elevation, dtype=float))
    edges = np.diff(np.concatenate(([0], valid.view(np.int8), [0])))
    starts = np.flatnonzero(edges == 1)
    ends = np.flatnonzero(edges == -1)
    return [(int(s), int(e)) for s, e in zip(starts.tolist(), ends.tolist()) if e - s >= 2]


def section_runs(chainage, elevation, exaggeration):
    """Section-space polylines (x = chainage, y = elevation x exaggeration)
    through consecutive samples that have an elevation.

    A gap in the data splits the profile; a lone sample between two gaps
    is left out of the drawing (it stays in the sample points).

    >>> runs = section_runs(np.arange(5.0), np.array([1, 2, np.nan, 4, 5.0]), 2)
    >>> [r.tolist() for r in runs]
    [[[0.0, 2.0], [1.0, 4.0]], [[3.0, 8.0], [4.0, 10.0]]]
    """
    points = np.column_stack((chainage, np.asarray(elevation, dtype=float) * exaggeration))
    return [points[s:e] for s, e in covered_runs(elevation)]


def draped_runs(xy, chainage, elevation):
    """Map-space polylines through the same runs: columns x, y, z =
    elevation, m = chainage (the profile draped on the ground).

    >>> runs = draped_runs(np.array([[0, 0], [3, 4], [6, 8]]), np.array([0, 5, 10.0]),
    ...                    np.array([7, 8, np.nan]))
    >>> [r.tolist() for r in runs]
    [[[0.0, 0.0, 7.0, 0.0], [3.0, 4.0, 8.0, 5.0]]]
    """
    points = np.column_stack((xy, elevation, chainage)).astype(float)
    return [points[s:e] for s, e in covered_runs(elevation)]
