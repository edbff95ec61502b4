"""Benchmark data: two DEMs of one analytic surface and 50 section lines.

    python benchmarks/bench_data.py [OUT_DIR]     (default benchmarks/data)

* ``dem_5m.tif``  4,000 × 4,000 cells of 5 m;
* ``dem_1m.tif``  20,000 × 20,000 cells of 1 m;
both 20 km square, tiled 256 × 256, DEFLATE, Float32 — the way real DEMs
arrive; ``lines.gpkg``: 50 section lines of 15 km with 2–4 vertices.
Files that exist are kept (the 1 m DEM takes minutes to write).
"""

import sys
from pathlib import Path

import numpy as np
from osgeo import gdal, ogr, osr

gdal.UseExceptions()

EPSG = 32633
ORIGIN = (400000.0, 5000000.0)  # south-west corner
SIDE = 20000.0
LINE_LENGTH = 15000.0
LINES = 50
SEED = 15


def surface(x, y):
    """Hilly ground with slopes up to ~30°, so nearest-cell errors show."""
    u, v = x - ORIGIN[0], y - ORIGIN[1]
    return (
        600.0
        + 250.0 * np.sin(u / 900.0) * np.cos(v / 700.0)
        + 60.0 * np.sin((u + 2 * v) / 170.0)
        + 0.002 * u
    )


def write_dem(path, cell):
    size = int(SIDE / cell)
    ds = gdal.GetDriverByName("GTiff").Create(
        str(path),
        size,
        size,
        1,
        gdal.GDT_Float32,
        [
            "TILED=YES",
            "BLOCKXSIZE=256",
            "BLOCKYSIZE=256",
            "COMPRESS=DEFLATE",
            "NUM_THREADS=ALL_CPUS",
            "BIGTIFF=IF_SAFER",
        ],
    )
    ds.SetGeoTransform((ORIGIN[0], cell, 0.0, ORIGIN[1] + SIDE, 0.0, -cell))
    ref = osr.SpatialReference()
    ref.ImportFromEPSG(EPSG)
    ds.SetProjection(ref.ExportToWkt())
    band = ds.GetRasterBand(1)
    band.SetNoDataValue(-9999.0)
    x = ORIGIN[0] + (np.arange(size) + 0.5) * cell
    for row0 in range(0, size, 256):
        rows = min(256, size - row0)
        y = ORIGIN[1] + SIDE - (np.arange(row0, row0 + rows) + 0.5) * cell
        band.WriteArray(surface(x[None, :], y[:, None]).astype(np.float32), 0, row0)
    ds = None


def line_vertices(rng):
    """A 15 km line with 2–4 vertices, wholly inside the square."""
    while True:
        count = rng.integers(2, 5)
        pieces = rng.dirichlet(np.ones(count - 1)) * LINE_LENGTH
        heading = rng.uniform(0, 2 * np.pi)
        turns = np.r_[0.0, rng.uniform(-0.6, 0.6, count - 2)]
        angles = heading + np.cumsum(turns)
        start = rng.uniform(0, SIDE, 2)
        steps = np.column_stack((pieces * np.sin(angles), pieces * np.cos(angles)))
        points = start + np.vstack(([0.0, 0.0], np.cumsum(steps, axis=0)))
        if points.min() > 50 and points.max() < SIDE - 50:
            return points + np.array(ORIGIN)


def write_lines(path):
    rng = np.random.default_rng(SEED)
    # FlatGeobuf: no 'fid' attribute that built-in chains would carry into
    # a GeoPackage output and collide with its key.
    data = ogr.GetDriverByName("FlatGeobuf").CreateDataSource(str(path))
    ref = osr.SpatialReference()
    ref.ImportFromEPSG(EPSG)
    layer = data.CreateLayer("lines", ref, ogr.wkbLineString)
    layer.CreateField(ogr.FieldDefn("name", ogr.OFTString))
    for i in range(LINES):
        line = ogr.Geometry(ogr.wkbLineString)
        for x, y in line_vertices(rng):
            line.AddPoint_2D(float(x), float(y))
        feature = ogr.Feature(layer.GetLayerDefn())
        feature.SetField("name", f"S{i:02d}")
        feature.SetGeometry(line)
        layer.CreateFeature(feature)
    data = None


def make(out_dir):
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    if not (out / "lines.fgb").exists():
        write_lines(out / "lines.fgb")
    for name, cell in (("dem_5m.tif", 5.0), ("dem_1m.tif", 1.0)):
        if not (out / name).exists():
            print(f"writing {name} …", flush=True)
            write_dem(out / f"{name}.part", cell)
            (out / f"{name}.part").rename(out / name)
    return out


if __name__ == "__main__":
    make(sys.argv[1] if len(sys.argv) > 1 else Path(__file__).parent / "data")
