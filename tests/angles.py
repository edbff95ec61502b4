"""Angles between orientations, for tests that compare them."""

import numpy as np


def axial_angle(trend_a, plunge_a, trend_b, plunge_b):
    """Angle (degrees) between two axial lines given as trend/plunge."""

    def vector(trend, plunge):
        t, p = np.radians(trend), np.radians(plunge)
        return np.array([np.sin(t) * np.cos(p), np.cos(t) * np.cos(p), -np.sin(p)])

    a, b = vector(trend_a, plunge_a), vector(trend_b, plunge_b)
    # atan2 of |a × b| and |a · b| keeps small angles exact (arccos does not).
    return np.degrees(np.arctan2(np.linalg.norm(np.cross(a, b)), abs(float(a @ b))))
