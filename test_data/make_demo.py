"""Writes the Tarrowgill demo world (see demo_world.py) into a folder.

    python3 test_data/make_demo.py OUT_DIR

Files: ``dem.tif`` (25 m, tiled, DEFLATE) and ``tarrowgill.gpkg`` with the
layers ``sections``, ``units``, ``contacts``, ``attitudes``, ``collars`` and
the tables ``surveys`` and ``intervals``. Everything is derived from the
analytic world with a fixed random seed, so the output is reproducible; the
files are not committed (they are remade in a second).
"""

import sys
from pathlib import Path

import numpy as np
from osgeo import gdal, ogr, osr

sys.path.insert(0, str(Path(__file__).parent))
import demo_world as W  # noqa: E402

gdal.UseExceptions()
ogr.UseExceptions()

SEED = 20261201
MAP_CELL = 10.0  # resolution of the unit map the polygons are traced from


def srs():
    ref = osr.SpatialReference()
    ref.ImportFromEPSG(W.EPSG)
    return ref


def grid_centres(cell):
    cols, rows = int(W.SIZE[0] / cell), int(W.SIZE[1] / cell)
    x = W.ORIGIN[0] + (np.arange(cols) + 0.5) * cell
    y = W.ORIGIN[1] + W.SIZE[1] - (np.arange(rows) + 0.5) * cell
    return np.meshgrid(x, y)


def geotransform(cell):
    return (W.ORIGIN[0], cell, 0.0, W.ORIGIN[1] + W.SIZE[1], 0.0, -cell)


def write_dem(path):
    x, y = grid_centres(W.DEM_CELL)
    rows, cols = x.shape
    ds = gdal.GetDriverByName("GTiff").Create(
        str(path),
        cols,
        rows,
        1,
        gdal.GDT_Float32,
        ["TILED=YES", "BLOCKXSIZE=128", "BLOCKYSIZE=128", "COMPRESS=DEFLATE"],
    )
    ds.SetGeoTransform(geotransform(W.DEM_CELL))
    ds.SetProjection(srs().ExportToWkt())
    band = ds.GetRasterBand(1)
    band.SetNoDataValue(-9999.0)
    band.WriteArray(W.ground(x, y).astype(np.float32))
    ds = None


def mem_raster(values, cell, nodata=None):
    rows, cols = values.shape
    ds = gdal.GetDriverByName("MEM").Create("", cols, rows, 1, gdal.GDT_Float64)
    ds.SetGeoTransform(geotransform(cell))
    ds.SetProjection(srs().ExportToWkt())
    band = ds.GetRasterBand(1)
    if nodata is not None:
        band.SetNoDataValue(nodata)
    band.WriteArray(values)
    return ds


def new_layer(gpkg, name, geom_type, fields):
    layer = gpkg.CreateLayer(name, srs() if geom_type != ogr.wkbNone else None, geom_type)
    for field_name, field_type in fields:
        layer.CreateField(ogr.FieldDefn(field_name, field_type))
    return layer


def add_feature(layer, values, geometry=None):
    feature = ogr.Feature(layer.GetLayerDefn())
    for name, value in values.items():
        feature.SetField(name, value)
    if geometry is not None:
        feature.SetGeometry(geometry)
    layer.CreateFeature(feature)


def line_geometry(points):
    line = ogr.Geometry(ogr.wkbLineString)
    for x, y in points:
        line.AddPoint_2D(W.ORIGIN[0] + x, W.ORIGIN[1] + y)
    return line


def write_sections(gpkg):
    layer = new_layer(gpkg, "sections", ogr.wkbLineString, [("name", ogr.OFTString)])
    for name, points in W.SECTION_LINES.items():
        add_feature(layer, {"name": name}, line_geometry(points))


def write_units(gpkg):
    x, y = grid_centres(MAP_CELL)
    index = W.unit_index(x, y, W.ground(x, y)).astype(np.int32)
    ds = gdal.GetDriverByName("MEM").Create("", x.shape[1], x.shape[0], 1, gdal.GDT_Int32)
    ds.SetGeoTransform(geotransform(MAP_CELL))
    ds.GetRasterBand(1).WriteArray(index)
    mem = ogr.GetDriverByName("Memory").CreateDataSource("")
    traced = new_layer(mem, "traced", ogr.wkbPolygon, [("index", ogr.OFTInteger)])
    gdal.Polygonize(ds.GetRasterBand(1), None, traced, 0)
    layer = new_layer(
        gpkg, "units", ogr.wkbPolygon, [("unit", ogr.OFTString), ("unit_name", ogr.OFTString)]
    )
    for feature in traced:
        code = W.UNITS[feature.GetField("index")]
        add_feature(
            layer, {"unit": code, "unit_name": W.UNIT_NAMES[code]}, feature.GetGeometryRef().Clone()
        )


