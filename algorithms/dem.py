"""Reading a DEM layer window by window: through GDAL where the layer is a
GDAL source, through the layer's data provider otherwise."""
from contextlib import contextmanager

import numpy as np
from osgeo import gdal
from qgis.core import QgsProcessingException, QgsRectangle

from .core.crs import cell_size_on_ground, transformer
from .core.raster_sampling import TileCache, bilinear, centre_index
from .section_lines import crs_wkt

PROVIDER_TILE = 256       # window side for sources without a useful block size
LARGEST_TILE = 1024       # blocks larger than this (strips, whole images) are windowed
GDAL_CACHE_CAP = 64 * 2 ** 20

_NUMPY_TYPES = {"Byte": np.uint8, "Int8": np.int8, "UInt16": np.uint16, "Int16": np.int16,
                "UInt32": np.uint32, "Int32": np.int32, "Float32": np.float32,
                "Float64": np.float64}


def _tile_shape(block_rows, block_cols):
    if block_rows > LARGEST_TILE or block_cols > LARGEST_TILE:
        return min(block_rows, PROVIDER_TILE), min(block_cols, PROVIDER_TILE)
    return block_rows, block_cols


class GdalGrid:
    """A band of a GDAL dataset, read through tile-aligned windows."""

    def __init__(self, dataset, band_number, z_factor):
        self.dataset = dataset
        self.band = dataset.GetRasterBand(band_number)
        self.shape = (dataset.RasterYSize, dataset.RasterXSize)
        self.geotransform = dataset.GetGeoTransform()
        block_cols, block_rows = self.band.GetBlockSize()
        self.tile_shape = _tile_shape(block_rows, block_cols)
        self.nodata = self.band.GetNoDataValue()
        self.scale = (self.band.GetScale() or 1.0) * z_factor
        self.offset = (self.band.GetOffset() or 0.0) * z_factor

    def read_window(self, row0, col0, nrows, ncols):
        raw = self.band.ReadAsArray(col0, row0, ncols, nrows)
        # Our tile cache holds the decoded tile: GDAL's copy is not needed.
        self.band.FlushCache()
        values = raw.astype(float)
        if self.nodata is not None:
            values[raw == self.nodata] = np.nan
        return values * self.scale + self.offset


class ProviderGrid:
    """A band read through a QGIS raster data provider (web coverages and
    other non-GDAL sources); north-up grids only."""

    def __init__(self, layer, band_number, z_factor):
        self.provider = layer.dataProvider()
        self.band_number = band_number
        self.z_factor = z_factor
        extent = self.provider.extent()
        rows, cols = self.provider.ySize(), self.provider.xSize()
        self.shape = (rows, cols)
        self.geotransform = (extent.xMinimum(), extent.width() / cols, 0.0,
                             extent.yMaximum(), 0.0, -extent.height() / rows)
        self.tile_shape = (PROVIDER_TILE, PROVIDER_TILE)

    def read_window(self, row0, col0, nrows, ncols):
        x0, dx, _, y0, _, dy = self.geotransform
        rect = QgsRectangle(x0 + col0 * dx, y0 + (row0 + nrows) * dy,
                            x0 + (col0 + ncols) * dx, y0 + row0 * dy)
        block = self.provider.block(self.band_number, rect, ncols, nrows)
        type_name = _data_type_name(block.dataType())
        raw = np.frombuffer(bytes(block.data()), dtype=_NUMPY_TYPES[type_name])
        raw = raw.reshape(nrows, ncols)
        values = raw.astype(float)
        if block.hasNoDataValue():
            values[raw == block.noDataValue()] = np.nan
        return values * self.z_factor


def _data_type_name(data_type):
    name = getattr(data_type, "name", None) or str(data_type).rsplit(".", 1)[-1]
    if name not in _NUMPY_TYPES:
        raise QgsProcessingException(
            f"DEM: cells of type {name} cannot be read as elevations.")
    return name


def open_grid(layer, band_number, z_factor):
    """The DEM band as a grid reader; clear errors for a missing band."""
    if layer is None or not layer.isValid():
        raise QgsProcessingException("DEM: the layer given is not a raster that can be read.")
    if not 1 <= band_number <= layer.bandCount():
        raise QgsProcessingException(
            f"DEM_BAND: the DEM has {layer.bandCount()} band(s); band {band_number} "
            f"does not exist.")
    if layer.providerType() == "gdal":
        dataset = gdal.OpenEx(layer.source(), gdal.OF_RASTER | gdal.OF_READONLY)
        if dataset is not None:
            return GdalGrid(dataset, band_number, z_factor)
    return ProviderGrid(layer, band_number, z_factor)


@contextmanager
def bounded_gdal_cache():
    """Caps GDAL's global block cache for the run (its default is 5 % of RAM)
    so that sources read inside a VRT mosaic cannot fill memory."""
    previous = gdal.GetCacheMax()
    gdal.SetCacheMax(min(previous, GDAL_CACHE_CAP))
    try:
        yield
    finally:
        gdal.SetCacheMax(previous)


class DemSampler:
    """Bilinear DEM elevations at working-CRS positions."""

    def __init__(self, layer, band_number, z_factor, work_crs):
        self.grid = open_grid(layer, band_number, z_factor)
        dem_wkt = crs_wkt(layer.crs())
        work_wkt = crs_wkt(work_crs)
        self.to_dem = transformer(work_wkt, dem_wkt)
        self.to_working = transformer(dem_wkt, work_wkt)
        self.inverse_geotransform = gdal.InvGeoTransform(self.grid.geotransform)
        self.tiles = TileCache(self.grid.read_window, self.grid.shape, self.grid.tile_shape)

    def elevations(self, xy):
        x, y = self.to_dem(xy[:, 0], xy[:, 1])
        u, v = centre_index(self.inverse_geotransform, x, y)
        return bilinear(u, v, self.tiles)

    def cell_size(self, centre_working):
        """The DEM's cell size measured in the working CRS at a position."""
        x, y = self.to_dem(np.array([centre_working[0]]), np.array([centre_working[1]]))
        gt = self.grid.geotransform
        return cell_size_on_ground(self.to_working, (x[0], y[0]), gt[1], gt[5])
