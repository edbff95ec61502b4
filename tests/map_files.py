"""A small map written to files as a user would hand it over: one
GeoPackage of vector layers (each in its own CRS) and a GeoTIFF DEM.

A ``MapSpec`` is plain data (coordinates in the map's base CRS, attribute
rows), so that tests and the hypothesis strategies of test_foreign_maps.py
describe maps without touching files; ``write_map`` turns one into files.
"""

import hashlib
from dataclasses import dataclass, field
from pathlib import Path
from typing import List, Optional, Tuple

import numpy as np
from osgeo import gdal, ogr, osr
from pyproj import Transformer

gdal.UseExceptions()
ogr.UseExceptions()

BASE_EPSG = 32618  # UTM 18N, metres: the CRS the spec's coordinates are in
ORIGIN = (583000.0, 4507000.0)  # south-west corner of the invented map area
SIZE = 2000.0  # the map area is SIZE × SIZE metres


@dataclass
class LayerSpec:
    """Features of one vector layer: ``rows`` of (wkt or None, [values])
    for ``fields`` of (name, 'string' | 'real' | 'integer')."""

    name: str
    geometry: str  # OGR geometry name: LineString, MultiLineString, Point, Polygon, None
    fields: List[Tuple[str, str]]
    rows: list
    epsg: int = BASE_EPSG


@dataclass
class DemSpec:
    """A DEM grid over ``bounds`` (base CRS) written in ``epsg``; cells in
    ``holes`` (row/column slices) hold nodata."""

    bounds: Tuple[float, float, float, float]
    shape: Tuple[int, int] = (24, 24)
    epsg: int = BASE_EPSG
    holes: list = field(default_factory=list)
    relief: float = 80.0  # metres of relief of the invented hill


@dataclass
class MapSpec:
    layers: List[LayerSpec]
    dem: Optional[DemSpec]


@dataclass
class MapFiles:
    folder: Path
    gpkg: Path
    dem: Optional[Path]
    counts: dict  # features per layer
    parts: int  # section line parts (a null or empty geometry counts as one)
    made: dict = field(default_factory=dict)  # algorithm -> its results on this map

    def layer(self, name):
        return f"{self.gpkg}|layername={name}"

    def dem_layer(self):
        return str(self.dem)

    def has(self, name):
        return name in self.counts


OGR_TYPES = {"string": ogr.OFTString, "real": ogr.OFTReal, "integer": ogr.OFTInteger64}
OGR_GEOMETRIES = {
    "Point": ogr.wkbPoint,
    "PointZ": ogr.wkbPoint25D,
    "LineString": ogr.wkbLineString,
    "MultiLineString": ogr.wkbMultiLineString,
    "Polygon": ogr.wkbPolygon,
    "MultiPolygon": ogr.wkbMultiPolygon,
    "None": ogr.wkbNone,
}


def ground(x, y, relief=80.0):
    """The invented ground surface (metres) at base-CRS positions."""
    u = (np.asarray(x) - ORIGIN[0]) / SIZE
    v = (np.asarray(y) - ORIGIN[1]) / SIZE
    return 300.0 + relief * np.sin(2.5 * u + 0.7) * np.cos(1.8 * v - 0.4) + 20.0 * u


def spatial_reference(epsg):
    reference = osr.SpatialReference()
    reference.ImportFromEPSG(epsg)
    reference.SetAxisMappingStrategy(osr.OAMS_TRADITIONAL_GIS_ORDER)
    return reference


def to_crs(wkt, epsg):
    """A base-CRS WKT geometry in another CRS."""
    geometry = ogr.CreateGeometryFromWkt(wkt)
    if epsg and epsg != BASE_EPSG:
        transform = osr.CoordinateTransformation(
            spatial_reference(BASE_EPSG), spatial_reference(epsg)
        )
        geometry.Transform(transform)
    return geometry


def _write_layer(dataset, spec):
    kind = OGR_GEOMETRIES[spec.geometry]
    srs = spatial_reference(spec.epsg) if kind != ogr.wkbNone and spec.epsg else None
    layer = dataset.CreateLayer(spec.name, srs, kind, ["FID=fid"])
    for name, type_name in spec.fields:
        layer.CreateField(ogr.FieldDefn(name, OGR_TYPES[type_name]))
    definition = layer.GetLayerDefn()
    layer.StartTransaction()
    for wkt, values in spec.rows:
        feature = ogr.Feature(definition)
        for (name, _), value in zip(spec.fields, values):
            if value is None:
                feature.SetFieldNull(name)
            else:
                feature.SetField(name, value)
        if wkt is not None:
            feature.SetGeometry(to_crs(wkt, spec.epsg))
        layer.CreateFeature(feature)
    layer.CommitTransaction()


def _write_dem(path, spec):
    x0, y0, x1, y1 = spec.bounds
    if spec.epsg != BASE_EPSG:
        to_dem = Transformer.from_crs(BASE_EPSG, spec.epsg, always_xy=True)
        xs, ys = to_dem.transform([x0, x1, x0, x1], [y0, y0, y1, y1])
        x0, x1, y0, y1 = min(xs), max(xs), min(ys), max(ys)
    rows, cols = spec.shape
    dx, dy = (x1 - x0) / cols, (y1 - y0) / rows
    centre_x = x0 + (np.arange(cols) + 0.5) * dx
    centre_y = y1 - (np.arange(rows) + 0.5) * dy
    grid_x, grid_y = np.meshgrid(centre_x, centre_y)
    if spec.epsg != BASE_EPSG:
        to_base = Transformer.from_crs(spec.epsg, BASE_EPSG, always_xy=True)
        grid_x, grid_y = to_base.transform(grid_x, grid_y)
    values = ground(grid_x, grid_y, spec.relief).astype(np.float32)
    for row_slice, col_slice in spec.holes:
        values[row_slice, col_slice] = -9999.0
    dataset = gdal.GetDriverByName("GTiff").Create(str(path), cols, rows, 1, gdal.GDT_Float32)
    dataset.SetGeoTransform((x0, dx, 0.0, y1, 0.0, -dy))
    dataset.SetProjection(spatial_reference(spec.epsg).ExportToWkt())
    band = dataset.GetRasterBand(1)
    band.SetNoDataValue(-9999.0)
    band.WriteArray(values)
    dataset = None


