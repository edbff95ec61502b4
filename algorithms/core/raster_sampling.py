"""Bilinear interpolation between cell centres of a raster read tile by tile.

A raster is seen through a *window reader*: a callable
``read(row0, col0, nrows, ncols)`` returning a float array with NaN where
the raster has no data. Only the tiles that the sample positions need are
read, one tile-aligned window at a time, and a bounded cache keeps the
recently used ones, so memory does not grow with the raster or the line.

Index space: ``u`` (columns) and ``v`` (rows) are fractional cell indices
with cell *centres* at whole numbers; the raster's outer edge is at -0.5 and
``n - 0.5``.
"""
from collections import OrderedDict

import numpy as np

CACHE_BYTES = 32 * 2 ** 20


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


class TileCache:
    """Cells of a raster read through tile-aligned windows, least recently
    used tiles dropped beyond ``CACHE_BYTES``."""

    def __init__(self, read_window, raster_shape, tile_shape):
        self.read_window = read_window
        self.rows, self.cols = (int(n) for n in raster_shape)
        self.tile_rows, self.tile_cols = (max(1, int(n)) for n in tile_shape)
        self.tiles_across = -(-self.cols // self.tile_cols)
        tile_bytes = self.tile_rows * self.tile_cols * 8
        self.capacity = max(4, CACHE_BYTES // tile_bytes)
        self._tiles = OrderedDict()
        self.tiles_read = 0

    def _tile(self, key):
        tile = self._tiles.pop(key, None)
        if tile is None:
            tile_row, tile_col = divmod(key, self.tiles_across)
            row0 = tile_row * self.tile_rows
            col0 = tile_col * self.tile_cols
            tile = self.read_window(row0, col0,
                                    min(self.tile_rows, self.rows - row0),
                                    min(self.tile_cols, self.cols - col0))
            self.tiles_read += 1
            while len(self._tiles) >= self.capacity:
                self._tiles.popitem(last=False)
        self._tiles[key] = tile
        return tile

    def cells(self, rows, cols):
        """Values of the cells at integer (rows, cols), all inside the raster."""
        rows = np.asarray(rows, dtype=np.int64)
        cols = np.asarray(cols, dtype=np.int64)
        keys = (rows // self.tile_rows) * self.tiles_across + cols // self.tile_cols
        out = np.empty(rows.shape, dtype=float)
        order = np.argsort(keys, kind="stable")
        sorted_keys = keys[order]
        starts = np.flatnonzero(np.r_[True, sorted_keys[1:] != sorted_keys[:-1]])
        ends = np.r_[starts[1:], len(order)]
        for start, end in zip(starts, ends):
            key = sorted_keys[start]
            tile = self._tile(int(key))
            pick = order[start:end]
            tile_row, tile_col = divmod(int(key), self.tiles_across)
            out[pick] = tile[rows[pick] - tile_row * self.tile_rows,
                             cols[pick] - tile_col * self.tile_cols]
        return out


def _corner_indices(position, count):
    """Lower cell index and weight of the upper one along one axis, with the
    edge cells extended over the outer half cell."""
    clamped = np.clip(position, 0.0, count - 1.0)
    lower = np.clip(np.floor(clamped), 0, max(count - 2, 0)).astype(np.int64)
    upper = np.minimum(lower + 1, count - 1)
    return lower, upper, clamped - lower


def bilinear(u, v, cache):
    """Bilinear value at fractional centre indices (u, v).

    NaN outside the raster (beyond its outer edge) and wherever a cell that
    carries weight in the interpolation has no data. A cell with zero
    weight (the point lies on the line through the other cells' centres)
    does not matter.

    >>> grid = np.array([[0.0, 10.0], [20.0, 30.0]])
    >>> cache = TileCache(lambda r, c, nr, nc: grid[r:r + nr, c:c + nc],
    ...                   grid.shape, (256, 256))
    >>> bilinear(np.array([0.5, 1.4, 2.0]), np.array([0.5, 0.0, 0.0]), cache)
    array([15., 10., nan])
    """
    u = np.asarray(u, dtype=float)
    v = np.asarray(v, dtype=float)
    z = np.full(u.shape, np.nan)
    inside = ((u >= -0.5) & (u <= cache.cols - 0.5)
              & (v >= -0.5) & (v <= cache.rows - 0.5))
    if not inside.any():
        return z
    c0, c1, fx = _corner_indices(u[inside], cache.cols)
    r0, r1, fy = _corner_indices(v[inside], cache.rows)
    rows = np.concatenate((r0, r0, r1, r1))
    cols = np.concatenate((c0, c1, c0, c1))
    weights = np.concatenate(((1 - fx) * (1 - fy), fx * (1 - fy),
                              (1 - fx) * fy, fx * fy))
    values = cache.cells(rows, cols)
    carries = weights > 0
    missing = carries & np.isnan(values)
    terms = np.where(carries, values, 0.0) * weights
    n = len(r0)
    total = terms.reshape(4, n).sum(axis=0)
    total[missing.reshape(4, n).any(axis=0)] = np.nan
    z[inside] = total
    return z
