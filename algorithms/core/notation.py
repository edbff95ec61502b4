"""Reading attitudes written the way geologists write them.

Forms understood (case, spaces and degree signs do not matter; azimuths
with or without leading zeros, 0–360; decimals allowed):

====================  ==============================================
``120/40``            a bare pair: dip direction / dip, or right-hand
                      strike / dip when bare pairs are read as strike
``030/40SE``          strike (either way) / dip + dip quadrant
``N30E 40SE``         quadrant-bearing strike, dip, dip quadrant
``N30E/40SE``         the same with a slash
``S60W 40N``          ditto
``N30E 40``           quadrant-bearing strike, right-hand rule (only
                      when bare pairs are read as strike)
====================  ==============================================

Quadrant bearings: NxE = x, NxW = 360 − x, SxE = 180 − x, SxW = 180 + x.
"""

import re
from functools import lru_cache

import numpy as np

from .orientation import COMPASS, dip_direction_from_quadrant, dip_direction_from_strike

_NUMBER = r"(\d+(?:\.\d*)?|\.\d+)"
_SIDE = r"(?P<side>[NSEW]{1,3})?"
_SEPARATOR = r"\s*[/,;\s]\s*"
_AZIMUTH_PAIR = re.compile(rf"^(?P<az>{_NUMBER}){_SEPARATOR}(?P<dip>{_NUMBER})\s*{_SIDE}$")
_BEARING_PAIR = re.compile(
    rf"^(?P<from>[NS])\s*(?P<angle>{_NUMBER})\s*(?P<to>[EW]){_SEPARATOR}?"
    rf"(?P<dip>{_NUMBER})\s*{_SIDE}$"
)


def quadrant_bearing(start, angle, end):
    """Azimuth of a quadrant bearing such as S60W.

    >>> quadrant_bearing("N", 30, "E"), quadrant_bearing("N", 30, "W")
    (30.0, 330.0)
    >>> quadrant_bearing("S", 60, "E"), quadrant_bearing("S", 60, "W")
    (120.0, 240.0)
    """
    angle = float(angle)
    if start == "N":
        return angle % 360.0 if end == "E" else (360.0 - angle) % 360.0
    return 180.0 - angle if end == "E" else 180.0 + angle


def _clean(text):
    text = str(text).upper()
    for mark in ("°", "º", "˚", "DEG"):
        text = text.replace(mark, " ")
    return " ".join(text.split()).replace(" /", "/").replace("/ ", "/")


@lru_cache(maxsize=4096)
def parse_attitude(text, bare_pair_is_strike=False):
    """(dip direction, dip, reason) of one written attitude.

    >>> parse_attitude("N30E 40SE")
    (120.0, 40.0, '')
    >>> parse_attitude("120/40"), parse_attitude("120/40", True)
    ((120.0, 40.0, ''), (210.0, 40.0, ''))
    >>> parse_attitude("N45E 30NE")[2]
    'quadrant contradicts strike'
    """
    if text is None or not str(text).strip():
        return np.nan, np.nan, "missing text"
    cleaned = _clean(text)
    match = _AZIMUTH_PAIR.match(cleaned)
    if match:
        azimuth, strike_is_bearing = float(match["az"]), False
    else:
        match = _BEARING_PAIR.match(cleaned)
        if not match or float(match["angle"]) > 90.0:
            return np.nan, np.nan, f"unparsed text: '{text}'"
        azimuth = quadrant_bearing(match["from"], match["angle"], match["to"])
        strike_is_bearing = True
    dip = float(match["dip"])
    if not 0.0 <= azimuth <= 360.0:
        return np.nan, dip, "azimuth out of range"
    if not 0.0 <= dip <= 90.0:
        return np.nan, dip, "dip out of range"
    side = match["side"]
    if side:
        if side not in COMPASS:
            return np.nan, dip, f"unparsed text: '{text}' (dip quadrant {side})"
        dip_direction = float(dip_direction_from_quadrant(azimuth, COMPASS[side]))
        if np.isnan(dip_direction):
            return np.nan, dip, "quadrant contradicts strike"
        return dip_direction, dip, ""
    if bare_pair_is_strike:
        return float(dip_direction_from_strike(azimuth)), dip, ""
    if strike_is_bearing:
        return np.nan, dip, f"unparsed text: '{text}' (no dip quadrant)"
    return azimuth % 360.0, dip, ""


def parse_attitudes(texts, bare_pair_is_strike=False):
    """Arrays (dip direction, dip, reasons) for many written attitudes.

    >>> dd, dip, why = parse_attitudes(["008/12E", "s60w 40n", "??"])
    >>> dd.tolist(), dip.tolist(), why.tolist()
    ([98.0, 330.0, nan], [12.0, 40.0, nan], ['', '', "unparsed text: '??'"])
    """
    parsed = [
        parse_attitude(None if t is None else str(t), bool(bare_pair_is_strike)) for t in texts
    ]
    if not parsed:
        return np.empty(0), np.empty(0), np.empty(0, dtype=object)
    dip_direction, dip, reasons = zip(*parsed)
    return (
        np.array(dip_direction, dtype=float),
        np.array(dip, dtype=float),
        np.array(reasons, dtype=object),
    )
