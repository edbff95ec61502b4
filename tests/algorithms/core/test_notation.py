"""Attitudes as geologists write them, under every convention."""

import numpy as np
import pytest

from sectionwright.algorithms.core.attitudes import (
    DIP_DIRECTION,
    STRIKE_QUADRANT,
    STRIKE_RHR,
    TEXT_AS_DIP_DIRECTION,
    TEXT_AS_STRIKE,
    read_attitudes,
)
from sectionwright.algorithms.core.notation import parse_attitude, quadrant_bearing
from sectionwright.algorithms.core.orientation import strike_from_dip_direction


@pytest.mark.parametrize(
    "start, angle, end, azimuth",
    [
        # Source: quadrant bearings NxE = x, NxW = 360 − x, SxE = 180 − x,
        # SxW = 180 + x (REFERENCES.md, orientation notation).
        ("N", 30, "E", 30.0),
        ("N", 30, "W", 330.0),
        ("S", 30, "E", 150.0),
        ("S", 30, "W", 210.0),
        ("N", 0, "E", 0.0),
        ("S", 90, "W", 270.0),
    ],
)
def test_quadrant_bearings(start, angle, end, azimuth):
    assert quadrant_bearing(start, angle, end) == azimuth


@pytest.mark.parametrize(
    "text, dip_direction, dip",
    [
        ("120/40", 120.0, 40.0),
        ("30/40SE", 120.0, 40.0),
        ("030/40SE", 120.0, 40.0),
        ("210/40SE", 120.0, 40.0),  # strike written the other way
        ("N30E 40SE", 120.0, 40.0),
        ("N30E/40SE", 120.0, 40.0),
        ("S60W 40N", 330.0, 40.0),
        ("n30e 40se", 120.0, 40.0),
        ("  N 30 E ,  40 SE ", 120.0, 40.0),
        ("120°/40°", 120.0, 40.0),
        ("005/07", 5.0, 7.0),
        ("360/10", 0.0, 10.0),
        ("95.5/12.5", 95.5, 12.5),
        # Source: A. L. Coe (ed.), Geological Field Techniques, 2010: notebook
        # form "008/12E" = strike 008, dip 12 toward the east (confirmed).
        ("008/12E", 98.0, 12.0),
    ],
)
def test_forms_geologists_write(text, dip_direction, dip):
    assert parse_attitude(text) == (dip_direction, dip, "")


def test_bare_pairs_as_strike_use_the_right_hand_rule():
    # Source: right-hand rule, dip direction = strike + 90 (CGI/GeoSciML
    # vocabulary "strike dip right hand rule", confirmed).
    assert parse_attitude("120/40", True) == (210.0, 40.0, "")
    assert parse_attitude("N30E 40", True) == (120.0, 40.0, "")
    assert parse_attitude("N30E 40SE", True) == (120.0, 40.0, "")


@pytest.mark.parametrize(
    "text, reason",
    [
        ("N45E 30NE", "quadrant contradicts strike"),  # REFERENCES.md: reject, do not guess
        ("120/40SE", "quadrant contradicts strike"),
        ("120/95", "dip out of range"),
        ("400/40", "azimuth out of range"),
        ("N95E 40S", "unparsed text: 'N95E 40S'"),
        ("see sketch p. 41", "unparsed text: 'see sketch p. 41'"),
        ("N30E 40", "unparsed text: 'N30E 40' (no dip quadrant)"),
        ("30/40XY", "unparsed text: '30/40XY'"),
        ("", "missing text"),
        (None, "missing text"),
    ],
)
def test_unreadable_text_is_rejected_with_its_reason(text, reason):
    dip_direction, _, why = parse_attitude(text)
    assert np.isnan(dip_direction) and why == reason


def test_every_convention_gives_the_same_plane():
    # One plane, dip direction 120, dip 40, written five ways.
    cases = [
        (DIP_DIRECTION, dict(azimuth=[120], dip=[40])),
        (STRIKE_RHR, dict(azimuth=[30], dip=[40])),
        (STRIKE_QUADRANT, dict(azimuth=[210], dip=[40], quadrant=["SE"])),
        (TEXT_AS_DIP_DIRECTION, dict(text=["120/40"])),
        (TEXT_AS_STRIKE, dict(text=["030/40"])),
    ]
    for convention, values in cases:
        dip_direction, dip, reasons = read_attitudes(convention, **values)
        assert (dip_direction[0], dip[0], reasons[0]) == (120.0, 40.0, ""), convention
    assert strike_from_dip_direction(np.array([120.0]))[0] == 30.0


def test_bad_numeric_values_are_reasons_not_guesses():
    dip_direction, dip, reasons = read_attitudes(
        DIP_DIRECTION,
        azimuth=[120, None, "abc", -10, 400, 120, 120, 360],
        dip=[95, 40, 40, 40, 40, None, "steep", 0],
    )
    assert reasons.tolist() == [
        "dip out of range",
        "missing azimuth",
        "non-numeric azimuth: 'abc'",
        "azimuth out of range",
        "azimuth out of range",
        "missing dip",
        "non-numeric dip: 'steep'",
        "",
    ]
    assert np.isnan(dip_direction[:7]).all() and dip_direction[7] == 0.0


def test_quadrant_convention_problems():
    _, _, reasons = read_attitudes(
        STRIKE_QUADRANT, azimuth=[45, 30, 30], dip=[30, 40, 40], quadrant=["NE", "XX", ""]
    )
    assert reasons.tolist() == [
        "quadrant contradicts strike",
        "unknown dip quadrant: 'XX'",
        "missing quadrant",
    ]
