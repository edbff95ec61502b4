"""Collars, surveys and intervals checked and assembled into survey
stations, many holes at once. Rows that cannot be used come back with a
reason; the rest are still used."""

from dataclasses import dataclass

import numpy as np

from .desurvey import inclination_from_vertical

NO_COLLAR = "no collar for hole"
OUT_OF_ORDER = "survey out of depth order"
BEYOND_DEPTH = "beyond total depth"
OVERLAP = "overlaps the interval above"
EMPTY = "empty interval"


def _running_max_before(group, values):
    """For rows sorted by group: the largest earlier value in the same group
    (-inf for a group's first row)."""
    scale = 4.0 * (np.nanmax(np.abs(values), initial=0.0) + 1.0)
    shifted = values + group * scale
    running = np.maximum.accumulate(shifted)
    before = np.r_[-np.inf, running[:-1]]
    first = np.r_[True, group[1:] != group[:-1]]
    return np.where(first, -np.inf, before - group * scale)


def _first_reason(reasons, *checks):
    for failed, reason in checks:
        reasons[failed & (reasons == "")] = reason
    return reasons


def check_surveys(hole, depth, azimuth, inclination, total_depth):
    """Reasons ('' = usable) for survey rows in table order. ``hole`` is the
    collar index of each row (-1: no collar), ``total_depth`` per collar.
    A row not deeper than an earlier row of its hole is out of order.

    >>> check_surveys(np.array([0, 0, 0, -1, 0]), np.array([0.0, 50, 40, 10, 300]),
    ...               np.zeros(5), np.full(5, 60.0), np.array([200.0])).tolist()
    ['', '', 'survey out of depth order', 'no collar for hole', 'beyond total depth']
    """
    hole = np.asarray(hole)
    depth = np.asarray(depth, dtype=float)
    reasons = np.full(len(hole), "", dtype=object)
    _first_reason(
        reasons,
        (hole < 0, NO_COLLAR),
        (np.isnan(depth), "missing depth"),
        (np.isnan(np.asarray(azimuth, dtype=float)), "missing azimuth"),
        (np.isnan(np.asarray(inclination, dtype=float)), "missing inclination"),
        (np.abs(np.asarray(inclination, dtype=float)) > 90, "inclination out of range"),
        (depth < 0, "negative depth"),
    )
    known = np.flatnonzero(reasons == "")
    order = known[np.argsort(hole[known], kind="stable")]
    earlier = _running_max_before(hole[order], depth[order])
    reasons[order[depth[order] <= earlier]] = OUT_OF_ORDER
    deeper = (reasons == "") & (hole >= 0)
    deeper[deeper] = depth[deeper] > np.asarray(total_depth)[hole[deeper]] + 1e-9
    reasons[deeper] = BEYOND_DEPTH
    return reasons


def check_intervals(hole, top, bottom, total_depth):
    """Reasons for interval rows: no collar, missing or empty, beyond the
    hole's total depth, or overlapping an interval above (the deeper-starting
    of two overlapping intervals is the one refused).

    >>> check_intervals(np.array([0, 0, 0, 0]), np.array([0.0, 10, 15, 30]),
    ...                 np.array([10.0, 20, 25, 90]), np.array([80.0])).tolist()
    ['', '', 'overlaps the interval above', 'beyond total depth']
    """
    hole = np.asarray(hole)
    top = np.asarray(top, dtype=float)
    bottom = np.asarray(bottom, dtype=float)
    reasons = np.full(len(hole), "", dtype=object)
    _first_reason(
        reasons,
        (hole < 0, NO_COLLAR),
        (np.isnan(top) | np.isnan(bottom), "missing depth"),
        (top < 0, "negative depth"),
        (bottom <= top, EMPTY),
    )
    usable = reasons == ""
    usable[usable] = bottom[usable] > np.asarray(total_depth)[hole[usable]] + 1e-9
    reasons[usable] = BEYOND_DEPTH
    known = np.flatnonzero(reasons == "")
    reasons[_overlapping(known[np.lexsort((top[known], hole[known]))], hole, top, bottom)] = OVERLAP
    return reasons


