"""Chainage and sample positions along a section line.

Chainage is horizontal distance along the line from its first vertex,
accumulated across kinks, in the length unit of the line's (projected) CRS.
"""

import numpy as np


def vertex_chainage(coords):
    """Chainage of each vertex of a polyline given as an (n, 2) array.

    >>> vertex_chainage(np.array([[0.0, 0.0], [3.0, 4.0], [3.0, 10.0]]))
    array([ 0.,  5., 11.])
    """
    coords = np.asarray(coords, dtype=float)[:, :2]
    steps = np.hypot(*np.diff(coords, axis=0).T)
    return np.concatenate(([0.0], np.cumsum(steps)))


def drop_repeated_vertices(coords):
    """Remove vertices that repeat the previous one (zero-length segments).

    >>> drop_repeated_vertices(np.array([[0.0, 0], [0, 0], [1, 0]])).tolist()
    [[0.0, 0.0], [1.0, 0.0]]
    """
    coords = np.asarray(coords, dtype=float)[:, :2]
    if len(coords) == 0:
        return coords
    keep = np.concatenate(([True], np.any(np.diff(coords, axis=0) != 0, axis=1)))
    return coords[keep]


def sample_chainages(vertex_ch, step):
    """Chainages every ``step`` from 0, plus every vertex and the end.

    A regular sample closer than a millionth of ``step`` to a vertex is
    dropped in favour of the vertex, so no two samples coincide.

    >>> sample_chainages(np.array([0.0, 2.5, 4.0]), 1.0)
    array([0. , 1. , 2. , 2.5, 3. , 4. ])
    """
    vertex_ch = np.asarray(vertex_ch, dtype=float)
    total = vertex_ch[-1]
    if not step > 0 or total <= 0:
        return vertex_ch.copy()
    regular = np.arange(0.0, total, step)
    tolerance = step * 1e-6
    slot = np.clip(np.searchsorted(vertex_ch, regular), 1, len(vertex_ch) - 1)
    gap = np.minimum(regular - vertex_ch[slot - 1], vertex_ch[slot] - regular)
    regular = regular[np.abs(gap) > tolerance]
    return np.sort(np.concatenate((regular, vertex_ch)))


def positions_at(coords, vertex_ch, chainages):
    """Map positions (x, y) of the given chainages along a polyline.

    >>> positions_at(np.array([[0.0, 0], [10, 0], [10, 10]]),
    ...              np.array([0.0, 10, 20]), np.array([5.0, 15]))
    array([[ 5.,  0.],
           [10.,  5.]])
    """
    coords = np.asarray(coords, dtype=float)
    x = np.interp(chainages, vertex_ch, coords[:, 0])
    y = np.interp(chainages, vertex_ch, coords[:, 1])
    return np.column_stack((x, y))


def azimuth_at(coords, chainage):
    """Azimuth (toward the end) of the segment holding each chainage; at a
    vertex, the segment that starts there.

    >>> azimuth_at(np.array([[0.0, 0], [10, 0], [10, 10]]), np.array([5.0, 10.0, 15.0]))
    array([90., 0., 0.])
    """
    coords = np.asarray(coords, dtype=float)[:, :2]
    vertex_ch = vertex_chainage(coords)
    segment = np.clip(np.searchsorted(vertex_ch, chainage, side="right") - 1, 0, len(coords) - 2)
    delta = coords[segment + 1] - coords[segment]
    return np.degrees(np.arctan2(delta[:, 0], delta[:, 1])) % 360.0
