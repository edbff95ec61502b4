"""Map geology along a section line: the unit under each stretch of the line,
where unit boundaries and contacts cross it."""

from dataclasses import dataclass

import numpy as np
import shapely

from .lines import positions_at, vertex_chainage

TOLERANCE = 1e-6  # chainages closer than this (working-CRS units) are one


@dataclass
class Intervals:
    """Consecutive stretches of a line; ``unit`` indexes the unit labels
    (-1: no mapped unit); ``overlap`` marks stretches where polygons of
    different units overlap (the first polygon in layer order wins)."""

    start: np.ndarray
    end: np.ndarray
    unit: np.ndarray
    overlap: np.ndarray


def _chainages_of(line, geometries):
    """Chainages along ``line`` of every coordinate of ``geometries``."""
    coords = shapely.get_coordinates(geometries)
    if len(coords) == 0:
        return np.empty(0)
    return shapely.line_locate_point(line, shapely.points(coords))


def _unique_sorted(values):
    values = np.sort(values)
    if len(values) == 0:
        return values
    return values[np.r_[True, np.diff(values) > TOLERANCE]]


def unit_intervals(coords, polygons, polygon_units, tree=None):
    """The line cut into stretches by unit.

    ``polygons`` are shapely polygons (working CRS), ``polygon_units`` the
    index of each polygon's unit (-1 for a polygon with no unit). Stretches
    of the same unit are merged, so a boundary between two polygons of one
    unit, or a polygon corner touching the line, cuts nothing.

    >>> squares = [shapely.box(0, -1, 4, 1), shapely.box(4, -1, 6, 1), shapely.box(7, -1, 9, 1)]
    >>> parts = unit_intervals(np.array([[0.0, 0], [10, 0]]), squares, np.array([0, 0, 1]))
    >>> parts.start.tolist(), parts.end.tolist(), parts.unit.tolist()
    ([0.0, 6.0, 7.0, 9.0], [6.0, 7.0, 9.0, 10.0], [0, -1, 1, -1])

    A line shorter than the tolerance is one stretch:

    >>> tiny = unit_intervals(np.array([[1.0, 0], [1 + 1e-9, 0]]), squares, np.array([0, 0, 1]))
    >>> tiny.unit.tolist(), len(tiny.start)
    ([0], 1)
    """
    coords = np.asarray(coords, dtype=float)
    vertex_ch = vertex_chainage(coords)
    line = shapely.LineString(coords)
    polygons = np.asarray(polygons, dtype=object)
    tree = tree if tree is not None else shapely.STRtree(polygons)
    near = tree.query(line)
    cuts = _chainages_of(line, shapely.intersection(line, shapely.boundary(polygons[near])))
    cuts = _unique_sorted(np.concatenate(([0.0, vertex_ch[-1]], cuts)))
    if len(cuts) < 2:  # a line shorter than TOLERANCE is one stretch
        cuts = np.array([0.0, vertex_ch[-1]])
    middles = positions_at(coords, vertex_ch, (cuts[:-1] + cuts[1:]) / 2)
    unit, overlap = _units_at(tree, polygons, polygon_units, middles)
    return _merged(cuts[:-1], cuts[1:], unit, overlap)


def _units_at(tree, polygons, polygon_units, xy):
    """Unit of the first polygon containing each point, and whether polygons
    of other units contain it too."""
    unit = np.full(len(xy), -1, dtype=int)
    overlap = np.zeros(len(xy), dtype=bool)
    point, polygon = tree.query(shapely.points(xy), predicate="intersects")
    if len(point) == 0:
        return unit, overlap
    order = np.lexsort((polygon, point))
    point, polygon = point[order], polygon[order]
    first = np.r_[True, point[1:] != point[:-1]]
    unit[point[first]] = polygon_units[polygon[first]]
    first_unit_of_group = polygon_units[polygon[first]][np.cumsum(first) - 1]
    differs = polygon_units[polygon] != first_unit_of_group
    overlap[np.unique(point[differs])] = True
    return unit, overlap


def _merged(start, end, unit, overlap):
    keep = np.r_[True, (unit[1:] != unit[:-1]) | (overlap[1:] != overlap[:-1])]
    starts = np.flatnonzero(keep)
    ends = np.r_[starts[1:], len(start)] - 1
    return Intervals(start[starts], end[ends], unit[starts], overlap[starts])


def boundary_crossings(intervals):
    """(chainage, unit before, unit after) wherever the unit changes,
    leaving or entering the mapped area included.

    >>> parts = Intervals(np.array([0.0, 6, 7]), np.array([6.0, 7, 9]),
    ...                   np.array([0, -1, 1]), np.zeros(3, bool))
    >>> [a.tolist() for a in boundary_crossings(parts)]
    [[6.0, 7.0], [0, -1], [-1, 1]]
    """
    change = intervals.unit[1:] != intervals.unit[:-1]
    return intervals.end[:-1][change], intervals.unit[:-1][change], intervals.unit[1:][change]


def unit_at_chainage(intervals, chainage):
    """Unit index of the stretch holding each chainage (the later stretch at
    a boundary)."""
    index = np.searchsorted(intervals.start, chainage, side="right") - 1
    return intervals.unit[np.clip(index, 0, len(intervals.unit) - 1)]


def contact_crossings(coords, contacts, tree=None):
    """(chainage, contact index, along) where contact lines meet the section
    line; a contact that crosses several times gives several crossings, one
    that touches the line at a vertex gives one; where a contact runs along
    the line for a while, its first shared point is given, with ``along``.

    >>> contacts = [shapely.LineString([(1, -1), (1, 1)]),
    ...             shapely.LineString([(3, -1), (4, 1), (5, -1)])]
    >>> ch, which, along = contact_crossings(np.array([[0.0, 0], [10, 0]]), contacts)
    >>> ch.tolist(), which.tolist(), along.tolist()
    ([1.0, 3.5, 4.5], [0, 1, 1], [False, False, False])

    A line that meets no contact has no crossings:

    >>> [a.tolist() for a in contact_crossings(np.array([[0.0, 5], [10, 5]]), contacts)]
    [[], [], []]
    """
    line = shapely.LineString(np.asarray(coords, dtype=float))
    contacts = np.asarray(contacts, dtype=object)
    tree = tree if tree is not None else shapely.STRtree(contacts)
    near = tree.query(line, predicate="intersects")
    meetings = shapely.intersection(line, contacts[near])
    parts, owner = shapely.get_parts(meetings, return_index=True)
    along = shapely.get_type_id(parts) != 0
    first_points = shapely.get_point(parts, 0)
    points = np.where(along, first_points, parts)
    if len(points) == 0:
        return np.empty(0), np.empty(0, dtype=int), np.empty(0, dtype=bool)
    chainage = shapely.line_locate_point(line, points)
    contact = near[owner]
    order = np.lexsort((chainage, contact))
    contact, chainage, along = contact[order], chainage[order], along[order]
    distinct = np.r_[True, (contact[1:] != contact[:-1]) | (np.diff(chainage) > TOLERANCE)]
    contact, chainage, along = contact[distinct], chainage[distinct], along[distinct]
    by_chainage = np.argsort(chainage, kind="stable")
    return chainage[by_chainage], contact[by_chainage], along[by_chainage]
