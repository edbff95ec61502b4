"""Which mapped unit a point lies in."""

import numpy as np
import shapely


def polygon_index_at(polygons, xy):
    """Index of the first polygon (in the given order) containing or touching
    each point; -1 where there is none.

    >>> squares = [shapely.box(0, 0, 10, 10), shapely.box(5, 5, 20, 20)]
    >>> polygon_index_at(squares, np.array([[1.0, 1], [7, 7], [15, 15], [30, 30]])).tolist()
    [0, 0, 1, -1]
    """
    xy = np.asarray(xy, dtype=float)
    found = np.full(len(xy), -1, dtype=int)
    if len(polygons) == 0 or len(xy) == 0:
        return found
    tree = shapely.STRtree(np.asarray(polygons, dtype=object))
    point, polygon = tree.query(shapely.points(xy), predicate="intersects")
    if len(point):
        order = np.lexsort((polygon, point))
        point, polygon = point[order], polygon[order]
        first = np.r_[True, point[1:] != point[:-1]]
        found[point[first]] = polygon[first]
    return found
