"""Section-view geometry put back on the map in 3-D along its section line.

A section-view coordinate (x = chainage, y = elevation × VE) stands at the
map position of that chainage on the section line, at elevation y / VE.
Chainages before the first vertex or past the last continue along the end
segments, so a form line or a borehole reaching beyond the line's ends
stays straight instead of piling up on the end vertex. Segments that cross
a kink of the line get a vertex at the kink, so the fence bends with the
line rather than cutting the corner.
"""

import numpy as np
import shapely

from .lines import vertex_chainage

POINT, LINESTRING, LINEARRING, POLYGON = 0, 1, 2, 3
MULTI = {4: shapely.multipoints, 5: shapely.multilinestrings, 6: shapely.multipolygons}


def map_positions(coords, chainage):
    """Map (x, y) of each chainage along a polyline, continued straight
    along the first and last segments beyond the ends.

    >>> line = np.array([[0.0, 0.0], [10.0, 0.0], [10.0, 10.0]])
    >>> map_positions(line, np.array([-5.0, 5.0, 10.0, 15.0, 25.0]))
    array([[-5.,  0.],
           [ 5.,  0.],
           [10.,  0.],
           [10.,  5.],
           [10., 15.]])
    """
    coords = np.asarray(coords, dtype=float)[:, :2]
    chainage = np.asarray(chainage, dtype=float)
    vertex_ch = vertex_chainage(coords)
    segment = np.clip(np.searchsorted(vertex_ch, chainage, side="right") - 1, 0, len(coords) - 2)
    start = coords[segment]
    along = (chainage - vertex_ch[segment]) / (vertex_ch[segment + 1] - vertex_ch[segment])
    return start + along[:, None] * (coords[segment + 1] - start)


def split_at_kinks(xy, index, kink_chainages):
    """Section-view vertex sequences (``xy`` rows, ``index`` = which
    sequence each row belongs to, rows of a sequence consecutive) with a
    vertex added wherever a segment crosses one of ``kink_chainages``
    (sorted); the added vertex is on the segment. Returns (xy, index).

    >>> xy, index = split_at_kinks(np.array([[0.0, 0], [30, 30], [0, 60]]),
    ...                            np.array([0, 0, 1]), np.array([10.0, 20.0]))
    >>> xy.tolist(), index.tolist()
    ([[0.0, 0.0], [10.0, 10.0], [20.0, 20.0], [30.0, 30.0], [0.0, 60.0]], [0, 0, 0, 0, 1])
    """
    xy = np.asarray(xy, dtype=float)
    index = np.asarray(index)
    kinks = np.asarray(kink_chainages, dtype=float)
    if len(kinks) == 0 or len(xy) < 2:
        return xy, index
    a, b = xy[:-1], xy[1:]
    low, high = np.minimum(a[:, 0], b[:, 0]), np.maximum(a[:, 0], b[:, 0])
    first = np.searchsorted(kinks, low, side="right")
    last = np.searchsorted(kinks, high, side="left")
    count = np.where(index[:-1] == index[1:], np.maximum(last - first, 0), 0)
    segment = np.repeat(np.arange(len(count)), count)
    nth = np.arange(len(segment)) - np.repeat(np.cumsum(count) - count, count)
    rising = b[segment, 0] >= a[segment, 0]
    kink = kinks[np.where(rising, first[segment] + nth, last[segment] - 1 - nth)]
    along = (kink - a[segment, 0]) / (b[segment, 0] - a[segment, 0])
    added = np.column_stack((kink, a[segment, 1] + along * (b[segment, 1] - a[segment, 1])))
    key = np.concatenate(
        (np.arange(len(xy), dtype=float), segment + (nth + 1) / (count[segment] + 1))
    )
    order = np.argsort(key, kind="stable")
    return np.vstack((xy, added))[order], np.concatenate((index, index[segment]))[order]


def _placed(coords, kinks, xy, index, exaggeration):
    xy, index = split_at_kinks(xy, index, kinks)
    xyz = np.column_stack((map_positions(coords, xy[:, 0]), xy[:, 1] / exaggeration))
    return xyz, index


def _placed_lines(coords, kinks, lines, exaggeration, make):
    xy, index = shapely.get_coordinates(lines, return_index=True)
    xyz, index = _placed(coords, kinks, xy, index, exaggeration)
    out = np.empty(len(lines), dtype=object)
    out[:] = make(xyz, indices=index) if len(xyz) else []
    return out


def _placed_polygons(coords, kinks, polygons, exaggeration):
    rings, polygon_of = shapely.get_rings(polygons, return_index=True)
    placed = _placed_lines(coords, kinks, rings, exaggeration, shapely.linearrings)
    starts = np.searchsorted(polygon_of, np.arange(len(polygons)))
    ends = np.r_[starts[1:], len(rings)]
    return np.array(
        [shapely.polygons(placed[s], placed[s + 1 : e]) for s, e in zip(starts, ends)],
        dtype=object,
    )


def place_on_map(coords, geometries, exaggeration):
    """Section-view geometries (points, lines, polygons, their multi-part
    forms) of one section as 3-D map geometries along the line ``coords``;
    the same types, with Z. Empty or missing geometries stay None.

    >>> line = np.array([[0.0, 0.0], [10.0, 0.0], [10.0, 10.0]])
    >>> section = shapely.from_wkt(["LINESTRING (5 200, 15 400)", "POINT (-2 100)"])
    >>> [shapely.to_wkt(g, rounding_precision=3)
    ...  for g in place_on_map(line, section, exaggeration=2.0)]
    ['LINESTRING Z (5 0 100, 10 0 150, 10 5 200)', 'POINT Z (-2 0 50)']
    """
    geometries = np.asarray(geometries, dtype=object)
    result = np.full(len(geometries), None, dtype=object)
    usable = ~(shapely.is_missing(geometries) | shapely.is_empty(geometries))
    if not usable.any():
        return result
    coords = np.asarray(coords, dtype=float)[:, :2]
    kinks = vertex_chainage(coords)[1:-1]
    wanted = np.flatnonzero(usable)
    parts, part_of = shapely.get_parts(shapely.force_2d(geometries[wanted]), return_index=True)
    kind = shapely.get_type_id(parts)
    placed = np.empty(len(parts), dtype=object)
    points = kind == POINT
    if points.any():
        xy = shapely.get_coordinates(parts[points])
        placed[points] = shapely.points(
            np.column_stack((map_positions(coords, xy[:, 0]), xy[:, 1] / exaggeration))
        )
    for line_kind, make in ((LINESTRING, shapely.linestrings), (LINEARRING, shapely.linearrings)):
        chosen = kind == line_kind
        if chosen.any():
            placed[chosen] = _placed_lines(coords, kinks, parts[chosen], exaggeration, make)
    polygons = kind == POLYGON
    if polygons.any():
        placed[polygons] = _placed_polygons(coords, kinks, parts[polygons], exaggeration)
    source_kind = shapely.get_type_id(geometries[wanted])
    first_part = np.searchsorted(part_of, np.arange(len(wanted)))
    single = ~np.isin(source_kind, list(MULTI))
    result[wanted[single]] = placed[first_part[single]]
    for multi_kind, make in MULTI.items():
        rows = np.flatnonzero(source_kind == multi_kind)
        if len(rows):
            mine = np.isin(part_of, rows)
            result[wanted[rows]] = make(
                placed[mine], indices=np.unique(part_of[mine], return_inverse=True)[1]
            )
    return result
