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

import threading
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass

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


class ReadingStopped(Exception):
    """The reads were stopped (TiledRaster.stopping) before they were done."""


class TiledRaster:
    """A raster's cells gathered tile by tile through one or more readers."""

    def __init__(self, readers, raster_shape, tile_shape):
        self.readers = list(readers)
        self.rows, self.cols = (int(n) for n in raster_shape)
        self.tile_rows, self.tile_cols = (max(1, int(n)) for n in tile_shape)
        self.tiles_across = -(-self.cols // self.tile_cols)
        self.tiles_read = 0
        # Set from another thread to stop the reads under way after their
        # current tile (ReadingStopped): a run that ends early does not wait
        # for a whole batch.
        self.stopping = threading.Event()

    def _key(self, rows, cols):
        return (rows // self.tile_rows) * self.tiles_across + cols // self.tile_cols

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

    def corners(self, r0, c0, r1, c1):
        """Values of the four cells (r0, c0), (r0, c1), (r1, c0), (r1, c1) of
        each position (integer arrays inside the raster, r1 >= r0, c1 >= c0),
        as a (4, n) array. Each tile the cells lie in is read once.

        A position whose four cells share a tile (all but those on a tile's
        last row or column) is served whole by that tile in one gather per
        tile; only the few that straddle tiles are looked up cell by cell."""
        n = len(r0)
        out = np.empty((4, n))
        key = self._key(r0, c0)
        straddles = self._key(r1, c1) != key
        whole = _WholeCells.of(self, np.flatnonzero(~straddles), key, (r0, c0, r1, c1))
        split = np.flatnonzero(straddles)
        cells = _Cells(
            np.concatenate((r0[split], r0[split], r1[split], r1[split])),
            np.concatenate((c0[split], c1[split], c0[split], c1[split])),
            np.concatenate([split + k * n for k in range(4)]),
        )
        jobs = _tile_jobs(whole, self._key(cells.rows, cells.cols))
        self.tiles_read += len(jobs)
        if len(self.readers) == 1 or len(jobs) < 2:
            self._fill(self.readers[0], jobs, whole, cells, out)
            return out
        # Each reader has its own handle; readers release Python's lock while
        # they decompress, so tiles decode in parallel.
        shares = [jobs[i :: len(self.readers)] for i in range(len(self.readers))]
        with ThreadPoolExecutor(max_workers=len(self.readers)) as pool:
            futures = [
                pool.submit(self._fill, reader, share, whole, cells, out)
                for reader, share in zip(self.readers, shares)
            ]
            try:
                for done in futures:
                    done.result()
            finally:
                # A failed future holds its traceback, which holds this frame:
                # let go of both, or the readers' GDAL handles wait for the
                # cycle collector (which frees them in any order).
                done = futures = None
        return out

    def _fill(self, reader, jobs, whole, cells, out):
        flat = out.reshape(-1)
        for key, (low, high), single in jobs:
            if self.stopping.is_set():
                raise ReadingStopped()
            row0, col0, tile = self._read_tile(reader, key)
            if high > low:
                out[:, whole.positions[low:high]] = tile.reshape(-1)[whole.offsets[:, low:high]]
            if len(single):
                rows, cols = cells.rows[single] - row0, cells.cols[single] - col0
                flat[cells.slots[single]] = tile[rows, cols]

    def tile_width(self, tile_col):
        """Columns of the tiles in column ``tile_col`` (narrower at the right edge)."""
        return np.minimum(self.tile_cols, self.cols - tile_col * self.tile_cols)


@dataclass
class _WholeCells:
    """The positions served whole by one tile, ordered by tile, with their
    tile keys and the offsets of their four cells in the flattened tile."""

    positions: np.ndarray
    keys: np.ndarray
    offsets: np.ndarray  # (4, m)

    @classmethod
    def of(cls, raster, whole, key, corners):
        positions = whole[np.argsort(key[whole], kind="stable")]
        r0, c0, r1, c1 = (a[positions] for a in corners)
        tile_col, col = np.divmod(c0, raster.tile_cols)
        width = raster.tile_width(tile_col)
        top = (r0 % raster.tile_rows) * width + col
        bottom = top + (r1 - r0) * width
        right = c1 - c0
        offsets = np.stack((top, top + right, bottom, bottom + right))
        return cls(positions, key[positions], offsets)


@dataclass
class _Cells:
    """The cells looked up one by one: their rows, columns and places in
    the flattened (4, n) result."""

    rows: np.ndarray
    cols: np.ndarray
    slots: np.ndarray


def _runs(sorted_keys):
    """{key: (first, end)} of each run of equal keys in a sorted array."""
    if not len(sorted_keys):
        return {}
    starts = np.flatnonzero(np.r_[True, sorted_keys[1:] != sorted_keys[:-1]])
    ends = np.r_[starts[1:], len(sorted_keys)]
    return {int(sorted_keys[s]): (int(s), int(e)) for s, e in zip(starts, ends)}


def _grouped(keys):
    """{key: indices} per distinct key."""
    order = np.argsort(keys, kind="stable")
    return {key: order[s:e] for key, (s, e) in _runs(keys[order]).items()}


def _tile_jobs(whole, single_keys):
    """(tile key, (first, end) of its run in ``whole``, single cells) per
    tile needed."""
    runs = _runs(whole.keys)
    singles = _grouped(single_keys)
    empty = np.empty(0, dtype=np.int64)
    return [
        (key, runs.get(key, (0, 0)), singles.get(key, empty))
        for key in sorted(runs.keys() | singles.keys())
    ]


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
    values = raster.corners(r0, c0, r1, c1)
    weights = np.stack(((1 - fx) * (1 - fy), fx * (1 - fy), (1 - fx) * fy, fx * fy))
    total = (values * weights).sum(axis=0)
    # NaN where a cell has no data; it counts only where it carries weight.
    doubtful = np.flatnonzero(np.isnan(total))
    if len(doubtful):
        kept, carries = values[:, doubtful], weights[:, doubtful] > 0
        redone = (np.where(carries, kept, 0.0) * weights[:, doubtful]).sum(axis=0)
        redone[(carries & np.isnan(kept)).any(axis=0)] = np.nan
        total[doubtful] = redone
    z[inside] = total
    return z
