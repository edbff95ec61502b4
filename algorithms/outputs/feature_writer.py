"""Many rows from numpy columns into a feature sink, the fastest way QGIS
3.22+ offers from Python (``benchmarks/bench_writing.py`` measures the
alternatives side by side).

What makes it fast: the geometries of a whole batch go to QGIS as one
GeometryCollection WKB, parsed in C++ and split by ``asGeometryCollection``;
attribute values are converted per column by numpy, not per value; Python's
cycle collector rests while the rows are written; the features of a
batch go to the sink in one ``addFeatures`` call; a second sink of the same
rows takes copies that share the attributes. What is left per row is making
the ``QgsFeature`` itself (a few µs, more with many fields). Text that QGIS
or OGR parses in C++ (GeoJSON, CSV, an OGR layer handed over as an
iterator) is slower on 3.22: turning OGR features into QGIS features costs
more than making them in Python.
"""

import gc
import struct
from contextlib import contextmanager
from itertools import repeat

import numpy as np
import shapely
from qgis.core import QgsFeature, QgsGeometry

from ..compat.null import plain
from ..compat.qgis_compat import DOUBLE, FAST_INSERT, STRING
from ..framework.run_guard import stop_if_cancelled
from .geometry_io import points_z

BATCH = 5000  # rows per addFeatures call and between two looks at Cancel
WKB_LINE_STRING = 2
WKB_MULTI_LINE_STRING = 5
WKB_DIMENSION_OFFSET = {2: 0, 3: 1000, 4: 3000}  # ISO codes; columns x y, x y z, x y z m
WKB_COLLECTION = 7
LARGE_WKB = 1024  # bytes a geometry, on average, above which each is parsed alone


def write_rows(sink, fields, geometries, columns, feedback=None, also=()):
    """Write one feature per row into ``sink``; returns the rows written
    (Cancel stops the run: RunCancelled).

    ``fields`` (``QgsFields``) are the sink's fields, in its order;
    ``columns`` maps each field's name to its values (numpy array or list,
    one per row; NaN and None are NULL); ``geometries`` is an array or list of
    shapely geometries (None elements: no geometry), a list of WKB
    ``bytes`` (for M values, which shapely 2.0 cannot hold), ``QgsGeometry``
    (as read from a source) or None, or None for a table. Cancel
    is looked at between batches.

    ``also`` lists further sinks as (sink, geometries, rows, appended): they
    take the features of ``rows`` (ascending integer index) with those
    geometries instead (a tick beside each point) and the ``appended``
    values after the fields (the same for every row; their fields follow
    ``fields`` in that sink); the attributes are converted and set once for
    all sinks. Python's cycle collector rests throughout: the rows make no
    cycles, and between batches it would walk every live row again.
    """
    with collector_paused():
        return _write_rows(sink, fields, geometries, columns, feedback, also)


def _write_rows(sink, fields, geometries, columns, feedback, also):
    names = fields.names()
    missing = [name for name in names if name not in columns]
    if missing:
        raise KeyError(f"no values for the fields {missing}")
    values = [attribute_values(columns[name], fields.at(i)) for i, name in enumerate(names)]
    wkbs = None if geometries is None else geometry_wkbs(geometries)
    count = len(wkbs) if wkbs is not None else len(values[0]) if values else 0
    if any(len(v) != count for v in values):
        raise ValueError("columns and geometries differ in length")
    others = [
        (other, geometry_wkbs(shapes), np.asarray(rows), appended)
        for other, shapes, rows, appended in also
    ]
    written = 0
    for start in range(0, count, BATCH):
        stop_if_cancelled(feedback)
        stop = min(start + BATCH, count)
        rows = zip(*(v[start:stop] for v in values)) if values else repeat((), stop - start)
        shapes = repeat(None) if wkbs is None else qgis_geometries(wkbs[start:stop])
        features = [_feature(row, geometry) for row, geometry in zip(rows, shapes)]
        sink.addFeatures(features, FAST_INSERT)
        for other, wkbs_of_other, rows_of_other, appended in others:
            low, high = np.searchsorted(rows_of_other, (start, stop))
            shapes_of_other = qgis_geometries(wkbs_of_other[low:high])
            copies = [
                _copy(features[row - start], geometry, len(names), appended)
                for row, geometry in zip(rows_of_other[low:high].tolist(), shapes_of_other)
            ]
            other.addFeatures(copies, FAST_INSERT)
        written += stop - start
    return written


def _copy(feature, geometry, count, appended):
    """A copy of ``feature`` (its ``count`` attributes shared, not set
    again) with another geometry and the ``appended`` values after them."""
    copy = QgsFeature(feature)
    copy.setGeometry(geometry)
    if appended:
        copy.resizeAttributes(count + len(appended))
        for index, value in enumerate(appended, start=count):
            copy.setAttribute(index, value)
    return copy


