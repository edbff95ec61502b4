"""Apparent dip, exaggerated dip and their uncertainty."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from sectionwright.algorithms.core.apparent_dip import (
    apparent_dip,
    apparent_dip_sd,
    exaggerated_dip,
    line_angle,
)


def apparent_dip_from_beta(dip, beta):
    """α for a line at β to strike: the line azimuth is strike + β."""
    dip_direction = 90.0  # strike 0 (right-hand rule)
    alpha, _ = apparent_dip(np.atleast_1d(dip), np.atleast_1d(dip_direction), np.atleast_1d(beta))
    return float(alpha[0])


@pytest.mark.parametrize(
    "dip, beta, expected",
    [
        # Source: tan α = tan δ · sin β (J. B. Jukes, The South Staffordshire
        # Coalfield, Mem. Geol. Surv., 1859, appendix; D. M. Ragan, Structural
        # Geology, 4th ed., 2009, ch. 1, from memory). Expected values computed
        # from the formula to two decimals.
        (40.0, 88.0, 39.98),
        (25.0, 65.0, 22.91),
        (60.0, 30.0, 40.89),
        (10.0, 45.0, 7.11),
    ],
)
def test_worked_values_of_the_published_formula(dip, beta, expected):
    assert apparent_dip_from_beta(dip, beta) == pytest.approx(expected, abs=0.005)


def test_rounding_sin_88_is_the_classic_slip():
    # Common practice warning (REFERENCES.md): sin 88° rounded to 0.99 turns
    # 39.98° into 39.72°; the exact computation must not make that slip.
    slip = np.degrees(np.arctan(np.tan(np.radians(40.0)) * 0.99))
    assert slip == pytest.approx(39.72, abs=0.005)
    assert apparent_dip_from_beta(40.0, 88.0) - slip > 0.25


def cross_product_apparent_dip(dip, dip_direction, line_azimuth):
    """Independent method: the bedding plane's pole crossed with the pole of
    the vertical section plane gives their line of intersection, whose
    plunge is the apparent dip (vector method of intersecting planes,
    Ragan 2009, from memory)."""
    d, a, s = np.radians([dip, dip_direction, line_azimuth])
    pole = np.array([np.sin(d) * np.sin(a), np.sin(d) * np.cos(a), np.cos(d)])
    section_pole = np.array([np.cos(s), -np.sin(s), 0.0])
    line = np.cross(pole, section_pole)
    return np.degrees(np.arctan2(abs(line[2]), np.hypot(line[0], line[1])))


@settings(max_examples=300, deadline=None)
@given(st.floats(0.0, 89.9), st.floats(0.0, 360.0), st.floats(0.0, 360.0))
def test_matches_the_intersection_of_planes_by_cross_product(dip, dip_direction, azimuth):
    # Property-based (hypothesis) over random planes and lines.
    alpha, sense = apparent_dip(np.array([dip]), np.array([dip_direction]), np.array([azimuth]))
    assert alpha[0] == pytest.approx(
        cross_product_apparent_dip(dip, dip_direction, azimuth), abs=1e-7
    )
    # Common practice: the apparent dip never exceeds the true dip.
    assert alpha[0] <= dip + 1e-9
    # Sense: the bed goes down toward the end when the dip direction points
    # along the line (positive component).
    along = np.cos(np.radians(azimuth - dip_direction))
    if 1e-9 < alpha[0] < 90 and abs(along) > 1e-9:
        assert sense[0] == np.sign(along)


def test_rules_of_thumb():
    # Common practice (no single source): apparent = true dip across strike,
    # zero along strike unless vertical, and a line at 92° to strike is the
    # same as one at 88°.
    assert apparent_dip_from_beta(35.0, 90.0) == pytest.approx(35.0)
    assert apparent_dip_from_beta(35.0, 0.0) == pytest.approx(0.0, abs=1e-12)
    assert apparent_dip_from_beta(90.0, 0.0) == 90.0
    assert apparent_dip_from_beta(90.0, 37.0) == 90.0
    assert line_angle(np.array([0.0]), np.array([92.0]))[0] == pytest.approx(88.0)
    assert apparent_dip_from_beta(40.0, 92.0) == pytest.approx(apparent_dip_from_beta(40.0, 88.0))


def test_horizontal_and_vertical_have_no_sense():
    alpha, sense = apparent_dip(
        np.array([0.0, 90.0]), np.array([10.0, 10.0]), np.array([10.0, 10.0])
    )
    assert alpha.tolist() == [0.0, 90.0] and sense.tolist() == [0, 0]


@pytest.mark.parametrize("alpha, ve", [(10.0, 2.0), (30.0, 5.0), (45.0, 1.5), (2.0, 10.0)])
def test_exaggeration_multiplies_the_tangent_not_the_angle(alpha, ve):
    # Source: R. H. Groshong, 3-D Structural Geology, 2nd ed., 2006, ch. 6,
    # eqs. 6.1–6.5: tan δv = VE · tan δ.
    expected = np.degrees(np.arctan(ve * np.tan(np.radians(alpha))))
    assert exaggerated_dip(np.array([alpha]), ve)[0] == pytest.approx(expected, abs=1e-12)
    assert exaggerated_dip(np.array([alpha]), ve)[0] != pytest.approx(min(90.0, ve * alpha))


@settings(max_examples=200, deadline=None)
@given(st.floats(1.0, 85.0), st.floats(1.0, 89.0), st.floats(0.1, 5.0), st.floats(0.1, 10.0))
def test_uncertainty_is_first_order_propagation(dip, beta, dip_sd, strike_sd):
    # Source: first-order (linear) propagation of independent errors,
    # σ² = Σ (∂f/∂x_i · σ_i)² (J. R. Taylor, An Introduction to Error
    # Analysis, 2nd ed., 1997, ch. 3, from memory); partial derivatives
    # checked here by central finite differences of the formula itself.
    def alpha(d, b):
        return np.degrees(np.arctan(np.tan(np.radians(d)) * np.sin(np.radians(b))))

    h = 1e-5
    by_dip = (alpha(dip + h, beta) - alpha(dip - h, beta)) / (2 * h)
    by_beta = (alpha(dip, beta + h) - alpha(dip, beta - h)) / (2 * h)
    expected = np.hypot(by_dip * dip_sd, by_beta * strike_sd)
    assert apparent_dip_sd(dip, beta, dip_sd, strike_sd) == pytest.approx(expected, rel=1e-5)
