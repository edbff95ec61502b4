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
    return tuple(compass_name(azimuth) for azimuth in end_azimuths(coords))


def standard_scales(largest=10_000_000):
    """The 1–2–2.5–5 series of map scales (the N of 1:N), from 1:100 up.

    >>> standard_scales(10_000).tolist()
    [100.0, 200.0, 250.0, 500.0, 1000.0, 2000.0, 2500.0, 5000.0, 10000.0]
    """
    powers = 10.0 ** np.arange(2, int(np.log10(largest)) + 1)
    series = (powers[:, None] * np.array([1.0, 2.0, 2.5, 5.0])).ravel()
    return series[series <= largest]


def standard_scale(width_m, height_m, box_width_mm, box_height_mm):
    """The largest standard scale (smallest N of 1:N in the 1–2–2.5–5
    series) at which a drawing of ``width_m`` × ``height_m`` fits a box of
    ``box_width_mm`` × ``box_height_mm``; NaN when none does.

    >>> standard_scale(9365.0, 1900.0, 378.0, 167.0), standard_scale(10200.0, 1900.0, 378.0, 167.0)
    (25000.0, 50000.0)
    """
    needed = max(width_m / box_width_mm, height_m / box_height_mm) * 1000.0
    scales = standard_scales()
    fitting = scales[scales >= needed * (1 - 1e-9)]
    return float(fitting[0]) if len(fitting) else float("nan")


def format_scale(denominator):
    """1:N written with thin-space thousands, as printed on a sheet.

    >>> format_scale(25000.0), format_scale(2500.0)
    ('1:25\\u202f000', '1:2500')
    """
    number = f"{denominator:,.0f}" if denominator >= 10000 else f"{denominator:.0f}"
    return "1:" + number.replace(",", "\u202f")


def end_azimuths(coords):
    """Azimuths (degrees from north, clockwise) the two ends of a line look
    toward: the start looks back along the line, the end ahead, from the
    direction joining them.

    >>> end_azimuths(np.array([[0.0, 0.0], [100.0, -100.0]]))
    (315.0, 135.0)
    """
    dx, dy = np.asarray(coords[-1], float)[:2] - np.asarray(coords[0], float)[:2]
    ahead = float(np.degrees(np.arctan2(dx, dy)) % 360.0)
    return (ahead + 180.0) % 360.0, ahead


def domain_panels(from_ch, to_ch, min_width):
    """(left, right) chainages of the dip-domain panels along the top of a
    section: neighbouring domains meet half-way between the last attitude
    of one and the first of the next, so the bar runs without gaps; the
    outer ends stay at the first and last attitudes but are widened
    outward to ``min_width`` so a caption fits. Domains in chainage order.

    >>> panels = domain_panels(np.array([100.0, 700.0, 900.0]),
    ...                        np.array([500.0, 700.0, 1500.0]), 200.0)
    >>> [p.tolist() for p in panels]
    [[100.0, 600.0, 800.0], [600.0, 800.0, 1500.0]]
    >>> [p.tolist() for p in domain_panels(np.array([50.0]), np.array([50.0]), 200.0)]
    [[-50.0], [150.0]]
    """
    start = np.minimum(from_ch, to_ch).astype(float)
    end = np.maximum(from_ch, to_ch).astype(float)
    meet = (end[:-1] + start[1:]) / 2.0
    left = np.concatenate((start[:1], meet))
    right = np.concatenate((meet, end[-1:]))
    left[0] = min(left[0], right[0] - min_width)
    right[-1] = max(right[-1], left[-1] + min_width)
    if len(left) == 1:
        centre = (start[0] + end[0]) / 2.0
        half = max(end[0] - start[0], min_width) / 2.0
        left[0], right[0] = centre - half, centre + half
    return left, right
