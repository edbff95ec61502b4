"""write_rows: numpy columns into feature sinks (memory layers and GeoPackages)."""

import struct

import numpy as np
import pytest
import shapely
from qgis.core import (
    NULL,
    QgsCoordinateReferenceSystem,
    QgsField,
    QgsFields,
    QgsProcessingContext,
    QgsProcessingFeedback,
    QgsProcessingUtils,
    QgsVectorLayer,
    QgsWkbTypes,
)

from sectionwright.algorithms.compat.qgis_compat import (
    DOUBLE,
    LINE_STRING,
    LINE_STRING_ZM,
    LONG,
    NO_GEOMETRY,
    POINT_Z,
    STRING,
)
from sectionwright.algorithms.core.wkb import from_wkb
from sectionwright.algorithms.framework.run_guard import RunCancelled
from sectionwright.algorithms.outputs.feature_writer import (
    BATCH,
    multi_line_wkb,
    qgis_geometries,
    write_rows,
)


def fields_of(**kinds):
    fields = QgsFields()
    for name, kind in kinds.items():
        fields.append(QgsField(name, kind))
    return fields


def sink_of(fields, wkb_type, destination="memory:"):
    """A sink as Processing makes them, and a function giving its layer
    once the sink is closed."""
    context = QgsProcessingContext()
    crs = QgsCoordinateReferenceSystem("EPSG:32633")
    sink, destination = QgsProcessingUtils.createFeatureSink(
        destination, context, fields, wkb_type, crs
    )

    def layer():
        return QgsProcessingUtils.mapLayerFromString(destination, context) or QgsVectorLayer(
            destination
        )

    return sink, layer


def rows_of(layer):
    return [f.attributes() for f in layer.getFeatures()]


def plain(values):
    """NULLs as None, whatever the release hands out."""
    return [None if v is None or (hasattr(v, "isNull") and v.isNull()) else v for v in values]


FIELDS = {"section": STRING, "src_fid": LONG, "elev": DOUBLE}


def test_types_nulls_and_order(qgis_app):
    fields = fields_of(**FIELDS)
    sink, layer = sink_of(fields, POINT_Z)
    # Columns given in another order than the fields: filled by name.
    columns = {
        "elev": np.array([1.5, np.nan, 3.0]),
        "src_fid": np.array([7, 8, 9]),
        "section": ["A", None, "C"],
    }
    geometries = shapely.points(np.array([[1.0, 2, 3], [4, 5, 6], [7, 8, 9]]))
    assert write_rows(sink, fields, geometries, columns) == 3
    del sink
    rows = [plain(r) for r in rows_of(layer())]
    assert rows == [["A", 7, 1.5], [None, 8, None], ["C", 9, 3.0]]
    assert all(isinstance(r[1], int) for r in rows)


def test_numbers_in_text_and_integer_fields_are_converted(qgis_app):
    fields = fields_of(section=STRING, src_fid=LONG)
    sink, layer = sink_of(fields, NO_GEOMETRY)
    write_rows(sink, fields, None, {"section": np.array([12, 13]), "src_fid": [4.0, np.nan]})
    del sink
    assert [plain(r) for r in rows_of(layer())] == [["12", 4], ["13", None]]


def test_z_is_kept_also_where_it_is_nan(qgis_app):
    # A GEOS point whose Z is NaN counts as 2-D (shapely.has_z is False);
    # the writer keeps it PointZ like its neighbours.
    fields = fields_of(elev=DOUBLE)
    sink, layer = sink_of(fields, POINT_Z)
    xyz = np.array([[1.0, 2, np.nan], [4, 5, 6]])
    write_rows(sink, fields, shapely.points(xyz), {"elev": xyz[:, 2]})
    del sink
    points = [f.geometry().constGet() for f in layer().getFeatures()]
    assert all(QgsWkbTypes.hasZ(p.wkbType()) for p in points)
    assert np.isnan(points[0].z()) and points[1].z() == 6


def test_lines_and_wkb_with_m(qgis_app):
    fields = fields_of(section=STRING)
    sink, layer = sink_of(fields, LINE_STRING)
    lines = shapely.linestrings([[[0, 0], [1, 1]], [[2, 2], [3, 5]]])
    write_rows(sink, fields, lines, {"section": ["a", "b"]})
    del sink
    assert [f.geometry().asWkt() for f in layer().getFeatures()] == [
        "LineString (0 0, 1 1)",
        "LineString (2 2, 3 5)",
    ]
    # ISO WKB LineStringZM (type 3002, the OGC Simple Features code).
    coords = np.array([[0.0, 0, 10, 0], [3, 4, 12, 5]])
    zm = struct.pack("<BII", 1, 3002, 2) + coords.tobytes()
    sink, layer = sink_of(fields, LINE_STRING_ZM)
    write_rows(sink, fields, [zm, None], {"section": ["a", "b"]})
    del sink
    features = list(layer().getFeatures())
    line = features[0].geometry().constGet()
    assert line.wkbType() == LINE_STRING_ZM  # (the WKT spelling differs by release)
    assert [(v.x(), v.y(), v.z(), v.m()) for v in line.vertices()] == [tuple(c) for c in coords]
    assert not features[1].hasGeometry()


