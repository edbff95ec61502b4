"""Geometries to and from WKB with every choice spelled out.

shapely picks some defaults by the GEOS version it was built against (from
shapely 2.1, WKB and WKT are written with 4 dimensions where that GEOS is
3.12 or newer). Inside QGIS, whose own GEOS is already loaded, a shapely
wheel's GEOS calls can reach QGIS's older library, which refuses 4
dimensions. So nothing here is left to a default.
"""

import shapely

OUTPUT_DIMENSION = 3  # x, y and z where the geometry has z; no m
LITTLE_ENDIAN = 1


def to_wkb(geometry):
    """ISO WKB (bytes, or an array of bytes for an array of geometries).

    >>> to_wkb(shapely.Point(1, 2, 3))[:5].hex()
    '01e9030000'
    >>> to_wkb(shapely.LineString([(0, 0), (1, 1)]))[:5].hex()
    '0102000000'
    """
    return shapely.to_wkb(
        geometry,
        hex=False,
        output_dimension=OUTPUT_DIMENSION,
        byte_order=LITTLE_ENDIAN,
        include_srid=False,
        flavor="iso",
    )


def from_wkb(data):
    """Geometries from WKB (bytes or an array of bytes); invalid WKB raises.

    >>> from_wkb(to_wkb(shapely.Point(1, 2, 3))).has_z
    True
    """
    return shapely.from_wkb(data, on_invalid="raise")