def _overlapping(order, hole, top, bottom):
    """Rows (in ``order``: by hole, then top) starting above the bottom of an
    interval kept before them in their hole. Sequential on purpose: whether
    a row is kept depends on which rows above it were kept."""
    refused = []
    deepest, current = -np.inf, None
    for row in order:
        if hole[row] != current:
            deepest, current = -np.inf, hole[row]
        if top[row] < deepest - 1e-9:
            refused.append(row)
        else:
            deepest = max(deepest, bottom[row])
    return np.array(refused, dtype=int)


@dataclass
class Stations:
    """Survey stations of many holes, sorted by hole then depth."""

    hole: np.ndarray
    md: np.ndarray
    inclination: np.ndarray  # from vertical
    azimuth: np.ndarray


def assemble_stations(collar_inclination, collar_azimuth, hole, depth, inclination, azimuth):
    """Stations for every collar: one at depth 0 with the collar's own
    direction (unless a survey is at 0), then its usable surveys. Logged
    inclinations (below horizontal, mining negatives) become inclinations
    from vertical.

    >>> s = assemble_stations(np.array([90.0, -60.0]), np.array([0.0, 45.0]),
    ...                       np.array([1, 1]), np.array([0.0, 100.0]),
    ...                       np.array([-55.0, -50.0]), np.array([44.0, 43.0]))
    >>> s.hole.tolist(), s.md.tolist(), s.inclination.tolist()
    ([0, 1, 1], [0.0, 0.0, 100.0], [0.0, 35.0, 40.0])
    """
    collars = np.arange(len(collar_inclination))
    surveyed_at_top = np.zeros(len(collars), dtype=bool)
    surveyed_at_top[np.asarray(hole)[np.asarray(depth) == 0]] = True
    top = collars[~surveyed_at_top]
    holes = np.concatenate((top, hole))
    md = np.concatenate((np.zeros(len(top)), depth))
    logged = np.concatenate((np.asarray(collar_inclination, dtype=float)[top], inclination))
    azimuths = np.concatenate((np.asarray(collar_azimuth, dtype=float)[top], azimuth))
    order = np.lexsort((md, holes))
    return Stations(
        holes[order],
        md[order],
        inclination_from_vertical(logged[order]),
        np.nan_to_num(azimuths[order]) % 360.0,
    )


def check_collars(hole, located, depth, inclination, z, value_reasons):
    """Reasons ('' = drawable) for collar rows: no position, no or a repeated
    hole id (the first collar of an id is the one kept), the reasons from
    reading their numbers (``value_reasons``, in order), a depth that is not
    positive, an inclination beyond ±90, no elevation.

    >>> check_collars(["A", None, "A", "B", "C"], np.array([True, True, True, True, False]),
    ...               np.array([100.0, 50, 80, 0, 10]), np.full(5, 90.0),
    ...               np.full(5, 300.0), [np.full(5, "", dtype=object)]).tolist()
    ['', 'missing hole id', 'duplicate hole id', 'depth not positive', 'null geometry']
    """
    known = np.array([h is not None for h in hole], dtype=bool)
    duplicate = known.copy()
    names = np.array([h if h is not None else "" for h in hole], dtype=object)
    if known.any():
        _, first = np.unique(names[known], return_index=True)
        duplicate[np.flatnonzero(known)[first]] = False
    reasons = np.full(len(known), "", dtype=object)
    _first_reason(
        reasons,
        (~np.asarray(located, dtype=bool), "null geometry"),
        (~known, "missing hole id"),
        (duplicate, "duplicate hole id"),
    )
    for why in value_reasons:
        reasons = np.where(reasons == "", np.asarray(why, dtype=object), reasons)
    return _first_reason(
        reasons,
        (np.asarray(depth, dtype=float) <= 0, "depth not positive"),
        (np.abs(np.asarray(inclination, dtype=float)) > 90, "inclination out of range"),
        (np.isnan(np.asarray(z, dtype=float)), "no collar elevation"),
    )


