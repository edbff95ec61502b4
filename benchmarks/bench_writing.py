"""Benchmark of the ways to get many rows from numpy arrays into a
Processing sink, side by side in one run.

    .venv/bin/python benchmarks/bench_writing.py [--scale F] [--repeat N]

Two tables of rows: the profile's per-sample points (150,000 PointZ, 5
fields: one text, four real) and projectattitudes' section points (100,000
PointZ, 25 fields: 5 text, 2 integer, 18 real), each with a NULL in every
hundredth row, written to a temporary (memory) output and to a GeoPackage
output made by ``QgsProcessingUtils.createFeatureSink`` as an algorithm's
``parameterAsSink`` makes them. Every candidate starts from the same numpy
arrays and ends when the sink is closed (a GeoPackage is complete); the
candidates take turns in each of ``--repeat`` rounds and the best is shown.

Candidates:
* per feature: ``QgsFeature`` + ``QgsPoint`` + ``setAttributes``, 5,000 a
  batch into ``addFeatures`` (what the algorithms did);
* the same, one ``addFeature`` call per row;
* ``QgsFeature(fields)`` + ``initAttributes``/``setAttribute`` per value;
* geometry per feature by ``QgsGeometry.fromWkb`` of shapely's ``to_wkb``;
* geometry of a whole batch parsed by QGIS in one call (one
  GeometryCollection WKB, split by ``asGeometryCollection``), attributes
  converted per column by numpy (``feature_writer.write_rows``);
* GeoJSON text parsed in C++ (``QgsJsonUtils.stringToFeatureList``);
* CSV text in ``/vsimem/`` opened as an OGR layer and handed to the sink as
  an iterator (``addFeatures(layer.getFeatures())``): no Python per row on
  the QGIS side;
* a FlatGeobuf in ``/vsimem/`` written by OGR's Python API (GDAL 3.6 has no
  Arrow or column writes), handed over as an iterator;
* the floor: features already made, only ``addFeatures`` timed.
"""

import argparse
import sys
import time
import uuid
from pathlib import Path

import numpy as np
import shapely

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE))
import bench_profile  # noqa: E402

BATCH = 5000
CRS = "EPSG:32633"


def table(rows, texts, integers, reals, seed=3):
    """Columns {name: numpy array} and (x, y, z); NULLs every 100th row."""
    rng = np.random.default_rng(seed)
    x = 400000 + rng.uniform(0, 20000, rows)
    y = 5000000 + rng.uniform(0, 20000, rows)
    z = rng.uniform(100, 900, rows)
    z[1::100] = np.nan
    columns = {}
    for i in range(texts):
        columns[f"t{i}"] = np.array([f"S{k % 50:02d}" for k in range(rows)], dtype=object)
    for i in range(integers):
        columns[f"i{i}"] = np.arange(rows, dtype=np.int64) + i
    for i in range(reals):
        values = rng.uniform(0, 360, rows)
        values[2::100] = np.nan
        columns[f"r{i}"] = values
    return columns, np.column_stack((x, y, z))


def qgs_fields(columns):
    from qgis.core import QgsField, QgsFields

    from sectionwright.algorithms.compat.qgis_compat import DOUBLE, LONG, STRING

    fields = QgsFields()
    for name, values in columns.items():
        kind = STRING if values.dtype == object else LONG if values.dtype.kind == "i" else DOUBLE
        fields.append(QgsField(name, kind))
    return fields


def open_sink(kind, fields):
    from qgis.core import QgsCoordinateReferenceSystem, QgsProcessingContext, QgsProcessingUtils

    from sectionwright.algorithms.compat.qgis_compat import POINT_Z

    context = QgsProcessingContext()
    destination = "memory:" if kind == "memory" else f"/tmp/bench_writing_{uuid.uuid4().hex}.gpkg"
    sink, destination = QgsProcessingUtils.createFeatureSink(
        destination, context, fields, POINT_Z, QgsCoordinateReferenceSystem(CRS)
    )
    return sink, context, destination


def python_rows(columns):
    """Attribute rows as QGIS takes them (NaN as None), the usual Python way."""
    lists = []
    for values in columns.values():
        if values.dtype.kind == "f":
            lists.append([None if v != v else v for v in values.tolist()])
        else:
            lists.append(values.tolist())
    return [list(row) for row in zip(*lists)]


def in_batches(sink, features):
    from qgis.core import QgsFeatureSink

    for start in range(0, len(features), BATCH):
        sink.addFeatures(features[start : start + BATCH], QgsFeatureSink.Flag.FastInsert)


