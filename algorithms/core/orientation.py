"""Planes given as dip direction / dip, strike / dip and dip quadrants.

Azimuths are degrees clockwise from north in [0, 360); dips degrees in
[0, 90]. Strike follows the right-hand rule: looking along strike, the plane
dips to the right, so dip direction = strike + 90.

Functions take and return numpy arrays; a value that cannot be read comes
back as NaN with a reason (a string, empty when the value is good).
"""

import numpy as np

COMPASS = {
    "N": 0.0,
    "NNE": 22.5,
    "NE": 45.0,
    "ENE": 67.5,
    "E": 90.0,
    "ESE": 112.5,
    "SE": 135.0,
    "SSE": 157.5,
    "S": 180.0,
    "SSW": 202.5,
    "SW": 225.0,
    "WSW": 247.5,
    "W": 270.0,
    "WNW": 292.5,
    "NW": 315.0,
    "NNW": 337.5,
}

# A dip quadrant closer than this to the strike line does not pick a side.
QUADRANT_TOLERANCE = 22.5


def strike_from_dip_direction(dip_direction):
    """Right-hand-rule strike of a plane.

    >>> strike_from_dip_direction(np.array([120.0, 45.0, 90.0]))
    array([ 30., 315.,   0.])
    """
    return (np.asarray(dip_direction, dtype=float) - 90.0) % 360.0


def dip_direction_from_strike(strike):
    """Dip direction of a right-hand-rule strike.

    >>> dip_direction_from_strike(np.array([30.0, 300.0]))
    array([120.,  30.])
    """
    return (np.asarray(strike, dtype=float) + 90.0) % 360.0


def angle_between(a, b):
    """Smallest angle between two azimuths, in [0, 180].

    >>> angle_between(np.array([350.0, 10.0]), np.array([10.0, 200.0]))
    array([ 20., 170.])
    """
    d = (np.asarray(a, dtype=float) - np.asarray(b, dtype=float)) % 360.0
    return np.minimum(d, 360.0 - d)


def compass_azimuth(letters):
    """Azimuth of compass letters (N, NE, ENE …); NaN for anything else.

    >>> compass_azimuth(np.array(["se", " N", "x", None], dtype=object))
    array([135.,   0.,  nan,  nan])
    """
    return np.array(
        [
            COMPASS.get(str(v).strip().upper(), np.nan) if v is not None else np.nan
            for v in np.asarray(letters, dtype=object).ravel()
        ],
        dtype=float,
    )


def dip_direction_from_quadrant(strike, quadrant_azimuth):
    """Dip direction from a strike taken either way and the dip quadrant.

    The side is the one of strike ± 90 nearer to the quadrant. A quadrant
    within QUADRANT_TOLERANCE of the strike line (N45E 30NE) picks no side:
    NaN, never a guess.

    >>> dip_direction_from_quadrant(np.array([30.0, 210.0, 45.0]),
    ...                             np.array([135.0, 135.0, 45.0]))
    array([120., 120.,  nan])
    """
    strike = np.asarray(strike, dtype=float)
    quadrant_azimuth = np.asarray(quadrant_azimuth, dtype=float)
    right = dip_direction_from_strike(strike)
    left = (right + 180.0) % 360.0
    to_right = angle_between(right, quadrant_azimuth)
    chosen = np.where(to_right <= 90.0, right, left)
    along_strike = np.minimum(to_right, 180.0 - to_right) > 90.0 - QUADRANT_TOLERANCE
    return np.where(along_strike | np.isnan(quadrant_azimuth), np.nan, chosen)


def range_reasons(azimuth, dip):
    """Why each (azimuth, dip) pair is unusable ('' when it is fine).

    >>> range_reasons(np.array([10.0, -10.0, 400.0, np.nan, 360.0]),
    ...               np.array([95.0, 20.0, 20.0, 20.0, 90.0])).tolist()
    ['dip out of range', 'azimuth out of range', 'azimuth out of range', 'missing azimuth', '']
    """
    azimuth = np.asarray(azimuth, dtype=float)
    dip = np.asarray(dip, dtype=float)
    reasons = np.full(azimuth.shape, "", dtype=object)
    checks = (
        (np.isnan(dip), "missing dip"),
        ((dip < 0) | (dip > 90), "dip out of range"),
        (np.isnan(azimuth), "missing azimuth"),
        ((azimuth < 0) | (azimuth > 360), "azimuth out of range"),
    )
    for failed, reason in checks:
        reasons[failed & (reasons == "")] = reason
    return reasons