def drawing_depths(total_depth, drawn, stations, interval_hole, interval_ends, step):
    """The depths drawn of each hole in ``drawn`` (collar indices, ascending):
    every ``step`` from the collar, every station and interval end, and the
    bottom, none below the bottom. Returns (hole, depth), sorted by hole
    then depth, without repeats.

    >>> empty = Stations(np.array([0]), np.array([0.0]), np.zeros(1), np.zeros(1))
    >>> hole, md = drawing_depths(np.array([12.0]), np.array([0]), empty,
    ...                           np.array([0]), np.array([7.5]), 5.0)
    >>> hole.tolist(), md.tolist()
    ([0, 0, 0, 0, 0], [0.0, 5.0, 7.5, 10.0, 12.0])
    >>> none = np.array([], int)  # no hole drawn
    >>> [a.tolist() for a in drawing_depths(np.array([0.0]), none, empty, none, none, 5.0)]
    [[], []]
    """
    total_depth = np.asarray(total_depth, dtype=float)
    drawn = np.asarray(drawn, dtype=int)
    count = np.ceil(total_depth[drawn] / step).astype(int)
    regular_hole = np.repeat(drawn, count)
    regular = (np.arange(count.sum()) - np.repeat(np.cumsum(count) - count, count)) * step
    station = np.isin(stations.hole, drawn)
    interval = np.isin(interval_hole, drawn)
    hole = np.concatenate(
        (regular_hole, stations.hole[station], np.asarray(interval_hole)[interval], drawn)
    ).astype(int)
    md = np.concatenate(
        (regular, stations.md[station], np.asarray(interval_ends)[interval], total_depth[drawn])
    )
    keep = md <= total_depth[hole]
    hole, md = hole[keep], md[keep]
    order = np.lexsort((md, hole))
    hole, md = hole[order], md[order]
    if len(hole) == 0:  # no hole drawn
        return hole, md
    new = np.r_[True, (hole[1:] != hole[:-1]) | (md[1:] != md[:-1])]
    return hole[new], md[new]


def interval_runs(sample_hole, sample_md, interval_hole, top, bottom):
    """Each interval as the run of drawn samples from its top to its bottom
    (samples sorted by hole then depth; both ends are among them). Returns
    the intervals drawn (those with two samples or more), the sample rows of
    their runs and, per row, which of the drawn intervals it belongs to.

    >>> kept, rows, piece = interval_runs(np.array([0, 0, 0, 1]), np.array([0.0, 5, 9, 0]),
    ...                                   np.array([0, 0]), np.array([0.0, 9]), np.array([9.0, 9]))
    >>> kept.tolist(), rows.tolist(), piece.tolist()
    ([0], [0, 1, 2], [0, 0, 0])
    """
    scale = 2.0 * (np.max(sample_md, initial=0.0) + 1.0)
    key = np.asarray(sample_hole) * scale + sample_md
    first = np.searchsorted(key, np.asarray(interval_hole) * scale + top, side="left")
    last = np.searchsorted(key, np.asarray(interval_hole) * scale + bottom, side="right")
    count = last - first
    kept = np.flatnonzero(count >= 2)
    count, first = count[kept], first[kept]
    piece = np.repeat(np.arange(len(kept)), count)
    within = np.arange(count.sum()) - np.repeat(np.cumsum(count) - count, count)
    return kept, np.repeat(first, count) + within, piece


def group_ranges(values, group):
    """(smallest, largest) value of each run of equal ``group`` labels.

    >>> [r.tolist() for r in group_ranges(np.array([3.0, -1, 2, 5]), np.array([0, 0, 1, 1]))]
    [[-1.0, 2.0], [3.0, 5.0]]
    """
    if len(values) == 0:
        return np.empty(0), np.empty(0)
    starts = np.flatnonzero(np.r_[True, group[1:] != group[:-1]])
    return np.minimum.reduceat(values, starts), np.maximum.reduceat(values, starts)
