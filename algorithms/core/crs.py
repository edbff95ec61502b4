"""Coordinate reference systems: the automatic working CRS and transforms."""

import numpy as np
from pyproj import CRS, Transformer


def utm_epsg(longitude, latitude):
    """EPSG code of the WGS 84 / UTM zone containing a point.

    Plain 6-degree zones, as the EPSG registry defines them (the Norway and
    Svalbard exceptions are not applied: any zone is a valid working CRS).

    >>> utm_epsg(9.19, 45.46), utm_epsg(-70.6, -33.4), utm_epsg(180.0, 0.0)
    (32632, 32719, 32660)
    """
    zone = min(int((longitude + 180.0) // 6.0) + 1, 60)
    return (32600 if latitude >= 0 else 32700) + zone


def _identity(x, y):
    return np.asarray(x, dtype=float), np.asarray(y, dtype=float)


def transformer(source_wkt, target_wkt):
    """Vectorised ``(x, y) -> (x, y)`` from one CRS to another (easting and
    northing order whatever the CRS's axis order); the identity when both are
    the same CRS."""
    if source_wkt == target_wkt:
        return _identity  # without asking PROJ (~2 ms a CRS the first time)
    source = CRS.from_wkt(source_wkt)
    target = CRS.from_wkt(target_wkt)
    if source == target:
        return _identity
    forward = Transformer.from_crs(source, target, always_xy=True)
    return lambda x, y: forward.transform(np.asarray(x, dtype=float), np.asarray(y, dtype=float))


def cell_size_on_ground(to_working, centre, cell_width, cell_height):
    """Length, in the working CRS, of a raster cell's sides at ``centre``
    (raster CRS coordinates): the smaller of its width and height.

    >>> identity = lambda x, y: (np.asarray(x), np.asarray(y))
    >>> float(cell_size_on_ground(identity, (100.0, 200.0), 5.0, -4.0))
    4.0
    """
    cx, cy = centre
    x, y = to_working(
        np.array([cx, cx + abs(cell_width), cx]), np.array([cy, cy, cy + abs(cell_height)])
    )
    return min(np.hypot(x[1] - x[0], y[1] - y[0]), np.hypot(x[2] - x[0], y[2] - y[0]))
