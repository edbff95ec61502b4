"""Reading a DEM layer window by window: through GDAL where the layer is a
GDAL source, through the layer's data provider otherwise."""

from concurrent.futures import ThreadPoolExecutor
from contextlib import contextmanager

import numpy as np
from osgeo import gdal
from qgis.core import QgsRectangle

from ..core.crs import cell_size_on_ground, transformer
from ..core.raster_sampling import TiledRaster, bilinear, centre_index
from ..framework.parameter_names import DEM, DEM_BAND
from ..framework.run_guard import ParameterProblem
from .section_lines import crs_wkt

READERS = 2  # GDAL handles decoding tiles concurrently
READER_THREAD = "sectionwright-dem"  # the thread that reads ahead
BATCH_SAMPLES = 250_000  # positions sampled together (~40 MB of working arrays)
PROVIDER_TILE = 256  # window side for sources without a useful block size
LARGEST_TILE = 1024  # blocks larger than this (strips, whole images) are windowed
GDAL_CACHE_CAP = 64 * 2**20
# Bands that hold colours or class indices, not heights.
NOT_HEIGHTS = {
    gdal.GCI_RedBand: "red",
    gdal.GCI_GreenBand: "green",
    gdal.GCI_BlueBand: "blue",
    gdal.GCI_AlphaBand: "transparency (alpha)",
    gdal.GCI_PaletteIndex: "palette colour indices",
}

_NUMPY_TYPES = {
    "Byte": np.uint8,
    "Int8": np.int8,
    "UInt16": np.uint16,
    "Int16": np.int16,
    "UInt32": np.uint32,
    "Int32": np.int32,
    "Float32": np.float32,
    "Float64": np.float64,
}


def cell_values(raw, nodata):
    """Cell values with NaN where nodata. Kept in single precision unless the
    source has double precision: half the memory per tile, and exact for
    every integer (to 2**24) or float32 DEM. A float tile that is the
    reader's own array is marked in place (no copy of the tile)."""
    if raw.dtype.kind == "f" and raw.flags.writeable:
        values = raw
    else:
        values = raw.astype(np.float64 if raw.dtype == np.float64 else np.float32)
    if nodata is not None:
        values[raw == nodata] = np.nan
    return values


def _tile_shape(block_rows, block_cols):
    if block_rows > LARGEST_TILE or block_cols > LARGEST_TILE:
        return min(block_rows, PROVIDER_TILE), min(block_cols, PROVIDER_TILE)
    return block_rows, block_cols


class GdalGrid:
    """A band of a GDAL dataset, read through tile-aligned windows."""

    def __init__(self, dataset, band_number, z_factor):
        self.dataset = dataset
        self.band = dataset.GetRasterBand(band_number)
        colour = NOT_HEIGHTS.get(self.band.GetColorInterpretation())
        if colour is not None:
            raise ParameterProblem(
                DEM,
                f"band {band_number} of this raster holds {colour} values of an image, not "
                f"elevations: choose a DEM (one band of heights).",
            )
        self.shape = (dataset.RasterYSize, dataset.RasterXSize)
        self.geotransform = dataset.GetGeoTransform()
        block_cols, block_rows = self.band.GetBlockSize()
        self.tile_shape = _tile_shape(block_rows, block_cols)
        self.nodata = self.band.GetNoDataValue()
        self.scale = (self.band.GetScale() or 1.0) * z_factor
        self.offset = (self.band.GetOffset() or 0.0) * z_factor

    def read_window(self, row0, col0, nrows, ncols):
        raw = self.band.ReadAsArray(col0, row0, ncols, nrows)
        # Each tile is decoded once per batch: GDAL's copy is not needed.
        self.band.FlushCache()
        return cell_values(raw, self.nodata)


class ProviderGrid:
    """A band read through a QGIS raster data provider (web coverages and
    other non-GDAL sources); north-up grids only."""

    def __init__(self, layer, band_number, z_factor):
        self.provider = layer.dataProvider()
        self.band_number = band_number
        self.scale = self.provider.bandScale(band_number) * z_factor
        self.offset = self.provider.bandOffset(band_number) * z_factor
        extent = self.provider.extent()
        rows, cols = self.provider.ySize(), self.provider.xSize()
        self.shape = (rows, cols)
        self.geotransform = (
            extent.xMinimum(),
            extent.width() / cols,
            0.0,
            extent.yMaximum(),
            0.0,
            -extent.height() / rows,
        )
        self.tile_shape = (PROVIDER_TILE, PROVIDER_TILE)

    def read_window(self, row0, col0, nrows, ncols):
        x0, dx, _, y0, _, dy = self.geotransform
        rect = QgsRectangle(
            x0 + col0 * dx, y0 + (row0 + nrows) * dy, x0 + (col0 + ncols) * dx, y0 + row0 * dy
        )
        block = self.provider.block(self.band_number, rect, ncols, nrows)
        type_name = _data_type_name(block.dataType())
        raw = np.frombuffer(bytes(block.data()), dtype=_NUMPY_TYPES[type_name])
        nodata = block.noDataValue() if block.hasNoDataValue() else None
        return cell_values(raw.reshape(nrows, ncols), nodata)