def _feature(row, geometry):
    feature = QgsFeature()
    feature.setAttributes(list(row))
    if geometry is not None:
        feature.setGeometry(geometry)
    return feature


@contextmanager
def collector_paused():
    """Python's cycle collector paused while a batch of features is made:
    it would otherwise walk every live object again and again as thousands
    of wrappers (which hold no cycles) are allocated, which costs more than
    making them (bench_writing.py)."""
    enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if enabled:
            gc.enable()


def attribute_values(values, field):
    """A column as the Python values QGIS takes for ``field``'s type, NaN
    and None as None (NULL)."""
    if field.type() == DOUBLE:
        try:
            numbers = np.asarray(values, dtype=float)
        except TypeError:  # NULL QVariants among the source's own values
            numbers = np.array([np.nan if _is_null(v) else v for v in values], dtype=float)
        out = numbers.astype(object)
        out[np.isnan(numbers)] = None
        return out.tolist()
    if field.type() == STRING:
        return [v if type(v) is str else None if _is_null(v) else str(v) for v in _plain(values)]
    if field.isNumeric():
        array = np.asarray(values)
        if array.dtype.kind in "iub":
            return array.astype(np.int64).tolist()
        return [None if _is_null(v) else int(v) for v in _plain(values)]
    return [None if _is_null(v) else v for v in _plain(values)]


def _plain(values):
    return values.tolist() if isinstance(values, np.ndarray) else list(values)


def _is_null(value):
    """None, NaN, or a NULL as the release hands it out."""
    value = plain(value)
    return value is None or value != value


def geometry_wkbs(geometries):
    """WKB bytes (or None) per row. Points are packed by numpy as PointZ
    when any has a Z: GEOS writes a point whose Z is NaN as 2-D."""
    if not isinstance(geometries, np.ndarray):
        items = list(geometries)
        if not any(isinstance(g, shapely.Geometry) for g in items):
            return items
        geometries = np.array(items, dtype=object)
    present = ~shapely.is_missing(geometries)
    wkbs = np.full(len(geometries), None, dtype=object)
    points = present & (shapely.get_type_id(geometries) == 0) & ~shapely.is_empty(geometries)
    if points.any() and shapely.has_z(geometries[points]).any():
        xyz = shapely.get_coordinates(geometries[points], include_z=True)
        wkbs[points] = points_z(xyz[:, 0], xyz[:, 1], xyz[:, 2])
        present &= ~points
    wkbs[present] = shapely.to_wkb(
        geometries[present], output_dimension=3, byte_order=1, flavor="iso"
    )
    return wkbs.tolist()


def line_wkbs(vertices):
    """ISO WKB LineString per row of ``vertices`` (lines, points per line,
    2-4 columns as in ``multi_line_wkb``), packed by numpy in one go."""
    lines, points, columns = vertices.shape
    record = np.dtype(
        [("order", "u1"), ("type", "<u4"), ("count", "<u4"), ("xy", "<f8", (points, columns))]
    )
    packed = np.empty(lines, record)
    packed["order"], packed["count"], packed["xy"] = 1, points, vertices
    packed["type"] = WKB_LINE_STRING + WKB_DIMENSION_OFFSET[columns]
    return [row.tobytes() for row in packed.view(np.uint8).reshape(lines, record.itemsize)]


def multi_line_wkb(runs, columns):
    """ISO WKB MultiLineString of (n, columns) arrays: 2 columns x, y; 3
    x, y, z; 4 x, y, z, m (shapely 2.0 has no M). Made by numpy, no GEOS."""
    offset = WKB_DIMENSION_OFFSET[columns]
    parts = [
        struct.pack("<BII", 1, WKB_LINE_STRING + offset, len(run))
        + np.asarray(run, "<f8").reshape(-1, columns).tobytes()
        for run in runs
    ]
    return struct.pack("<BII", 1, WKB_MULTI_LINE_STRING + offset, len(parts)) + b"".join(parts)


def qgis_geometries(items):
    """QgsGeometry (or None) per item: QgsGeometry objects pass as they are;
    small WKBs (points, short lines) are parsed by QGIS in one call, large
    ones each on its own (splitting a collection would copy them again)."""
    wkbs = [w for w in items if isinstance(w, bytes)]
    if not wkbs:
        return list(items)
    if len(wkbs) == 1 or sum(map(len, wkbs)) > LARGE_WKB * len(wkbs):
        parsed = iter([_parsed(w) for w in wkbs])
    else:
        collection = _parsed(struct.pack("<BII", 1, WKB_COLLECTION, len(wkbs)) + b"".join(wkbs))
        parsed = iter(collection.asGeometryCollection())
    return [next(parsed) if isinstance(w, bytes) else w for w in items]


def _parsed(wkb):
    geometry = QgsGeometry()
    geometry.fromWkb(wkb)
    return geometry
