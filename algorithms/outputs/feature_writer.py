"""Many rows from numpy columns into a feature sink, the fastest way QGIS
3.22+ offers from Python (``benchmarks/bench_writing.py`` measures the
alternatives side by side).

What makes it fast: the geometries of a whole batch go to QGIS as one
GeometryCollection WKB, parsed in C++ and split by ``asGeometryCollection``;
attribute values are converted per column by numpy, not per value; Python's
cycle collector rests while a batch's features are made; the features of a
batch go to the sink in one ``addFeatures`` call. What is left per row is
making the ``QgsFeature`` itself (~2 µs). Text that QGIS or OGR
parses in C++ (GeoJSON, CSV, an OGR layer handed over as an iterator) is
slower on 3.22: turning OGR features into QGIS features costs more than
making them in Python.
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
from .geometry_io import points_z

BATCH = 5000  # rows per addFeatures call and between two looks at Cancel
WKB_LINE_STRING = 2
WKB_MULTI_LINE_STRING = 5
WKB_DIMENSION_OFFSET = {2: 0, 3: 1000, 4: 3000}  # ISO codes; columns x y, x y z, x y z m
WKB_COLLECTION = 7


def write_rows(sink, fields, geometries, columns, feedback=None):
    """Write one feature per row into ``sink``; returns the rows written
    (fewer than given only when the run was cancelled).

    ``fields`` (``QgsFields``) are the sink's fields, in its order;
    ``columns`` maps each field's name to its values (numpy array or list,
    one per row; NaN and None are NULL); ``geometries`` is a numpy array of
    shapely geometries (None elements: no geometry), a list of WKB
    ``bytes`` (for M values, which shapely 2.0 cannot hold), or None for a
    table. Cancel (``feedback.isCanceled()``) is looked at between batches.
    """
    names = fields.names()
    missing = [name for name in names if name not in columns]
    if missing:
        raise KeyError(f"no values for the fields {missing}")
    values = [attribute_values(columns[name], fields.at(i)) for i, name in enumerate(names)]
    wkbs = None if geometries is None else geometry_wkbs(geometries)
    count = len(wkbs) if wkbs is not None else len(values[0]) if values else 0
    if any(len(v) != count for v in values):
        raise ValueError("columns and geometries differ in length")
    written = 0
    for start in range(0, count, BATCH):
        if feedback is not None and feedback.isCanceled():
            break
        stop = min(start + BATCH, count)
        rows = zip(*(v[start:stop] for v in values)) if values else repeat((), stop - start)
        shapes = repeat(None) if wkbs is None else qgis_geometries(wkbs[start:stop])
        with collector_paused():
            features = [_feature(row, geometry) for row, geometry in zip(rows, shapes)]
        sink.addFeatures(features, FAST_INSERT)
        written += stop - start
    return written


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
        numbers = np.asarray(values, dtype=float)
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
        return list(geometries)
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


def qgis_geometries(wkbs):
    """QgsGeometry (or None) per WKB, parsed by QGIS in one call."""
    present = [w for w in wkbs if w is not None]
    if len(present) == 1:
        single = QgsGeometry()
        single.fromWkb(present[0])
        return [None if w is None else single for w in wkbs]
    collection = QgsGeometry()
    collection.fromWkb(struct.pack("<BII", 1, WKB_COLLECTION, len(present)) + b"".join(present))
    with collector_paused():
        parts = iter(collection.asGeometryCollection() if present else ())
    return [None if w is None else next(parts) for w in wkbs]
