"""The invented Tarrowgill map area: an analytic world that is ground truth.

Everything is a closed-form function of map position, so tests can compare
what the plugin measures with what the world is:

* the ground surface ``ground(x, y)``;
* a layered sequence folded into an anticline whose axis trends 035° and
  plunges 8° toward 035°, cut by a vertical fault striking 120° with its
  north-east block let down by ``FAULT_THROW``;
* every contact is the fold surface shifted vertically, so bedding has the
  same attitude at a given map position in every unit:
  ``bedding_attitude(x, y)``.

Coordinates are WGS 84 / UTM zone 33N (EPSG:32633) metres; the area is
10 km × 8 km with its south-west corner at ``ORIGIN``. The place, its units
and its data are invented.
"""

import numpy as np

EPSG = 32633
ORIGIN = (431000.0, 5127000.0)
SIZE = (10000.0, 8000.0)
DEM_CELL = 25.0

FOLD_TREND = 35.0  # degrees, azimuth of the fold axis
FOLD_PLUNGE = 8.0  # degrees, toward FOLD_TREND
FOLD_AMPLITUDE = 500.0  # metres
FOLD_WAVELENGTH = 5000.0  # metres, across the axis
FOLD_CENTRE = (5000.0, 4000.0)  # local coordinates of a point on the crest line

FAULT_POINT = (5200.0, 5200.0)  # local coordinates of a point on the fault trace
FAULT_STRIKE = 120.0
FAULT_THROW = 150.0  # metres, north-east block down

# Units from youngest (top) to oldest; CONTACT_LEVELS[k] is the elevation of
# the base of UNITS[k] on the fold's reference surface.
UNITS = ("HWM", "BRS", "COL", "DNG", "ASH")
UNIT_NAMES = {
    "HWM": "Harrow Moss Mudstone",
    "BRS": "Brackenrigg Sandstone",
    "COL": "Colley Limestone",
    "DNG": "Dunnage Grits",
    "ASH": "Ashlow Slates",
}
CONTACT_LEVELS = (820.0, 640.0, 470.0, 260.0)


def local(x, y):
    return np.asarray(x, dtype=float) - ORIGIN[0], np.asarray(y, dtype=float) - ORIGIN[1]


def ground(x, y):
    """Elevation of the ground surface (metres)."""
    u, v = local(x, y)
    return (
        560.0
        + 140.0 * np.sin(2 * np.pi * u / 7000.0) * np.cos(2 * np.pi * v / 5200.0)
        + 70.0 * np.cos(2 * np.pi * (u + 0.6 * v) / 9000.0)
        + 0.012 * u
    )


def _fold_frame(u, v):
    """Along-axis and across-axis coordinates from the fold centre."""
    t = np.radians(FOLD_TREND)
    du, dv = u - FOLD_CENTRE[0], v - FOLD_CENTRE[1]
    return du * np.sin(t) + dv * np.cos(t), du * np.cos(t) - dv * np.sin(t)


def fault_side(x, y):
    """1 on the downthrown (north-east) side of the fault, else 0."""
    u, v = local(x, y)
    s = np.radians(FAULT_STRIKE)
    # Right of the strike direction (looking along 120°) is the south-west.
    cross = (u - FAULT_POINT[0]) * np.cos(s) - (v - FAULT_POINT[1]) * np.sin(s)
    return (cross < 0).astype(float)


def fold_surface(x, y):
    """The reference surface: contacts lie at fold_surface + level."""
    u, v = local(x, y)
    along, across = _fold_frame(u, v)
    return (
        -along * np.tan(np.radians(FOLD_PLUNGE))
        + FOLD_AMPLITUDE * np.cos(2 * np.pi * across / FOLD_WAVELENGTH)
        - FAULT_THROW * fault_side(x, y)
    )


def contact_elevation(k, x, y):
    """Elevation of the base of UNITS[k] below (x, y)."""
    return fold_surface(x, y) + CONTACT_LEVELS[k]


def unit_index(x, y, z):
    """Index into UNITS of the unit at (x, y, z)."""
    surface = fold_surface(x, y)
    z = np.asarray(z, dtype=float)
    return sum((z < surface + level).astype(int) for level in CONTACT_LEVELS)


def bedding_attitude(x, y):
    """Exact (dip direction, dip) of bedding in degrees, from the gradient of
    the fold surface (the fault only shifts it)."""
    u, v = local(x, y)
    along, across = _fold_frame(u, v)
    t = np.radians(FOLD_TREND)
    d_along = -np.tan(np.radians(FOLD_PLUNGE))
    d_across = (
        -FOLD_AMPLITUDE * 2 * np.pi / FOLD_WAVELENGTH * np.sin(2 * np.pi * across / FOLD_WAVELENGTH)
    )
    # d/du and d/dv through the rotation of _fold_frame.
    dz_du = d_along * np.sin(t) + d_across * np.cos(t)
    dz_dv = d_along * np.cos(t) - d_across * np.sin(t)
    dip = np.degrees(np.arctan(np.hypot(dz_du, dz_dv)))
    dip_direction = np.degrees(np.arctan2(-dz_du, -dz_dv)) % 360.0
    return dip_direction, dip


# Section lines in local coordinates: straight across the fold, oblique,
# kinked, and one nearly along the axis.
SECTION_LINES = {
    "A": [(1200.0, 6600.0), (8800.0, 1300.0)],
    "B": [(600.0, 2500.0), (9400.0, 4600.0)],
    "C": [(1500.0, 1000.0), (4200.0, 3900.0), (6500.0, 4300.0), (8900.0, 7200.0)],
    "D": [(3600.0, 900.0), (7400.0, 7100.0)],
}
