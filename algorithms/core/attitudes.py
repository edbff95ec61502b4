"""Attitudes read under one of the five conventions (DESIGN.md, CONVENTION).

0 dip direction / dip; 1 right-hand-rule strike / dip; 2 strike (either
way) / dip + dip quadrant; 3 text, bare pairs as dip direction; 4 text, bare
pairs as right-hand-rule strike. Raw values may be None, numbers or text
(as they come out of a notebook's table); every row gets a dip direction
and dip, or NaN and the reason it could not be read.
"""

import numpy as np

from .notation import parse_attitudes
from .orientation import (
    compass_azimuth,
    dip_direction_from_quadrant,
    dip_direction_from_strike,
    range_reasons,
)

DIP_DIRECTION, STRIKE_RHR, STRIKE_QUADRANT, TEXT_AS_DIP_DIRECTION, TEXT_AS_STRIKE = range(5)


def as_numbers(values, name):
    """Floats and reasons for raw values: None is missing, text that is not a
    number is reported with the text.

    >>> numbers, why = as_numbers([12, "40.5", None, "steep"], "dip")
    >>> numbers.tolist(), why.tolist()
    ([12.0, 40.5, nan, nan], ['', '', 'missing dip', "non-numeric dip: 'steep'"])
    """
    try:
        # Fast path: numbers, numeric text and None (which becomes NaN).
        numbers = np.array(values, dtype=float)
        reasons = np.where(np.isnan(numbers), f"missing {name}", "").astype(object)
        return numbers, reasons
    except (TypeError, ValueError):
        pass
    numbers = np.full(len(values), np.nan)
    reasons = np.full(len(values), "", dtype=object)
    for i, value in enumerate(values):
        if value is None or (isinstance(value, str) and not value.strip()):
            reasons[i] = f"missing {name}"
            continue
        try:
            numbers[i] = float(value)
        except (TypeError, ValueError):
            reasons[i] = f"non-numeric {name}: '{value}'"
            continue
        if np.isnan(numbers[i]):
            reasons[i] = f"missing {name}"
    return numbers, reasons


def _first_reason(*reason_arrays):
    reasons = np.full(len(reason_arrays[0]), "", dtype=object)
    for more in reason_arrays:
        reasons = np.where(reasons == "", more, reasons)
    return reasons


def read_attitudes(convention, azimuth=None, dip=None, quadrant=None, text=None):
    """(dip direction, dip, reasons) for raw field values.

    >>> dd, dip, why = read_attitudes(STRIKE_QUADRANT, [30, 45, 30], [40, 30, 40],
    ...                               ["SE", "NE", None])
    >>> dd.tolist(), why.tolist()
    ([120.0, nan, nan], ['', 'quadrant contradicts strike', 'missing quadrant'])
    """
    if convention in (TEXT_AS_DIP_DIRECTION, TEXT_AS_STRIKE):
        return parse_attitudes(text, bare_pair_is_strike=convention == TEXT_AS_STRIKE)
    azimuth, azimuth_reasons = as_numbers(azimuth, "azimuth")
    dip, dip_reasons = as_numbers(dip, "dip")
    reasons = _first_reason(dip_reasons, azimuth_reasons, range_reasons(azimuth, dip))
    if convention == DIP_DIRECTION:
        dip_direction = azimuth % 360.0
    elif convention == STRIKE_RHR:
        dip_direction = dip_direction_from_strike(azimuth)
    else:
        quadrant_azimuth = compass_azimuth(quadrant)
        missing = np.array([q is None or not str(q).strip() for q in quadrant], dtype=bool)
        unknown = np.array([f"unknown dip quadrant: '{q}'" for q in quadrant], dtype=object)
        quadrant_reasons = np.where(
            missing, "missing quadrant", np.where(np.isnan(quadrant_azimuth), unknown, "")
        )
        dip_direction = dip_direction_from_quadrant(azimuth, quadrant_azimuth)
        contradiction = np.where(
            np.isnan(dip_direction) & ~np.isnan(quadrant_azimuth), "quadrant contradicts strike", ""
        )
        reasons = _first_reason(reasons, quadrant_reasons, contradiction)
    bad = reasons != ""
    return (
        np.where(bad, np.nan, dip_direction),
        np.where(bad, np.nan, dip),
        reasons.astype(object),
    )
