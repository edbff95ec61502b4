"""Bilinear interpolation between cell centres, tile by tile."""

import gc
import weakref

import numpy as np
import pytest
from scipy import ndimage

from sectionwright.algorithms.core.raster_sampling import (
    ReadingStopped,
    TiledRaster,
    bilinear,
    centre_index,
)


def cache_for(grid, tile_shape=(7, 5), readers=1):
    reads = []

    def read(row0, col0, nrows, ncols):
        reads.append((row0, col0))
        return grid[row0 : row0 + nrows, col0 : col0 + ncols].astype(float)

    raster = TiledRaster([read] * readers, grid.shape, tile_shape)
    raster.reads = reads
    return raster


@pytest.fixture
def grid():
    return np.random.default_rng(7).normal(500.0, 80.0, (23, 31))


def test_interior_values_match_scipy_map_coordinates(grid):
    # Source: SciPy reference guide, `scipy.ndimage.map_coordinates` with
    # order=1 is linear (bilinear in 2-D) interpolation with coordinates at
    # array indices, i.e. at cell centres: an independent implementation.
    rng = np.random.default_rng(1)
    u = rng.uniform(0, grid.shape[1] - 1, 2000)
    v = rng.uniform(0, grid.shape[0] - 1, 2000)
    expected = ndimage.map_coordinates(grid, [v, u], order=1)
    np.testing.assert_allclose(bilinear(u, v, cache_for(grid)), expected, rtol=0, atol=1e-9)


def test_a_plane_is_reproduced_exactly():
    # Common practice: bilinear interpolation reproduces any plane exactly
    # between cell centres (REFERENCES.md, DEM sampling).
    rows, cols = np.mgrid[0:40, 0:60]
    plane = 312.5 + 0.75 * cols - 1.25 * rows
    u = np.random.default_rng(2).uniform(0, 59, 500)
    v = np.random.default_rng(3).uniform(0, 39, 500)
    np.testing.assert_allclose(
        bilinear(u, v, cache_for(plane)), 312.5 + 0.75 * u - 1.25 * v, atol=1e-9
    )


def test_edge_cells_extend_to_the_raster_edge_and_nothing_beyond(grid):
    cache = cache_for(grid)
    z = bilinear(
        np.array([-0.5, -0.2, 30.5, 10.0, -0.51, 30.51]),
        np.array([3.0, 0.0, 22.5, -0.5, 3.0, 3.0]),
        cache,
    )
    assert z[0] == pytest.approx(grid[3, 0])
    assert z[1] == pytest.approx(grid[0, 0])
    assert z[2] == pytest.approx(grid[22, 30])
    assert z[3] == pytest.approx(grid[0, 10])
    assert np.isnan(z[4]) and np.isnan(z[5])


def test_nodata_in_a_weighted_cell_gives_nan_and_only_then(grid):
    grid = grid.copy()
    grid[5, 5] = np.nan
    z = bilinear(
        np.array([5.5, 4.5, 6.0, 5.0, 7.0]), np.array([5.5, 4.5, 4.0, 4.0, 5.0]), cache_for(grid)
    )
    assert np.isnan(z[0]) and np.isnan(z[1])
    # (6, 4) and (5, 4) are cell centres off the nodata cell: it carries no weight.
    assert not np.isnan(z[2]) and not np.isnan(z[3])
    assert z[4] == pytest.approx(grid[5, 7])


def test_tile_layout_does_not_change_values(grid):
    rng = np.random.default_rng(4)
    u = rng.uniform(-0.5, 30.5, 3000)
    v = rng.uniform(-0.5, 22.5, 3000)
    reference = bilinear(u, v, cache_for(grid, (1000, 1000)))
    for shape in ((1, 1), (3, 31), (23, 1), (4, 6)):
        np.testing.assert_allclose(bilinear(u, v, cache_for(grid, shape)), reference)


def test_a_raster_one_cell_wide_or_high_is_read_along_its_length():
    column = np.arange(12.0)[:, None] * 10.0
    v = np.array([0.0, 2.5, 10.75])
    z = bilinear(np.zeros(3), v, cache_for(column, (5, 5)))
    np.testing.assert_allclose(z, v * 10.0)
    np.testing.assert_allclose(bilinear(v, np.zeros(3), cache_for(column.T, (5, 5))), v * 10.0)


def test_each_tile_is_read_once_per_call_whatever_the_order(grid):
    raster = cache_for(grid, (4, 4))
    rng = np.random.default_rng(5)
    bilinear(rng.uniform(0, 30, 5000), rng.uniform(0, 22, 5000), raster)
    assert len(raster.reads) == len(set(raster.reads)) == raster.tiles_read


def test_several_readers_give_the_same_values(grid):
    rng = np.random.default_rng(6)
    u, v = rng.uniform(-0.5, 30.5, 4000), rng.uniform(-0.5, 22.5, 4000)
    one = bilinear(u, v, cache_for(grid, (3, 3)))
    np.testing.assert_array_equal(bilinear(u, v, cache_for(grid, (3, 3), readers=3)), one)


def test_a_reader_that_fails_leaves_nothing_for_the_cycle_collector(grid):
    # A failed reader's traceback holds the frame that waited for it: unless
    # that is let go, the raster and its readers' GDAL handles wait for the
    # cycle collector, which frees them in any order.
    def failing(row0, col0, nrows, ncols):
        raise OSError("tile cannot be decoded")

    raster = TiledRaster([failing, failing], grid.shape, (4, 4))
    left = weakref.ref(raster)
    collecting = gc.isenabled()
    gc.disable()
    try:
        with pytest.raises(OSError):
            bilinear(np.arange(20.0), np.arange(20.0), raster)
        del raster
        assert left() is None
    finally:
        if collecting:
            gc.enable()


@pytest.mark.parametrize("readers", [1, 2])
def test_reads_stopped_from_another_thread_end_after_their_current_tile(grid, readers):
    raster = cache_for(grid, (4, 4), readers=readers)
    read = raster.readers[0]

    def read_then_stop(*window):
        if len(raster.reads) == 2:
            raster.stopping.set()  # as ElevationsAhead.close does from its thread
        return read(*window)

    raster.readers = [read_then_stop] * readers
    with pytest.raises(ReadingStopped):
        bilinear(np.arange(20.0), np.arange(20.0), raster)
    assert len(raster.reads) <= 2 + readers  # each reader finishes the tile in hand


def test_only_tiles_near_the_positions_are_read():
    # A diagonal line across 64 x 64 tiles touches ~2 per tile row, not the
    # 4096 of its bounding box.
    grid = np.zeros((64 * 16, 64 * 16))
    cache = cache_for(grid, (16, 16))
    t = np.linspace(0, 64 * 16 - 1, 20000)
    bilinear(t, t, cache)
    assert len(cache.reads) <= 3 * 64


def test_centre_index_uses_cell_centres():
    # Source: GDAL data model documentation (geotransform: the top-left
    # *corner* of the top-left pixel); the centre of cell (0, 0) is half a
    # cell in from it.
    gt = (1000.0, 10.0, 0.0, 5000.0, 0.0, -10.0)
    inverse = (-100.0, 0.1, 0.0, 500.0, 0.0, -0.1)
    u, v = centre_index(inverse, np.array([1005.0, 1010.0]), np.array([4995.0, 4990.0]))
    np.testing.assert_allclose(u, [0.0, 0.5])
    np.testing.assert_allclose(v, [0.0, 0.5])
    assert gt[0] + (u[0] + 0.5) * gt[1] == 1005.0