def test_large_and_small_geometries_keep_their_order_among_ready_ones(qgis_app):
    ready = qgis_geometries([multi_line_wkb([np.zeros((2, 2))], 2)])[0]
    long_line = multi_line_wkb([np.column_stack((np.arange(500.0), np.ones(500)))], 2)
    point = struct.pack("<BIdd", 1, 1, 3.0, 4.0)
    for items in ([long_line, None, ready, long_line], [point, None, ready, point]):
        parsed = qgis_geometries(items)
        assert parsed[1] is None and parsed[2] is ready
        expected = from_wkb(items[0])
        for geometry in (parsed[0], parsed[3]):
            assert shapely.equals_exact(from_wkb(bytes(geometry.asWkb())), expected, 0.0)


@pytest.mark.parametrize("columns", [2, 3, 4])
def test_multi_line_wkb_is_read_alike_by_shapely_and_qgis(qgis_app, columns):
    runs = [np.arange(3 * columns, dtype=float).reshape(3, columns), np.ones((2, columns))]
    wkb = multi_line_wkb(runs, columns)
    (geometry,) = qgis_geometries([wkb])
    parts = geometry.constGet()
    assert parts.numGeometries() == 2
    assert QgsWkbTypes.hasZ(parts.wkbType()) == (columns >= 3)
    assert QgsWkbTypes.hasM(parts.wkbType()) == (columns == 4)
    if columns < 4:  # shapely 2.0 reads no M
        np.testing.assert_array_equal(
            shapely.get_coordinates(from_wkb(wkb), include_z=columns == 3),
            np.concatenate(runs),
        )


def test_empty_input_writes_nothing_and_reports_nothing(qgis_app):
    fields = fields_of(**FIELDS)
    sink, layer = sink_of(fields, POINT_Z)
    feedback = QgsProcessingFeedback()
    empty = {"section": [], "src_fid": np.array([], int), "elev": np.array([])}
    assert write_rows(sink, fields, shapely.points(np.empty((0, 3))), empty, feedback) == 0
    assert write_rows(sink, fields, None, empty, feedback) == 0
    del sink
    assert layer().featureCount() == 0


def test_null_as_the_release_hands_it_over(qgis_app):
    # Carried source values: a NULL QVariant on QGIS 3.22, None later.
    fields = fields_of(section=STRING, elev=DOUBLE)
    sink, layer = sink_of(fields, NO_GEOMETRY)
    write_rows(sink, fields, None, {"section": [NULL, "b"], "elev": [NULL, 2.5]})
    del sink
    assert [plain(r) for r in rows_of(layer())] == [[None, None], ["b", 2.5]]


def test_missing_column_is_an_error(qgis_app):
    fields = fields_of(**FIELDS)
    sink, _ = sink_of(fields, NO_GEOMETRY)
    with pytest.raises(KeyError, match="elev"):
        write_rows(sink, fields, None, {"section": ["a"], "src_fid": [1]})


def test_cancel_stops_between_batches(qgis_app):
    fields = fields_of(elev=DOUBLE)
    sink, layer = sink_of(fields, NO_GEOMETRY)

    class CancelAfterFirstLook(QgsProcessingFeedback):
        looks = 0

        def isCanceled(self):
            self.looks += 1
            return self.looks > 1

    values = np.arange(3 * BATCH, dtype=float)
    # Cancel ends the run (the algorithm then takes its outputs back).
    with pytest.raises(RunCancelled):
        write_rows(sink, fields, None, {"elev": values}, CancelAfterFirstLook())
    del sink
    assert layer().featureCount() == BATCH


def test_geopackage_sink(qgis_app, tmp_path):
    fields = fields_of(**FIELDS)
    path = str(tmp_path / "rows.gpkg")
    sink, _ = sink_of(fields, POINT_Z, path)
    count = BATCH + 7  # more than one batch, in order across the seam
    xyz = np.column_stack((np.arange(count), np.arange(count) * 2.0, np.full(count, 5.0)))
    columns = {
        "section": np.array([f"S{i}" for i in range(count)], dtype=object),
        "src_fid": np.arange(count),
        "elev": np.where(np.arange(count) % 10 == 0, np.nan, xyz[:, 0]),
    }
    write_rows(sink, fields, shapely.points(xyz), columns)
    del sink  # closes the GeoPackage
    layer = QgsVectorLayer(path)
    assert layer.featureCount() == count
    features = list(layer.getFeatures())
    assert [f["src_fid"] for f in features] == list(range(count))
    assert plain([features[10]["elev"]]) == [None] and features[11]["elev"] == 11.0
    assert features[-1]["section"] == f"S{count - 1}"
    assert features[-1].geometry().constGet().y() == 2.0 * (count - 1)