def write_contacts(gpkg):
    layer = new_layer(
        gpkg,
        "contacts",
        ogr.wkbLineString,
        [("type", ogr.OFTString), ("unit_above", ogr.OFTString)],
    )
    x, y = grid_centres(MAP_CELL)
    side = W.fault_side(x, y)
    mem = ogr.GetDriverByName("Memory").CreateDataSource("")
    for k in range(len(W.CONTACT_LEVELS)):
        misfit = W.ground(x, y) - W.contact_elevation(k, x, y)
        for block in (0.0, 1.0):
            values = np.where(side == block, misfit, -99999.0)
            traces = new_layer(
                mem,
                f"c{k}{int(block)}",
                ogr.wkbLineString,
                [("id", ogr.OFTInteger), ("level", ogr.OFTReal)],
            )
            raster = mem_raster(values, MAP_CELL, nodata=-99999.0)
            gdal.ContourGenerate(raster.GetRasterBand(1), 0, 0, [0.0], 1, -99999.0, traces, 0, 1)
            for trace in traces:
                add_feature(
                    layer,
                    {"type": "contact", "unit_above": W.UNITS[k]},
                    trace.GetGeometryRef().Clone(),
                )
    strike = np.radians(W.FAULT_STRIKE)
    reach = 20000.0
    fault = line_geometry(
        [
            (W.FAULT_POINT[0] - reach * np.sin(strike), W.FAULT_POINT[1] - reach * np.cos(strike)),
            (W.FAULT_POINT[0] + reach * np.sin(strike), W.FAULT_POINT[1] + reach * np.cos(strike)),
        ]
    )
    box = ogr.CreateGeometryFromWkt(
        "POLYGON(({0} {1},{2} {1},{2} {3},{0} {3},{0} {1}))".format(
            W.ORIGIN[0], W.ORIGIN[1], W.ORIGIN[0] + W.SIZE[0], W.ORIGIN[1] + W.SIZE[1]
        )
    )
    add_feature(layer, {"type": "fault", "unit_above": None}, fault.Intersection(box))


def quadrant_bearing(azimuth):
    """Azimuth as a quadrant bearing, e.g. 210 -> 'S30W'."""
    a = azimuth % 360.0
    if a <= 90:
        return f"N{a:.0f}E"
    if a <= 180:
        return f"S{180 - a:.0f}E"
    if a <= 270:
        return f"S{a - 180:.0f}W"
    return f"N{360 - a:.0f}W"


def compass_letters(azimuth):
    names = ("N", "NE", "E", "SE", "S", "SW", "W", "NW")
    return names[int(np.round(azimuth / 45.0)) % 8]


def field_notation(style, dip_direction, dip):
    """The attitude written the way one of several field geologists would."""
    dd = float(np.round(dip_direction)) % 360.0
    d = float(np.round(dip))
    strike = (dd - 90.0) % 360.0
    other_strike = (strike + 180.0) % 360.0
    forms = (
        f"{dd:03.0f}/{d:02.0f}",
        f"{other_strike:.0f}/{d:.0f}{compass_letters(dd)}",
        f"{quadrant_bearing(strike)} {d:.0f}{compass_letters(dd)}",
        f"{quadrant_bearing(other_strike)}/{d:.0f}{compass_letters(dd).lower()}",
        f"{dd:.0f}° / {d:.0f}°",
    )
    return forms[style % len(forms)]


def write_attitudes(gpkg, rng):
    layer = new_layer(
        gpkg,
        "attitudes",
        ogr.wkbPoint,
        [
            ("station", ogr.OFTString),
            ("attitude", ogr.OFTString),
            ("unit", ogr.OFTString),
            ("true_ddir", ogr.OFTReal),
            ("true_dip", ogr.OFTReal),
        ],
    )
    count = 80
    u = rng.uniform(300, W.SIZE[0] - 300, count)
    v = rng.uniform(300, W.SIZE[1] - 300, count)
    x, y = W.ORIGIN[0] + u, W.ORIGIN[1] + v
    dip_direction, dip = W.bedding_attitude(x, y)
    unit = W.unit_index(x, y, W.ground(x, y))
    for i in range(count):
        text = field_notation(i, dip_direction[i], dip[i])
        if i in (17, 53):  # notebook entries nobody could read
            text = "see sketch p. 41" if i == 17 else ""
        point = ogr.Geometry(ogr.wkbPoint)
        point.AddPoint_2D(float(x[i]), float(y[i]))
        add_feature(
            layer,
            {
                "station": f"T{i + 1:03d}",
                "attitude": text,
                "unit": W.UNITS[unit[i]],
                "true_ddir": float(dip_direction[i]),
                "true_dip": float(dip[i]),
            },
            point,
        )


# Boreholes: local collar position, azimuth, inclination as logged, depth.
HOLES = (
    ("TG-01", 2300.0, 5600.0, 0.0, 90.0, 620.0),
    ("TG-02", 4100.0, 4100.0, 125.0, 60.0, 560.0),
    ("TG-03", 5600.0, 3000.0, 305.0, -70.0, 650.0),  # mining convention
    ("TG-04", 6900.0, 2300.0, 0.0, 90.0, 480.0),
    ("TG-05", 3100.0, 2200.0, 80.0, 75.0, 520.0),
    ("TG-06", 7700.0, 5600.0, 215.0, -60.0, 600.0),
)
# A hole drilled as a circular arc: vertical at the collar, turning at a
# constant rate toward CURVED_AZIMUTH until CURVED_END_INCLINATION below the
# horizontal at its total depth. Minimum curvature reproduces such an arc
# exactly, so its analytic path is ground truth.
CURVED = ("TG-07", 5000.0, 3400.0, 170.0, 90.0, 500.0)
CURVED_END_INCLINATION = 40.0
SURVEY_SPACING = 25.0


