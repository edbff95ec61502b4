"""Bilinear interpolation between cell centres of a raster read tile by tile.

A raster is seen through *window readers*: callables
``read(row0, col0, nrows, ncols)`` returning a float array with NaN where
the raster has no data. Only the tiles that the sample positions need are
read, each once per call, one tile-aligned window at a time, and no tile is
kept afterwards: memory follows the number of samples, never the raster's
size. With several readers (independent handles on the same raster) the
tiles are read concurrently.

Index space: ``u`` (columns) and ``v`` (rows) are fractional cell indices
with cell *centres* at whole numbers; the raster's outer edge is at -0.5 and
``n - 0.5``.
"""

from concurrent.futures import ThreadPoolExecutor

import numpy as np


def centre_index(inverse_geotransform, x, y):
    """Fractional (u, v) cell indices, centres at whole numbers.

    ``inverse_geotransform`` is GDAL's inverse geotransform (pixel-corner
    based: GDAL's geotransform gives the top-left corner of the top-left
    cell), hence the half-cell shift.

    >>> gt_inv = (0.0, 0.1, 0.0, 100.0, 0.0, -0.1)   # 10 m cells, top y=1000
    >>> centre_index(gt_inv, np.array([5.0]), np.array([995.0]))
    (array([0.]), array([0.]))
    """
    g = inverse_geotransform
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    u = g[0] + g[1] * x + g[2] * y - 0.5
    v = g[3] + g[4] * x + g[5] * y - 0.5
    return u, v


class TiledRaster:
    """A raster's cells gathered tile by tile through one or more readers."""

    def __init__(self, readers, raster_shape, tile_shape):
        self.readers = list(readers)
        self.rows, self.cols = (int(n) for n in raster_shape)
        self.tile_rows, self.tile_cols = (max(1, int(n)) for n in tile_shape)
        self.tiles_across = -(-self.cols // self.tile_cols)
        self.tiles_read = 0

    def _read_tile(self, reader, key):
        tile_row, tile_col = divmod(key, self.tiles_across)
        row0 = tile_row * self.tile_rows
        col0 = tile_col * self.tile_cols
        return (
            row0,
            col0,
            reader(
                row0,
                col0,
                min(self.tile_rows, self.rows - row0),
                min(self.tile_cols, self.cols - col0),
            ),
        )

    def _gather(self, reader, groups, rows, cols, out):
        for key, pick in groups:
            row0, col0, tile = self._read_tile(reader, key)
            out[pick] = tile[rows[pick] - row0, cols[pick] - col0]

    def cells(self, rows, cols):
        """Values of the cells at integer (rows, cols), all inside the raster."""
        rows = np.asarray(rows, dtype=np.int64)
        cols = np.asarray(cols, dtype=np.int64)
        keys = (rows // self.tile_rows) * self.tiles_across + cols // self.tile_cols
        order = np.argsort(keys, kind="stable")
        sorted_keys = keys[order]
        starts = np.flatnonzero(np.r_[True, sorted_keys[1:] != sorted_keys[:-1]])
        ends = np.r_[starts[1:], len(order)]
        groups = [(int(sorted_keys[s]), order[s:e]) for s, e in zip(starts, ends)]
        self.tiles_read += len(groups)
        out = np.empty(rows.shape, dtype=float)
        if len(self.readers) == 1 or len(groups) < 2:
            self._gather(self.readers[0], groups, rows, cols, out)
            return out
        # Each reader has its own handle; readers release Python's lock while
        # they decompress, so tiles decode in parallel.
        shares = [groups[i :: len(self.readers)] for i in range(len(self.readers))]
        with ThreadPoolExecutor(max_workers=len(self.readers)) as pool:
            for done in [
                pool.submit(self._gather, reader, share, rows, cols, out)
                for reader, share in zip(self.readers, shares)
            ]:
                done.result()
        return out


def _corner_indices(position, count):
    """Lower cell index and weight of the upper one along one axis, with the
    edge cells extended over the outer half cell."""
    clamped = np.clip(position, 0.0, count - 1.0)
    lower = np.clip(np.floor(clamped), 0, max(count - 2, 0)).astype(np.int64)
    upper = np.minimum(lower + 1, count - 1)
    return lower, upper, clamped - lower


def bilinear(u, v, raster):
    """Bilinear value at fractional centre indices (u, v) of a TiledRaster.

    NaN outside the raster (beyond its outer edge) and wherever a cell that
    carries weight in the interpolation has no data. A cell with zero
    weight (the point lies on the line through the other cells' centres)
    does not matter.

    >>> grid = np.array([[0.0, 10.0], [20.0, 30.0]])
    >>> raster = TiledRaster([lambda r, c, nr, nc: grid[r:r + nr, c:c + nc]],
    ...                      grid.shape, (256, 256))
    >>> bilinear(np.array([0.5, 1.4, 2.0]), np.array([0.5, 0.0, 0.0]), raster)
    array([15., 10., nan])
    """
    u = np.asarray(u, dtype=float)
    v = np.asarray(v, dtype=float)
    z = np.full(u.shape, np.nan)
    inside = (u >= -0.5) & (u <= raster.cols - 0.5) & (v >= -0.5) & (v <= raster.rows - 0.5)
    if not inside.any():
        return z
    c0, c1, fx = _corner_indices(u[inside], raster.cols)
    r0, r1, fy = _corner_indices(v[inside], raster.rows)
    rows = np.concatenate((r0, r0, r1, r1))
    cols = np.concatenate((c0, c1, c0, c1))
    weights = np.concatenate(((1 - fx) * (1 - fy), fx * (1 - fy), (1 - fx) * fy, fx * fy))
    values = raster.cells(rows, cols)
    carries = weights > 0
    missing = carries & np.isnan(values)
    terms = np.where(carries, values, 0.0) * weights
    n = len(r0)
    total = terms.reshape(4, n).sum(axis=0)
    total[missing.reshape(4, n).any(axis=0)] = np.nan
    z[inside] = total
    return z