def per_feature(sink, fields, columns, xyz):
    from qgis.core import QgsFeature, QgsFeatureSink, QgsPoint

    batch = []
    for row, (x, y, z) in zip(python_rows(columns), xyz.tolist()):
        feature = QgsFeature()
        feature.setGeometry(QgsPoint(x, y, z))
        feature.setAttributes(row)
        batch.append(feature)
        if len(batch) == BATCH:
            sink.addFeatures(batch, QgsFeatureSink.Flag.FastInsert)
            batch = []
    sink.addFeatures(batch, QgsFeatureSink.Flag.FastInsert)


def per_feature_single_adds(sink, fields, columns, xyz):
    from qgis.core import QgsFeature, QgsFeatureSink, QgsPoint

    for row, (x, y, z) in zip(python_rows(columns), xyz.tolist()):
        feature = QgsFeature()
        feature.setGeometry(QgsPoint(x, y, z))
        feature.setAttributes(row)
        sink.addFeature(feature, QgsFeatureSink.Flag.FastInsert)


def set_attribute_each(sink, fields, columns, xyz):
    from qgis.core import QgsFeature, QgsPoint

    features = []
    for row, (x, y, z) in zip(python_rows(columns), xyz.tolist()):
        feature = QgsFeature(fields)
        feature.initAttributes(len(row))
        for i, value in enumerate(row):
            feature.setAttribute(i, value)
        feature.setGeometry(QgsPoint(x, y, z))
        features.append(feature)
    in_batches(sink, features)


def wkb_each(sink, fields, columns, xyz):
    from qgis.core import QgsFeature, QgsGeometry

    from sectionwright.algorithms.core.wkb import to_wkb

    wkbs = to_wkb(shapely.points(xyz)).tolist()
    features = []
    for row, wkb in zip(python_rows(columns), wkbs):
        geometry = QgsGeometry()
        geometry.fromWkb(wkb)
        feature = QgsFeature()
        feature.setGeometry(geometry)
        feature.setAttributes(row)
        features.append(feature)
    in_batches(sink, features)


def write_rows_candidate(sink, fields, columns, xyz):
    from sectionwright.algorithms.outputs.feature_writer import write_rows

    write_rows(sink, fields, shapely.points(xyz), columns)


def geojson(sink, fields, columns, xyz):
    import json

    from qgis.core import QgsFeatureSink, QgsJsonUtils

    names = list(columns)
    rows = python_rows(columns)
    features = [
        {
            "type": "Feature",
            "geometry": {"type": "Point", "coordinates": [x, y, z if z == z else None]},
            "properties": dict(zip(names, row)),
        }
        for row, (x, y, z) in zip(rows, xyz.tolist())
    ]
    text = json.dumps({"type": "FeatureCollection", "features": features})
    sink.addFeatures(QgsJsonUtils.stringToFeatureList(text, fields), QgsFeatureSink.Flag.FastInsert)


def csv_iterator(sink, fields, columns, xyz):
    from osgeo import gdal
    from qgis.core import QgsFeatureSink, QgsVectorLayer

    path = f"/vsimem/{uuid.uuid4().hex}.csv"
    texts = []
    for values in list(columns.values()) + [xyz[:, 0], xyz[:, 1], xyz[:, 2]]:
        text = values.astype(str) if values.dtype != object else values
        texts.append(np.where(text == "nan", "", text).tolist())
    header = ",".join(list(columns) + ["gx", "gy", "gz"])
    body = "\n".join(map(",".join, zip(*texts)))
    kinds = {"O": "String", "i": "Integer64", "f": "Real"}
    types = [kinds[v.dtype.kind] for v in columns.values()] + ["Real"] * 3
    gdal.FileFromMemBuffer(path, f"{header}\n{body}\n".encode())
    gdal.FileFromMemBuffer(path + "t", ",".join(types).encode())
    options = "|option:X_POSSIBLE_NAMES=gx|option:Y_POSSIBLE_NAMES=gy|option:Z_POSSIBLE_NAMES=gz"
    layer = QgsVectorLayer(path + options + "|option:KEEP_GEOM_COLUMNS=NO", "csv", "ogr")
    assert layer.fields().names() == list(columns), layer.fields().names()
    sink.addFeatures(layer.getFeatures(), QgsFeatureSink.Flag.FastInsert)
    del layer
    gdal.Unlink(path)
    gdal.Unlink(path + "t")


