"""Borehole paths from survey stations by the minimum curvature method.

Between two stations the hole is taken as a circular arc tangent to both
station directions (S. J. Sawaryn and J. L. Thorogood, "A compendium of
directional calculations based on the minimum curvature method", SPE
Drilling & Completion 20(1), 2005). With inclination I from vertical and
azimuth A:

    DL = 2 asin √(sin²(ΔI/2) + sin I₁ sin I₂ sin²(ΔA/2))   (dogleg; stable form)
    RF = (2 / DL) tan(DL / 2)                            (→ 1 as DL → 0)
    ΔN = ΔMD/2 (sin I₁ cos A₁ + sin I₂ cos A₂) RF, ΔE likewise with sin A,
    ΔTVD = ΔMD/2 (cos I₁ + cos I₂) RF

Everything works on many holes at once: stations of all holes are stacked,
each with its hole number, sorted by hole then depth.
"""

import numpy as np


def inclination_from_vertical(logged):
    """Inclination from vertical (degrees) of inclinations logged below the
    horizontal (90 = straight down), negative values read as the mining
    convention (−60 is 60° below the horizontal).

    >>> inclination_from_vertical(np.array([90.0, 60.0, -60.0, 0.0]))
    array([ 0., 30., 30., 90.])
    """
    return 90.0 - np.abs(np.asarray(logged, dtype=float))


def directions(inclination, azimuth):
    """Unit vectors (east, north, down) of inclinations from vertical and
    azimuths, in degrees."""
    i = np.radians(inclination)
    a = np.radians(azimuth)
    return np.column_stack((np.sin(i) * np.sin(a), np.sin(i) * np.cos(a), np.cos(i)))


def _ratio_factor(dogleg):
    with np.errstate(divide="ignore", invalid="ignore"):
        factor = 2.0 / dogleg * np.tan(dogleg / 2.0)
    # Series 1 + DL²/12 where DL is tiny: the exact form loses precision.
    return np.where(dogleg < 1e-4, 1.0 + dogleg**2 / 12.0, factor)


def dogleg(t1, t2):
    """Angle (radians) between unit directions, stable for small angles."""
    return 2.0 * np.arcsin(np.clip(np.linalg.norm(t2 - t1, axis=1) / 2.0, 0.0, 1.0))


def station_offsets(md, inclination, azimuth, hole, balanced_tangential=False):
    """(east, north, down) of every station relative to its hole's first
    station, by minimum curvature (or, for comparison, balanced tangential:
    the same without the ratio factor).

    A quarter circle of radius R from vertical to horizontal northward ends
    R north and R down:

    >>> R = 100.0
    >>> md = np.linspace(0, np.pi * R / 2, 5)
    >>> end = station_offsets(md, np.linspace(0, 90, 5), np.zeros(5), np.zeros(5, int))[-1]
    >>> end.round(9).tolist()
    [0.0, 100.0, 100.0]
    """
    md = np.asarray(md, dtype=float)
    t = directions(inclination, azimuth)
    same_hole = np.asarray(hole)[1:] == np.asarray(hole)[:-1]
    t1, t2 = t[:-1], t[1:]
    factor = 1.0 if balanced_tangential else _ratio_factor(dogleg(t1, t2))
    step = (np.diff(md)[:, None] / 2.0) * (t1 + t2) * np.atleast_1d(factor)[:, None]
    step[~same_hole] = 0.0
    offsets = np.vstack((np.zeros((1, 3)), np.cumsum(step, axis=0)))
    first = np.r_[0, np.flatnonzero(~same_hole) + 1]
    starts = np.repeat(offsets[first], np.diff(np.r_[first, len(md)]), axis=0)
    return offsets - starts


def positions_at_depths(md, inclination, azimuth, hole, offsets, query_hole, query_md):
    """(east, north, down) at any measured depths, on the minimum-curvature
    arcs between stations (exact on the arc: the direction at the depth is
    the spherical interpolation of the station directions). Depths beyond
    the last station continue straight along its direction.

    >>> md = np.array([0.0, 100.0])
    >>> off = station_offsets(md, [0.0, 0.0], [0.0, 0.0], [0, 0])
    >>> positions_at_depths(md, [0.0, 0.0], [0.0, 0.0], [0, 0], off, [0, 0], [50.0, 130.0])
    array([[  0.,   0.,  50.],
           [  0.,   0., 130.]])
    >>> none = np.empty(0)  # no hole drawn: no stations, no depths asked
    >>> positions_at_depths(none, none, none, none, np.empty((0, 3)), none, none).shape
    (0, 3)
    """
    md = np.asarray(md, dtype=float)
    hole = np.asarray(hole)
    query_hole = np.asarray(query_hole)
    query_md = np.asarray(query_md, dtype=float)
    t = directions(inclination, azimuth)
    first = np.searchsorted(hole, query_hole, side="left")
    last = np.searchsorted(hole, query_hole, side="right") - 1
    station = _station_above(md, hole, first, last, query_hole, query_md)
    beyond = station >= last
    start = np.where(beyond, last, station)
    end = np.minimum(start + 1, last)
    t1, t2 = t[start], t[end]
    span = np.where(beyond, 1.0, md[end] - md[start])
    along = query_md - md[start]
    fraction = np.where(beyond, 0.0, along / np.where(span > 0, span, 1.0))
    angle = dogleg(t1, t2)
    direction = _slerp(t1, t2, angle, fraction)
    factor = _ratio_factor(dogleg(t1, direction))
    return offsets[start] + (along / 2.0)[:, None] * (t1 + direction) * factor[:, None]


def _station_above(md, hole, first, last, query_hole, query_md):
    """Index of the last station of the query's hole at or above its depth.
    Offsetting each hole's depths by a large multiple of its number lets one
    sorted search serve every hole at once (stations sorted by hole, depth)."""
    scale = 2.0 * (np.max(np.abs(md), initial=0.0) + np.max(np.abs(query_md), initial=0.0) + 1.0)
    index = np.searchsorted(md + hole * scale, query_md + query_hole * scale, side="right") - 1
    return np.clip(index, first, last)


def _slerp(t1, t2, angle, fraction):
    """Direction a ``fraction`` of the way from t1 to t2 along the great
    circle (straight when they are parallel)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        s = np.sin(angle)
        w1 = np.where(angle > 1e-9, np.sin((1 - fraction) * angle) / s, 1 - fraction)
        w2 = np.where(angle > 1e-9, np.sin(fraction * angle) / s, fraction)
    vector = w1[:, None] * t1 + w2[:, None] * t2
    return vector / np.linalg.norm(vector, axis=1)[:, None]
