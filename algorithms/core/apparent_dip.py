"""Apparent dip of a plane in a vertical section.

tan α = tan δ · sin β, β the angle between strike and section line
(J. B. Jukes, *The South Staffordshire Coalfield*, 1859, appendix; D. M.
Ragan, *Structural Geology*, 2009, ch. 1). Evaluated in the robust form
α = atan2(sin δ · |sin β|, cos δ), with its sense from the sign of
cos(line azimuth − dip direction). Vertical exaggeration draws it at
tan α′ = VE · tan α (R. H. Groshong, *3-D Structural Geology*, 2006, ch. 6).
"""

import numpy as np

from .orientation import angle_between, strike_from_dip_direction

TOWARD_END, TOWARD_START = 1, -1


def line_angle(strike, line_azimuth):
    """Acute angle β (0–90) between a strike and a section line.

    >>> line_angle(np.array([30.0, 30.0, 30.0]), np.array([120.0, 210.0, 100.0]))
    array([90.,  0., 70.])
    """
    d = angle_between(strike, line_azimuth)
    return np.minimum(d, 180.0 - d)


def apparent_dip(dip, dip_direction, line_azimuth):
    """(α, sense): apparent dip (0–90) in a section of the given azimuth and
    the way it dips along the line (+1 toward the end, −1 toward the start,
    0 when horizontal or vertical).

    A vertical plane shows vertical in every section (also in the one
    section that contains it, where its trace is the whole section).

    >>> a, s = apparent_dip(np.array([40.0, 40.0]), np.array([120.0, 300.0]),
    ...                     np.array([120.0, 120.0]))
    >>> a.round(6).tolist(), s.tolist()
    ([40.0, 40.0], [1, -1])
    """
    dip = np.radians(np.asarray(dip, dtype=float))
    towards = np.cos(
        np.radians(np.asarray(line_azimuth, dtype=float) - np.asarray(dip_direction, dtype=float))
    )
    # cos(90°) is 6e-17 in floating point: a line along strike is exactly so.
    towards = np.where(np.abs(towards) < 1e-12, 0.0, towards)
    alpha = np.degrees(np.arctan2(np.sin(dip) * np.abs(towards), np.cos(dip)))
    alpha = np.where(np.isclose(np.degrees(dip), 90.0, rtol=0, atol=1e-12), 90.0, alpha)
    sense = np.where((alpha > 0) & (alpha < 90), np.sign(towards), 0).astype(int)
    return alpha, sense


def exaggerated_dip(alpha, exaggeration):
    """Angle at which a dip α is drawn at vertical exaggeration VE:
    tan α′ = VE · tan α (not VE · α).

    >>> exaggerated_dip(np.array([10.0, 0.0, 90.0]), 2.0).round(3).tolist()
    [19.425, 0.0, 90.0]
    """
    alpha = np.radians(np.asarray(alpha, dtype=float))
    return np.degrees(np.arctan2(exaggeration * np.sin(alpha), np.cos(alpha)))


def apparent_dip_sd(dip, beta, dip_sd, strike_sd):
    """One standard deviation of the apparent dip, by first-order (linear)
    propagation of the dip and strike uncertainties (degrees) through
    tan α = tan δ · sin β, the two terms added in quadrature. A strike error
    moves β by the same angle (the line is fixed).

    ∂α/∂δ = sin β / (cos²δ + sin²δ sin²β),
    ∂α/∂β = sin δ cos δ cos β / (cos²δ + sin²δ sin²β).

    >>> round(float(apparent_dip_sd(40.0, 90.0, 2.0, 5.0)), 9)   # perpendicular: δ's sd
    2.0
    """
    d = np.radians(np.asarray(dip, dtype=float))
    b = np.radians(np.asarray(beta, dtype=float))
    denominator = np.cos(d) ** 2 + (np.sin(d) * np.sin(b)) ** 2
    with np.errstate(invalid="ignore", divide="ignore"):
        by_dip = np.sin(b) / denominator
        by_strike = np.sin(d) * np.cos(d) * np.cos(b) / denominator
    return np.hypot(by_dip * dip_sd, by_strike * strike_sd)


def section_attitude(dip, dip_direction, line_azimuth, exaggeration):
    """Everything a section needs of a plane, as a dict of arrays: strike,
    line_angle, app_dip, sense, plot_dip."""
    strike = strike_from_dip_direction(dip_direction)
    alpha, sense = apparent_dip(dip, dip_direction, line_azimuth)
    return {
        "strike": strike,
        "line_angle": line_angle(strike, line_azimuth),
        "app_dip": alpha,
        "sense": sense,
        "plot_dip": exaggerated_dip(alpha, exaggeration),
    }