def write_map(spec, folder):
    folder = Path(folder)
    folder.mkdir(parents=True, exist_ok=True)
    gpkg = folder / "map.gpkg"
    dataset = ogr.GetDriverByName("GPKG").CreateDataSource(str(gpkg))
    for layer in spec.layers:
        _write_layer(dataset, layer)
    dataset = None
    dem = None
    if spec.dem is not None:
        dem = folder / "dem.tif"
        _write_dem(dem, spec.dem)
    counts = {layer.name: len(layer.rows) for layer in spec.layers}
    sections = [layer for layer in spec.layers if layer.name == "sections"]
    parts = sum(_part_count(wkt) for layer in sections for wkt, _ in layer.rows)
    return MapFiles(folder, gpkg, dem, counts, parts)


def _part_count(wkt):
    if wkt is None:
        return 1
    geometry = ogr.CreateGeometryFromWkt(wkt)
    if geometry.IsEmpty() or not geometry.GetGeometryName().startswith("MULTI"):
        return 1
    return geometry.GetGeometryCount()


def polygon(*corners):
    """WKT of the polygon through ``corners`` ("x y" strings), closed."""
    return f"POLYGON(({', '.join(corners + corners[:1])}))"


def ordinary_map(section_rows=None, **replace):
    """A plain map of the area: three section lines, two units, a contact
    and a fault, attitudes, collars with surveys and intervals, and a DEM
    over the whole area; ``replace`` swaps layers (None drops one)."""
    x0, y0 = ORIGIN

    def at(dx, dy):
        return f"{x0 + dx} {y0 + dy}"

    layers = {
        "sections": LayerSpec(
            "sections",
            "LineString",
            [("name", "string")],
            section_rows
            if section_rows is not None
            else [
                (f"LINESTRING({at(200, 500)}, {at(1800, 500)})", ["A"]),
                (
                    f"LINESTRING({at(200, 1000)}, {at(1000, 1200)}, {at(1800, 1000)})",
                    ["B"],
                ),
                (f"LINESTRING({at(1000, 200)}, {at(1000, 1800)})", ["C"]),
            ],
        ),
        "units": LayerSpec(
            "units",
            "Polygon",
            [("unit", "string")],
            [
                (polygon(at(0, 0), at(900, 0), at(1100, 2000), at(0, 2000)), ["LWR"]),
                (polygon(at(900, 0), at(2000, 0), at(2000, 2000), at(1100, 2000)), ["UPR"]),
            ],
        ),
        "contacts": LayerSpec(
            "contacts",
            "LineString",
            [("type", "string")],
            [
                (f"LINESTRING({at(900, 0)}, {at(1100, 2000)})", ["contact"]),
                (f"LINESTRING({at(1500, 0)}, {at(1400, 2000)})", ["fault"]),
            ],
        ),
        "attitudes": LayerSpec(
            "attitudes",
            "Point",
            [("dipdir", "real"), ("dip", "real"), ("text", "string")],
            [
                (
                    f"POINT({at(300 + 150 * i, 450 + 50 * (i % 3) * 5)})",
                    [90.0 + 10 * i, 20.0 + 3 * i, f"{90 + 10 * i}/{20 + 3 * i}"],
                )
                for i in range(10)
            ],
        ),
        "collars": LayerSpec(
            "collars",
            "Point",
            [("hole", "string"), ("az", "real"), ("incl", "real"), ("depth", "real")],
            [(f"POINT({at(400 + 300 * i, 520)})", [f"H{i}", 0.0, 70.0, 150.0]) for i in range(4)],
        ),
        "surveys": LayerSpec(
            "surveys",
            "None",
            [("hole", "string"), ("depth", "real"), ("az", "real"), ("incl", "real")],
            [(None, [f"H{i}", d, 10.0, 70.0 - d / 10]) for i in range(4) for d in (50.0, 100.0)],
        ),
        "intervals": LayerSpec(
            "intervals",
            "None",
            [("hole", "string"), ("from_m", "real"), ("to_m", "real"), ("code", "string")],
            [
                (None, [f"H{i}", a, b, c])
                for i in range(4)
                for a, b, c in ((0.0, 60.0, "LWR"), (60.0, 150.0, "UPR"))
            ],
        ),
    }
    dem = replace.pop("dem", DemSpec((x0 - 50, y0 - 50, x0 + SIZE + 50, y0 + SIZE + 50)))
    for name, layer in replace.items():
        if layer is None:
            layers.pop(name)
        else:
            layers[name] = layer
    return MapSpec(list(layers.values()), dem)


def checksums(folder):
    """{file name: sha256} of every file in ``folder``."""
    return {
        path.name: hashlib.sha256(path.read_bytes()).hexdigest()
        for path in sorted(Path(folder).iterdir())
        if path.is_file()
    }