def _data_type_name(data_type):
    name = getattr(data_type, "name", None) or str(data_type).rsplit(".", 1)[-1]
    if name not in _NUMPY_TYPES:
        raise ParameterProblem(DEM, f"cells of type {name} cannot be read as elevations.")
    return name


def open_grids(layer, band_number, z_factor):
    """Readers of the DEM band (one per thread for GDAL sources); clear
    errors for a missing band or a layer that is not a raster."""
    if layer is None or not layer.isValid():
        raise ParameterProblem(DEM, "the layer given is not a raster that can be read.")
    if not 1 <= band_number <= layer.bandCount():
        raise ParameterProblem(
            DEM_BAND, f"the DEM has {layer.bandCount()} band(s); band {band_number} does not exist."
        )
    if not layer.crs().isValid():
        raise ParameterProblem(
            DEM,
            "the raster has no coordinate reference system. Set one in the layer's "
            "properties (Source) and run again.",
        )
    if layer.providerType() == "gdal":
        datasets = [
            gdal.OpenEx(layer.source(), gdal.OF_RASTER | gdal.OF_READONLY) for _ in range(READERS)
        ]
        if all(d is not None for d in datasets):
            return [GdalGrid(d, band_number, z_factor) for d in datasets]
    return [ProviderGrid(layer, band_number, z_factor)]


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
        grids = open_grids(layer, band_number, z_factor)
        self.grid = grids[0]
        dem_wkt = crs_wkt(layer.crs())
        work_wkt = crs_wkt(work_crs)
        self.to_dem = transformer(work_wkt, dem_wkt)
        self.to_working = transformer(dem_wkt, work_wkt)
        self.inverse_geotransform = gdal.InvGeoTransform(self.grid.geotransform)
        self.raster = TiledRaster(
            [g.read_window for g in grids], self.grid.shape, self.grid.tile_shape
        )

    def elevations(self, xy):
        x, y = self.to_dem(xy[:, 0], xy[:, 1])
        u, v = centre_index(self.inverse_geotransform, x, y)
        return bilinear(u, v, self.raster) * self.grid.scale + self.grid.offset

    def stop_reading(self):
        """Makes reads under way on other threads stop after their current
        tile (they raise ReadingStopped)."""
        self.raster.stopping.set()

    def resume_reading(self):
        self.raster.stopping.clear()

    def cell_size(self, centre_working):
        """The DEM's cell size measured in the working CRS at a position."""
        x, y = self.to_dem(np.array([centre_working[0]]), np.array([centre_working[1]]))
        gt = self.grid.geotransform
        return cell_size_on_ground(self.to_working, (x[0], y[0]), gt[1], gt[5])


def _batched(jobs):
    batch, size = [], 0
    for key, xy in jobs:
        batch.append((key, xy))
        size += 0 if xy is None else len(xy)
        if size >= BATCH_SAMPLES:
            yield batch
            batch, size = [], 0
    if batch:
        yield batch


def _sample_batch(sampler, batch):
    arrays = [xy for _, xy in batch if xy is not None]
    if not arrays:
        return [(key, None) for key, _ in batch]
    z = sampler.elevations(np.concatenate(arrays))
    results, start = [], 0
    for key, xy in batch:
        if xy is None:
            results.append((key, None))
        else:
            results.append((key, z[start : start + len(xy)]))
            start += len(xy)
    return results


class ElevationsAhead:
    """Elevations for ``(key, xy)`` jobs: iterating yields ``(key,
    elevations)`` in order (``None`` for a job whose xy is None).

    Jobs are sampled in batches of about ``BATCH_SAMPLES`` positions, so a
    tile that several lines cross is decoded once per batch, and the next
    batch is made and read while the caller writes the current one's
    features. The first batch starts at once, so that the caller can open
    its outputs meanwhile. As a context manager, when the caller leaves
    early (an error, Cancel), it stops the batch in hand after its current
    tile and waits for that.

    ``jobs`` is consumed on the reading thread: it must not touch QGIS
    objects (the sampler's reads run there too, as they always have:
    through GDAL handles of their own, or a non-GDAL raster's data
    provider).
    """

    def __init__(self, jobs, sampler):
        self._sampler = sampler
        self._batches = _batched(jobs)
        self._worker = ThreadPoolExecutor(max_workers=1, thread_name_prefix=READER_THREAD)
        self._pending = self._worker.submit(self._sample_next)

    def _sample_next(self):
        batch = next(self._batches, None)
        return None if batch is None else _sample_batch(self._sampler, batch)

    def __iter__(self):
        try:
            while self._pending is not None:
                results = self._pending.result()
                if results is None:
                    return
                self._pending = self._worker.submit(self._sample_next)
                yield from results
        finally:
            self.close()

    def close(self):
        """Ends the reading: a batch in hand stops after its current tile,
        those queued behind it are dropped."""
        unfinished = self._pending is not None and not self._pending.done()
        if unfinished:
            self._sampler.stop_reading()
        self._worker.shutdown(wait=True, cancel_futures=True)
        if unfinished:
            self._sampler.resume_reading()
        # A failed batch's future holds its traceback, which holds the
        # caller's frame and so this object: break the cycle, or the DEM's
        # handles and the run's sinks wait for the cycle collector, which
        # frees them in any order (GDAL crashes on that).
        self._pending = None

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()
