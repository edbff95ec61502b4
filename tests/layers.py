"""Small layers and rasters made on the fly for tests."""

import numpy as np
from osgeo import gdal, osr
from qgis.core import NULL, QgsFeature, QgsGeometry, QgsVectorLayer

gdal.UseExceptions()


def write_raster(
    path,
    values,
    geotransform,
    epsg,
    nodata=None,
    data_type=gdal.GDT_Float64,
    options=("TILED=YES", "BLOCKXSIZE=16", "BLOCKYSIZE=16"),
):
    rows, cols = values.shape
    ds = gdal.GetDriverByName("GTiff").Create(str(path), cols, rows, 1, data_type, list(options))
    ds.SetGeoTransform(geotransform)
    ref = osr.SpatialReference()
    ref.ImportFromEPSG(epsg)
    ds.SetProjection(ref.ExportToWkt())
    band = ds.GetRasterBand(1)
    if nodata is not None:
        band.SetNoDataValue(nodata)
    band.WriteArray(values)
    ds = None
    return str(path)


def plane_raster(path, plane, geotransform, shape, epsg, **kwargs):
    """A raster whose cell centres hold plane(x, y)."""
    rows, cols = np.mgrid[0 : shape[0], 0 : shape[1]]
    x0, dx, _, y0, _, dy = geotransform
    values = plane(x0 + (cols + 0.5) * dx, y0 + (rows + 0.5) * dy)
    return write_raster(path, values, geotransform, epsg, **kwargs)


def line_layer(wkts, epsg="EPSG:32633", names=None, geometry_type="MultiLineString"):
    layer = QgsVectorLayer(f"{geometry_type}?crs={epsg}&field=name:string", "lines", "memory")
    features = []
    for i, wkt in enumerate(wkts):
        feature = QgsFeature(layer.fields())
        if wkt is not None:
            feature.setGeometry(QgsGeometry.fromWkt(wkt))
        feature.setAttributes([names[i] if names else f"L{i}"])
        features.append(feature)
    layer.dataProvider().addFeatures(features)
    return layer


def by_section(layer):
    """{section label: [features sorted by chainage or as stored]}"""
    groups = {}
    for feature in layer.getFeatures():
        groups.setdefault(feature["section"], []).append(feature)
    for features in groups.values():
        if "chainage" in features[0].fields().names():
            features.sort(key=lambda f: f["chainage"])
    return groups


def is_null(value):
    """NULL however this QGIS release hands it over (NULL QVariant, None)."""
    return value is None or value == NULL


def point_layer(rows, fields, epsg="EPSG:32633", geometry_type="Point"):
    """A memory point layer: rows are (wkt or None, [attribute values]);
    fields are (name, type) with type 'string', 'double' or 'integer'."""
    spec = "&".join(f"field={name}:{kind}" for name, kind in fields)
    layer = QgsVectorLayer(f"{geometry_type}?crs={epsg}&{spec}", "points", "memory")
    features = []
    for wkt, values in rows:
        feature = QgsFeature(layer.fields())
        if wkt is not None:
            feature.setGeometry(QgsGeometry.fromWkt(wkt))
        feature.setAttributes(list(values))
        features.append(feature)
    layer.dataProvider().addFeatures(features)
    return layer


def attributes(layer):
    """[{field: value}] of a layer's features."""
    names = layer.fields().names()
    return [dict(zip(names, f.attributes())) for f in layer.getFeatures()]
