"""Numbers for drawing a section sheet: round grid steps, padded extents and
the compass names of a line's ends."""

import numpy as np

POINTS = (
    "N",
    "NNE",
    "NE",
    "ENE",
    "E",
    "ESE",
    "SE",
    "SSE",
    "S",
    "SSW",
    "SW",
    "WSW",
    "W",
    "WNW",
    "NW",
    "NNW",
)


def nice_step(span, target_count=8):
    """A round step (1, 2 or 5 × 10ⁿ) giving about ``target_count`` steps.

    >>> nice_step(9265.0), nice_step(370.0), nice_step(0.0)
    (2000.0, 50.0, 1.0)
    """
    if not span > 0:
        return 1.0
    raw = span / target_count
    power = 10.0 ** np.floor(np.log10(raw))
    for factor in (1.0, 2.0, 5.0, 10.0):
        if raw <= factor * power * 1.0001:
            return float(factor * power)
    return float(10.0 * power)


def padded(low, high, fraction=0.08, minimum=1.0):
    """(low, high) widened by ``fraction`` of the span on each side.

    >>> padded(400.0, 600.0)
    (384.0, 616.0)
    """
    span = max(high - low, minimum)
    return low - fraction * span, high + fraction * span


def compass_name(azimuth):
    """Nearest of the 16 compass points.

    >>> compass_name(134.0), compass_name(350.0), compass_name(-45.0)
    ('SE', 'N', 'NW')
    """
    return POINTS[int(np.round((azimuth % 360.0) / 22.5)) % 16]


def end_names(coords):
    """Compass names of the start and end of a line, from the direction
    joining them: the start looks back, the end looks ahead.

    >>> end_names(np.array([[0.0, 0.0], [100.0, -100.0]]))
    ('NW', 'SE')
    """
    dx, dy = np.asarray(coords[-1], float)[:2] - np.asarray(coords[0], float)[:2]
    ahead = np.degrees(np.arctan2(dx, dy)) % 360.0
    return compass_name(ahead + 180.0), compass_name(ahead)
