"""Grid, true and magnetic north.

Meridian convergence γ is the bearing of grid north clockwise from true
north (PROJ's ``meridian_convergence``), so a grid azimuth is the true
azimuth minus γ; a magnetic azimuth becomes true by adding the declination
(east positive).
"""

import numpy as np
from pyproj import CRS, Proj, Transformer

GRID, TRUE, MAGNETIC = 0, 1, 2


def meridian_convergence(crs_wkt, x, y):
    """Convergence (degrees) at projected positions (x, y) of a CRS; 0 for a
    geographic CRS, whose grid north is true north.

    >>> wkt = CRS.from_epsg(32633).to_wkt()
    >>> gamma = meridian_convergence(wkt, np.array([500000.0]), np.array([5e6]))
    >>> abs(float(gamma[0])) < 1e-9       # on the central meridian
    True
    >>> meridian_convergence(wkt, np.array([]), np.array([])).shape  # no positions
    (0,)
    """
    crs = CRS.from_wkt(crs_wkt)
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    if crs.is_geographic or x.size == 0:
        return np.zeros(x.shape)
    to_lonlat = Transformer.from_crs(crs, crs.geodetic_crs, always_xy=True)
    lon, lat = to_lonlat.transform(x, y)
    factors = Proj(crs).get_factors(lon, lat, errcheck=False)
    return np.asarray(factors.meridian_convergence, dtype=float)


def to_grid(azimuth, reference, convergence, declination=0.0):
    """Azimuths read against ``reference`` (GRID, TRUE or MAGNETIC) as grid
    azimuths in [0, 360).

    >>> to_grid(np.array([10.0]), MAGNETIC, np.array([1.5]), 3.0)
    array([11.5])
    """
    azimuth = np.asarray(azimuth, dtype=float)
    true = azimuth + (np.asarray(declination, dtype=float) if reference == MAGNETIC else 0.0)
    grid = true if reference == GRID else true - np.asarray(convergence, dtype=float)
    with np.errstate(invalid="ignore"):  # NaN stays NaN: an unknown azimuth
        return grid % 360.0