def ogr_iterator(sink, fields, columns, xyz):
    from osgeo import gdal, ogr
    from qgis.core import QgsFeatureSink, QgsVectorLayer

    path = f"/vsimem/{uuid.uuid4().hex}.fgb"
    data = ogr.GetDriverByName("FlatGeobuf").CreateDataSource(path)
    layer = data.CreateLayer("rows", None, ogr.wkbPoint25D, ["SPATIAL_INDEX=NO"])
    kinds = {"O": ogr.OFTString, "i": ogr.OFTInteger64, "f": ogr.OFTReal}
    for name, values in columns.items():
        layer.CreateField(ogr.FieldDefn(name, kinds[values.dtype.kind]))
    definition = layer.GetLayerDefn()
    for row, (x, y, z) in zip(python_rows(columns), xyz.tolist()):
        feature = ogr.Feature(definition)
        for i, value in enumerate(row):
            if value is not None:
                feature.SetField(i, value)
        point = ogr.Geometry(ogr.wkbPoint25D)
        point.AddPoint(x, y, z)
        feature.SetGeometryDirectly(point)
        layer.CreateFeature(feature)
    data = None
    source = QgsVectorLayer(path, "fgb", "ogr")
    sink.addFeatures(source.getFeatures(), QgsFeatureSink.Flag.FastInsert)
    del source
    gdal.Unlink(path)


class Collector:
    """Takes the features a candidate hands to a sink, and keeps them."""

    def __init__(self):
        self.features = []

    def addFeatures(self, features, flags):  # noqa: N802 (the sink's API)
        self.features.extend(features)
        return True


def floor_prepare(fields, columns, xyz):
    """Features made beforehand (as the first candidate makes them): only
    the sink's own work is timed."""
    collector = Collector()
    per_feature(collector, fields, columns, xyz)
    return collector.features


CANDIDATES = (
    ("per feature, batches of 5,000 (before)", per_feature),
    ("per feature, one addFeature each", per_feature_single_adds),
    ("initAttributes + setAttribute each", set_attribute_each),
    ("QgsGeometry.fromWkb per feature", wkb_each),
    ("batch WKB collection + numpy columns", write_rows_candidate),
    ("GeoJSON → QgsJsonUtils (C++)", geojson),
    ("CSV in /vsimem → OGR layer iterator", csv_iterator),
    ("ogr Python → FlatGeobuf → iterator", ogr_iterator),
)


def count_of(kind, context, destination):
    from qgis.core import QgsProcessingUtils, QgsVectorLayer

    if kind == "memory":
        return QgsProcessingUtils.mapLayerFromString(destination, context).featureCount()
    return QgsVectorLayer(destination).featureCount()


def measure(function, kind, fields, columns, xyz, prepared=None):
    sink, context, destination = open_sink(kind, fields)
    started = time.perf_counter()
    if prepared is None:
        function(sink, fields, columns, xyz)
    else:
        in_batches(sink, prepared)
    del sink  # closes a GeoPackage: its writing is part of the time
    seconds = time.perf_counter() - started
    return seconds, count_of(kind, context, destination)


def main():
    parser = argparse.ArgumentParser()
    parser.add_argument("--scale", type=float, default=1.0, help="fraction of the rows")
    parser.add_argument("--repeat", type=int, default=2, help="rounds; the best is shown")
    args = parser.parse_args()
    app, provider = bench_profile.start_qgis()  # keep the provider alive
    from qgis.core import Qgis

    tables = (
        ("profile points, 5 fields", int(150_000 * args.scale), (1, 0, 4)),
        ("attitude points, 25 fields", int(100_000 * args.scale), (5, 2, 18)),
    )
    print(f"QGIS {Qgis.QGIS_VERSION}; seconds, µs per row (rows written)")
    print(f"{'rows':<28}{'candidate':<42}{'memory':>16}{'GeoPackage':>18}")
    for title, rows, shape in tables:
        columns, xyz = table(rows, *shape)
        fields = qgs_fields(columns)
        prepared = floor_prepare(fields, columns, xyz)
        best = {}
        # Rounds interleave the candidates, so that a busy spell of the
        # shared machine falls on all of them alike.
        for _ in range(args.repeat):
            for name, function in CANDIDATES + ((FLOOR, None),):
                for kind in OUTPUTS:
                    ready = prepared if function is None else None
                    figure = measure(function, kind, fields, columns, xyz, ready)
                    if (name, kind) not in best or figure[0] < best[(name, kind)][0]:
                        best[(name, kind)] = figure
        del prepared
        results = [
            (name, [best[(name, kind)] for kind in OUTPUTS])
            for name, _ in CANDIDATES + ((FLOOR, None),)
        ]
        for name, figures in results:
            cells = "".join(
                f"{s:>8.3f} {1e6 * s / rows:>5.1f}{'' if n == rows else '!':1}"
                f"{' ' * (3 if i == 0 else 4)}"
                for i, (s, n) in enumerate(figures)
            )
            print(f"{title:<28}{name:<42}{cells}")
    print("! = the sink did not receive every row")
    app.exitQgis()


OUTPUTS = ("memory", "gpkg")
FLOOR = "floor: addFeatures of ready features"

if __name__ == "__main__":
    main()