def straight_path(azimuth, inclination):
    """md -> (east, north, up) offsets of a straight hole; inclination below
    horizontal, negative values read as the mining convention."""
    plunge = np.radians(abs(inclination))
    a = np.radians(azimuth)
    direction = np.array([np.cos(plunge) * np.sin(a), np.cos(plunge) * np.cos(a), -np.sin(plunge)])
    return lambda md: np.outer(md, direction)


def arc_path(azimuth, depth):
    """md -> offsets along the curved hole (radius 1/k in a vertical plane)."""
    k = np.radians(90.0 - CURVED_END_INCLINATION) / depth
    a = np.radians(azimuth)

    def path(md):
        md = np.asarray(md, dtype=float)
        across = (1 - np.cos(k * md)) / k
        return np.column_stack((across * np.sin(a), across * np.cos(a), -np.sin(k * md) / k))

    path.logged_inclination = lambda md: 90.0 - np.degrees(k * np.asarray(md))
    return path


def hole_intervals(x, y, z, path, depth):
    """(from, to, unit) along a hole, boundaries to 1 cm."""
    md = np.arange(0.0, depth + 0.005, 0.01)
    offsets = path(md)
    index = W.unit_index(x + offsets[:, 0], y + offsets[:, 1], z + offsets[:, 2])
    breaks = np.flatnonzero(np.diff(index)) + 1
    starts = np.r_[0, breaks]
    ends = np.r_[breaks, len(md) - 1]
    return [(float(md[s]), float(md[e]), W.UNITS[index[s]]) for s, e in zip(starts, ends)]


def write_boreholes(gpkg):
    collars = new_layer(
        gpkg,
        "collars",
        ogr.wkbPoint25D,
        [
            ("hole_id", ogr.OFTString),
            ("azimuth", ogr.OFTReal),
            ("incl", ogr.OFTReal),
            ("depth", ogr.OFTReal),
        ],
    )
    surveys = new_layer(
        gpkg,
        "surveys",
        ogr.wkbNone,
        [
            ("hole_id", ogr.OFTString),
            ("depth", ogr.OFTReal),
            ("azimuth", ogr.OFTReal),
            ("incl", ogr.OFTReal),
        ],
    )
    intervals = new_layer(
        gpkg,
        "intervals",
        ogr.wkbNone,
        [
            ("hole_id", ogr.OFTString),
            ("from_m", ogr.OFTReal),
            ("to_m", ogr.OFTReal),
            ("unit", ogr.OFTString),
        ],
    )
    for hole_id, u, v, azimuth, inclination, depth in HOLES + (CURVED,):
        x, y = W.ORIGIN[0] + u, W.ORIGIN[1] + v
        z = float(W.ground(x, y))
        collar = ogr.Geometry(ogr.wkbPoint25D)
        collar.AddPoint(x, y, z)
        add_feature(
            collars,
            {"hole_id": hole_id, "azimuth": azimuth, "incl": inclination, "depth": depth},
            collar,
        )
        curved = hole_id == CURVED[0]
        path = arc_path(azimuth, depth) if curved else straight_path(azimuth, inclination)
        for station in np.arange(0.0, depth + 1e-9, SURVEY_SPACING):
            logged = float(path.logged_inclination(station)) if curved else inclination
            add_feature(
                surveys,
                {"hole_id": hole_id, "depth": float(station), "azimuth": azimuth, "incl": logged},
            )
        for top, bottom, code in hole_intervals(x, y, z, path, depth):
            add_feature(
                intervals, {"hole_id": hole_id, "from_m": top, "to_m": bottom, "unit": code}
            )
    # Two slips of the kind logging sheets have, for SKIPPED to report.
    add_feature(surveys, {"hole_id": "TG-03", "depth": 140.0, "azimuth": 305.0, "incl": -70.0})
    add_feature(intervals, {"hole_id": "TG-04", "from_m": 470.0, "to_m": 500.0, "unit": "ASH"})


def make(out_dir):
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    write_dem(out / "dem.tif")
    gpkg_path = out / "tarrowgill.gpkg"
    if gpkg_path.exists():
        gpkg_path.unlink()
    gpkg = ogr.GetDriverByName("GPKG").CreateDataSource(str(gpkg_path))
    rng = np.random.default_rng(SEED)
    write_sections(gpkg)
    write_units(gpkg)
    write_contacts(gpkg)
    write_attitudes(gpkg, rng)
    write_boreholes(gpkg)
    gpkg = None
    return out


if __name__ == "__main__":
    if len(sys.argv) != 2:
        sys.exit("usage: python3 test_data/make_demo.py OUT_DIR")
    print(f"Tarrowgill demo world written to {make(sys.argv[1])}")
